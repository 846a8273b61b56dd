package mesh

import (
	"bytes"
	"encoding/binary"
	"math"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// Binary STL record layout (the format's definition): 80-byte header, uint32 count, then per
// triangle normal, three corners (float32 little endian) and a 2-byte attribute.
func TestWriteSTLLayout(t *testing.T) {
	m := &Mesh{Vertices: []mgl64.Vec3{{0, 0, 0}, {2, 0, 0}, {0, 2, 0}}, Triangles: [][3]int32{{0, 1, 2}}}
	var buf bytes.Buffer
	if err := WriteSTL(&buf, m, "demo one triangle"); err != nil {
		t.Fatal(err)
	}
	d := buf.Bytes()
	if len(d) != 84+50 || !strings.HasPrefix(string(d), "demo one triangle") || binary.LittleEndian.Uint32(d[80:]) != 1 {
		t.Fatalf("header wrong: %d bytes", len(d))
	}
	f := func(off int) float32 { return math.Float32frombits(binary.LittleEndian.Uint32(d[off:])) }
	want := []float32{0, 0, 1, 0, 0, 0, 2, 0, 0, 0, 2, 0}
	for i, w := range want {
		if got := f(84 + 4*i); got != w {
			t.Errorf("float %d = %g, want %g", i, got, w)
		}
	}
	if d[132] != 0 || d[133] != 0 {
		t.Error("attribute bytes not zero")
	}
}

func TestWriteASCIISTL(t *testing.T) {
	m := &Mesh{Vertices: []mgl64.Vec3{{0, 0, 0}, {0.1, 0, 0}, {0, 1e-3, 0}}, Triangles: [][3]int32{{0, 1, 2}}}
	var buf bytes.Buffer
	if err := WriteASCIISTL(&buf, m, "demo\nname"); err != nil {
		t.Fatal(err)
	}
	text := buf.String()
	for _, want := range []string{"solid demo_name\n", "facet normal 0 0 1\n", "outer loop\n", "vertex 0.1 0 0\n", "vertex 0 0.001 0\n", "endloop\n", "endfacet\n", "endsolid demo_name\n"} {
		if !strings.Contains(text, want) {
			t.Errorf("ASCII output lacks %q:\n%s", want, text)
		}
	}
}
