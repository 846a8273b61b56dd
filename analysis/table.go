package analysis

import (
	"strconv"
	"strings"
)

// StepColumns are the per-step columns of every table output (CSV, the report, the window),
// named as in the JSON.
var StepColumns = []string{
	"step", "label", "alloy", "tip_depth_mm", "tip_from_apex_mm", "engaged_length_mm",
	"engaged_area_mm2", "removed_volume_mm3", "max_depth_of_cut_mm", "untouched_wall_pct",
	"diameter_at_max_curvature_mm", "strain_at_max_curvature_pct", "peak_strain_pct",
	"fatigue_damage", "fracture_from_tip_mm", "torsion_margin", "peak_torque_index",
	"transportation_1_mm", "transportation_3_mm", "transportation_5_mm", "centering_ratio_1",
	"centering_ratio_3", "centering_ratio_5", "foramen_shift_mm", "advice",
}

// Row states a step's metrics as strings in StepColumns order; values that do not exist are
// empty, advice codes are joined with ";". transportation_N_mm and centering_ratio_N are the
// JSON's transportation_mm["N"] and centering_ratio["N"].
func (m StepMetrics) Row() []string {
	f := func(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
	p := func(v *float64) string {
		if v == nil {
			return ""
		}
		return f(*v)
	}
	codes := make([]string, len(m.Advice))
	for i, a := range m.Advice {
		codes[i] = a.Code
	}
	return []string{
		strconv.Itoa(m.Step), m.Label, m.Alloy, f(m.TipDepthMM), f(m.TipFromApexMM), f(m.EngagedLengthMM),
		f(m.EngagedAreaMM2), f(m.RemovedVolumeMM3), f(m.MaxDepthOfCutMM), f(m.UntouchedWallPct),
		p(m.DiameterAtMaxCurvatureMM), p(m.StrainAtMaxCurvaturePct), f(m.PeakStrainPct),
		f(m.FatigueDamage), p(m.FractureFromTipMM), p(m.TorsionMargin), f(m.PeakTorqueIndex),
		f(m.TransportationMM["1"]), f(m.TransportationMM["3"]), f(m.TransportationMM["5"]),
		p(m.CenteringRatio["1"]), p(m.CenteringRatio["3"]), p(m.CenteringRatio["5"]), f(m.ForamenShiftMM),
		strings.Join(codes, ";"),
	}
}
