package main

import (
	"bytes"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
	"tapersweep/models"
)

// rootCase is a curved canal and its root (round, 3 mm wide, 0.45 mm groove toward 0 degrees
// 6 mm from the apical end): the canal spec alone, the canal's STL, the root's STL, and both in
// one STL.
func rootCase(t *testing.T) (canalSTL, rootSTL, bothSTL string, spec *models.CanalSpec) {
	t.Helper()
	spec, err := models.ParseCanalSpec("t.json", []byte(`{"segments":[{"kind":"straight","length":8},{"kind":"arc","radius":8,"angle":30}],
		"orifice_d":0.8,"apical_d":0.3,"root":{"coronal_d":3,"apical_d":3,"concavity":{"depth":0.45,"toward_deg":0,"from_apex":6,"length":5}}}`))
	if err != nil {
		t.Fatal(err)
	}
	write := func(name string, m *mesh.Mesh) string {
		var b bytes.Buffer
		if err := mesh.WriteSTL(&b, m, name); err != nil {
			t.Fatal(err)
		}
		return writeFile(t, name+".stl", b.Bytes())
	}
	canal, root := spec.Mesh(0.05, 64), spec.RootMesh(0.05, 128)
	both := &mesh.Mesh{Vertices: append(append([]mgl64.Vec3(nil), root.Vertices...), canal.Vertices...),
		Triangles: append([][3]int32(nil), root.Triangles...)}
	off := int32(len(root.Vertices))
	for _, tri := range canal.Triangles {
		both.Triangles = append(both.Triangles, [3]int32{tri[0] + off, tri[1] + off, tri[2] + off})
	}
	return write("canal", canal), write("root", root), write("both", both), spec
}

// TestRootFromEveryInput: the wall is the same whether the root comes from --root, from the
// canal's own file (the surface that encloses the other), or from the spec; the groove's
// thinnest wall is R - d - r toward 0 degrees 6 mm from the apical end (analytic geometry, as in
// analysis' tests); without a root the fields are absent. --root that is not a closed surface or
// does not hold the canal is refused naming the file.
func TestRootFromEveryInput(t *testing.T) {
	canalSTL, rootSTL, bothSTL, spec := rootCase(t)
	seq := writeFile(t, "s.json", []byte(`{"steps":[{"size":20,"taper":0.04,"depth":"WL"}]}`))
	specPath := writeFile(t, "c.json", mustJSON(t, spec))
	type out struct {
		Wall *struct {
			Thinnest float64 `json:"thinnest_wall_mm"`
			FromApex float64 `json:"thinnest_wall_from_apex_mm"`
			Toward   float64 `json:"thinnest_wall_toward_deg"`
		} `json:"wall_as_scanned"`
		Steps []map[string]any `json:"steps"`
	}
	r := 0.8 + (0.3-0.8)*(spec.Length()-6)/spec.Length()
	want := 1.5 - 0.45 - r/2
	for _, args := range [][]string{
		{"--canal", canalSTL, "--root", rootSTL},
		{"--canal", bothSTL},
		{"--canal", specPath},
	} {
		code, stdout, stderr := runCLI(t, append([]string{"analyze", "--sequence", seq, "--format", "json"}, args...)...)
		if code != exitOK {
			t.Fatalf("%v: exit %d: %s", args, code, stderr)
		}
		var o out
		if err := json.Unmarshal([]byte(stdout), &o); err != nil {
			t.Fatal(err)
		}
		if o.Wall == nil {
			t.Fatalf("%v: no wall_as_scanned", args)
		}
		if math.Abs(o.Wall.Thinnest-want) > 0.01 || math.Abs(o.Wall.FromApex-6) > 0.4 ||
			math.Abs(math.Remainder(o.Wall.Toward, 360)) > 4 {
			t.Errorf("%v: thinnest %.3f mm %.2f mm from the apex toward %.0f; want %.3f, 6, 0", args, o.Wall.Thinnest, o.Wall.FromApex, o.Wall.Toward, want)
		}
		if _, ok := o.Steps[0]["thinnest_wall_mm"]; !ok {
			t.Errorf("%v: the step has no thinnest_wall_mm", args)
		}
	}
	code, stdout, _ := runCLI(t, "analyze", "--sequence", seq, "--canal", canalSTL)
	if code != exitOK || strings.Contains(stdout, "thinnest_wall") || strings.Contains(stdout, "wall_as_scanned") {
		t.Errorf("without a root: exit %d, wall fields present", code)
	}
	// A root that does not hold the canal, one with a hole, one that is missing.
	far := writeFile(t, "far.stl", nil)
	{
		m := spec.RootMesh(0.1, 32)
		for i := range m.Vertices {
			m.Vertices[i] = m.Vertices[i].Add(mgl64.Vec3{30, 0, 0})
		}
		var b bytes.Buffer
		mesh.WriteSTL(&b, m, "far")
		far = writeFile(t, "far.stl", b.Bytes())
	}
	holed := spec.RootMesh(0.1, 32)
	holed.Triangles = holed.Triangles[1:]
	var b bytes.Buffer
	mesh.WriteSTL(&b, holed, "holed")
	holedPath := writeFile(t, "holed.stl", b.Bytes())
	for _, tc := range []struct{ root, words string }{
		{far, "does not enclose"}, {holedPath, "not closed"}, {"/nonexistent/root.stl", "root.stl"},
	} {
		code, _, stderr := runCLI(t, "analyze", "--sequence", seq, "--canal", canalSTL, "--root", tc.root)
		if code != exitBadInput || !strings.Contains(stderr, tc.words) || !strings.Contains(stderr, strings.TrimSuffix(tc.root[strings.LastIndex(tc.root, "/")+1:], ".stl")) {
			t.Errorf("--root %s: exit %d, %q", tc.root, code, stderr)
		}
	}
	if code, _, _ := runCLI(t, "analyze", "--sequence", seq, "--canal", canalSTL, "--min-wall", "0"); code != exitUsage {
		t.Errorf("--min-wall 0: exit %d, want 2", code)
	}
}

func mustJSON(t *testing.T, v any) []byte {
	t.Helper()
	b, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	return b
}
