package models

import (
	"math"

	"tapersweep/mesh"

	"github.com/go-gl/mathgl/mgl64"
)

// maxCanalMeshVertices bounds Mesh; a finer ds is widened to fit.
const maxCanalMeshVertices = 20_000_000

// Mesh returns the canal's wall as a closed, capped, outward-facing mesh with shared
// vertices: rings at steps no longer than ds along the exact centerline, `around` vertices
// per ring (clamped to 3..4096; ds widens if the mesh would pass 20 M vertices). An oval section is an ellipse with semi-axes
// r*sqrt(oval) along the transported long axis and r/sqrt(oval) across it, so its area
// equals that of the nominal circle of radius r = Diameter(s)/2.
func (c *CanalSpec) Mesh(ds float64, around int) *mesh.Mesh {
	g := c.geometry()
	if len(g.pieces) == 0 {
		return &mesh.Mesh{}
	}
	around = min(max(around, 3), 4096)
	s := canalStations(g.length, ds)
	if len(s)*around > maxCanalMeshVertices { // widen ds rather than exhaust memory
		s = canalStations(g.length, g.length*float64(around)/maxCanalMeshVertices)
	}
	centers := make([]mgl64.Vec3, len(s))
	n1 := make([]mgl64.Vec3, len(s))
	n2 := make([]mgl64.Vec3, len(s))
	for i, si := range s {
		pc, u := g.pieceAt(si)
		p, t, long := pc.frameAt(u)
		centers[i], n1[i], n2[i] = p, long, t.Cross(long)
	}
	radius := func(i int, theta float64) float64 {
		sin, cos := math.Sincos(theta)
		return ovalRadius(c.Diameter(s[i])/2, c.Oval, cos, sin)
	}
	return mesh.SweepTube(centers, n1, n2, radius, around, true, true)
}

// ovalRadius is the polar radius of the ellipse of area pi r^2 whose long over short axis is
// oval (0 or 1 = round), in the direction (cos, sin) of an angle from its long axis.
func ovalRadius(r, oval, cos, sin float64) float64 {
	if oval <= 1 {
		return r
	}
	a, b := math.Sqrt(oval), 1/math.Sqrt(oval)
	return r / math.Sqrt(cos*cos/(a*a)+sin*sin/(b*b))
}
