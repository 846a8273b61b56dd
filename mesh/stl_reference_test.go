package mesh

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/hschendel/stl"
)

// Our streaming reader (no per-triangle callback, every ASCII solid, warnings by line) must
// read what github.com/hschendel/stl reads, triangle for triangle: the library is the
// independent reference for the files both accept. The fixtures are binary; each is also
// checked as ASCII written by the library.
func TestReaderAgreesWithSTLLibrary(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "testdata", "*.stl"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no STL fixtures found: %v", err)
	}
	for _, f := range files {
		data, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		ref, err := stl.ReadAll(bytes.NewReader(data))
		if err != nil {
			t.Fatalf("%s: the library cannot read it: %v", f, err)
		}
		var ascii bytes.Buffer
		ref.IsAscii = true
		if err := ref.WriteAll(&ascii); err != nil {
			t.Fatal(err)
		}
		for _, c := range []struct {
			kind string
			data []byte
		}{{"binary", data}, {"ascii", ascii.Bytes()}} {
			m, rep := mustLoad(t, f, c.data, LoadOptions{})
			if rep.Format != c.kind {
				t.Errorf("%s: read as %s, want %s", f, rep.Format, c.kind)
			}
			if len(m.Triangles) != len(ref.Triangles) || rep.TrianglesRead != len(ref.Triangles) {
				t.Errorf("%s (%s): %d triangles kept of %d read, the library reads %d", f, c.kind,
					len(m.Triangles), rep.TrianglesRead, len(ref.Triangles))
				continue
			}
			// Welding keeps input order and moves corners by at most float32 rounding.
			worst := 0.0
			for i, tri := range ref.Triangles {
				a, b, cc := m.Corners(i)
				for k, ours := range [3][3]float64{a, b, cc} {
					for d := range 3 {
						worst = max(worst, math.Abs(ours[d]-float64(tri.Vertices[k][d])))
					}
				}
			}
			if worst > 1e-6 {
				t.Errorf("%s (%s): a corner differs from the library's by %g mm", f, c.kind, worst)
			}
		}
	}
}
