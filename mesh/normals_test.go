package mesh

import (
	"math"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

func TestFaceNormal(t *testing.T) {
	m := &Mesh{Vertices: []mgl64.Vec3{{0, 0, 0}, {2, 0, 0}, {0, 3, 0}, {1, 1, 0}}, Triangles: [][3]int32{{0, 1, 2}, {0, 2, 1}, {0, 1, 1}}}
	// Right-hand rule: x then y gives +z.
	if n := FaceNormal(m, 0); n != (mgl64.Vec3{0, 0, 1}) {
		t.Errorf("normal %v, want +z", n)
	}
	if n := FaceNormal(m, 1); n != (mgl64.Vec3{0, 0, -1}) {
		t.Errorf("reversed normal %v, want -z", n)
	}
	if n := FaceNormal(m, 2); n != (mgl64.Vec3{}) {
		t.Errorf("degenerate normal %v, want zero", n)
	}
}

// On a sphere the surface normal is the radial direction (analytic geometry); the
// area-weighted vertex normals of a UV sphere on a 2.8-degree grid must agree within 0.6 degree (0.47 seen; the error is first order in the grid step)
// and unit length.
func TestVertexNormalsSphere(t *testing.T) {
	m := shapeUVSphere(2, 128, 64)
	ns := VertexNormals(m)
	worst := 0.0
	for i, n := range ns {
		if math.Abs(n.Len()-1) > 1e-12 {
			t.Fatalf("normal %d not unit: %v", i, n)
		}
		radial := m.Vertices[i].Normalize()
		worst = math.Max(worst, math.Acos(math.Min(1, n.Dot(radial))))
	}
	if deg := worst * 180 / math.Pi; deg > 0.6 {
		t.Errorf("worst vertex normal off radial by %.3f deg", deg)
	}
	// Every face normal faces out (positive dot with its centroid).
	for f := range m.Triangles {
		a, b, c := m.Corners(f)
		if FaceNormal(m, f).Dot(a.Add(b).Add(c)) <= 0 {
			t.Fatalf("face %d faces in", f)
		}
	}
}
