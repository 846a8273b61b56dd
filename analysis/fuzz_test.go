package analysis

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
	"time"

	"tapersweep/models"
)

// fuzzSpec writes a canal spec from fuzzed numbers, bounded so that one run of the whole
// pipeline stays short: straights of at most 15 and 10 mm, arcs of radius 0.5 to 30 mm and
// at most 180 degrees (the spec's own limit of 100 mm in all refuses the longest), at least
// 0.15 mm wide: the target is every shape the format allows at a canal's scale, not every size.
func fuzzSpec(straight1, radius, angle, turn, radius2, angle2, straight2, orifice, apical, oval float64) string {
	clamp := func(v, lo, hi float64) float64 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return lo
		}
		return math.Max(lo, math.Min(hi, math.Abs(v)))
	}
	var segs []string
	if l := clamp(straight1, 0, 15); l > 0.05 {
		segs = append(segs, fmt.Sprintf(`{"kind": "straight", "length": %g}`, l))
	}
	if r, a := clamp(radius, 0.5, 30), clamp(angle, 0, 180); a > 1 {
		segs = append(segs, fmt.Sprintf(`{"kind": "arc", "radius": %g, "angle": %g}`, r, a))
	}
	if r, a := clamp(radius2, 0.5, 30), clamp(angle2, 0, 180); a > 1 {
		segs = append(segs, fmt.Sprintf(`{"kind": "arc", "radius": %g, "angle": %g, "plane_turn": %g}`, r, a, math.Mod(clamp(turn, 0, 360), 360)))
	}
	if l := clamp(straight2, 0, 10); l > 0.05 || len(segs) == 0 {
		segs = append(segs, fmt.Sprintf(`{"kind": "straight", "length": %g}`, math.Max(l, 2)))
	}
	o := clamp(orifice, 0.15, 2)
	ov := 0.0
	if v := clamp(oval, 0, 3); v >= 1 {
		ov = v
	}
	return fmt.Sprintf(`{"name": "fuzz", "segments": [%s], "orifice_d": %g, "apical_d": %g, "oval": %g}`,
		strings.Join(segs, ", "), o, clamp(apical, 0.15, o), ov)
}

// FuzzSpecThroughRun: from a random canal spec through the whole pipeline (mesh, centerline,
// radius map, measures, a sequence of three files on either path model). Nothing may panic or
// hang; a canal that cannot be measured is an error naming the file; every figure a run states
// is a number.
func FuzzSpecThroughRun(f *testing.F) {
	// The demo's shape, a straight cone, an S-curve, a curve out of its plane, a tight hook.
	f.Add(10.0, 5.0, 40.0, 180.0, 8.0, 20.0, 2.0, 1.0, 0.25, 1.4, uint8(25), 0.06, -1.0, false)
	f.Add(16.0, 1.0, 0.0, 0.0, 1.0, 0.0, 0.0, 1.0, 0.3, 0.0, uint8(30), 0.04, 0.0, false)
	f.Add(7.0, 5.0, 30.0, 180.0, 4.0, 40.0, 1.5, 1.0, 0.3, 0.0, uint8(20), 0.04, 0.5, true)
	f.Add(7.0, 6.0, 30.0, 90.0, 4.0, 35.0, 1.0, 1.0, 0.3, 0.0, uint8(25), 0.06, -2.0, true)
	f.Add(3.0, 0.5, 170.0, 0.0, 0.5, 0.0, 2.0, 2.0, 0.15, 3.0, uint8(80), 0.12, 0.0, false)
	f.Fuzz(func(t *testing.T, straight1, radius, angle, turn, radius2, angle2, straight2, orifice, apical, oval float64,
		size uint8, taper, depth float64, elastic bool) {
		specJSON := fuzzSpec(straight1, radius, angle, turn, radius2, angle2, straight2, orifice, apical, oval)
		spec, err := models.ParseCanalSpec("fuzz.json", []byte(specJSON))
		if err != nil {
			t.Skip() // a shape the format refuses is the spec reader's business (FuzzParseCanalSpec)
		}
		// A hang shows as the deadline passing; the pipeline honours its context.
		ctx, cancel := context.WithTimeout(context.Background(), 5*time.Minute)
		defer cancel()
		c, err := CanalFromSpec(ctx, "fuzz.json", spec, CanalOptions{})
		if errors.Is(err, context.DeadlineExceeded) {
			t.Fatalf("%s: measuring did not finish", specJSON)
		}
		if err != nil {
			if !strings.Contains(err.Error(), "fuzz.json") {
				t.Fatalf("%s: error without the file's name: %v", specJSON, err)
			}
			return
		}
		tp := math.Min(math.Max(math.Abs(taper), 0.01), models.MaxTaper)
		if math.IsNaN(taper) {
			tp = 0.04
		}
		sz := max(6, int(size)%141)
		off := math.Max(-5, math.Min(1, depth))
		if math.IsNaN(off) {
			off = 0
		}
		seqJSON := fmt.Sprintf(`{"path_model": %q, "steps": [{"size": 15, "taper": 0.02, "depth": "WL"},
			{"size": %d, "taper": %g, "depth": "WL%+g"}, {"size": %d, "taper": 0.04, "depth": "WL"}]}`,
			map[bool]string{false: models.PathCentred, true: models.PathElastic}[elastic], sz, tp, off, sz)
		seq, err := models.ParseSequence("fuzz-sequence.json", []byte(seqJSON))
		if err != nil {
			t.Fatalf("%s: %v", seqJSON, err)
		}
		res, err := Run(ctx, c, seq, RunOptions{})
		if errors.Is(err, context.DeadlineExceeded) {
			t.Fatalf("%s with %s: the run did not finish", specJSON, seqJSON)
		}
		if err != nil {
			return // a depth beyond this canal's end, stated as such
		}
		for _, st := range res.Steps {
			for _, col := range append(StepColumns(), StepDetails()...) {
				if v, ok := col.Value(st.Metrics); ok && (math.IsNaN(v) || math.IsInf(v, 0)) {
					t.Fatalf("%s with %s: step %d %s = %v", specJSON, seqJSON, st.Number, col.Key, v)
				}
			}
		}
		if _, err := json.Marshal(res.Summary()); err != nil {
			t.Fatalf("%s: the summary does not write as JSON: %v", specJSON, err)
		}
	})
}
