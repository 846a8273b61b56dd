package models

import (
	"strings"
	"testing"
)

// TestParseInstruments: both forms read, fields keep a sequence step's meaning and defaults,
// and every error names the file, the instrument and the field.
func TestParseInstruments(t *testing.T) {
	ins, warns, err := ParseInstruments("shelf.json", []byte(`[{"size": 20, "taper": 0.06},
		{"size": 25, "tapers": [[0, 0.04], [4, 0.06]], "section": "triangle"}, {"size": 20, "taper": 0.06}, {"size": 22, "taper": 0.04}]`))
	if err != nil {
		t.Fatal(err)
	}
	if len(ins) != 3 || ins[0].Label() != "20/.06" || ins[1].Label() != "25/.04-.06" || ins[1].Section.Name != "triangle" ||
		ins[0].CuttingLength != 16 || ins[0].Alloy.Name != "niti-superelastic" {
		t.Errorf("read %+v", ins)
	}
	// ISO 3630-1 lists no size 22; the repeated 20/.06 is dropped.
	if len(warns) != 2 || !strings.Contains(warns[0], "repeats instrument 1") || !strings.Contains(warns[1], "size 22") {
		t.Errorf("warnings %q", warns)
	}
	ins, _, err = ParseInstruments("shelf.json", []byte(`{"alloys": {"soft": {"elastic_modulus_gpa": 30,
		"shear_ultimate_mpa": 800, "recoverable_strain": 0.08, "strain_life_c": 0.4, "strain_life_b": 0.28,
		"cycles_above_limit": 5}}, "instruments": [{"size": 30, "taper": 0.04, "alloy": "soft"}]}`))
	if err != nil || len(ins) != 1 || ins[0].Alloy.Name != "soft" || ins[0].Alloy.StrainLifeC != 0.4 {
		t.Errorf("object form: %+v, %v", ins, err)
	}
	bad := []struct{ data, want string }{
		{`[{"size": 20, "taper": 0.06}, {"size": 25}]`, "shelf.json: instrument 2: taper: missing"},
		{`[{"size": 20, "taper": 0.06, "depth": "WL"}]`, `shelf.json: instrument 1: "depth": unknown field`},
		{`[{"size": 20, "taper": -1}]`, "instrument 1: taper: must be above 0"},
		{`[{"size": 20, "taper": 0.06, "alloy": "unobtainium"}]`, `instrument 1: alloy: unknown alloy "unobtainium"`},
		{"[\n{\"size\": 20,, \"taper\": 0.06}]", "shelf.json:2:13: broken JSON"},
		{`[]`, "lists no instruments"},
		{`{"files": []}`, `"files": unknown field`},
		{`[3]`, "instrument 1: must be a JSON object"},
		{`"30/.04"`, "must be a list of instruments"},
	}
	for _, b := range bad {
		_, _, err := ParseInstruments("shelf.json", []byte(b.data))
		if err == nil || !strings.Contains(err.Error(), b.want) {
			t.Errorf("%s: got %v, want %q", b.data, err, b.want)
		}
	}
	many := "[" + strings.Repeat(`{"size": 20, "taper": 0.06},`, MaxInstruments) + `{"size": 20, "taper": 0.06}]`
	if _, _, err := ParseInstruments("shelf.json", []byte(many)); err == nil || !strings.Contains(err.Error(), "more than") {
		t.Errorf("too many instruments: %v", err)
	}
}
