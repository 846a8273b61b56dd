package analysis

import (
	"context"
	"math"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// TestBranchLeftOutIsReported: a canal with a lateral canal joined to it (the union of two
// voxelised tubes, its surface extracted) is measured along the main canal, and the branch is
// named in the warnings (DEVELOPERS.md, "How the centerline is found": a branch left out is reported).
func TestBranchLeftOutIsReported(t *testing.T) {
	main := specJSON(t, `{"kind":"straight","length":14}`, 1.0, 0.4, 0).Mesh(0.1, 48)
	side := specJSON(t, `{"kind":"straight","length":4}`, 0.35, 0.3, 0).Mesh(0.1, 32)
	// Turn the side canal to leave the main one sideways at 7 mm from the orifice.
	for i, v := range side.Vertices {
		side.Vertices[i] = mgl64.Vec3{-v[2], v[1], v[0] - 7}
	}
	h := 0.04
	lo, hi := main.Bounds()
	slo, shi := side.Bounds()
	for k := 0; k < 3; k++ {
		lo[k], hi[k] = math.Min(lo[k], slo[k]), math.Max(hi[k], shi[k])
	}
	// One grid for both: voxelise each on the union's box.
	ga, err := mesh.Voxelize(withBox(main, lo, hi), h, 2, 0)
	if err != nil {
		t.Fatal(err)
	}
	gb, err := mesh.Voxelize(withBox(side, lo, hi), h, 2, 0)
	if err != nil {
		t.Fatal(err)
	}
	if ga.NX != gb.NX || ga.NY != gb.NY || ga.NZ != gb.NZ || ga.Origin != gb.Origin {
		t.Fatalf("grids differ: %v %v", ga.Origin, gb.Origin)
	}
	for i := range ga.Inside {
		ga.Inside[i] = ga.Inside[i] || gb.Inside[i]
	}
	branched := mesh.ExtractSurface(ga)
	c, err := NewCanal(context.Background(), "branched", branched, CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if L := c.Line.Length(); math.Abs(L-14) > 0.3 {
		t.Errorf("the centerline runs %.2f mm, want the main canal's 14", L)
	}
	t.Logf("warnings: %q", c.Warnings)
	found := false
	for _, w := range c.Warnings {
		found = found || strings.Contains(w, "branch")
	}
	if !found {
		t.Errorf("no warning names the branch: %q", c.Warnings)
	}
}

// withBox adds a degenerate triangle at each of two corners of the box, so that meshes of
// different extents voxelise onto the same grid; degenerate triangles add no crossings.
func withBox(m *mesh.Mesh, lo, hi mgl64.Vec3) *mesh.Mesh {
	out := &mesh.Mesh{Vertices: append(append([]mgl64.Vec3(nil), m.Vertices...), lo, hi), Triangles: m.Triangles}
	n := int32(len(m.Vertices))
	out.Triangles = append(append([][3]int32(nil), m.Triangles...), [3]int32{n, n, n}, [3]int32{n + 1, n + 1, n + 1})
	return out
}
