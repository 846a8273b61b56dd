package mesh

import (
	"bytes"
	"encoding/binary"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
	"github.com/hschendel/stl"
)

// A binary file is welded on its float32 corner bits, grouped by hash (cornerGroups), and its
// degenerate triangles and volume come from the corners in file order; everything else is
// welded as float64 corners (weld). Both must give the same mesh and report, bit for bit, on
// files made to hit every branch: triangles in scattered order over several decode chunks,
// coordinates at +0 and -0 (equal, but with other bits), corners moved by one float32 step
// (merged by the tolerance, or not), repeated corners and exactly collinear triangles. The
// corners of the reference path are read by github.com/hschendel/stl, the independent reader.
func TestBinaryWeldMatchesFloat64Weld(t *testing.T) {
	base := shapeCanalLike(48, 100) // about 9,600 triangles: three decode chunks
	var buf bytes.Buffer
	if err := WriteSTL(&buf, base, "demo canal"); err != nil {
		t.Fatal(err)
	}
	clean := buf.Bytes()
	n := (len(clean) - stlHeaderSize) / stlRecordSize
	rng := rand.New(rand.NewPCG(3, 5))
	rec := func(b []byte, t int) []byte { return b[stlHeaderSize+stlRecordSize*t:][:stlRecordSize] }
	coord := func(b []byte, t, c, a int) []byte { return rec(b, t)[12+12*c+4*a:] }

	scattered := bytes.Clone(clean)
	for i, p := range rng.Perm(n) {
		copy(rec(scattered, i), rec(clean, p))
	}
	// Coordinates near the canal's middle become exactly 0, written as -0 in every other triangle.
	zeros := bytes.Clone(scattered)
	for i := range n {
		for c := range 3 {
			for a := range 3 {
				x := math.Float32frombits(binary.LittleEndian.Uint32(coord(zeros, i, c, a)))
				if math.Abs(float64(x)) < 0.3 {
					x = 0
					if i%2 == 0 {
						x = float32(math.Copysign(0, -1))
					}
				}
				binary.LittleEndian.PutUint32(coord(zeros, i, c, a), math.Float32bits(x))
			}
		}
	}
	nudged := bytes.Clone(scattered)
	for range n / 4 {
		p := coord(nudged, rng.IntN(n), rng.IntN(3), rng.IntN(3))
		bits := binary.LittleEndian.Uint32(p)
		if rng.IntN(2) == 0 {
			bits++
		} else if bits&0x7FFFFFFF != 0 {
			bits--
		}
		binary.LittleEndian.PutUint32(p, bits)
	}
	degenerate := bytes.Clone(scattered)
	for k := range n / 20 {
		r := rec(degenerate, rng.IntN(n))[12:48]
		if k%2 == 0 {
			copy(r[24:36], r[0:12]) // a repeated corner
		} else {
			copy(r[16:24], r[4:12]) // all three on a line along x
			copy(r[28:36], r[4:12])
		}
	}

	for _, file := range []struct {
		name string
		data []byte
	}{{"scattered", scattered}, {"zeros", zeros}, {"nudged", nudged}, {"degenerate", degenerate}} {
		ref, err := stl.ReadAll(bytes.NewReader(file.data))
		if err != nil {
			t.Fatal(err)
		}
		for _, scale := range []float64{1, 0.001} {
			for _, workers := range []int{1, 2} {
				corners := make([]mgl64.Vec3, 0, 3*len(ref.Triangles))
				for _, tri := range ref.Triangles {
					for _, v := range tri.Vertices {
						corners = append(corners, mgl64.Vec3{float64(v[0]) * scale, float64(v[1]) * scale, float64(v[2]) * scale})
					}
				}
				want, removed := dropDegenerate(weld(corners, 0, weldRelTol, workers), nil, workers)
				wantRep := validate(want, func() TriangleSums { return TriangleSums{SignedVolume: signedVolume(want)} }, 1, false)
				got, rep := mustLoad(t, file.name, file.data, LoadOptions{Scale: scale, Workers: workers})
				if rep.Turned != 0 {
					t.Fatalf("%s: %d triangles turned; the comparison assumes none", file.name, rep.Turned)
				}
				if rep.DegenerateRemoved != removed || rep.Surface != wantRep {
					t.Errorf("%s, scale %g, %d workers: removed %d, report %+v; float64 weld: %d, %+v",
						file.name, scale, workers, rep.DegenerateRemoved, rep.Surface, removed, wantRep)
				}
				if !sameMesh(got, want) {
					t.Errorf("%s, scale %g, %d workers: %d vertices, %d triangles; float64 weld: %d, %d, or the same counts with other values",
						file.name, scale, workers, len(got.Vertices), len(got.Triangles), len(want.Vertices), len(want.Triangles))
				}
			}
		}
	}
}

// sameMesh: the same vertices, bit for bit, and the same triangles.
func sameMesh(a, b *Mesh) bool {
	if len(a.Vertices) != len(b.Vertices) || len(a.Triangles) != len(b.Triangles) {
		return false
	}
	for i, v := range a.Vertices {
		for k := range 3 {
			if math.Float64bits(v[k]) != math.Float64bits(b.Vertices[i][k]) {
				return false
			}
		}
	}
	for i, tri := range a.Triangles {
		if tri != b.Triangles[i] {
			return false
		}
	}
	return true
}
