package main

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"github.com/go-gl/mathgl/mgl64"
	"math"
	"os"
	"path/filepath"
	"strings"
	"tapersweep/mesh"
	"tapersweep/models"
	"testing"
)

func runCLI(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errOut bytes.Buffer
	code = run(args, &out, &errOut)
	return code, out.String(), errOut.String()
}

func writeFile(t *testing.T, name string, data []byte) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// binarySTL writes triangles as a binary STL with the given header count.
func binarySTL(count uint32, tris [][9]float32) []byte {
	var b bytes.Buffer
	b.Write(make([]byte, 80))
	binary.Write(&b, binary.LittleEndian, count)
	for _, t := range tris {
		binary.Write(&b, binary.LittleEndian, [3]float32{})
		binary.Write(&b, binary.LittleEndian, t)
		b.Write([]byte{0, 0})
	}
	return b.Bytes()
}

// TestCenterlineJSON: the fixture of a 45 degree arc on a 5 mm radius gives the fields the issue
// names, the exact length within 1 % and the arc's radius within 10 % (analytic geometry).
func TestCenterlineJSON(t *testing.T) {
	code, out, errOut := runCLI(t, "centerline", "--canal", "../../testdata/curve_45deg_r5.stl", "--format", "json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		LengthMM        float64 `json:"length_mm"`
		WorkingLengthMM float64 `json:"working_length_mm"`
		MaxCurvature    struct {
			SMM      float64  `json:"s_mm"`
			RadiusMM *float64 `json:"radius_mm"`
		} `json:"max_curvature"`
		Schneider float64 `json:"schneider_angle_deg"`
		Arc       struct {
			RadiusMM *float64 `json:"radius_mm"`
			AngleDeg float64  `json:"angle_deg"`
		} `json:"arc"`
		Warnings []string     `json:"warnings"`
		Points   [][4]float64 `json:"points"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("output is not the expected JSON: %v", err)
	}
	spec, err := os.ReadFile("../../testdata/curve_45deg_r5.json")
	if err != nil {
		t.Fatal(err)
	}
	var s struct {
		Segments []struct {
			Kind   string
			Length float64
			Radius float64
			Angle  float64
		}
	}
	json.Unmarshal(spec, &s)
	L := 0.0
	for _, seg := range s.Segments {
		if seg.Kind == "arc" {
			L += seg.Radius * seg.Angle * math.Pi / 180
		} else {
			L += seg.Length
		}
	}
	if math.Abs(got.LengthMM-L)/L > 0.01 {
		t.Errorf("length %.3f, exact %.3f", got.LengthMM, L)
	}
	if got.MaxCurvature.RadiusMM == nil || math.Abs(*got.MaxCurvature.RadiusMM-5)/5 > 0.1 {
		t.Errorf("radius at s* %v, want 5 within 10%%", got.MaxCurvature.RadiusMM)
	}
	if len(got.Points) < 100 || got.Points[0][3] != 0 || got.Warnings == nil {
		t.Errorf("points %d, first s %v, warnings %v", len(got.Points), got.Points[0], got.Warnings)
	}
	if last := got.Points[len(got.Points)-1][3]; math.Abs(last-got.LengthMM) > 1e-3 {
		t.Errorf("points end at s = %.3f, length %.3f", last, got.LengthMM)
	}
}

// TestBadInputs: every bad file is an error (exit 1) or a warning that names the file and the
// place, never a panic; usage mistakes exit 2.
func TestBadInputs(t *testing.T) {
	nan := float32(math.NaN())
	tri := [9]float32{0, 0, 0, 1, 0, 0, 0, 1, 0}
	cases := []struct {
		name, file string
		data       []byte
		want       []string // all must appear in stderr
	}{
		{"empty", "empty.stl", nil, []string{"empty.stl"}},
		{"truncated binary", "cut.stl", binarySTL(10, [][9]float32{tri, tri})[:84+75], []string{"cut.stl"}},
		{"hostile count", "huge.stl", binarySTL(4_000_000_000, [][9]float32{tri}), []string{"huge.stl"}},
		{"ascii garbage", "junk.stl", []byte("solid x\n facet normal 0 0 1\n  outer loop\n   vertex 0 0 zero\n"), []string{"junk.stl", "line"}},
		{"nan", "nan.stl", binarySTL(1, [][9]float32{{0, nan, 0, 1, 0, 0, 0, 1, 0}}), []string{"nan.stl", "triangle 1"}},
		{"spec unknown kind", "k.json", []byte(`{"segments":[{"kind":"spiral","length":3}],"orifice_d":1,"apical_d":0.3}`), []string{"k.json", "segment 1", "kind"}},
		{"spec negative radius", "r.json", []byte(`{"segments":[{"kind":"arc","radius":-2,"angle":30}],"orifice_d":1,"apical_d":0.3}`), []string{"r.json", "segment 1", "radius"}},
		{"spec missing field", "m.json", []byte(`{"segments":[{"kind":"straight","length":9}],"orifice_d":1}`), []string{"m.json", "apical_d"}},
		{"spec unknown field", "u.json", []byte(`{"segments":[{"kind":"straight","length":9}],"orifice_d":1,"apical_d":0.3,"colour":"red"}`), []string{"u.json", "colour"}},
		{"broken json", "b.json", []byte("{\"segments\": [\n{\"kind\": \"straight\",, }]}"), []string{"b.json", "line 2"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			path := writeFile(t, tc.file, tc.data)
			code, _, errOut := runCLI(t, "centerline", "--canal", path)
			if code != exitBadInput {
				t.Fatalf("exit %d, want %d; stderr: %s", code, exitBadInput, errOut)
			}
			for _, w := range tc.want {
				if !strings.Contains(errOut, w) {
					t.Errorf("message %q does not name %q", strings.TrimSpace(errOut), w)
				}
			}
		})
	}
	for _, args := range [][]string{{"centerline"}, {"centerline", "--canal", "x.stl", "--format", "xml"}, {"nosuch"}, {"analyze", "--canal", "x.stl"}} {
		if code, _, _ := runCLI(t, args...); code != exitUsage {
			t.Errorf("%v: exit %d, want %d", args, code, exitUsage)
		}
	}
	if code, _, _ := runCLI(t, "centerline", "--canal", filepath.Join(t.TempDir(), "missing.stl")); code != exitBadInput {
		t.Errorf("missing file: exit %d, want 1", code)
	}
}

// TestMicrometreWarning: a canal exported in micrometres loads with a warning that names the
// fix, and --scale 0.001 brings it back to mm (same length as the mm fixture within 0.1 %).
func TestMicrometreWarning(t *testing.T) {
	data, err := os.ReadFile("../../testdata/straight.stl")
	if err != nil {
		t.Fatal(err)
	}
	// Scale the binary STL's coordinates by 1000.
	scaled := append([]byte(nil), data...)
	n := binary.LittleEndian.Uint32(scaled[80:84])
	for i := 0; i < int(n); i++ {
		for k := 0; k < 9; k++ {
			off := 84 + 50*i + 12 + 4*k
			v := math.Float32frombits(binary.LittleEndian.Uint32(scaled[off:]))
			binary.LittleEndian.PutUint32(scaled[off:], math.Float32bits(v*1000))
		}
	}
	path := writeFile(t, "um.stl", scaled)
	code, out, errOut := runCLI(t, "centerline", "--canal", path, "--scale", "0.001")
	if code != exitOK {
		t.Fatalf("scaled: exit %d: %s", code, errOut)
	}
	var scaledRes, plain struct {
		LengthMM float64  `json:"length_mm"`
		Warnings []string `json:"warnings"`
	}
	json.Unmarshal([]byte(out), &scaledRes)
	_, out, _ = runCLI(t, "centerline", "--canal", "../../testdata/straight.stl")
	json.Unmarshal([]byte(out), &plain)
	if math.Abs(scaledRes.LengthMM-plain.LengthMM) > 0.001*plain.LengthMM {
		t.Errorf("scaled length %.3f, plain %.3f", scaledRes.LengthMM, plain.LengthMM)
	}
	code, out, errOut = runCLI(t, "centerline", "--canal", path)
	if code == exitOK && !strings.Contains(out, "--scale") {
		t.Errorf("micrometre canal measured without a warning naming --scale: %s", out[:min(300, len(out))])
	}
	if code != exitOK && !strings.Contains(errOut, "--scale") {
		t.Errorf("micrometre canal refused without naming --scale: %s", errOut)
	}
}

// TestAnalyzeFormats: the JSON has the fields per step, numbered from 1, with null for a
// torsional margin where nothing is engaged; CSV and table name the same steps.
func TestAnalyzeFormats(t *testing.T) {
	code, out, errOut := runCLI(t, "analyze", "--canal", "../../models/demo/canal.json", "--sequence", "../../models/demo/sequence.json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	var got struct {
		Canal map[string]any   `json:"canal"`
		Steps []map[string]any `json:"steps"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	if _, ok := got.Canal["points"]; ok {
		t.Error("the canal summary in analyze carries points")
	}
	for _, k := range []string{"length_mm", "working_length_mm", "max_curvature", "schneider_angle_deg", "arc", "warnings"} {
		if _, ok := got.Canal[k]; !ok {
			t.Errorf("canal lacks %s", k)
		}
	}
	fields := []string{"step", "label", "tip_depth_mm", "engaged_length_mm", "engaged_area_mm2", "removed_volume_mm3",
		"untouched_wall_pct", "diameter_at_max_curvature_mm", "strain_at_max_curvature_pct", "peak_strain_pct",
		"fatigue_damage", "fracture_from_tip_mm", "torsion_margin", "peak_torque_index", "advice"}
	for i, s := range got.Steps {
		for _, f := range fields {
			if _, ok := s[f]; !ok {
				t.Errorf("step %d lacks %s", i+1, f)
			}
		}
		if s["step"].(float64) != float64(i+1) {
			t.Errorf("step numbered %v, want %d", s["step"], i+1)
		}
		if s["engaged_area_mm2"].(float64) == 0 && s["torsion_margin"] != nil {
			t.Errorf("step %d engages nothing but has a margin %v", i+1, s["torsion_margin"])
		}
	}
	code, out, _ = runCLI(t, "analyze", "--canal", "../../models/demo/canal.json", "--sequence", "../../models/demo/sequence.json", "--format", "csv")
	if lines := strings.Count(strings.TrimSpace(out), "\n") + 1; code != exitOK || lines != len(got.Steps)+1 {
		t.Errorf("csv: exit %d, %d lines for %d steps", code, lines, len(got.Steps))
	}
	// The terminal's first line states the tightest bend's band with its radius, and the band
	// holds the demo's 5 mm arc (analytic geometry: the spec's tightest arc).
	code, out, _ = runCLI(t, "analyze", "--canal", "../../models/demo/canal.json", "--sequence", "../../models/demo/sequence.json", "--format", "table")
	first, _, _ := strings.Cut(out, "\n")
	var r, lo, hi float64
	if i := strings.Index(first, "tightest bend r "); code != exitOK || i < 0 {
		t.Errorf("table: exit %d, first line %q", code, first)
	} else if _, err := fmt.Sscanf(first[i:], "tightest bend r %f mm (%f–%f)", &r, &lo, &hi); err != nil || !(lo <= 5 && 5 <= hi) {
		t.Errorf("table: the first line %q states no band holding r 5 mm (%v)", first, err)
	}
	bad := writeFile(t, "seq.json", []byte(`{"steps":[{"size":25,"taper":0.06,"depth":"WL"},{"size":30,"taper":0,"depth":"WL"}]}`))
	code, _, errOut = runCLI(t, "analyze", "--canal", "../../models/demo/canal.json", "--sequence", bad)
	if code != exitBadInput || !strings.Contains(errOut, "step 2") || !strings.Contains(errOut, "taper") {
		t.Errorf("bad sequence: exit %d, %q", code, errOut)
	}
	deep := writeFile(t, "deep.json", []byte(`{"steps":[{"size":25,"taper":0.06,"depth":40}]}`))
	code, _, errOut = runCLI(t, "analyze", "--canal", "../../models/demo/canal.json", "--sequence", deep)
	if code != exitBadInput || !strings.Contains(errOut, "step 1") || !strings.Contains(errOut, "depth") {
		t.Errorf("depth beyond the apical end: exit %d, %q", code, errOut)
	}
}

// TestOddMeshes: a canal with a hole, with a second shell, and an open tube either load with a
// warning that names the problem or fail with a message that does; never a panic.
func TestOddMeshes(t *testing.T) {
	spec, err := models.ParseCanalSpec("t.json", []byte(`{"segments":[{"kind":"straight","length":8},{"kind":"arc","radius":5,"angle":30}],"orifice_d":1,"apical_d":0.4}`))
	if err != nil {
		t.Fatal(err)
	}
	base := spec.Mesh(0.1, 32)
	write := func(name string, m *mesh.Mesh) string {
		var b bytes.Buffer
		if err := mesh.WriteSTL(&b, m, name); err != nil {
			t.Fatal(err)
		}
		return writeFile(t, name, b.Bytes())
	}
	// A hole: drop a few wall triangles in the middle.
	holed := &mesh.Mesh{Vertices: base.Vertices}
	for i, tri := range base.Triangles {
		if i < 1000 || i > 1006 {
			holed.Triangles = append(holed.Triangles, tri)
		}
	}
	// Two shells: the canal and a copy 5 mm to the side.
	two := &mesh.Mesh{Vertices: append([]mgl64.Vec3(nil), base.Vertices...), Triangles: append([][3]int32(nil), base.Triangles...)}
	off := int32(len(base.Vertices))
	for _, v := range base.Vertices {
		two.Vertices = append(two.Vertices, v.Add(mgl64.Vec3{5, 0, 0}))
	}
	for _, tri := range base.Triangles {
		two.Triangles = append(two.Triangles, [3]int32{tri[0] + off, tri[1] + off, tri[2] + off})
	}
	// An open tube: the end caps removed (the fan triangles share a centre vertex).
	open := &mesh.Mesh{Vertices: base.Vertices}
	capStart, capEnd := int32(len(base.Vertices)-2), int32(len(base.Vertices)-1)
	for _, tri := range base.Triangles {
		if tri[0] != capStart && tri[0] != capEnd && tri[1] != capStart && tri[1] != capEnd && tri[2] != capStart && tri[2] != capEnd {
			open.Triangles = append(open.Triangles, tri)
		}
	}
	for _, tc := range []struct {
		name string
		m    *mesh.Mesh
		word string
	}{{"holed.stl", holed, "hole"}, {"two.stl", two, "surface"}, {"open.stl", open, "open"}} {
		path := write(tc.name, tc.m)
		code, out, errOut := runCLI(t, "centerline", "--canal", path)
		msg := strings.ToLower(out + errOut)
		switch {
		case code == exitOK && strings.Contains(msg, tc.word):
			t.Logf("%s: measured with a warning", tc.name)
		case code == exitBadInput && strings.Contains(errOut, tc.name):
			t.Logf("%s: refused: %s", tc.name, strings.TrimSpace(errOut))
		default:
			t.Errorf("%s: exit %d without naming the problem (%q): %s %s", tc.name, code, tc.word, out[:min(len(out), 400)], errOut)
		}
	}
}

// TestChoosingEndsAndShells: the user may name the ends (the line then runs from the named
// orifice) and keep one surface of a file with several.
func TestChoosingEndsAndShells(t *testing.T) {
	var first struct {
		Orifice   [3]float64 `json:"orifice"`
		ApicalEnd [3]float64 `json:"apical_end"`
		LengthMM  float64    `json:"length_mm"`
	}
	code, out, errOut := runCLI(t, "centerline", "--canal", "../../testdata/curve_45deg_r5.stl")
	if code != exitOK {
		t.Fatal(errOut)
	}
	json.Unmarshal([]byte(out), &first)
	pt := func(p [3]float64) string { return fmt.Sprintf("%g,%g,%g", p[0], p[1], p[2]) }
	code, out, errOut = runCLI(t, "centerline", "--canal", "../../testdata/curve_45deg_r5.stl",
		"--orifice", pt(first.ApicalEnd), "--apical-end", pt(first.Orifice))
	if code != exitOK {
		t.Fatal(errOut)
	}
	var swapped struct {
		Orifice  [3]float64 `json:"orifice"`
		LengthMM float64    `json:"length_mm"`
	}
	json.Unmarshal([]byte(out), &swapped)
	d := mgl64.Vec3(swapped.Orifice).Sub(mgl64.Vec3(first.ApicalEnd)).Len()
	if d > 0.3 || math.Abs(swapped.LengthMM-first.LengthMM) > 0.01*first.LengthMM {
		t.Errorf("named ends: line starts %.3f mm from the named orifice, length %.3f against %.3f", d, swapped.LengthMM, first.LengthMM)
	}
	if code, _, _ := runCLI(t, "centerline", "--canal", "x.stl", "--orifice", "1,2"); code != exitUsage {
		t.Errorf("a malformed point: exit %d, want 2", code)
	}

	// Two copies of a canal side by side: keep the first with --shell 1.
	spec, err := models.ParseCanalSpec("t.json", []byte(`{"segments":[{"kind":"straight","length":8},{"kind":"arc","radius":5,"angle":30}],"orifice_d":1,"apical_d":0.4}`))
	if err != nil {
		t.Fatal(err)
	}
	base := spec.Mesh(0.1, 32)
	two := &mesh.Mesh{Vertices: append([]mgl64.Vec3(nil), base.Vertices...), Triangles: append([][3]int32(nil), base.Triangles...)}
	off := int32(len(base.Vertices))
	for _, v := range base.Vertices {
		two.Vertices = append(two.Vertices, v.Add(mgl64.Vec3{5, 0, 0}))
	}
	for _, tri := range base.Triangles {
		two.Triangles = append(two.Triangles, [3]int32{tri[0] + off, tri[1] + off, tri[2] + off})
	}
	var b bytes.Buffer
	mesh.WriteSTL(&b, two, "two")
	path := writeFile(t, "two.stl", b.Bytes())
	code, out, errOut = runCLI(t, "centerline", "--canal", path, "--shell", "1")
	if code != exitOK || strings.Contains(out, "separate surfaces") || !strings.Contains(out, "surface 1 of 2 kept") {
		t.Errorf("--shell 1: exit %d, %s %s", code, out[:min(len(out), 300)], errOut)
	}
	if code, _, errOut := runCLI(t, "centerline", "--canal", path, "--shell", "3"); code != exitBadInput || !strings.Contains(errOut, "holds 2") {
		t.Errorf("--shell 3: exit %d, %s", code, errOut)
	}
}
