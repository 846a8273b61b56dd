package models

import (
	"fmt"
	"math"
	"strings"
)

// Check tells whether a sequence built or edited in code (the window's editor) could have been
// read from a file: the same limits and the same wording as ParseSequence, checked on the
// values as they stand, without writing the sequence out and reading it back.
func (s *Sequence) Check() error {
	file := s.Name
	if file == "" {
		file = "sequence"
	}
	fail := func(step int, field, format string, args ...any) error {
		return &SequenceError{File: file, Step: step, Field: field, Msg: fmt.Sprintf(format, args...)}
	}
	if len(s.Steps) == 0 {
		return fail(0, "steps", "at least one step is needed")
	}
	if s.PathModel != "" && s.PathModel != PathCentred && s.PathModel != PathElastic {
		return fail(0, "path_model", "must be %q or %q (got %q)", PathCentred, PathElastic, s.PathModel)
	}
	for i, st := range s.Steps {
		n := i + 1
		in := st.Instrument
		if in.Size <= 0 || in.Size > maxStepSize {
			return fail(n, "size", "must be from 1 to %d (got %d)", maxStepSize, in.Size)
		}
		if msg := checkStepTaper(in.Taper); msg != "" {
			return fail(n, "taper", "%s", msg)
		}
		for k, seg := range in.Tapers {
			if msg := checkStepTaper(seg.Taper); msg != "" {
				return fail(n, fmt.Sprintf("tapers[%d]", k), "%s", msg)
			}
		}
		if d := st.Depth.MM; math.IsNaN(d) || math.IsInf(d, 0) || math.Abs(d) > MaxDepthMM || (!st.Depth.FromWL && d <= 0) {
			return fail(n, "depth", "%s is not a depth (mm from the orifice up to %g, or WL, WL-1.5, WL+0.5)", st.Depth, MaxDepthMM)
		}
		for _, r := range []struct {
			field      string
			v, lo, hi  float64
			aboveLower bool
		}{
			{"rpm", st.RPM, 0, maxRPM, true},
			{"peck_mm", st.PeckMM, minPeckMM, maxStrokeMM, false},
			{"retract_mm", st.RetractMM, 0, maxStrokeMM, false},
			{"advance_mm_s", st.AdvanceMMs, minAdvanceMMs, maxAdvanceMMs, false},
			{"torque_limit_ncm", st.TorqueLimitNcm, 0, maxTorqueNcm, false},
			{"cutting_length", in.CuttingLength, 0, maxStrokeMM, true},
			{"max_flute_d", in.MaxFluteD, 0, maxFluteDMM, true},
		} {
			switch {
			case math.IsNaN(r.v):
				return fail(n, r.field, "is not a number")
			case r.aboveLower && r.v <= r.lo:
				return fail(n, r.field, "must be above %g (got %g)", r.lo, r.v)
			case !r.aboveLower && r.v < r.lo:
				return fail(n, r.field, "must be at least %g (got %g)", r.lo, r.v)
			case r.v > r.hi:
				return fail(n, r.field, "must be at most %g (got %g)", r.hi, r.v)
			}
		}
		if in.MaxFluteD < in.TipDiameter() {
			return fail(n, "max_flute_d", "%g mm is below the tip diameter %g mm", in.MaxFluteD, in.TipDiameter())
		}
		if _, ok := s.Alloy(st.AlloyName); !ok {
			return fail(n, "alloy", "unknown alloy %q (known: %s)", st.AlloyName, strings.Join(knownAlloyNames(s), ", "))
		}
		if _, err := SectionByName(st.SectionName); err != nil {
			return fail(n, "section", "%v", err)
		}
	}
	return nil
}
