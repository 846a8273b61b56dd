package models

import (
	"bytes"
	"encoding/binary"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

func TestDemoCanalAndSequence(t *testing.T) {
	c := DemoCanal()
	if !strings.Contains(c.Name, "demo") || !strings.Contains(c.Name, "invented") {
		t.Errorf("demo canal not marked as invented demo data: %q", c.Name)
	}
	if c.WorkingLength() > c.Length() {
		t.Errorf("working length %g beyond the canal's end at %g", c.WorkingLength(), c.Length())
	}
	if !bytes.Contains(DemoSequenceJSON(), []byte("demo")) {
		t.Error("demo sequence not marked as demo")
	}
	seq, err := ParseSequence("demo/sequence.json", DemoSequenceJSON())
	if err != nil {
		t.Fatal(err)
	}
	if err := seq.CheckDepths(c.Length(), c.WorkingLength()); err != nil {
		t.Errorf("demo sequence does not fit the demo canal: %v", err)
	}
	// Common practice: change taper between consecutive files, and start with a smaller
	// tip than the canal at working length (a glide path).
	if len(seq.Steps) < 3 {
		t.Fatalf("%d steps", len(seq.Steps))
	}
	canalMeshClosedCheck := c.Mesh(0.1, 48)
	canalCheckClosed(t, "demo canal", canalMeshClosedCheck)
}

// stlTriangles reads the corners of a binary STL (80-byte header, count, 50 bytes each).
func stlTriangles(t *testing.T, data []byte) [][3]mgl64.Vec3 {
	t.Helper()
	if len(data) < 84 {
		t.Fatalf("STL of %d bytes", len(data))
	}
	n := int(binary.LittleEndian.Uint32(data[80:84]))
	if len(data) != 84+50*n {
		t.Fatalf("STL of %d bytes for %d triangles", len(data), n)
	}
	out := make([][3]mgl64.Vec3, n)
	for i := range out {
		rec := data[84+50*i+12:]
		for c := range 3 {
			for a := range 3 {
				out[i][c][a] = float64(math.Float32frombits(binary.LittleEndian.Uint32(rec[4*(3*c+a):])))
			}
		}
	}
	return out
}

// The committed fixtures must be what cmd/maketestdata makes now (regenerate with
// `go run ./cmd/maketestdata` from the repository root).
func TestFixturesMatchGenerator(t *testing.T) {
	dir := filepath.Join("..", "testdata")
	for _, ex := range ExampleCanals() {
		spec, err := ex.SpecJSON()
		if err != nil {
			t.Fatal(err)
		}
		got, err := os.ReadFile(filepath.Join(dir, ex.File+".json"))
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, spec) {
			t.Errorf("%s.json differs from the generator", ex.File)
		}
		if _, err := ParseCanalSpec(ex.File+".json", got); err != nil {
			t.Errorf("fixture does not parse: %v", err)
		}
		data, err := os.ReadFile(filepath.Join(dir, ex.File+".stl"))
		if err != nil {
			t.Fatal(err)
		}
		if len(data) > 2<<20 {
			t.Errorf("%s.stl is %d bytes, keep fixtures under 2 MB", ex.File, len(data))
		}
		tris := stlTriangles(t, data)
		m, err := ex.Mesh()
		if err != nil {
			t.Fatal(err)
		}
		if len(tris) != len(m.Triangles) {
			t.Errorf("%s.stl: %d triangles, generator %d", ex.File, len(tris), len(m.Triangles))
			continue
		}
		// float32 in the file: equal to rounding.
		for i := range tris {
			a, b, c := m.Corners(i)
			for k, p := range [3]mgl64.Vec3{a, b, c} {
				if tris[i][k].Sub(p).Len() > 1e-5 {
					t.Fatalf("%s.stl triangle %d corner %d: %v, generator %v", ex.File, i, k, tris[i][k], p)
				}
			}
		}
	}
}
