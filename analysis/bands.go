package analysis

import (
	"fmt"
	"strings"
)

// The canal's measures with their bands, as the window and the report state them: the figure
// with the decimals it has always had, the band (how well the line pins it down) to one
// decimal, "3.10 mm (2.8–3.6)".

// RadiusText is the tightest bend's radius with its band; "none (straight)" for a straight
// canal. A band whose high end is unknown reads "(2.8 or straighter)".
func (s CanalSummary) RadiusText() string {
	p := s.MaxCurvature
	if p.RadiusMM == nil {
		return "none (straight)"
	}
	lo, hi := p.RadiusRangeMM[0], p.RadiusRangeMM[1]
	switch {
	case lo == nil:
		return fmt.Sprintf("%.2f mm", *p.RadiusMM)
	case hi == nil:
		return fmt.Sprintf("%.2f mm (%.1f or straighter)", *p.RadiusMM, *lo)
	}
	return fmt.Sprintf("%.2f mm (%s)", *p.RadiusMM, band(*lo, *hi, 1))
}

// PlaceText is where the tightest bend lies, from the apical end, with its band.
func (s CanalSummary) PlaceText() string {
	p := s.MaxCurvature
	return fmt.Sprintf("%.2f mm from the apical end (%s)", p.FromApexMM, band(p.FromApexRangeMM[0], p.FromApexRangeMM[1], 1))
}

// SchneiderText is the Schneider angle with its band and the construction's tolerance: how far
// the canal must leave its coronal axis to count as departing (Schneider 1971 draws it by eye;
// here it follows the scan's resolution, so the reader is told).
func (s CanalSummary) SchneiderText() string {
	t := fmt.Sprintf("%.1f° (%s", s.SchneiderDeg, band(s.SchneiderRangeDeg[0], s.SchneiderRangeDeg[1], 1))
	if s.SchneiderToleranceMM > 0 {
		t += fmt.Sprintf("; departs %.2f mm off the coronal axis", s.SchneiderToleranceMM)
	}
	return t + ")"
}

func band(lo, hi float64, digits int) string {
	return fmt.Sprintf("%.*f–%.*f", digits, lo, digits, hi)
}

// restOnBend are the step figures computed at the canal's tightest bend (its place sets the
// file's diameter there, its radius the strain), or driven by the strain there.
var restOnBend = map[string]bool{
	"diameter_at_max_curvature_mm": true,
	"strain_at_max_curvature_pct":  true,
	"peak_strain_pct":              true,
	"fatigue_damage":               true,
}

// RestsOnTightestBend says whether a step column's figure inherits the uncertainty of the
// tightest bend's radius and place.
func RestsOnTightestBend(key string) bool { return restOnBend[key] }

// BendUncertain says whether the tightest bend's radius or place is too loosely pinned down
// for the figures that rest on it to be read as more than rough (see Measures.WideBands).
func (c *Canal) BendUncertain() bool {
	r, p, _ := c.Measures.WideBands()
	return r || p
}

// BendInheritNote says, in a few words, which step figures carry the tightest bend's
// uncertainty; mark is how the table marks them ("" when it does not).
func BendInheritNote(mark string) string {
	s := "the file's diameter, strain and fatigue use at the bend inherit this uncertainty"
	if mark != "" {
		s += " (marked " + strings.TrimSpace(mark) + ")"
	}
	return s
}
