package mesh

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// asciiTet is a right tetrahedron with unit legs (volume 1/6, analytic) as ASCII facets.
const asciiTet = "facet normal 0 0 -1\n outer loop\n vertex 0 0 0\n vertex 0 1 0\n vertex 1 0 0\n endloop\nendfacet\n" +
	"facet normal 0 -1 0\n outer loop\n vertex 0 0 0\n vertex 1 0 0\n vertex 0 0 1\n endloop\nendfacet\n" +
	"facet normal -1 0 0\n outer loop\n vertex 0 0 0\n vertex 0 0 1\n vertex 0 1 0\n endloop\nendfacet\n" +
	"facet normal 1 1 1\n outer loop\n vertex 1 0 0\n vertex 0 1 0\n vertex 0 0 1\n endloop\nendfacet\n"

// Keywords in upper case are ASCII STL all the same (the format's keywords are read without
// regard to case by common practice); the file is not taken for binary.
func TestLoadASCIIUpperCase(t *testing.T) {
	text := strings.ToUpper("solid tet\n" + asciiTet + "endsolid tet\n")
	m, rep := mustLoad(t, "upper.stl", []byte(text), LoadOptions{Scale: 10})
	if rep.Format != "ascii" || len(m.Triangles) != 4 || math.Abs(Volume(m)-1000.0/6) > 1e-9 {
		t.Errorf("%+v volume %g", rep, Volume(m))
	}
}

// Two solids in one file: both are read (two separate tetrahedra, twice the volume), and the
// report says so.
func TestLoadASCIIEverySolid(t *testing.T) {
	moved := strings.NewReplacer("vertex 0 ", "vertex 5 ", "vertex 1 ", "vertex 6 ").Replace(asciiTet)
	text := "solid a\n" + asciiTet + "endsolid a\nsolid b\n" + moved + "endsolid b\n"
	m, rep := mustLoad(t, "two.stl", []byte(text), LoadOptions{Scale: 10})
	if len(m.Triangles) != 8 || math.Abs(Volume(m)-2000.0/6) > 1e-9 || rep.Solids != 2 {
		t.Errorf("%d triangles, volume %g, %d solids", len(m.Triangles), Volume(m), rep.Solids)
	}
	if !hasWarning(rep, "2 solids") || !hasWarning(rep, "2 separate surfaces") {
		t.Errorf("warnings %q", rep.Warnings)
	}
}

// A misspelt keyword skips its facet, garbage between facets is skipped too, and the warning
// names the lines; the good facets are read.
func TestLoadASCIISkipsAndSays(t *testing.T) {
	facets := strings.SplitAfter(asciiTet, "endfacet\n")
	bad := strings.Replace(facets[1], "outer loop", "outer lop", 1) // line 10 of the file
	text := "solid x\n" + facets[0] + bad + "this line is noise\nso is this\n" + facets[2] + facets[3] + "endsolid x\n"
	m, rep := mustLoad(t, "skip.stl", []byte(text), LoadOptions{Scale: 10})
	if len(m.Triangles) != 3 {
		t.Errorf("%d triangles, want the 3 good ones", len(m.Triangles))
	}
	if !hasWarning(rep, "1 facets that could not be read were skipped", "line 10", "\"loop\" expected, found \"lop\"") {
		t.Errorf("no warning naming the misspelt line: %q", rep.Warnings)
	}
	if !hasWarning(rep, "lines 16-17: text between facets") {
		t.Errorf("no warning naming the noise: %q", rep.Warnings)
	}
	if rep.Surface.Closed {
		t.Error("a tetrahedron missing a face is not closed")
	}
}

// A corrupt vertex far from the surface is named with its triangle and byte (binary) or line
// (ASCII), whatever its size: 1e4, 1e6 and 3e38 mm on a 4 mm tube.
func TestLoadNamesCorruptVertex(t *testing.T) {
	src := shapeCylinder(1, 4, 32, 8)
	for _, far := range []float32{1e4, 1e6, 3e38, -2e5} {
		data := shapeBinarySTL(t, src)
		// Triangle 20 (1-based), third corner's x: 84 + 19*50 + 12 (normal) + 24.
		at := 84 + 19*50 + 36
		binary.LittleEndian.PutUint32(data[at:], math.Float32bits(far))
		_, _, err := loadBytes(t, "corrupt.stl", data, LoadOptions{})
		wantErr(t, err, "corrupt.stl", "triangle 20, corner 3", fmt.Sprintf("byte %d", at), "far outside the rest")
		if err != nil && strings.Contains(err.Error(), "--scale") {
			t.Errorf("a corrupt vertex is not a matter of units: %v", err)
		}
	}
	var ascii bytes.Buffer
	if err := WriteASCIISTL(&ascii, src, "demo"); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(ascii.String(), "\n")
	// Triangle 3 starts on line 1 + 2*7 + 1 = 16; its first vertex is line 18 (1-based).
	lines[17] = "      vertex 1e6 0 0"
	_, _, err := loadBytes(t, "corrupt_ascii.stl", []byte(strings.Join(lines, "\n")), LoadOptions{})
	wantErr(t, err, "corrupt_ascii.stl", "triangle 3 (line 16)", "far outside")
	// A surface in micrometres is large everywhere, not corrupt: it loads with the units note.
	if _, rep := mustLoad(t, "um.stl", shapeBinarySTL(t, shapeScale(src, 1000)), LoadOptions{}); !hasWarning(rep, "--scale 0.001") {
		t.Errorf("warnings %q", rep.Warnings)
	}
}

// Mixed winding is repaired at load: the same closed surface, the same volume as the clean
// file (divergence theorem), every edge run both ways, and the report counts the turned triangles.
func TestLoadTurnsMixedWinding(t *testing.T) {
	src := shapeCanalLike(48, 40)
	want := Volume(src)
	rng := rand.New(rand.NewPCG(3, 4))
	mixed := &Mesh{Vertices: src.Vertices}
	flipped := 0
	for _, tr := range src.Triangles {
		if rng.IntN(10) < 4 {
			tr[1], tr[2] = tr[2], tr[1]
			flipped++
		}
		mixed.Triangles = append(mixed.Triangles, tr)
	}
	inside := &Mesh{Vertices: src.Vertices}
	for _, tr := range src.Triangles {
		inside.Triangles = append(inside.Triangles, [3]int32{tr[0], tr[2], tr[1]})
	}
	for name, c := range map[string]struct {
		m      *Mesh
		turned int
	}{"mixed": {mixed, flipped}, "inside-out": {inside, len(src.Triangles)}} {
		if Validate(c.m).InconsistentOrientation == 0 && name == "mixed" {
			t.Fatal("the test surface is not mixed")
		}
		m, rep := mustLoad(t, name+".stl", shapeBinarySTL(t, c.m), LoadOptions{})
		if rep.Turned != c.turned || rep.Surface.InconsistentOrientation != 0 || !rep.Surface.Closed {
			t.Errorf("%s: turned %d of %d flipped, report %+v", name, rep.Turned, c.turned, rep.Surface)
		}
		if got := Volume(m); math.Abs(got-want) > 1e-6*want {
			t.Errorf("%s: volume %g, clean %g", name, got, want)
		}
		if !hasWarning(rep, "turned over") {
			t.Errorf("%s: warnings %q", name, rep.Warnings)
		}
	}
}

// A binary file over the triangle cap is refused from its header, before anything is read.
func TestLoadRefusesTooManyTriangles(t *testing.T) {
	n := uint32(MaxTriangles + 1)
	_, _, err := Load(t.Context(), "big.stl", sizedReader{size: 84 + 50*int64(n), count: n}, 0, LoadOptions{})
	wantErr(t, err, "big.stl", fmt.Sprint(n), "coarser")
}

// sizedReader is a binary STL header of a given count followed by zeros, without the memory.
type sizedReader struct {
	size  int64
	count uint32
	pos   int64
}

func (s sizedReader) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = 0
	}
	if s.pos < 84 {
		var h [84]byte
		binary.LittleEndian.PutUint32(h[80:], s.count)
		copy(p, h[s.pos:])
	}
	return len(p), nil
}

func (s sizedReader) Seek(off int64, whence int) (int64, error) {
	if whence == 2 {
		return s.size, nil
	}
	return off, nil
}

// cancelAfter cancels a context once n bytes have been read: Cancel pressed during a read.
type cancelAfter struct {
	*bytes.Reader
	n      int
	cancel func()
}

func (c *cancelAfter) Read(p []byte) (int, error) {
	k, err := c.Reader.Read(p)
	if c.n -= k; c.n <= 0 {
		c.cancel()
	}
	return k, err
}

// Cancelling while the file is being read stops the read itself (binary and ASCII), not only
// the steps after it.
func TestLoadCancelDuringRead(t *testing.T) {
	src := shapeCylinder(1, 4, 64, 200)
	var ascii bytes.Buffer
	if err := WriteASCIISTL(&ascii, src, "demo"); err != nil {
		t.Fatal(err)
	}
	for name, data := range map[string][]byte{"binary": shapeBinarySTL(t, src), "ascii": ascii.Bytes()} {
		ctx, cancel := context.WithCancel(t.Context())
		r := &cancelAfter{Reader: bytes.NewReader(data), n: len(data) / 4, cancel: cancel}
		_, _, err := Load(ctx, name+".stl", r, int64(len(data)), LoadOptions{})
		if !errors.Is(err, context.Canceled) || r.Len() < len(data)/2 {
			t.Errorf("%s: %v, %d of %d bytes left unread", name, err, r.Len(), len(data))
		}
	}
}
