package plan

import (
	"fmt"
	"slices"
	"strings"

	"tapersweep/analysis"
)

// ComparedColumns are the figures a plan is judged by, in the order of Weights: each file's
// engaged length, peak torque and fatigue use. Every comparison of plans shows these.
func ComparedColumns() []analysis.Column {
	return analysis.PickColumns("engaged_length_mm", "peak_torque_index", "fatigue_damage")
}

// Differences says where two runs of one canal differ in other things than their files: the
// alloys, the rotation speed, the advance (both set how many revolutions each place of a file
// turns through, hence its fatigue use; Pruett et al. 1997) and the path model. A comparison
// of plans that does not say so compares more than the files.
func Differences(plan, other *analysis.Result) []string {
	var out []string
	set := func(res *analysis.Result, of func(s *analysis.StepResult) string) []string {
		var vals []string
		for _, s := range res.Steps {
			if v := of(s); !slices.Contains(vals, v) {
				vals = append(vals, v)
			}
		}
		return vals
	}
	differ := func(what string, of func(s *analysis.StepResult) string, why string) {
		a, b := set(plan, of), set(other, of)
		sa, sb := slices.Clone(a), slices.Clone(b)
		slices.Sort(sa)
		slices.Sort(sb)
		if !slices.Equal(sa, sb) {
			out = append(out, fmt.Sprintf("the compared sequence uses %s %s where the plan uses %s: %s",
				what, strings.Join(b, ", "), strings.Join(a, ", "), why))
		}
	}
	differ("the alloy(s)", func(s *analysis.StepResult) string {
		a := s.Alloy
		return fmt.Sprintf("%s (E %g GPa, recoverable strain %g %%)", s.Metrics.Alloy, a.ElasticModulusGPa, 100*a.RecoverableStrain)
	}, "fatigue use and torsional figures differ for that reason as well as for the files")
	differ("rotation at", func(s *analysis.StepResult) string { return fmt.Sprintf("%g rpm", s.Step.RPM) },
		"fatigue use counts revolutions, so it differs for that reason as well as for the files")
	differ("an advance of", func(s *analysis.StepResult) string {
		return fmt.Sprintf("%g mm/s in pecks of %g mm", s.Step.AdvanceMMs, s.Step.PeckMM)
	}, "a slower advance or shorter pecks turn each place of a file through more revolutions")
	if a, b := plan.Options.PathModel, other.Options.PathModel; a != b {
		out = append(out, fmt.Sprintf("the compared sequence runs on the %s file path, the plan on the %s one: "+
			"strain, fatigue and transportation figures differ for that reason as well as for the files", b, a))
	}
	return out
}
