package analysis

import "math"

// CanalSummary is the canal as every output states it (CLI JSON, CSV, report, window).
// Values that do not exist (the radius of a straight canal) are null, never Inf.
type CanalSummary struct {
	Name            string      `json:"name"`
	Source          string      `json:"source,omitempty"` // the scan a canal was found in
	LengthMM        float64     `json:"length_mm"`
	WorkingLengthMM float64     `json:"working_length_mm"`
	MaxCurvature    PlaceRadius `json:"max_curvature"`
	SchneiderDeg    float64     `json:"schneider_angle_deg"`
	// SchneiderRangeDeg is how well the scan pins the angle down, [low, high].
	SchneiderRangeDeg [2]float64 `json:"schneider_angle_range_deg"`
	// SchneiderToleranceMM is how far the canal must leave its coronal axis to count as
	// leaving it in the construction (tied to the scan's resolution).
	SchneiderToleranceMM float64    `json:"schneider_tolerance_mm"`
	Arc                  Arc        `json:"arc"`
	VoxelMM              float64    `json:"voxel_mm"`
	Orifice              [3]float64 `json:"orifice"`
	ApicalEnd            [3]float64 `json:"apical_end"`
	Warnings             []string   `json:"warnings"`
	// Unresolved lists the stretches a scan does not resolve (empty for surfaces and specs).
	Unresolved []UnresolvedSummary `json:"unresolved"`
	// Points run from the orifice to the apical end: x, y, z in the file's own coordinates and s.
	Points [][4]float64 `json:"points,omitempty"`
}

// PlaceRadius is where the canal bends most and how tightly, each with the band [low, high]
// the scan pins it down to. The radius band's high end is null when the scan cannot tell the
// bend from straight.
type PlaceRadius struct {
	SMM             float64     `json:"s_mm"`
	FromApexMM      float64     `json:"from_apex_mm"`
	RadiusMM        *float64    `json:"radius_mm"`
	RadiusRangeMM   [2]*float64 `json:"radius_range_mm"`
	SRangeMM        [2]float64  `json:"s_range_mm"`
	FromApexRangeMM [2]float64  `json:"from_apex_range_mm"`
	// SecondBendSRangeMM is a second bend as tight as this one within what the scan can tell
	// (mm from the orifice), null when there is none.
	SecondBendSRangeMM *[2]float64 `json:"second_bend_s_range_mm"`
}

// Arc is the circle fitted to the curved part.
type Arc struct {
	RadiusMM *float64 `json:"radius_mm"`
	AngleDeg float64  `json:"angle_deg"`
}

// finite returns nil for values that do not exist (Inf or NaN), so JSON shows null.
func finite(v float64) *float64 {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return nil
	}
	return &v
}

// Summary states the canal's measures; points are included on request.
func (c *Canal) Summary(withPoints bool) CanalSummary {
	m := c.Measures
	n := c.Line.Len()
	s := CanalSummary{
		Name:            c.Name,
		Source:          c.Source,
		LengthMM:        round(m.Length, 3),
		WorkingLengthMM: round(c.WorkingLength, 3),
		MaxCurvature: PlaceRadius{SMM: round(m.MaxCurvatureS, 3), FromApexMM: round(m.Length-m.MaxCurvatureS, 3),
			RadiusMM:        finite(round(m.MaxCurvatureR, 3)),
			RadiusRangeMM:   [2]*float64{finite(round(m.RadiusRange[0], 3)), finite(round(m.RadiusRange[1], 3))},
			SRangeMM:        [2]float64{round(m.SRange[0], 3), round(m.SRange[1], 3)},
			FromApexRangeMM: [2]float64{round(m.Length-m.SRange[1], 3), round(m.Length-m.SRange[0], 3)}},
		SchneiderDeg:         round(m.SchneiderDeg, 2),
		SchneiderRangeDeg:    [2]float64{round(m.SchneiderRange[0], 2), round(m.SchneiderRange[1], 2)},
		SchneiderToleranceMM: round(m.SchneiderTolMM, 4),
		Arc:                  Arc{RadiusMM: finite(round(m.ArcRadius, 3)), AngleDeg: round(m.ArcAngleDeg, 2)},
		VoxelMM:              round(c.Voxel, 4),
		Orifice:              [3]float64(c.Line.Points[0]),
		ApicalEnd:            [3]float64(c.Line.Points[n-1]),
		Warnings:             append([]string{}, c.Warnings...),
		Unresolved:           []UnresolvedSummary{},
	}
	if t := m.AsTight; t[1] > 0 {
		s.MaxCurvature.SecondBendSRangeMM = &[2]float64{round(t[0], 3), round(t[1], 3)}
	}
	for _, u := range c.Unresolved {
		s.Unresolved = append(s.Unresolved, UnresolvedSummary{FromApexMM: round(m.Length-u.From, 3), ToApexMM: round(m.Length-u.To, 3)})
	}
	if withPoints {
		s.Points = make([][4]float64, n)
		for i, p := range c.Line.Points {
			s.Points[i] = [4]float64{round(p[0], 4), round(p[1], 4), round(p[2], 4), round(c.Line.S[i], 4)}
		}
	}
	return s
}

// round keeps outputs readable and stable across machines; Inf and NaN pass through.
func round(v float64, digits int) float64 {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return v
	}
	p := math.Pow(10, float64(digits))
	return math.Round(v*p) / p
}
