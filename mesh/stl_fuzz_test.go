package mesh

import (
	"bytes"
	"context"
	"encoding/binary"
	"math"
	"runtime"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// fuzzTetra is a unit right tetrahedron (demo data) in both STL flavours.
func fuzzTetra() *Mesh {
	return &Mesh{
		Vertices:  []mgl64.Vec3{{0, 0, 0}, {1, 0, 0}, {0, 1, 0}, {0, 0, 1}},
		Triangles: [][3]int32{{0, 2, 1}, {0, 1, 3}, {0, 3, 2}, {1, 2, 3}},
	}
}

// fuzzAllocBound is what one load may allocate in total: the binary path keeps about
// 170 bytes per 50-byte record over the whole load (corner bits and their copy grouped for
// the weld, first corners, triangles, positions, per-triangle checks, half-edges), the ASCII
// parser of the stl package allocates a 4 KiB word buffer per line (garbage at once), and a
// fixed allowance covers small files. A hostile count must never show up here.
func fuzzAllocBound(data []byte) uint64 {
	lines := uint64(bytes.Count(data, []byte("\n")) + bytes.Count(data, []byte("\r")) + 1)
	return 2<<20 + 64*uint64(len(data)) + 16<<10*lines
}

func FuzzLoadSTL(f *testing.F) {
	var bin, ascii bytes.Buffer
	if err := WriteSTL(&bin, fuzzTetra(), "demo tetra"); err != nil {
		f.Fatal(err)
	}
	if err := WriteASCIISTL(&ascii, fuzzTetra(), "demo tetra"); err != nil {
		f.Fatal(err)
	}
	f.Add(bin.Bytes())
	f.Add(ascii.Bytes())
	hostile := bytes.Clone(bin.Bytes())
	binary.LittleEndian.PutUint32(hostile[80:], math.MaxUint32)
	f.Add(hostile)
	solidHead := bytes.Clone(bin.Bytes())
	copy(solidHead, "solid demo binary with a text-looking header")
	f.Add(solidHead)
	f.Add(bin.Bytes()[:100])
	f.Add([]byte("solid\nendsolid\n"))
	f.Add([]byte("solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 nan\n"))
	f.Add([]byte{})
	// What was fixed: upper-case keywords, several solids, a misspelt keyword, text between
	// facets, a corrupt vertex far away, triangles facing different ways.
	f.Add(bytes.ToUpper(ascii.Bytes()))
	f.Add(append(bytes.Clone(ascii.Bytes()), ascii.Bytes()...))
	f.Add(bytes.Replace(ascii.Bytes(), []byte("outer loop"), []byte("outer lop"), 1))
	f.Add(bytes.Replace(ascii.Bytes(), []byte("endfacet\n"), []byte("endfacet\nsome words here\n"), 2))
	far := bytes.Clone(bin.Bytes())
	binary.LittleEndian.PutUint32(far[84+50+12:], math.Float32bits(1e6))
	f.Add(far)
	mixed := fuzzTetra()
	mixed.Triangles[1][1], mixed.Triangles[1][2] = mixed.Triangles[1][2], mixed.Triangles[1][1]
	var mixedBin bytes.Buffer
	if err := WriteSTL(&mixedBin, mixed, "demo mixed"); err != nil {
		f.Fatal(err)
	}
	f.Add(mixedBin.Bytes())

	f.Fuzz(func(t *testing.T, data []byte) {
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		m, rep, err := Load(context.Background(), "fuzz.stl", bytes.NewReader(data), int64(len(data)), LoadOptions{})
		runtime.ReadMemStats(&after)
		if got, bound := after.TotalAlloc-before.TotalAlloc, fuzzAllocBound(data); got > bound {
			t.Fatalf("allocated %d bytes for a %d-byte input (bound %d)", got, len(data), bound)
		}
		if err != nil {
			if !strings.Contains(err.Error(), "fuzz.stl") {
				t.Fatalf("error does not name the file: %v", err)
			}
			return
		}
		if len(m.Triangles) == 0 || rep.TrianglesRead < len(m.Triangles) || rep.Vertices != len(m.Vertices) {
			t.Fatalf("inconsistent result: %+v, %d triangles", rep, len(m.Triangles))
		}
		for _, tr := range m.Triangles {
			for _, v := range tr {
				if v < 0 || int(v) >= len(m.Vertices) {
					t.Fatalf("index %d out of range", v)
				}
			}
		}
		for _, v := range m.Vertices {
			if !finiteVec(v) {
				t.Fatalf("non-finite vertex %v got through", v)
			}
		}
		Validate(m)
	})
}
