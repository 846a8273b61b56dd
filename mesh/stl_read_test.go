package mesh

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

func loadBytes(t *testing.T, name string, data []byte, opt LoadOptions) (*Mesh, LoadReport, error) {
	t.Helper()
	return Load(context.Background(), name, bytes.NewReader(data), int64(len(data)), opt)
}

func mustLoad(t *testing.T, name string, data []byte, opt LoadOptions) (*Mesh, LoadReport) {
	t.Helper()
	m, rep, err := loadBytes(t, name, data, opt)
	if err != nil {
		t.Fatalf("load %s: %v", name, err)
	}
	return m, rep
}

func wantErr(t *testing.T, err error, parts ...string) {
	t.Helper()
	if err == nil {
		t.Fatalf("want an error mentioning %q, got none", parts)
	}
	for _, p := range parts {
		if !strings.Contains(err.Error(), p) {
			t.Errorf("error %q does not mention %q", err, p)
		}
	}
}

func hasWarning(rep LoadReport, parts ...string) bool {
	for _, w := range rep.Warnings {
		ok := true
		for _, p := range parts {
			ok = ok && strings.Contains(w, p)
		}
		if ok {
			return true
		}
	}
	return false
}

// Binary STL layout (the format's own definition): 80-byte header, uint32 count, 50 bytes per
// triangle. A round trip must give back the generator's topology exactly: same vertex and
// triangle counts, a closed manifold surface, the same volume to float32 precision.
func TestLoadBinaryRoundTrip(t *testing.T) {
	src := shapeCylinder(0.5, 10, 48, 12)
	data := shapeBinarySTL(t, src)
	if want := 84 + 50*len(src.Triangles); len(data) != want {
		t.Fatalf("binary size %d, want 84 + 50n = %d", len(data), want)
	}
	var calls int
	var last int64
	m, rep := mustLoad(t, "cyl.stl", data, LoadOptions{Progress: func(done, total int64) {
		calls++
		last = done
		if total != int64(len(data)) {
			t.Errorf("progress total %d, want %d", total, len(data))
		}
	}})
	if rep.Format != "binary" || rep.TrianglesRead != len(src.Triangles) || rep.Vertices != len(src.Vertices) || rep.DegenerateRemoved != 0 {
		t.Errorf("report %+v, want binary with %d triangles and %d vertices", rep, len(src.Triangles), len(src.Vertices))
	}
	if len(rep.Warnings) != 0 {
		t.Errorf("a clean closed cylinder drew warnings: %q", rep.Warnings)
	}
	if calls == 0 || last != int64(len(data)) {
		t.Errorf("progress called %d times, last %d, want the end %d", calls, last, len(data))
	}
	within(t, "volume after round trip", Volume(m), Volume(src), 1e-6)
	if r := Validate(m); !r.Closed || !r.Manifold || r.Shells != 1 {
		t.Errorf("round trip lost closure: %+v", r)
	}
	// Vertices in first-appearance order: the first triangle's corners are 0, 1, 2.
	if m.Triangles[0] != [3]int32{0, 1, 2} {
		t.Errorf("first triangle %v, want 0 1 2", m.Triangles[0])
	}
}

func TestLoadScale(t *testing.T) {
	src := shapeCylinder(500, 10000, 32, 4) // micrometres
	m, rep := mustLoad(t, "um.stl", shapeBinarySTL(t, src), LoadOptions{Scale: 0.001})
	within(t, "scaled volume", Volume(m), Volume(src)*1e-9, 1e-5)
	if hasWarning(rep, "--scale") {
		t.Errorf("scaled load still warns about units: %q", rep.Warnings)
	}
	_, _, err := loadBytes(t, "um.stl", shapeBinarySTL(t, src), LoadOptions{Scale: -1})
	wantErr(t, err, "um.stl", "scale")
}

// ASCII STL keywords: solid / facet normal / outer loop / vertex / endloop / endfacet / endsolid.
func TestLoadASCIIMatchesBinary(t *testing.T) {
	src := shapeTorusSection(5, 0.6, 1, 24, 16)
	var buf bytes.Buffer
	if err := WriteASCIISTL(&buf, src, "demo torus"); err != nil {
		t.Fatal(err)
	}
	ma, ra := mustLoad(t, "t.stl", buf.Bytes(), LoadOptions{})
	mb, rb := mustLoad(t, "t.stl", shapeBinarySTL(t, src), LoadOptions{})
	if ra.Format != "ascii" || rb.Format != "binary" {
		t.Fatalf("formats %q %q", ra.Format, rb.Format)
	}
	if len(ma.Vertices) != len(mb.Vertices) || len(ma.Triangles) != len(mb.Triangles) {
		t.Fatalf("ascii %d/%d vs binary %d/%d", len(ma.Vertices), len(ma.Triangles), len(mb.Vertices), len(mb.Triangles))
	}
	for i := range ma.Vertices {
		if ma.Vertices[i] != mb.Vertices[i] {
			t.Fatalf("vertex %d: ascii %v binary %v (both carry float32 values)", i, ma.Vertices[i], mb.Vertices[i])
		}
	}
}

// Common practice: some exporters write "solid" with no name, CRLF line ends, leading blank lines.
func TestLoadASCIIVariants(t *testing.T) {
	tet := "facet normal 0 0 -1\n outer loop\n vertex 0 0 0\n vertex 0 1 0\n vertex 1 0 0\n endloop\nendfacet\n" +
		"facet normal 0 -1 0\n outer loop\n vertex 0 0 0\n vertex 1 0 0\n vertex 0 0 1\n endloop\nendfacet\n" +
		"facet normal -1 0 0\n outer loop\n vertex 0 0 0\n vertex 0 0 1\n vertex 0 1 0\n endloop\nendfacet\n" +
		"facet normal 1 1 1\n outer loop\n vertex 1 0 0\n vertex 0 1 0\n vertex 0 0 1\n endloop\nendfacet\n"
	for name, text := range map[string]string{
		"named":    "solid tet\n" + tet + "endsolid tet\n",
		"unnamed":  "solid\n" + tet + "endsolid\n",
		"crlf":     strings.ReplaceAll("solid tet\n"+tet+"endsolid tet\n", "\n", "\r\n"),
		"leading":  "\n\n  solid tet\n" + tet + "endsolid tet",
		"bom":      "\xEF\xBB\xBFsolid tet\n" + tet + "endsolid tet\n",
		"exponent": strings.ReplaceAll("solid tet\n"+tet+"endsolid\n", "vertex 1 0 0", "vertex 1.0e+00 0e0 -0.0"),
	} {
		m, rep, err := loadBytes(t, name+".stl", []byte(text), LoadOptions{Scale: 10})
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		// A right tetrahedron with unit legs holds 1/6; scaled by 10 that is 1000/6.
		if rep.Format != "ascii" || len(m.Triangles) != 4 || len(m.Vertices) != 4 || math.Abs(Volume(m)-1000.0/6) > 1e-9 {
			t.Errorf("%s: %+v volume %g", name, rep, Volume(m))
		}
	}
}

// A binary file whose header starts with "solid" is still binary when its length is 84 + 50n.
func TestLoadBinaryHeaderStartingWithSolid(t *testing.T) {
	src := shapeCylinder(0.5, 3, 16, 2)
	data := shapeBinarySTL(t, src)
	copy(data, "solid exported by a tool that writes ASCII-looking headers")
	_, rep := mustLoad(t, "solidhead.stl", data, LoadOptions{})
	if rep.Format != "binary" || rep.TrianglesRead != len(src.Triangles) {
		t.Errorf("report %+v", rep)
	}
	// The same with a wrong length: an error naming the count and the size, not an ASCII parse.
	_, _, err := loadBytes(t, "solidhead.stl", data[:len(data)-7], LoadOptions{})
	wantErr(t, err, "solidhead.stl", "84", "bytes")
}

func TestLoadEmptyFile(t *testing.T) {
	_, _, err := loadBytes(t, "empty.stl", nil, LoadOptions{})
	wantErr(t, err, "empty.stl", "empty")
}

func TestLoadTruncatedBinary(t *testing.T) {
	data := shapeBinarySTL(t, shapeCylinder(1, 2, 12, 2))
	n := binary.LittleEndian.Uint32(data[80:])
	_, _, err := loadBytes(t, "cut.stl", data[:len(data)-30], LoadOptions{})
	wantErr(t, err, "cut.stl", "truncated", strconv.Itoa(int(n)), strconv.Itoa(len(data)-30))
	_, _, err = loadBytes(t, "short.stl", data[:40], LoadOptions{})
	wantErr(t, err, "short.stl", "40 bytes")
}

// A count of four billion in a 134-byte file must be refused before anything is allocated.
func TestLoadHostileCountDoesNotAllocate(t *testing.T) {
	data := make([]byte, 84+50)
	binary.LittleEndian.PutUint32(data[80:], math.MaxUint32)
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	_, _, err := loadBytes(t, "hostile.stl", data, LoadOptions{})
	runtime.ReadMemStats(&after)
	wantErr(t, err, "hostile.stl", "4294967295", "134 bytes")
	if got := after.TotalAlloc - before.TotalAlloc; got > 64<<10 {
		t.Errorf("refusing a hostile count allocated %d bytes", got)
	}
}

func TestLoadASCIIGarbage(t *testing.T) {
	text := "solid x\nfacet normal 0 0 1\n outer loop\n vertex 0 0 0\n vertex 1 0 zero\n vertex 0 1 0\n endloop\nendfacet\nendsolid x\n"
	_, _, err := loadBytes(t, "bad.stl", []byte(text), LoadOptions{})
	wantErr(t, err, "bad.stl", "line 5")
	_, _, err = loadBytes(t, "noend.stl", []byte("solid x\nfacet normal 0 0 1\n outer loop\n vertex 0 0 0\n"), LoadOptions{})
	wantErr(t, err, "noend.stl", "line")
	_, _, err = loadBytes(t, "noise.stl", []byte("this is not a surface at all, just some words that run on long enough to pass the header size"), LoadOptions{})
	wantErr(t, err, "noise.stl", "not an STL file")
	_, _, err = loadBytes(t, "zero.stl", []byte("solid x\nendsolid x\n"), LoadOptions{})
	wantErr(t, err, "zero.stl", "no triangles")
}

func TestLoadNaNAndInf(t *testing.T) {
	src := shapeCylinder(1, 2, 12, 2)
	for _, bad := range []float32{float32(math.NaN()), float32(math.Inf(1)), float32(math.Inf(-1))} {
		data := shapeBinarySTL(t, src)
		// Triangle 7 (1-based), second corner's y: bytes 84 + 6*50 + 12 (normal) + 12 + 4.
		binary.LittleEndian.PutUint32(data[84+6*50+28:], math.Float32bits(bad))
		_, _, err := loadBytes(t, "nan.stl", data, LoadOptions{})
		wantErr(t, err, "nan.stl", "triangle 7 ", "byte 384", "not a finite number")
	}
	text := "solid x\nfacet normal 0 0 1\n outer loop\n vertex 0 0 0\n vertex 1 0 0\n vertex 0 1 0\n endloop\nendfacet\n" +
		"facet normal 0 0 1\n outer loop\n vertex 0 0 0\n vertex 1 0 nan\n vertex 0 1 0\n endloop\nendfacet\nendsolid x\n"
	_, _, err := loadBytes(t, "nan.stl", []byte(text), LoadOptions{})
	wantErr(t, err, "nan.stl", "triangle 2 ", "not a finite number")
	_, _, err = loadBytes(t, "inf.stl", []byte(strings.Replace(text, "nan", "-Inf", 1)), LoadOptions{})
	wantErr(t, err, "inf.stl", "triangle 2 ")
}

func TestLoadWarnsAboutHole(t *testing.T) {
	m := shapeCylinder(1, 4, 24, 4)
	m.Triangles = m.Triangles[1:]
	_, rep := mustLoad(t, "hole.stl", shapeBinarySTL(t, m), LoadOptions{})
	if !hasWarning(rep, "not closed", "3 edges", "Close the holes") {
		t.Errorf("no hole warning: %q", rep.Warnings)
	}
}

func TestLoadWarnsAboutTwoShells(t *testing.T) {
	m := shapeMerge(shapeCylinder(1, 4, 24, 4), shapeMove(shapeCylinder(1, 4, 24, 4), mgl64.Vec3{5, 0, 0}))
	got, rep := mustLoad(t, "two.stl", shapeBinarySTL(t, m), LoadOptions{})
	if !hasWarning(rep, "2 separate surfaces", "largest") {
		t.Errorf("no shell warning: %q", rep.Warnings)
	}
	if len(got.Triangles) != len(m.Triangles) {
		t.Errorf("both shells must be kept: %d of %d triangles", len(got.Triangles), len(m.Triangles))
	}
}

func TestLoadWarnsAboutOpenTube(t *testing.T) {
	m := shapeTube(straightFrame(6), constRadius(0.5), 32, 10, false)
	_, rep := mustLoad(t, "open.stl", shapeBinarySTL(t, m), LoadOptions{})
	// An uncapped tube has two rims of 32 edges each.
	if !hasWarning(rep, "not closed", "64 edges") {
		t.Errorf("no open-tube warning: %q", rep.Warnings)
	}
}

func TestLoadWarnsAboutMicrometres(t *testing.T) {
	m := shapeScale(shapeCylinder(0.5, 20, 24, 4), 1000)
	_, rep := mustLoad(t, "um.stl", shapeBinarySTL(t, m), LoadOptions{})
	if !hasWarning(rep, "micrometres", "--scale 0.001") {
		t.Errorf("no unit warning: %q", rep.Warnings)
	}
}

func TestLoadDropsDegenerate(t *testing.T) {
	m := shapeCylinder(1, 4, 24, 4)
	n := len(m.Triangles)
	m.Triangles = append(m.Triangles, [3]int32{0, 0, 1}, [3]int32{0, 1, 1})
	// A collinear triangle: three points on one generator line of the side.
	m.Vertices = append(m.Vertices, mgl64.Vec3{1, 0, 0.5})
	m.Triangles = append(m.Triangles, [3]int32{0, int32(len(m.Vertices) - 1), 24})
	got, rep := mustLoad(t, "deg.stl", shapeBinarySTL(t, m), LoadOptions{})
	if rep.DegenerateRemoved != 3 || len(got.Triangles) != n || len(got.Vertices) != len(m.Vertices)-1 {
		t.Errorf("removed %d (want 3), %d triangles (want %d), %d vertices (want %d)",
			rep.DegenerateRemoved, len(got.Triangles), n, len(got.Vertices), len(m.Vertices)-1)
	}
	if !hasWarning(rep, "3 triangles") {
		t.Errorf("no degenerate note: %q", rep.Warnings)
	}
}

func TestLoadCancel(t *testing.T) {
	data := shapeBinarySTL(t, shapeCylinder(1, 4, 64, 64))
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, _, err := Load(ctx, "c.stl", bytes.NewReader(data), int64(len(data)), LoadOptions{})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("want context.Canceled, got %v", err)
	}
	wantErr(t, err, "c.stl")
}

func TestLoadFileAndWriteFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "demo.stl")
	src := shapeFrustum(1, 0.5, 3, 24, 3)
	if err := WriteSTLFile(path, src); err != nil {
		t.Fatal(err)
	}
	m, _, err := LoadFile(context.Background(), path, LoadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	within(t, "file volume", Volume(m), Volume(src), 1e-6)
	_, _, err = LoadFile(context.Background(), filepath.Join(dir, "missing.stl"), LoadOptions{})
	wantErr(t, err, "missing.stl")
	_, _, err = LoadFile(context.Background(), dir, LoadOptions{})
	wantErr(t, err, dir, "folder")
	if err := os.WriteFile(path, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	_, _, err = LoadFile(context.Background(), path, LoadOptions{})
	wantErr(t, err, path, "empty")
}

func TestLoadWarnsAboutLargeAndTinyModels(t *testing.T) {
	m := shapeCylinder(0.5, 10, 16, 2)
	w := loadNotes(m, LoadReport{TrianglesRead: largeMeshTriangles + 1})
	if !hasWarning(LoadReport{Warnings: w}, "2000001 triangles", "coarser") {
		t.Errorf("no size warning: %q", w)
	}
	// A canal modelled in metres: 0.01 units long.
	w = loadNotes(shapeScale(m, 0.001), LoadReport{TrianglesRead: len(m.Triangles)})
	if !hasWarning(LoadReport{Warnings: w}, "--scale 1000") {
		t.Errorf("no metre warning: %q", w)
	}
}
