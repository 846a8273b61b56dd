package models

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

// designExample uses every field of a sequence step (README, "Sequence files").
const designExample = `{"alloys": {"my-alloy": {"elastic_modulus_gpa": 40, "shear_ultimate_mpa": 900, "recoverable_strain": 0.07,
                         "strain_life_c": 0.33, "strain_life_b": 0.3, "low_cycle_b": 0.1}},
 "steps": [{"size": 25, "taper": 0.06, "depth": "WL-2"},
           {"size": 25, "taper": 0.04, "depth": "WL", "rpm": 400, "peck_mm": 1.0, "retract_mm": 2.0,
            "advance_mm_s": 1.5, "torque_limit_ncm": 2.0, "alloy": "niti-superelastic",
            "section": "triangle", "tapers": [[0, 0.04], [4, 0.06]], "max_flute_d": 1.2}]}`

func TestParseSequenceDesignExample(t *testing.T) {
	seq, err := ParseSequence("example.json", []byte(designExample))
	if err != nil {
		t.Fatal(err)
	}
	if len(seq.Steps) != 2 || seq.PathModel != PathCentred || len(seq.Warnings) != 0 {
		t.Fatalf("steps %d, path %q, warnings %v", len(seq.Steps), seq.PathModel, seq.Warnings)
	}
	// Defaults stated in the README ("Sequence files"): rpm 400, peck 1.0, retract 2.0, advance 1.5, superelastic
	// alloy, round section, 16 mm cutting length, 1.2 mm flute cap.
	s1 := seq.Steps[0]
	if s1.RPM != 400 || s1.PeckMM != 1 || s1.RetractMM != 2 || s1.AdvanceMMs != 1.5 || s1.TorqueLimitNcm != 0 ||
		s1.AlloyName != AlloyNiTiSuperelastic || s1.SectionName != SectionRound ||
		s1.Instrument.CuttingLength != 16 || s1.Instrument.MaxFluteD != 1.2 || s1.Depth != DepthWL(-2) {
		t.Errorf("step 1 defaults: %+v", s1)
	}
	s2 := seq.Steps[1]
	if s2.Instrument.Label() != "25/.04-.06" || s2.SectionName != SectionTriangle || s2.TorqueLimitNcm != 2 ||
		s2.Instrument.Section.Name != SectionTriangle || s2.Instrument.Alloy.Name != AlloyNiTiSuperelastic {
		t.Errorf("step 2: %+v", s2)
	}
	// ISO 3630-1 d = d0 + taper*u, piecewise: 0.25 + 4*0.04 + 2*0.06 at 6 mm.
	if d := s2.Instrument.Diameter(6); math.Abs(d-0.53) > 1e-12 {
		t.Errorf("step 2 d(6) = %g, want 0.53", d)
	}
	if a := seq.Alloys["my-alloy"]; a.StrainLifeC != 0.33 || a.Illustrative || a.Name != "my-alloy" {
		t.Errorf("file alloy: %+v", a)
	}
}

func TestParseSequenceErrors(t *testing.T) {
	// Common practice for input files: every error names the file, the step (from 1) and the field.
	ok := `{"size": 25, "taper": 0.04, "depth": "WL"}`
	cases := []struct {
		name, json, want string
	}{
		{"taper zero", `{"steps": [` + ok + `, {"size": 25, "taper": 0, "depth": "WL"}]}`,
			"demo.json: step 2: taper: must be above 0"},
		{"taper negative", `{"steps": [{"size": 25, "taper": -0.02, "depth": "WL"}]}`,
			"demo.json: step 1: taper: must be above 0"},
		{"unknown alloy", `{"steps": [` + ok + `, ` + ok + `, {"size": 30, "taper": 0.04, "depth": "WL", "alloy": "unobtainium"}]}`,
			"demo.json: step 3: alloy: unknown alloy \"unobtainium\""},
		{"missing size", `{"steps": [{"taper": 0.04, "depth": "WL"}]}`, "demo.json: step 1: size: missing"},
		{"missing taper", `{"steps": [{"size": 25, "depth": "WL"}]}`, "demo.json: step 1: taper: missing"},
		{"missing depth", `{"steps": [{"size": 25, "taper": 0.04}]}`, "demo.json: step 1: depth: missing"},
		{"unknown step field", `{"steps": [` + ok + `, {"size": 25, "taper": 0.04, "depth": "WL", "speed": 300}]}`,
			"demo.json: step 2: \"speed\": unknown field"},
		{"field names are case-sensitive", `{"steps": [{"Size": 25, "taper": 0.04, "depth": "WL"}]}`,
			"demo.json: step 1: \"Size\": unknown field"},
		{"unknown top field", `{"steps": [` + ok + `], "name": "x"}`, "demo.json: \"name\": unknown field"},
		{"size not whole", `{"steps": [{"size": 25.5, "taper": 0.04, "depth": "WL"}]}`, "demo.json: step 1: size: must be a whole number"},
		{"size zero", `{"steps": [{"size": 0, "taper": 0.04, "depth": "WL"}]}`, "demo.json: step 1: size: must be from 1"},
		{"size string", `{"steps": [{"size": "25", "taper": 0.04, "depth": "WL"}]}`, "demo.json: step 1: size: must be a number"},
		{"rpm zero", `{"steps": [{"size": 25, "taper": 0.04, "depth": "WL", "rpm": 0}]}`, "demo.json: step 1: rpm: must be above 0"},
		{"peck zero", `{"steps": [{"size": 25, "taper": 0.04, "depth": "WL", "peck_mm": 0}]}`, "demo.json: step 1: peck_mm: must be at least"},
		{"retract negative", `{"steps": [{"size": 25, "taper": 0.04, "depth": "WL", "retract_mm": -1}]}`, "demo.json: step 1: retract_mm: must be at least 0"},
		{"advance zero", `{"steps": [{"size": 25, "taper": 0.04, "depth": "WL", "advance_mm_s": 0}]}`, "demo.json: step 1: advance_mm_s: must be at least"},
		{"torque negative", `{"steps": [{"size": 25, "taper": 0.04, "depth": "WL", "torque_limit_ncm": -1}]}`, "demo.json: step 1: torque_limit_ncm: must be at least 0"},
		{"unknown section", `{"steps": [{"size": 25, "taper": 0.04, "depth": "WL", "section": "star"}]}`, "demo.json: step 1: section: unknown section \"star\""},
		{"bad depth", `{"steps": [{"size": 25, "taper": 0.04, "depth": "WL*2"}]}`, "demo.json: step 1: depth: "},
		{"null depth", `{"steps": [{"size": 25, "taper": 0.04, "depth": null}]}`, "demo.json: step 1: depth: "},
		{"flute cap under tip", `{"steps": [{"size": 40, "taper": 0.04, "depth": "WL", "max_flute_d": 0.3}]}`, "demo.json: step 1: max_flute_d: 0.3 mm is below the tip"},
		{"tapers not increasing", `{"steps": [{"size": 25, "depth": "WL", "tapers": [[0, 0.04], [4, 0.06], [4, 0.02]]}]}`,
			"demo.json: step 1: tapers[2]: starts at 4 mm, not after"},
		{"tapers not from tip", `{"steps": [{"size": 25, "depth": "WL", "tapers": [[1, 0.04]]}]}`, "demo.json: step 1: tapers[0]: the first segment must start at the tip"},
		{"tapers bad pair", `{"steps": [{"size": 25, "depth": "WL", "tapers": [[0, 0.04, 1]]}]}`, "demo.json: step 1: tapers[0]: must be a pair"},
		{"tapers zero taper", `{"steps": [{"size": 25, "depth": "WL", "tapers": [[0, 0.04], [3, 0]]}]}`, "demo.json: step 1: tapers[1]: taper must be above 0"},
		{"taper disagrees with tapers", `{"steps": [{"size": 25, "taper": 0.06, "depth": "WL", "tapers": [[0, 0.04]]}]}`, "demo.json: step 1: taper: 0.06 differs"},
		{"no steps", `{"alloys": {}}`, "demo.json: steps: missing"},
		{"empty steps", `{"steps": []}`, "demo.json: steps: must list at least one step"},
		{"steps not a list", `{"steps": {"size": 25}}`, "demo.json: steps: must be a list"},
		{"step not an object", `{"steps": [25]}`, "demo.json: step 1: must be a JSON object"},
		{"top not an object", `[1, 2]`, "demo.json: the top level must be a JSON object"},
		{"bad path model", `{"steps": [` + ok + `], "path_model": "straight"}`, "demo.json: path_model: want"},
		{"alloy field missing", `{"alloys": {"x": {"elastic_modulus_gpa": 40}}, "steps": [` + ok + `]}`,
			"demo.json: alloys: \"x\": shear_ultimate_mpa: missing"},
		{"alloy b zero", `{"alloys": {"x": {"elastic_modulus_gpa": 40, "shear_ultimate_mpa": 900, "recoverable_strain": 0.07,
			"strain_life_c": 0.33, "strain_life_b": 0, "low_cycle_b": 0.1}}, "steps": [` + ok + `]}`,
			"demo.json: alloys: \"x\": strain_life_b: must be above 0"},
		{"alloy strain as percent", `{"alloys": {"x": {"elastic_modulus_gpa": 40, "shear_ultimate_mpa": 900, "recoverable_strain": 7,
			"strain_life_c": 0.33, "strain_life_b": 0.3, "low_cycle_b": 0.1}}, "steps": [` + ok + `]}`,
			"demo.json: alloys: \"x\": recoverable_strain: must be below 0.2"},
		{"alloy low-cycle b negative", `{"alloys": {"x": {"elastic_modulus_gpa": 40, "shear_ultimate_mpa": 900, "recoverable_strain": 0.07,
			"strain_life_c": 0.33, "strain_life_b": 0.3, "low_cycle_b": -1}}, "steps": [` + ok + `]}`,
			"demo.json: alloys: \"x\": low_cycle_b: must be above 0"},
		{"alloy unknown field", `{"alloys": {"x": {"density": 6.4}}, "steps": [` + ok + `]}`, "demo.json: alloys: \"x\": \"density\": unknown field"},
	}
	for _, c := range cases {
		_, err := ParseSequence("demo.json", []byte(c.json))
		if err == nil {
			t.Errorf("%s: no error, want %q", c.name, c.want)
			continue
		}
		if !strings.HasPrefix(err.Error(), c.want) {
			t.Errorf("%s:\n got %q\nwant %q...", c.name, err.Error(), c.want)
		}
		var se *SequenceError
		if !errors.As(err, &se) {
			t.Errorf("%s: error is %T, not *SequenceError", c.name, err)
		}
	}
}

func TestParseSequenceBrokenJSON(t *testing.T) {
	// The line and column of the first bad byte, counted from 1 (common practice for text files).
	data := "{\"steps\": [\n  {\"size\": 25, \"taper\": 0.04,, \"depth\": \"WL\"}\n]}\n"
	_, err := ParseSequence("demo.json", []byte(data))
	var se *SequenceError
	if !errors.As(err, &se) {
		t.Fatalf("error %v", err)
	}
	wantCol := strings.Index("  {\"size\": 25, \"taper\": 0.04,, \"depth\": \"WL\"}", ",,") + 2
	if se.Line != 2 || se.Column != wantCol || !strings.HasPrefix(err.Error(), "demo.json:2:") {
		t.Errorf("got %q (line %d col %d), want line 2 col %d", err, se.Line, se.Column, wantCol)
	}
	// Cut short: the error points just after the last bracket.
	_, err = ParseSequence("demo.json", []byte("{\"steps\": [\n"))
	if !errors.As(err, &se) || se.Line != 1 || se.Column != len(`{"steps": [`)+1 {
		t.Errorf("truncated file: %v", err)
	}
	for _, bad := range []string{"", "   ", "{} {}", "\x00"} {
		if _, err := ParseSequence("demo.json", []byte(bad)); err == nil || !strings.HasPrefix(err.Error(), "demo.json:") {
			t.Errorf("%q: %v", bad, err)
		}
	}
}

func TestParseSequenceNonISOWarning(t *testing.T) {
	// ISO 3630-1 has no size 27 or 65: a warning naming the step, not an error.
	seq, err := ParseSequence("demo.json", []byte(`{"steps": [{"size": 25, "taper": 0.04, "depth": "WL-1"},
		{"size": 27, "taper": 0.04, "depth": "WL"}, {"size": 65, "taper": 0.02, "depth": "WL"}]}`))
	if err != nil {
		t.Fatal(err)
	}
	if len(seq.Warnings) != 2 || !strings.HasPrefix(seq.Warnings[0], "demo.json: step 2: size 27") ||
		!strings.HasPrefix(seq.Warnings[1], "demo.json: step 3: size 65") {
		t.Errorf("warnings %q", seq.Warnings)
	}
}

func TestSequenceAlloyOverride(t *testing.T) {
	seq, err := ParseSequence("demo.json", []byte(`{"alloys": {"niti-superelastic": {"elastic_modulus_gpa": 50,
		"shear_ultimate_mpa": 950, "recoverable_strain": 0.065, "strain_life_c": 0.3, "strain_life_b": 0.35,
		"low_cycle_b": 0.08}}, "path_model": "elastic", "steps": [{"size": 25, "taper": 0.04, "depth": 17}]}`))
	if err != nil {
		t.Fatal(err)
	}
	a := seq.Steps[0].Instrument.Alloy
	if a.ElasticModulusGPa != 50 || a.LowCycleB != 0.08 || a.Illustrative || seq.PathModel != PathElastic || seq.Steps[0].Depth != DepthMM(17) {
		t.Errorf("override not applied: %+v, path %q", a, seq.PathModel)
	}
}

// TestSequenceLegacyAlloyField: files written before the strain-life law became continuous
// carry cycles_above_limit; they still load, the field is set aside with a note naming it, and
// the alloy takes the default low-cycle exponent.
func TestSequenceLegacyAlloyField(t *testing.T) {
	seq, err := ParseSequence("old.json", []byte(`{"alloys": {"mine": {"elastic_modulus_gpa": 40,
		"shear_ultimate_mpa": 900, "recoverable_strain": 0.07, "strain_life_c": 0.33, "strain_life_b": 0.3,
		"cycles_above_limit": 3}}, "steps": [{"size": 25, "taper": 0.04, "depth": 17, "alloy": "mine"}]}`))
	if err != nil {
		t.Fatal(err)
	}
	if a := seq.Steps[0].Instrument.Alloy; a.LowCycleB != DefaultLowCycleB {
		t.Errorf("low-cycle exponent %g, want the default %g", a.LowCycleB, DefaultLowCycleB)
	}
	if len(seq.Warnings) != 1 || !strings.Contains(seq.Warnings[0], "old.json") ||
		!strings.Contains(seq.Warnings[0], "cycles_above_limit is no longer used") {
		t.Errorf("warnings %q", seq.Warnings)
	}
}

func TestSequenceRoundTrip(t *testing.T) {
	seq, err := ParseSequence("example.json", []byte(designExample))
	if err != nil {
		t.Fatal(err)
	}
	out, err := json.Marshal(seq)
	if err != nil {
		t.Fatal(err)
	}
	back, err := ParseSequence("example.json", out)
	if err != nil {
		t.Fatalf("re-reading %s: %v", out, err)
	}
	if !reflect.DeepEqual(seq, back) {
		t.Errorf("round trip differs:\n%+v\n%+v", seq, back)
	}

	// A sequence built in code (as a planner would) with an alloy of its own is written so that it
	// reads back the same.
	custom := Alloy{Name: "test-alloy", ElasticModulusGPa: 45, ShearUltimateMPa: 850, RecoverableStrain: 0.06,
		StrainLifeC: 0.3, StrainLifeB: 0.32, LowCycleB: 0.09}
	in := NewInstrument(30, 0.05)
	in.Alloy = custom
	in.Section = Section{Name: SectionSquare}
	planned := &Sequence{PathModel: PathCentred, Steps: []Step{
		NewStep(NewInstrument(20, 0.04), DepthWL(-3)),
		NewStep(in, DepthMM(16.25)),
	}}
	out, err = json.Marshal(planned)
	if err != nil {
		t.Fatal(err)
	}
	back, err = ParseSequence("", out)
	if err != nil {
		t.Fatalf("re-reading %s: %v", out, err)
	}
	if got := back.Steps[1]; got.Instrument.Alloy != custom || got.SectionName != SectionSquare || got.Depth != DepthMM(16.25) ||
		got.Instrument.Label() != "30/.05" || back.Steps[0].Depth != DepthWL(-3) {
		t.Errorf("planned sequence read back as %+v", back.Steps)
	}
}

func TestCheckDepths(t *testing.T) {
	seq, err := ParseSequence("demo.json", []byte(`{"steps": [{"size": 20, "taper": 0.04, "depth": 15},
		{"size": 25, "taper": 0.06, "depth": "WL"}, {"size": 25, "taper": 0.04, "depth": "WL+0.5"}]}`))
	if err != nil {
		t.Fatal(err)
	}
	if err := seq.CheckDepths(18, 17.5); err != nil {
		t.Errorf("WL+0.5 = 18.0 on an 18 mm canal: %v", err)
	}
	err = seq.CheckDepths(17.8, 17.5)
	if err == nil || !strings.HasPrefix(err.Error(), "demo.json: step 3: depth:") {
		t.Errorf("WL+0.5 beyond a 17.8 mm canal: %v", err)
	}
	err = seq.CheckDepths(14, 13)
	if err == nil || !strings.HasPrefix(err.Error(), "demo.json: step 1: depth:") {
		t.Errorf("15 mm on a 14 mm canal: %v", err)
	}
	short := &Sequence{Steps: []Step{NewStep(NewInstrument(25, 0.04), DepthWL(-20))}}
	if err := short.CheckDepths(18, 17.5); err == nil || !strings.Contains(err.Error(), "step 1: depth:") {
		t.Errorf("WL-20 above the orifice: %v", err)
	}
	if err := seq.CheckDepths(math.NaN(), 17); err == nil {
		t.Error("NaN canal length accepted")
	}
}

func TestLoadSequence(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "plan.json")
	if err := os.WriteFile(path, []byte(`{"steps": [{"size": 25, "taper": 0, "depth": "WL"}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := LoadSequence(path); err == nil || !strings.HasPrefix(err.Error(), path+": step 1: taper:") {
		t.Errorf("LoadSequence: %v", err)
	}
	if _, err := LoadSequence(filepath.Join(dir, "missing.json")); err == nil || !strings.Contains(err.Error(), "missing.json") {
		t.Errorf("missing file: %v", err)
	}
}

func FuzzParseSequence(f *testing.F) {
	f.Add([]byte(designExample))
	f.Add([]byte(`{"steps": [{"size": 27, "taper": 0.04, "depth": 12.5, "path_model": "elastic"}]}`))
	f.Add([]byte(`{"steps": [{"size": 25, "depth": "WL+0.5", "tapers": [[0, 0.02], [2.5, 0.1]], "section": "square"}], "path_model": "elastic"}`))
	f.Add([]byte(`{"steps": [{"size": 25, "taper": 0.04, "depth": "WL",, }]}`))
	f.Add([]byte(`{"alloys": {"niti-superelastic": {"elastic_modulus_gpa": 50, "shear_ultimate_mpa": 950,
		"recoverable_strain": 0.065, "strain_life_c": 0.3, "strain_life_b": 0.35, "cycles_above_limit": 2},
		"b": {"elastic_modulus_gpa": 1e3, "shear_ultimate_mpa": 1e-3, "recoverable_strain": 0.19,
		"strain_life_c": 1e-9, "strain_life_b": 9, "low_cycle_b": 1e9}},
		"steps": [{"size": 140, "taper": 1, "depth": "WL-1e-3", "alloy": "b", "rpm": 20000, "peck_mm": 0.01,
		"retract_mm": 0, "advance_mm_s": 100, "torque_limit_ncm": 100, "cutting_length": 50, "max_flute_d": 10}]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		seq, err := ParseSequence("fuzz.json", data)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "fuzz.json") {
				t.Fatalf("error without the file name: %v", err)
			}
			return
		}
		if len(seq.Steps) == 0 {
			t.Fatal("accepted a sequence without steps")
		}
		for i, st := range seq.Steps {
			in := st.Instrument
			for _, u := range []float64{0, 1, 5, 16, 30} {
				if d := in.Diameter(u); !(d > 0) || d > 10 {
					t.Fatalf("step %d: d(%g) = %g", i+1, u, d)
				}
			}
			if !(st.RPM > 0 && st.PeckMM > 0 && st.AdvanceMMs > 0) {
				t.Fatalf("step %d: accepted %+v", i+1, st)
			}
		}
		// Whatever was accepted is written so that it reads back the same.
		out, err := json.Marshal(seq)
		if err != nil {
			t.Fatalf("marshal: %v", err)
		}
		back, err := ParseSequence("fuzz.json", out)
		if err != nil {
			t.Fatalf("re-reading %s: %v", out, err)
		}
		back.Warnings, seq.Warnings = nil, nil
		back.legacyNotes, seq.legacyNotes = nil, nil
		if !reflect.DeepEqual(seq, back) {
			t.Fatalf("round trip differs:\n%+v\n%+v", seq, back)
		}
	})
}

func BenchmarkParseSequence(b *testing.B) {
	data := []byte(designExample)
	for b.Loop() {
		if _, err := ParseSequence("example.json", data); err != nil {
			b.Fatal(err)
		}
	}
}

func TestDemoSequenceFitsDemoCanal(t *testing.T) {
	// The embedded demo sequence must read cleanly and reach no deeper than the demo canal.
	seq, err := ParseSequence("demo sequence", DemoSequenceJSON())
	if err != nil {
		t.Fatal(err)
	}
	if len(seq.Warnings) != 0 {
		t.Errorf("warnings: %q", seq.Warnings)
	}
	c := DemoCanal()
	if err := seq.CheckDepths(c.Length(), c.WorkingLength()); err != nil {
		t.Error(err)
	}
}
