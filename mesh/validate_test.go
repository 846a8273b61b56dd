package mesh

import (
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// Euler's formula V - E + F = 2 for a closed genus-0 surface, and E = 3F/2 when every edge
// joins two triangles: the counts of a capped cylinder follow from these.
func TestValidateClosedCylinder(t *testing.T) {
	seg, rings := 24, 5
	m := shapeCylinder(1, 3, seg, rings)
	r := Validate(m)
	f := len(m.Triangles)
	if r.Vertices-3*f/2+f != 2 {
		t.Errorf("Euler characteristic %d, want 2", r.Vertices-3*f/2+f)
	}
	if !r.Closed || !r.Manifold || r.BoundaryEdges != 0 || r.NonManifoldEdges != 0 || r.InconsistentOrientation != 0 || r.Shells != 1 || r.Degenerate != 0 {
		t.Errorf("clean cylinder: %+v", r)
	}
	if w := r.Warnings(); len(w) != 0 {
		t.Errorf("clean cylinder warnings: %q", w)
	}
}

func TestValidateProblems(t *testing.T) {
	// A hole: removing one triangle frees its three edges.
	m := shapeCylinder(1, 3, 24, 5)
	m.Triangles = m.Triangles[1:]
	if r := Validate(m); r.BoundaryEdges != 3 || r.Closed {
		t.Errorf("hole: %+v", r)
	}
	// One flipped triangle: its three edges are run the same way by both neighbours.
	m = shapeCylinder(1, 3, 24, 5)
	tr := m.Triangles[10]
	m.Triangles[10] = [3]int32{tr[0], tr[2], tr[1]}
	if r := Validate(m); r.InconsistentOrientation != 3 || !r.Closed {
		t.Errorf("flipped: %+v", r)
	}
	// A fin: a third triangle on an edge of a closed surface makes it non-manifold and adds
	// two free edges.
	m = shapeCylinder(1, 3, 24, 5)
	e := m.Triangles[0]
	m.Vertices = append(m.Vertices, mgl64.Vec3{5, 5, 5})
	m.Triangles = append(m.Triangles, [3]int32{e[0], e[1], int32(len(m.Vertices) - 1)})
	if r := Validate(m); r.NonManifoldEdges != 1 || r.BoundaryEdges != 2 || r.Manifold {
		t.Errorf("fin: %+v", r)
	}
	// Degenerate: repeated index, zero area, out-of-range index.
	m = shapeCylinder(1, 3, 24, 5)
	m.Triangles = append(m.Triangles, [3]int32{1, 1, 2}, [3]int32{0, 0, 0}, [3]int32{0, 1, 99999})
	if r := Validate(m); r.Degenerate != 3 {
		t.Errorf("degenerate: %+v", r)
	}
	w := Validate(m).Warnings()
	if len(w) == 0 || !strings.Contains(strings.Join(w, "\n"), "3 triangles") {
		t.Errorf("degenerate warnings: %q", w)
	}
}

func TestShellsAndLargest(t *testing.T) {
	small := shapeMove(shapeCylinder(0.5, 1, 8, 1), mgl64.Vec3{9, 0, 0})
	big := shapeCylinder(1, 3, 24, 5)
	tiny := shapeMove(shapeCylinder(0.2, 1, 8, 1), mgl64.Vec3{-9, 0, 0}) // same size as small
	m := shapeMerge(small, big, tiny)
	sh := Shells(m)
	if len(sh) != 3 || len(sh[0]) != len(big.Triangles) || len(sh[1]) != len(small.Triangles) || len(sh[2]) != len(tiny.Triangles) {
		t.Fatalf("shell sizes wrong: %d shells", len(sh))
	}
	// Largest first; the tie between small and tiny goes to small, whose first triangle is first.
	if sh[0][0] != int32(len(small.Triangles)) || sh[1][0] != 0 {
		t.Errorf("shell order: first triangles %d, %d", sh[0][0], sh[1][0])
	}
	if r := Validate(m); r.Shells != 3 || !strings.Contains(strings.Join(r.Warnings(), "\n"), "3 separate surfaces") {
		t.Errorf("report %+v warnings %q", r, r.Warnings())
	}
	l := LargestShell(m)
	if len(l.Vertices) != len(big.Vertices) || len(l.Triangles) != len(big.Triangles) {
		t.Fatalf("largest shell %d/%d, want %d/%d", len(l.Vertices), len(l.Triangles), len(big.Vertices), len(big.Triangles))
	}
	// Subset keeps vertex order, so the big cylinder comes back exactly.
	for i := range l.Triangles {
		if l.Triangles[i] != big.Triangles[i] {
			t.Fatalf("triangle %d: %v want %v", i, l.Triangles[i], big.Triangles[i])
		}
	}
	for i := range l.Vertices {
		if l.Vertices[i] != big.Vertices[i] {
			t.Fatalf("vertex %d moved", i)
		}
	}
	if e := LargestShell(&Mesh{}); len(e.Triangles) != 0 {
		t.Error("empty mesh")
	}
}
