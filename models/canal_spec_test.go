package models

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

const canalGoodSpec = `{"name": "t",
 "segments": [{"kind": "straight", "length": 8},
              {"kind": "arc", "radius": 5, "angle": 40},
              {"kind": "arc", "radius": 8, "angle": 20, "plane_turn": 180},
              {"kind": "straight", "length": 2}],
 "orifice_d": 1.0, "apical_d": 0.25, "oval": 1.4, "working_length": 15.5}`

func TestParseCanalSpecGood(t *testing.T) {
	c, err := ParseCanalSpec("good.json", []byte(canalGoodSpec))
	if err != nil {
		t.Fatal(err)
	}
	// The format of the README, "Canal spec files": every field read as written.
	if c.Name != "t" || len(c.Segments) != 4 || c.OrificeD != 1 || c.ApicalD != 0.25 || c.Oval != 1.4 ||
		c.GivenWorkingLength != 15.5 || c.Segments[2].PlaneTurn != 180 || c.Segments[1].Radius != 5 {
		t.Errorf("parsed %+v", c)
	}
	if c.WorkingLength() != 15.5 {
		t.Errorf("working length %g, want 15.5", c.WorkingLength())
	}
	noWL := strings.Replace(canalGoodSpec, `, "working_length": 15.5`, "", 1)
	c2, err := ParseCanalSpec("nowl.json", []byte(noWL))
	if err != nil {
		t.Fatal(err)
	}
	// README, "Canal spec files": working_length defaults to the centerline length.
	if c2.WorkingLength() != c2.Length() {
		t.Errorf("default working length %g, want the length %g", c2.WorkingLength(), c2.Length())
	}
}

func TestParseCanalSpecErrorsNameFileAndPlace(t *testing.T) {
	seg := func(s string) string {
		return `{"name": "x", "orifice_d": 1, "apical_d": 0.3, "segments": [{"kind": "straight", "length": 5}, ` + s + `]}`
	}
	cases := []struct {
		name, data string
		want       []string // every piece must appear in the message
	}{
		{"unknown kind", seg(`{"kind": "spiral", "length": 3}`), []string{"segment 2", `"kind"`, "spiral"}},
		{"negative radius", seg(`{"kind": "arc", "radius": -5, "angle": 30}`), []string{"segment 2", `"radius"`, "-5"}},
		{"zero length", seg(`{"kind": "straight", "length": 0}`), []string{"segment 2", `"length"`}},
		{"negative angle", seg(`{"kind": "arc", "radius": 5, "angle": -1}`), []string{"segment 2", `"angle"`}},
		{"angle over a turn", seg(`{"kind": "arc", "radius": 5, "angle": 400}`), []string{"segment 2", `"angle"`}},
		{"missing angle", seg(`{"kind": "arc", "radius": 5}`), []string{"segment 2", `missing field "angle"`}},
		{"missing kind", seg(`{"length": 5}`), []string{"segment 2", `missing field "kind"`}},
		{"length on an arc", seg(`{"kind": "arc", "radius": 5, "angle": 30, "length": 2}`), []string{"segment 2", `"length"`}},
		{"radius on a straight", seg(`{"kind": "straight", "length": 2, "radius": 3}`), []string{"segment 2", `"radius"`}},
		{"unknown segment field", seg(`{"kind": "arc", "radius": 5, "angle": 30, "twist": 2}`), []string{"segment 2", `unknown field "twist"`}},
		{"string for a number", seg(`{"kind": "arc", "radius": "5", "angle": 30}`), []string{"segment 2", `"radius"`, "number"}},
		{"unknown top field", `{"name": "x", "orifice_d": 1, "apical_d": 0.3, "colour": 1, "segments": [{"kind": "straight", "length": 5}]}`,
			[]string{`unknown field "colour"`}},
		{"missing apical_d", `{"name": "x", "orifice_d": 1, "segments": [{"kind": "straight", "length": 5}]}`,
			[]string{`missing field "apical_d"`}},
		{"missing segments", `{"name": "x", "orifice_d": 1, "apical_d": 0.3}`, []string{`missing field "segments"`}},
		{"empty segments", `{"orifice_d": 1, "apical_d": 0.3, "segments": []}`, []string{`"segments"`, "empty"}},
		{"zero apical_d", `{"orifice_d": 1, "apical_d": 0, "segments": [{"kind": "straight", "length": 5}]}`, []string{`"apical_d"`}},
		{"oval under 1", `{"orifice_d": 1, "apical_d": 0.3, "oval": 0.5, "segments": [{"kind": "straight", "length": 5}]}`, []string{`"oval"`}},
		{"negative working length", `{"orifice_d": 1, "apical_d": 0.3, "working_length": -2, "segments": [{"kind": "straight", "length": 5}]}`,
			[]string{`"working_length"`}},
		{"too long", `{"orifice_d": 1, "apical_d": 0.3, "segments": [{"kind": "straight", "length": 1e300}]}`, []string{"segment 1", `"length"`}},
		// Broken JSON: the comma is missing before "apical_d" on line 3, column 2.
		{"broken JSON", "{\"name\": \"x\",\n \"orifice_d\": 1\n \"apical_d\": 0.3}", []string{"line 3, column 2"}},
		{"truncated", `{"name": "x", "segments": [`, []string{"line 1", "broken JSON"}},
		{"not an object", `[1, 2]`, []string{"JSON object"}},
	}
	for _, tc := range cases {
		_, err := ParseCanalSpec("bad/"+tc.name+".json", []byte(tc.data))
		if err == nil {
			t.Errorf("%s: accepted", tc.name)
			continue
		}
		msg := err.Error()
		if !strings.Contains(msg, "bad/"+tc.name+".json") {
			t.Errorf("%s: %q does not name the file", tc.name, msg)
		}
		for _, w := range tc.want {
			if !strings.Contains(msg, w) {
				t.Errorf("%s: %q lacks %q", tc.name, msg, w)
			}
		}
	}
}

func TestApicalWiderThanOrificeIsAllowed(t *testing.T) {
	// Odd but legal (the brief allows it): only non-positive diameters are errors.
	_, err := ParseCanalSpec("odd.json", []byte(`{"orifice_d": 0.3, "apical_d": 0.5, "segments": [{"kind": "straight", "length": 5}]}`))
	if err != nil {
		t.Error(err)
	}
}

// TestLooksLikeJSON: JSON of any shape, broken or in UTF-16, is answered as JSON; an STL (ASCII
// "solid" or a binary header, ISO/IEC-free but common practice of the format) is not.
func TestLooksLikeJSON(t *testing.T) {
	utf16 := func(s string, bigEndian bool) string {
		var b []byte
		for _, r := range s {
			if bigEndian {
				b = append(b, 0, byte(r))
			} else {
				b = append(b, byte(r), 0)
			}
		}
		return string(b)
	}
	for data, want := range map[string]bool{
		canalGoodSpec:                          true,
		"\n\t  {\"name\": 1}":                  true,
		"\xef\xbb\xbf{}":                       true,
		"{\"name\": ,,":                        true, // broken JSON is still JSON to be answered as such
		"null":                                 true,
		" [1, 2] ":                             true,
		"\"a string\"":                         true,
		"17.5\n":                               true,
		utf16(`{"name": "x"}`, false):          true,
		utf16(`{"name": "x"}`, true):           true,
		"\xff\xfe" + utf16("{}", false):        true,
		"solid canal\nfacet ...":               false,
		"\x00\x00\x00binary head":              false,
		"nullify" + strings.Repeat("\x00", 90): false,
		"":                                     false,
		"   ":                                  false,
	} {
		if got := LooksLikeJSON([]byte(data)); got != want {
			t.Errorf("LooksLikeJSON(%q) = %v, want %v", data, got, want)
		}
	}
}

func TestLoadCanalSpec(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "c.json")
	if err := os.WriteFile(path, []byte(canalGoodSpec), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := LoadCanalSpec(path); err != nil {
		t.Error(err)
	}
	_, err := LoadCanalSpec(filepath.Join(dir, "missing.json"))
	if err == nil || !strings.Contains(err.Error(), "missing.json") {
		t.Errorf("missing file: %v", err)
	}
}

// FuzzParseCanalSpec: no input may panic, hang or allocate beyond its size; whatever
// parses must also sample and mesh coarsely without trouble.
func FuzzParseCanalSpec(f *testing.F) {
	f.Add([]byte(canalGoodSpec))
	f.Add(DemoCanalJSON())
	f.Add([]byte(`{"orifice_d": 1, "apical_d": 0.3, "segments": [{"kind": "arc", "radius": 0.001, "angle": 360, "plane_turn": -3600}]}`))
	f.Add([]byte(`{"segments": [{"kind": "straight", "length": 1e-300}], "orifice_d": 50, "apical_d": 1e-300}`))
	f.Add([]byte(`{"name": "\u0000", "segments": null}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := ParseCanalSpec("fuzz.json", data)
		if err != nil {
			if !strings.Contains(err.Error(), "fuzz.json") {
				t.Fatalf("error does not name the file: %v", err)
			}
			return
		}
		l := c.Length()
		if !(l > 0) || l > MaxCanalLengthMM {
			t.Fatalf("length %g", l)
		}
		pts, _, _ := c.Centerline(l / 50)
		if len(pts) > 52 {
			t.Fatalf("%d points for 50 steps", len(pts))
		}
		m := c.Mesh(l/20, 8)
		if len(m.Triangles) > 2*21*8+2*8 {
			t.Fatalf("%d triangles", len(m.Triangles))
		}
		_ = c.Curvature(l / 2)
		_ = c.Diameter(l / 3)
	})
}
