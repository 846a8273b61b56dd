package mesh

import "github.com/go-gl/mathgl/mgl64"

// ClosestOnTriangle is the point of triangle abc nearest p (the same test the BVH's closest-
// point queries make per triangle). A point of one known triangle of a surface bounds the
// distance to the surface from above without a search.
func ClosestOnTriangle(p, a, b, c mgl64.Vec3) mgl64.Vec3 { return closestOnTriangle(p, a, b, c) }
