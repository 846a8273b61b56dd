package plan

import "tapersweep/analysis"

// ComparedColumns are the figures a plan is judged by, in the order of Weights: each file's
// engaged length, peak torque and fatigue use. Every comparison of plans shows these.
func ComparedColumns() []analysis.Column {
	return analysis.PickColumns("engaged_length_mm", "peak_torque_index", "fatigue_damage")
}
