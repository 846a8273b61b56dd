package mesh

import (
	"math"
	"testing"
)

// Joined meshes keep their surfaces apart: two tetrahedra give two shells of 4 faces, and the
// joined volume is the sum (divergence theorem on each closed surface: 1/6 each).
func TestJoinKeepsSurfaces(t *testing.T) {
	a := fuzzTetra()
	b := fuzzTetra()
	for i := range b.Vertices {
		b.Vertices[i][0] += 5
	}
	j := Join(a, nil, b)
	if len(j.Triangles) != 8 || len(j.Vertices) != 8 {
		t.Fatalf("%d triangles, %d vertices", len(j.Triangles), len(j.Vertices))
	}
	if s := Shells(j); len(s) != 2 {
		t.Errorf("%d shells", len(s))
	}
	if v, want := Volume(j), Volume(a)+Volume(b); math.Abs(v-want) > 1e-12 {
		t.Errorf("volume %g, want %g", v, want)
	}
}
