package analysis

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
	"tapersweep/models"
)

// The start of a file decides what it is; JSON of any kind, even UTF-16 or not an object, is
// answered as JSON, never with an STL error (ECMA-404 for what JSON is; UTF-16 by its
// byte-order marks). models.LooksLikeJSON decides; this is the loader's table of cases.
func TestSniffCanalFiles(t *testing.T) {
	for text, want := range map[string]bool{
		`{"segments": []}`:         true,
		"\xEF\xBB\xBF {\"a\": 1}":  true,
		"null":                     true,
		" [1, 2]":                  true,
		`"canal"`:                  true,
		"42\n":                     true,
		"\xFF\xFE{\x00\"\x00":      true,
		"\xFE\xFF\x00{":            true,
		"{\x00\"\x00s\x00":         true,
		"solid canal\nfacet":       false,
		"SOLID CANAL\n":            false,
		"\x00\x00binary header...": false,
		"":                         false,
	} {
		if got := models.LooksLikeJSON([]byte(text)); got != want {
			t.Errorf("%q: JSON %v, want %v", text, got, want)
		}
	}
}

// A sequence given as the canal, JSON that is no object, and a spec over the size limit are
// refused with messages that say so and name the file.
func TestLoadCanalRefusesWhatIsNotACanal(t *testing.T) {
	dir := t.TempDir()
	put := func(name, text string) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(text), 0o644)
		return p
	}
	for path, say := range map[string]string{
		put("plan.json", `{"steps": [{"size": 25, "taper": 0.04, "depth": "WL"}]}`): "this is a sequence, not a canal",
		put("list.json", `[{"kind": "straight", "length": 5}]`):                     "not a canal spec",
		put("big.json", `{"segments": []`+strings.Repeat(" ", 2<<20)+`}`):           "more than a canal spec can need",
		dir: "folder",
	} {
		_, err := LoadCanal(t.Context(), path, LoadOptions{})
		if err == nil || !strings.Contains(err.Error(), say) || !strings.Contains(err.Error(), path) {
			t.Errorf("%s: %v, want %q", path, err, say)
		}
		if errors.Is(err, ErrUntrustedSurface) {
			t.Errorf("%s: not a surface question", path)
		}
	}
}

// TestLoadCheckIsTheCanalCheck: a canal read from an STL takes the load's check of its surface
// instead of checking it again, so the load's check must be the check of the mesh the load
// returns, on surfaces good and bad: every count equal (the warnings are made of counts), on
// every testdata STL and on a demo canal made open, inside out, with a triangle turned, with
// two surfaces, with zero-area triangles, shuffled, in ASCII and scaled.
func TestLoadCheckIsTheCanalCheck(t *testing.T) {
	cases := map[string][]byte{}
	paths, _ := filepath.Glob("../testdata/*.stl")
	for _, p := range paths {
		data, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		cases[filepath.Base(p)] = data
	}
	if len(paths) < 10 {
		t.Fatalf("only %d testdata STLs", len(paths))
	}
	base := benchDemo().Mesh(0.2, 24)
	variant := func(name string, edit func(m *mesh.Mesh)) {
		m := &mesh.Mesh{Vertices: slices.Clone(base.Vertices), Triangles: slices.Clone(base.Triangles)}
		edit(m)
		var buf bytes.Buffer
		if err := mesh.WriteSTL(&buf, m, "demo "+name); err != nil {
			t.Fatal(err)
		}
		cases[name+".stl"] = buf.Bytes()
	}
	variant("open", func(m *mesh.Mesh) { m.Triangles = m.Triangles[:len(m.Triangles)-7] })
	variant("inside out", func(m *mesh.Mesh) {
		for i := range m.Triangles {
			m.Triangles[i][1], m.Triangles[i][2] = m.Triangles[i][2], m.Triangles[i][1]
		}
	})
	variant("one turned", func(m *mesh.Mesh) {
		m.Triangles[100][1], m.Triangles[100][2] = m.Triangles[100][2], m.Triangles[100][1]
	})
	variant("two surfaces", func(m *mesh.Mesh) {
		n := int32(len(m.Vertices))
		for _, v := range base.Vertices {
			m.Vertices = append(m.Vertices, v.Add(mgl64.Vec3{5, 0, 0}))
		}
		for _, tri := range base.Triangles {
			m.Triangles = append(m.Triangles, [3]int32{tri[0] + n, tri[1] + n, tri[2] + n})
		}
	})
	variant("zero area", func(m *mesh.Mesh) {
		m.Triangles = append(m.Triangles, [3]int32{0, 0, 1}, [3]int32{5, 6, 5})
	})
	variant("shuffled", func(m *mesh.Mesh) {
		rand.New(rand.NewPCG(3, 4)).Shuffle(len(m.Triangles), func(i, j int) {
			m.Triangles[i], m.Triangles[j] = m.Triangles[j], m.Triangles[i]
		})
	})
	var ascii strings.Builder
	ascii.WriteString("solid demo\n")
	for f := range base.Triangles {
		a, b, c := base.Corners(f)
		ascii.WriteString(" facet normal 0 0 0\n  outer loop\n")
		for _, p := range []mgl64.Vec3{a, b, c} {
			fmt.Fprintf(&ascii, "   vertex %.9g %.9g %.9g\n", p[0], p[1], p[2])
		}
		ascii.WriteString("  endloop\n endfacet\n")
	}
	ascii.WriteString("endsolid demo\n")
	cases["ascii.stl"] = []byte(ascii.String())
	for name, data := range cases {
		for _, scale := range []float64{0, 0.001} {
			m, rep, err := mesh.Load(context.Background(), name, bytes.NewReader(data), int64(len(data)),
				mesh.LoadOptions{Scale: scale})
			if err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			load, again := rep.Surface, mesh.Validate(m)
			load.SignedVolume, again.SignedVolume = 0, 0 // summed in another order; its sign is checked below
			if load != again {
				t.Errorf("%s, scale %g: the load's check %+v, the mesh's %+v", name, scale, load, again)
			}
			if (rep.Surface.SignedVolume < 0) != (mesh.Validate(m).SignedVolume < 0) {
				t.Errorf("%s: the signed volume's sign differs", name)
			}
			// The bad surfaces are bad as read (else the check above compares nothing).
			switch {
			case name == "open.stl" && again.BoundaryEdges == 0,
				name == "two surfaces.stl" && again.Shells != 2,
				name == "inside out.stl" && rep.Turned == 0,
				name == "zero area.stl" && rep.DegenerateRemoved != 2:
				t.Errorf("%s: the defect is not there: %+v", name, rep)
			}
		}
	}
}
