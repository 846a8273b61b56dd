package render

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// clusterSize is how many consecutive triangles of a mesh share one coneCluster.
const clusterSize = 16

// coneCluster bounds clusterSize consecutive triangles of a mesh: a ball that holds them and a
// cone that holds their normals. When the eye sees every normal of the cone from behind, with
// a margin, every triangle faces away and culling skips the cluster without looking at its
// triangles: about four in ten triangles of a canal seen from the side.
type coneCluster struct {
	centre     mgl64.Vec3
	radius     float64
	axis       mgl64.Vec3
	cosB, sinB float64 // the cone's half-angle plus coneMargin; cosB <= 0: never skipped
}

// coneMargin widens every cone, so a triangle nearly edge-on, whose facing the rounding of its
// screen corners could still flip, is never in a skipped cluster.
const coneMargin = 5 * math.Pi / 180

// buildClusters returns the clusters of m's triangles, in order.
func buildClusters(m *mesh.Mesh) []coneCluster {
	out := make([]coneCluster, (len(m.Triangles)+clusterSize-1)/clusterSize)
	nv := uint32(len(m.Vertices))
	var normals [clusterSize]mgl64.Vec3
	for ci := range out {
		t0 := ci * clusterSize
		t1 := min(t0+clusterSize, len(m.Triangles))
		cl := &out[ci]
		lo := mgl64.Vec3{math.Inf(1), math.Inf(1), math.Inf(1)}
		hi := lo.Mul(-1)
		var sum mgl64.Vec3
		ok := true
		for t := t0; t < t1; t++ {
			tri := &m.Triangles[t]
			if uint32(tri[0]) >= nv || uint32(tri[1]) >= nv || uint32(tri[2]) >= nv {
				ok = false
				break
			}
			a, b, c := &m.Vertices[tri[0]], &m.Vertices[tri[1]], &m.Vertices[tri[2]]
			ux, uy, uz := b[0]-a[0], b[1]-a[1], b[2]-a[2]
			vx, vy, vz := c[0]-a[0], c[1]-a[1], c[2]-a[2]
			nx, ny, nz := uy*vz-uz*vy, uz*vx-ux*vz, ux*vy-uy*vx
			l := math.Sqrt(nx*nx + ny*ny + nz*nz)
			if !(l > 0) || math.IsInf(l, 0) {
				ok = false // degenerate: its facing is decided by rounding alone
				break
			}
			n := mgl64.Vec3{nx / l, ny / l, nz / l}
			normals[t-t0] = n
			sum[0], sum[1], sum[2] = sum[0]+n[0], sum[1]+n[1], sum[2]+n[2]
			for k := 0; k < 3; k++ { // the coordinates are finite (n is): plain comparisons
				lo[k] = min4(lo[k], a[k], b[k], c[k])
				hi[k] = max4(hi[k], a[k], b[k], c[k])
			}
		}
		if l := sum.Len(); !ok || !(l > 1e-9) {
			continue // cosB = 0: never skipped
		}
		cl.axis = sum.Normalize()
		minDot := 1.0
		for _, n := range normals[:t1-t0] {
			minDot = math.Min(minDot, n.Dot(cl.axis))
		}
		beta := math.Acos(math.Max(-1, math.Min(1, minDot))) + coneMargin
		if beta >= math.Pi/2 {
			continue
		}
		cl.cosB, cl.sinB = math.Cos(beta), math.Sin(beta)
		cl.centre = lo.Add(hi).Mul(0.5)
		cl.radius = hi.Sub(lo).Len()*0.5*(1+1e-9) + 1e-12
	}
	return out
}

// awayMask has bit j set when every triangle of cluster j of cls (at most 64) faces away from
// eye: for any point p of the ball and normal n of the cone, (p - eye).n >= |d| cos(theta +
// beta) - radius > 0, with d the centre seen from the eye and theta its angle to the axis
// (both under 90 degrees).
//
// It is written out in scalars and without branches: vector values copied through the stack,
// and a branch mispredicted every few clusters, each cost this loop more than its arithmetic.
// No test of the sign of along or of cosB is needed: a cluster that is never skipped has cosB
// = sinB = radius = 0, so the left side is 0 (or NaN), not above 0; and along <= 0 with cosB
// >= 0 makes the left side <= 0 < radius. Both give false, as they should.
func awayMask(cls []coneCluster, eye mgl64.Vec3) uint64 {
	var mask uint64
	for j := range cls {
		cl := &cls[j]
		dx, dy, dz := cl.centre[0]-eye[0], cl.centre[1]-eye[1], cl.centre[2]-eye[2]
		along := dx*cl.axis[0] + dy*cl.axis[1] + dz*cl.axis[2]
		across2 := max(dx*dx+dy*dy+dz*dz-along*along, 0)
		var bit uint64
		if along*cl.cosB-math.Sqrt(across2)*cl.sinB > cl.radius {
			bit = 1
		}
		mask |= bit << j
	}
	return mask
}

// min4 and max4 are min and max of finite numbers, without the builtins' care for NaN.
func min4(a, b, c, d float64) float64 {
	if b < a {
		a = b
	}
	if c < a {
		a = c
	}
	if d < a {
		a = d
	}
	return a
}

func max4(a, b, c, d float64) float64 {
	if b > a {
		a = b
	}
	if c > a {
		a = c
	}
	if d > a {
		a = d
	}
	return a
}
