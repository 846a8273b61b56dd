package mesh

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// SweepTube builds a tube around a polyline. Ring i holds `around` vertices
//
//	centers[i] + radius(i, theta) * (cos(theta) n1[i] + sin(theta) n2[i]),  theta = 2 pi j / around,
//
// and neighbouring rings are joined by quads split in two. Triangles face outward whichever
// way n1, n2 turn about the direction of travel. A cap is a fan from the ring to a centre
// vertex at centers[0] or centers[last]; with both caps the mesh is closed and manifold.
// Fewer than two rings, fewer than three vertices per ring, or frame slices shorter than
// centers give an empty mesh.
func SweepTube(centers []mgl64.Vec3, n1, n2 []mgl64.Vec3, radius func(i int, theta float64) float64,
	around int, capStart, capEnd bool) *Mesh {
	rings := len(centers)
	if rings < 2 || around < 3 || len(n1) < rings || len(n2) < rings || radius == nil {
		return &Mesh{}
	}
	nv := rings * around
	if capStart {
		nv++
	}
	if capEnd {
		nv++
	}
	m := &Mesh{
		Vertices:  make([]mgl64.Vec3, 0, nv),
		Triangles: make([][3]int32, 0, 2*(rings-1)*around+2*around),
	}
	cosT := make([]float64, around)
	sinT := make([]float64, around)
	thetas := make([]float64, around)
	for j := range around {
		thetas[j] = 2 * math.Pi * float64(j) / float64(around)
		sinT[j], cosT[j] = math.Sincos(thetas[j])
	}
	for i, c := range centers {
		for j := range around {
			r := radius(i, thetas[j])
			dir := n1[i].Mul(cosT[j]).Add(n2[i].Mul(sinT[j]))
			m.Vertices = append(m.Vertices, c.Add(dir.Mul(r)))
		}
	}

	// With n1 x n2 along the travel direction, (j, j+1, next ring) turns outward.
	// Decide once for the whole tube so a frame that flips at one ring cannot tear it.
	handed := 0.0
	for i := range rings {
		var t mgl64.Vec3
		switch {
		case i+1 < rings:
			t = centers[i+1].Sub(centers[i])
		default:
			t = centers[i].Sub(centers[i-1])
		}
		handed += n1[i].Cross(n2[i]).Dot(t)
	}
	flip := handed < 0

	at := func(i, j int) int32 { return int32(i*around + j%around) }
	add := func(a, b, c int32) {
		if flip {
			b, c = c, b
		}
		m.Triangles = append(m.Triangles, [3]int32{a, b, c})
	}
	for i := 0; i+1 < rings; i++ {
		for j := range around {
			a, b := at(i, j), at(i, j+1)
			c, d := at(i+1, j+1), at(i+1, j)
			add(a, b, c)
			add(a, c, d)
		}
	}
	if capStart {
		centre := int32(len(m.Vertices))
		m.Vertices = append(m.Vertices, centers[0])
		for j := range around {
			add(centre, at(0, j+1), at(0, j))
		}
	}
	if capEnd {
		centre := int32(len(m.Vertices))
		m.Vertices = append(m.Vertices, centers[rings-1])
		for j := range around {
			add(centre, at(rings-1, j), at(rings-1, j+1))
		}
	}
	return m
}
