package models

import (
	"errors"
	"testing"
)

// TestCheckAgreesWithTheFileReader: a sequence edited in code is accepted by Check exactly when
// writing it out and reading it back is, with the error at the same step and field (the window
// checks its edits with Check instead of that round trip).
func TestCheckAgreesWithTheFileReader(t *testing.T) {
	base, err := ParseSequence("demo", DemoSequenceJSON())
	if err != nil {
		t.Fatal(err)
	}
	edits := map[string]func(s *Sequence){
		"as read":          func(s *Sequence) {},
		"taper 0.06":       func(s *Sequence) { s.Steps[1].Instrument.Taper = 0.06 },
		"taper 5":          func(s *Sequence) { s.Steps[1].Instrument.Taper = 5 },
		"taper 0":          func(s *Sequence) { s.Steps[0].Instrument.Taper = 0 },
		"rpm -300":         func(s *Sequence) { s.Steps[2].RPM = -300 },
		"rpm 0":            func(s *Sequence) { s.Steps[2].RPM = 0 },
		"rpm 30000":        func(s *Sequence) { s.Steps[2].RPM = 30000 },
		"peck 0.001":       func(s *Sequence) { s.Steps[0].PeckMM = 0.001 },
		"peck 2":           func(s *Sequence) { s.Steps[0].PeckMM = 2 },
		"size 1000":        func(s *Sequence) { s.Steps[3].Instrument.Size = 1000 },
		"size 0":           func(s *Sequence) { s.Steps[3].Instrument.Size = 0 },
		"size 33":          func(s *Sequence) { s.Steps[3].Instrument.Size = 33; s.Steps[3].Instrument.MaxFluteD = 1.2 },
		"depth 12.5":       func(s *Sequence) { s.Steps[1].Depth = DepthMM(12.5) },
		"depth WL-1":       func(s *Sequence) { s.Steps[1].Depth = DepthWL(-1) },
		"unknown alloy":    func(s *Sequence) { s.Steps[0].AlloyName = "unobtainium" },
		"built-in alloy":   func(s *Sequence) { s.Steps[0].AlloyName = AlloyNiTiSuperelastic },
		"elastic path":     func(s *Sequence) { s.PathModel = PathElastic },
		"flute below tip":  func(s *Sequence) { s.Steps[0].Instrument.MaxFluteD = 0.1 },
		"advance 200 mm/s": func(s *Sequence) { s.Steps[0].AdvanceMMs = 200 },
	}
	for name, edit := range edits {
		s := *base
		s.Steps = append([]Step(nil), base.Steps...)
		edit(&s)
		checked := s.Check()
		data, err := s.MarshalJSON()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		_, parsed := ParseSequence("demo", data)
		if (checked == nil) != (parsed == nil) {
			t.Errorf("%s: Check says %v, the file reader %v", name, checked, parsed)
			continue
		}
		var a, b *SequenceError
		if checked != nil && errors.As(checked, &a) && errors.As(parsed, &b) && (a.Step != b.Step || a.Field != b.Field) {
			t.Errorf("%s: Check blames step %d %s, the file reader step %d %s", name, a.Step, a.Field, b.Step, b.Field)
		}
	}
}
