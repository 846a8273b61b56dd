package models

import (
	"errors"
	"fmt"
	"strings"
	"testing"
)

// The checks below are common practice for files a person writes by hand (RFC 8259 says names
// within an object "SHOULD be unique" and leaves duplicates to the reader; we refuse them rather
// than let the last one win).

const oneStep = `{"size": 25, "taper": 0.04, "depth": "WL"}`

// TestRepeatedKeysAreRefusedNamingTheLine: a step written with size 15 and then 80 was read as
// an 80/.04; now it is an error naming the field and both lines, in every input format.
func TestRepeatedKeysAreRefusedNamingTheLine(t *testing.T) {
	seq := "{\"steps\": [\n" + oneStep + ",\n{\"size\": 15, \"taper\": 0.04,\n \"size\": 80, \"depth\": \"WL\"}]}"
	_, err := ParseSequence("plan.json", []byte(seq))
	var se *SequenceError
	if !errors.As(err, &se) || se.Line != 4 || se.Step != 2 || !strings.HasPrefix(err.Error(), `plan.json:4:2: step 2: "size": given twice (first on line 3)`) {
		t.Errorf("sequence: %v", err)
	}
	spec := "{\"name\": \"x\", \"orifice_d\": 1, \"apical_d\": 0.3,\n \"segments\": [{\"kind\": \"straight\", \"length\": 5,\n \"length\": 50}]}"
	_, err = ParseCanalSpec("c.json", []byte(spec))
	if err == nil || !strings.Contains(err.Error(), "line 3, column 2: segment 1: field \"length\" given twice (first on line 2)") {
		t.Errorf("spec: %v", err)
	}
	_, _, err = ParseInstruments("shelf.json", []byte("[{\"size\": 20, \"taper\": 0.06, \"taper\": 0.04}]"))
	if err == nil || !strings.Contains(err.Error(), `shelf.json:1:30: instrument 1: "taper": given twice`) {
		t.Errorf("instruments: %v", err)
	}
	// Repeated names deeper down (an alloy's parameter, an alloy's name) are caught too.
	_, err = ParseSequence("plan.json", []byte(`{"alloys": {"a": {"elastic_modulus_gpa": 40, "elastic_modulus_gpa": 4}}, "steps": [`+oneStep+`]}`))
	if err == nil || !strings.Contains(err.Error(), `alloys: "a": "elastic_modulus_gpa": given twice`) {
		t.Errorf("alloy parameter: %v", err)
	}
}

// TestByteOrderMarkAndUTF16: a UTF-8 byte-order mark (written by some editors) is read in every
// format; UTF-16 text is named as such, not reported as broken JSON.
func TestByteOrderMarkAndUTF16(t *testing.T) {
	bom := "\xef\xbb\xbf"
	if seq, err := ParseSequence("s.json", []byte(bom+`{"steps": [`+oneStep+`]}`)); err != nil || len(seq.Steps) != 1 {
		t.Errorf("sequence with a BOM: %v", err)
	}
	if _, err := ParseCanalSpec("c.json", []byte(bom+canalGoodSpec)); err != nil {
		t.Errorf("spec with a BOM: %v", err)
	}
	if ins, _, err := ParseInstruments("i.json", []byte(bom+`[{"size": 20, "taper": 0.06}]`)); err != nil || len(ins) != 1 {
		t.Errorf("instruments with a BOM: %v", err)
	}
	// The line and column of a mistake count from after the mark, as an editor shows them.
	if _, err := ParseSequence("s.json", []byte(bom+"{\"steps\": [\n  ,]}")); err == nil || !strings.HasPrefix(err.Error(), "s.json:2:3:") {
		t.Errorf("place after a BOM: %v", err)
	}
	var u16 []byte
	for _, r := range `{"steps": []}` {
		u16 = append(u16, byte(r), 0)
	}
	for _, data := range [][]byte{u16, append([]byte{0xFF, 0xFE}, u16...)} {
		if _, err := ParseSequence("s.json", data); err == nil || !strings.Contains(err.Error(), "UTF-16 text: save the file as UTF-8") {
			t.Errorf("UTF-16 sequence: %v", err)
		}
		if _, err := ParseCanalSpec("c.json", data); err == nil || !strings.Contains(err.Error(), "canal spec c.json: UTF-16 text") {
			t.Errorf("UTF-16 spec: %v", err)
		}
	}
	if _, err := ParseSequence("s.json", []byte("{\"steps\": [{\"size\": 25, \"alloy\": \"\xff\"}]}")); err == nil || !strings.Contains(err.Error(), "not UTF-8 text") {
		t.Errorf("Latin-1 byte: %v", err)
	}
}

// TestNullIsNeverTakenAsTheDefault: a null would leave a field at its default; it is refused,
// naming the field and what it should be.
func TestNullIsNeverTakenAsTheDefault(t *testing.T) {
	for field, want := range map[string]string{
		`"rpm": null`:           "step 1: rpm: must be a number, not null",
		`"alloy": null`:         "step 1: alloy: must be a string, not null",
		`"tapers": null`:        "step 1: tapers: must be a list of [mm from tip, taper] pairs",
		`"tapers": [[0, null]]`: "step 1: tapers[0]: must be a pair [mm from tip, taper], not null",
	} {
		_, err := ParseSequence("s.json", []byte(`{"steps": [{"size": 25, "taper": 0.04, "depth": "WL", `+field+`}]}`))
		if err == nil || !strings.HasPrefix(err.Error(), "s.json: "+want) {
			t.Errorf("%s: %v, want %q", field, err, want)
		}
	}
	if _, err := ParseCanalSpec("c.json", []byte(`{"orifice_d": 1, "apical_d": null, "segments": [{"kind": "straight", "length": 5}]}`)); err == nil ||
		!strings.Contains(err.Error(), `field "apical_d": want a number, got null`) {
		t.Errorf("spec null: %v", err)
	}
}

// TestStepsAreCapped: a sequence of more steps than anyone uses (a 110,000-step file ran out of
// memory) is refused with the limit named.
func TestStepsAreCapped(t *testing.T) {
	steps := strings.TrimSuffix(strings.Repeat(oneStep+",", MaxSteps+1), ",")
	_, err := ParseSequence("s.json", []byte(`{"steps": [`+steps+`]}`))
	if err == nil || !strings.Contains(err.Error(), fmt.Sprintf("steps: %d steps, more than the %d a sequence may hold", MaxSteps+1, MaxSteps)) {
		t.Errorf("%d steps: %v", MaxSteps+1, err)
	}
	steps = strings.TrimSuffix(strings.Repeat(oneStep+",", MaxSteps), ",")
	if _, err := ParseSequence("s.json", []byte(`{"steps": [`+steps+`]}`)); err != nil {
		t.Errorf("%d steps: %v", MaxSteps, err)
	}
}

// TestTaperPlausibility: common practice of the trade: rotary files are made with tapers up to
// about .12 (orifice shapers); a steeper one is kept with a warning, and a taper typed as 0.6
// for .06 is refused, naming the limit.
func TestTaperPlausibility(t *testing.T) {
	seq, err := ParseSequence("s.json", []byte(`{"steps": [{"size": 25, "taper": 0.15, "depth": "WL"}, `+
		`{"size": 25, "tapers": [[0, 0.04], [3, 0.14]], "depth": "WL"}, `+oneStep+`]}`))
	if err != nil {
		t.Fatal(err)
	}
	if len(seq.Warnings) != 2 || !strings.HasPrefix(seq.Warnings[0], "s.json: step 1: taper 0.15 is steeper than the .12") ||
		!strings.HasPrefix(seq.Warnings[1], "s.json: step 2: taper 0.14") {
		t.Errorf("warnings %q", seq.Warnings)
	}
	for _, bad := range []string{`"taper": 0.6`, `"tapers": [[0, 0.04], [2, 0.6]]`} {
		_, err := ParseSequence("s.json", []byte(`{"steps": [{"size": 25, `+bad+`, "depth": "WL"}]}`))
		if err == nil || !strings.Contains(err.Error(), "must be at most 0.2 mm per mm (got 0.6)") {
			t.Errorf("%s: %v", bad, err)
		}
	}
	_, warns, err := ParseInstruments("i.json", []byte(`[{"size": 25, "taper": 0.15}]`))
	if err != nil || len(warns) != 1 || !strings.Contains(warns[0], "instrument 1: taper 0.15") {
		t.Errorf("instruments: %q %v", warns, err)
	}
}

// TestValidateSaysWhatTheFileWouldSay: a sequence changed in code (as the window's editor does)
// is checked by the same rules with the same words as the file it would be written to.
func TestValidateSaysWhatTheFileWouldSay(t *testing.T) {
	base := func() *Sequence {
		return &Sequence{Name: "s.json", PathModel: PathCentred, Steps: []Step{
			NewStep(NewInstrument(20, 0.04), DepthWL(-1)), NewStep(NewInstrument(25, 0.06), DepthWL(0))}}
	}
	if err := base().Validate(); err != nil {
		t.Fatalf("a good sequence: %v", err)
	}
	changes := map[string]func(s *Step){
		"rpm zero":         func(s *Step) { s.RPM = 0 },
		"peck too long":    func(s *Step) { s.PeckMM = 60 },
		"taper too steep":  func(s *Step) { s.Instrument.Taper = 0.6 },
		"taper zero":       func(s *Step) { s.Instrument.Taper = 0 },
		"tapers backwards": func(s *Step) { s.Instrument.Tapers = []TaperSegment{{0, 0.04}, {3, 0.06}, {2, 0.02}} },
		"depth too deep":   func(s *Step) { s.Depth = DepthMM(150) },
		"torque negative":  func(s *Step) { s.TorqueLimitNcm = -1 },
		"flute cap small":  func(s *Step) { s.Instrument.MaxFluteD = 0.1 },
		"size zero":        func(s *Step) { s.Instrument.Size = 0 },
	}
	for name, change := range changes {
		s := base()
		change(&s.Steps[1])
		verr := s.Validate()
		var se *SequenceError
		if !errors.As(verr, &se) || se.Step != 2 {
			t.Errorf("%s: Validate gives %v, want an error at step 2", name, verr)
			continue
		}
		data, err := s.MarshalJSON()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		_, perr := ParseSequence("s.json", data)
		if perr == nil || perr.Error() != verr.Error() {
			t.Errorf("%s:\n Validate: %v\n the file: %v", name, verr, perr)
		}
	}
}

// TestEmptyAlloysReadBackTheSame: an empty "alloys" object is the same sequence as none, so a
// sequence reads back equal after it is written (the fuzzer's round trip once failed on this).
func TestEmptyAlloysReadBackTheSame(t *testing.T) {
	seq, err := ParseSequence("s.json", []byte(`{"alloys": {}, "steps": [`+oneStep+`]}`))
	if err != nil {
		t.Fatal(err)
	}
	if seq.Alloys != nil {
		t.Errorf("alloys %v, want none", seq.Alloys)
	}
}

// TestASequenceIsNotACanal: a sequence file given where a canal belongs says so.
func TestASequenceIsNotACanal(t *testing.T) {
	_, err := ParseCanalSpec("plan.json", DemoSequenceJSON())
	if err == nil || !strings.Contains(err.Error(), "this is a sequence, not a canal") {
		t.Errorf("%v", err)
	}
	big := append([]byte(canalGoodSpec), make([]byte, MaxSpecBytes)...)
	if _, err := ParseCanalSpec("big.json", big); err == nil || !strings.Contains(err.Error(), "more than a canal spec can need") {
		t.Errorf("a spec over the size limit: %v", err)
	}
}
