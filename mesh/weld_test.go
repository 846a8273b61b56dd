package mesh

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// Welding an indexed mesh's own soup must give the mesh back: same vertex count, same
// positions triangle by triangle (an exact check by construction of the soup).
func TestWeldRecoversIndexedMesh(t *testing.T) {
	src := shapeTorusSection(4, 0.5, 1, 20, 10)
	for _, tol := range []float64{0, 1e-9, 1e-4} {
		m := Weld(shapeSoup(src), tol)
		if len(m.Vertices) != len(src.Vertices) || len(m.Triangles) != len(src.Triangles) {
			t.Fatalf("tol %g: %d vertices %d triangles, want %d %d", tol, len(m.Vertices), len(m.Triangles), len(src.Vertices), len(src.Triangles))
		}
		for i := range m.Triangles {
			a, b, c := m.Corners(i)
			p, q, r := src.Corners(i)
			if a != p || b != q || c != r {
				t.Fatalf("tol %g: triangle %d moved", tol, i)
			}
		}
		// First-appearance numbering: each new index is one more than the largest so far.
		next := int32(0)
		for _, tr := range m.Triangles {
			for _, v := range tr {
				if v > next {
					t.Fatalf("tol %g: index %d appears before %d", tol, v, next)
				}
				if v == next {
					next++
				}
			}
		}
	}
}

// Clusters of points spread less than tol/2, centres at least 3 tol apart, many straddling
// grid-cell borders: every cluster must become exactly one vertex (brute-force reference:
// pairwise distances decide which points are the same).
func TestWeldToleranceNearCellBorders(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	const tol = 0.01
	cell := weldCellTols * tol // the grid the welder uses; points are put right at its borders
	var pts []mgl64.Vec3
	var cluster []int
	nClusters := 300
	for c := 0; c < nClusters; c++ {
		// A distinct grid position per cluster, on cell borders unless nudged inside.
		centre := mgl64.Vec3{float64(c%7) * 3 * cell, float64(c/7%7) * 3 * cell, float64(c/49) * 3 * cell}
		for k := 0; k < 3; k++ {
			if rng.IntN(3) == 0 {
				centre[k] += 5 * tol
			}
		}
		for i := 0; i < 6; i++ {
			jit := mgl64.Vec3{rng.Float64() - 0.5, rng.Float64() - 0.5, rng.Float64() - 0.5}.Mul(tol / 2 / math.Sqrt(3))
			pts = append(pts, centre.Add(jit))
			cluster = append(cluster, c)
		}
	}
	m := Weld(pts, tol)
	if len(m.Vertices) != nClusters {
		t.Fatalf("%d vertices, want %d clusters", len(m.Vertices), nClusters)
	}
	flat := make([]int32, 0, len(pts))
	for _, tr := range m.Triangles {
		flat = append(flat, tr[:]...)
	}
	first := map[int]int32{}
	for i, c := range cluster {
		if v, ok := first[c]; !ok {
			first[c] = flat[i]
		} else if v != flat[i] {
			t.Fatalf("point %d of cluster %d went to vertex %d, not %d", i, c, flat[i], v)
		}
	}
	// Just beyond tol apart stays apart, just within merges, across a cell border.
	b := cell * 7
	pair := func(d float64) int {
		return len(Weld([]mgl64.Vec3{{b - d/2, 0, 0}, {b + d/2, 0, 0}, {9, 9, 9}}, tol).Vertices)
	}
	if pair(0.99*tol) != 2 || pair(1.01*tol) != 3 {
		t.Errorf("merge at 0.99 tol: %d vertices (want 2); at 1.01 tol: %d (want 3)", pair(0.99*tol), pair(1.01*tol))
	}
}

// The result depends only on input order: welding twice gives identical meshes.
func TestWeldDeterministic(t *testing.T) {
	soup := shapeSoup(shapeCanalLike(32, 40))
	rng := rand.New(rand.NewPCG(3, 4))
	for i := range soup {
		soup[i] = soup[i].Add(mgl64.Vec3{rng.Float64(), rng.Float64(), rng.Float64()}.Mul(1e-7))
	}
	a, b := Weld(soup, 1e-5), Weld(soup, 1e-5)
	if len(a.Vertices) != len(b.Vertices) {
		t.Fatal("vertex counts differ")
	}
	for i := range a.Vertices {
		if a.Vertices[i] != b.Vertices[i] {
			t.Fatal("vertices differ")
		}
	}
	for i := range a.Triangles {
		if a.Triangles[i] != b.Triangles[i] {
			t.Fatal("triangles differ")
		}
	}
	if r := Validate(a); !r.Closed || r.Shells != 1 {
		t.Errorf("jittered soup welded to %+v", r)
	}
}

func TestWeldOddInput(t *testing.T) {
	if m := Weld(nil, 0.1); len(m.Vertices) != 0 || len(m.Triangles) != 0 {
		t.Error("empty input")
	}
	nan := mgl64.Vec3{math.NaN(), 0, 0}
	m := Weld([]mgl64.Vec3{nan, nan, {1, 2, 3}, {1, 2, 3}}, 0.1)
	if len(m.Triangles) != 1 || len(m.Vertices) != 3 {
		t.Errorf("NaN corners must stay apart and the extra corner be ignored: %+v", m)
	}
	huge := []mgl64.Vec3{{1e300, 0, 0}, {1e300, 0, 0}, {-1e300, 1, 1}}
	if m := Weld(huge, 1e-9); len(m.Vertices) != 2 {
		t.Errorf("huge coordinates: %d vertices, want 2", len(m.Vertices))
	}
}

// A position seen again long after its first corner (far beyond any cache of recent
// positions) joins the first corner's vertex; so does a third copy that follows the second.
func TestWeldRepeatFarApart(t *testing.T) {
	var soup []mgl64.Vec3
	p := mgl64.Vec3{0.5, 0.25, 0.125}
	soup = append(soup, p, mgl64.Vec3{9, 9, 9}, mgl64.Vec3{9, 9, 8})
	for i := range 60000 {
		soup = append(soup, mgl64.Vec3{float64(i), 1, 2}, mgl64.Vec3{float64(i), 3, 2}, mgl64.Vec3{float64(i), 1, 5})
	}
	soup = append(soup, mgl64.Vec3{7, 7, 7}, p, p)
	m := Weld(soup, 0)
	last := m.Triangles[len(m.Triangles)-1]
	if last[1] != m.Triangles[0][0] || last[2] != m.Triangles[0][0] {
		t.Errorf("the repeats of the first position got vertices %d and %d, the first %d", last[1], last[2], m.Triangles[0][0])
	}
	if len(m.Vertices) != 3+3*60000+1 {
		t.Errorf("%d vertices", len(m.Vertices))
	}
}

// The weld does not depend on triangle order beyond numbering: the same surface with its
// triangles shuffled gives the same vertex positions and the same triangles (by position).
func TestWeldOrderIndependent(t *testing.T) {
	src := shapeCanalLike(64, 80)
	soup := shapeSoup(src)
	nt := len(soup) / 3
	perm := rand.New(rand.NewPCG(8, 9)).Perm(nt)
	shuffled := make([]mgl64.Vec3, 0, len(soup))
	for _, t := range perm {
		shuffled = append(shuffled, soup[3*t:3*t+3]...)
	}
	a, b := weld(soup, 0, weldRelTol), weld(shuffled, 0, weldRelTol)
	if len(a.Vertices) != len(b.Vertices) || len(a.Vertices) != len(src.Vertices) {
		t.Fatalf("%d and %d vertices, the surface has %d", len(a.Vertices), len(b.Vertices), len(src.Vertices))
	}
	for k, t0 := range perm {
		for c := range 3 {
			if a.Vertices[a.Triangles[t0][c]] != b.Vertices[b.Triangles[k][c]] {
				t.Fatalf("triangle %d corner %d differs", t0, c)
			}
		}
	}
}
