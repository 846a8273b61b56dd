package analysis

import (
	"fmt"
	"math"
	"strings"

	"tapersweep/mesh"
	"tapersweep/models"
)

// Advice codes. Each draws on common practice of the trade or on the model's own limits; the
// text says why and leaves the decision to the clinician.
const (
	AdviceSameTaper      = "same-taper"
	AdviceLongPeck       = "long-peck"
	AdviceNoGlidePath    = "no-glide-path"
	AdvicePastWL         = "past-working-length"
	AdviceStrainLimit    = "strain-over-limit"
	AdviceEngagementJump = "engagement-jump"
	AdviceTorqueJump     = "torque-jump"
	AdviceApexUnresolved = "apex-unresolved"
	AdviceMotorLimit     = "motor-limit"
	AdviceFatigue        = "fatigue"
	AdviceTorsion        = "torsion"
	AdviceTransportation = "apical-transportation"
	AdviceThinWall       = "thin-wall"
)

// apicalTransportLimit: apical transportation above about 0.3 mm harmed the seal of root fillings
// (Wu MK, Fan B, Wesselink PR, J Endod 2000;26:210-216; from memory). Their figure, measured on
// radiographs with the working length 1 mm short of the apex, is how far the prepared canal's
// apical part lay from the original one: the shift of the canal, which is half of Gambill's
// figure for a canal widened on one side. It is compared with the shift of the canal's centre
// 1 mm from the apical end.
const apicalTransportLimit = 0.3

// addAdvice fills each step's advice list; every step gets a list, possibly empty.
func addAdvice(res *Result) {
	c := res.Canal
	gp := GlidePathOf(c)
	canalAtWL := gp.Width
	apexNoted, transportNoted := false, false
	for k, sr := range res.Steps {
		m := &sr.Metrics
		m.Advice = []Advice{}
		add := func(code, format string, a ...any) {
			m.Advice = append(m.Advice, Advice{Code: code, Text: fmt.Sprintf(format, a...)})
		}
		in, st := sr.Step.Instrument, sr.Step
		var prev *StepResult
		if k > 0 {
			prev = res.Steps[k-1]
		}
		if prev != nil && sameTaper(prev.Step.Instrument, in) {
			add(AdviceSameTaper, "Same taper as step %d: a file of a different taper spreads the contact over a shorter length (common practice: change taper when changing files).", prev.Number)
		}
		if st.PeckMM > 1.0+1e-9 {
			add(AdviceLongPeck, "Advance of %.1f mm per insertion; about 1 mm per insertion is common practice.", st.PeckMM)
		}
		if tip := in.TipDiameter(); gp.Missing(in, gp.OpenedBy(res.Steps[:k])) {
			add(AdviceNoGlidePath, "The tip (%.2f mm) is wider than the canal at working length (%.2f mm) and no smaller file goes to working length before it: consider a glide path first.", tip, canalAtWL)
		}
		if past := sr.TipDepth - c.WorkingLength; past > 1e-6 {
			add(AdvicePastWL, "The tip goes %.2f mm past working length.", past)
		}
		if limit := 100 * sr.Alloy.RecoverableStrain; m.PeakStrainPct > limit {
			where := ""
			if e := m.StrainAtMaxCurvaturePct; e != nil {
				where = fmt.Sprintf("; %.1f %% where the canal bends most", *e)
			}
			add(AdviceStrainLimit, "Bending strain reaches %.1f %% %.1f mm from the tip%s, above the alloy's recoverable strain (%.1f %%): "+
				"the file cannot follow this path; the model's figures past this point are not meaningful.",
				m.PeakStrainPct, m.PeakStrainFromTipMM, where, limit)
		}
		if prev != nil {
			pl, l := prev.Metrics.EngagedLengthMM, m.EngagedLengthMM
			jump := l > pl+2 && l > 1.5*pl
			if jump {
				add(AdviceEngagementJump, "Engaged length jumps from %.1f mm (step %d) to %.1f mm: more wall in contact means more torque and a higher risk of the tip binding.", pl, prev.Number, l)
			}
			// After a step that cut nothing the engagement jump already says it.
			if pt := prev.Metrics.PeakTorqueIndex; !(jump && pt == 0) {
				if text := torqueJump(pt, m.PeakTorqueIndex, prev.Number); text != "" {
					add(AdviceTorqueJump, "%s", text)
				}
			}
		}
		if u := c.Unresolved; !apexNoted && len(u) > 0 && sr.TipDepth >= u[0].From {
			// Evidence from the scan itself: the stretch where it does not show the lumen.
			L := c.Line.Length()
			add(AdviceApexUnresolved, "The scan does not resolve the canal from %.1f to %.1f mm from the apical end (narrower than about two voxels): its path there is the darkest line through the scan and its width is unknown.", L-u[0].From, L-u[0].To)
			apexNoted = true
		}
		if !apexNoted && sr.TipDepth >= c.WorkingLength-1 {
			if res := c.SurfaceDetail; res > 0 && canalAtWL < 3*res && surfaceFromVoxels(c.Mesh) {
				add(AdviceApexUnresolved, "The canal near working length (%.2f mm across) spans fewer than three scan voxels (about %.2f mm): the apical part may be lost in the scan.", canalAtWL, res)
			}
			apexNoted = true
		}
		if lim := st.TorqueLimitNcm; lim > 0 && lim > m.CapacityAt3mmNcm {
			add(AdviceMotorLimit, "The motor's torque limit (%.2f N*cm) is above what the file carries 3 mm from its tip (%.2f N*cm, where ISO 3630-1 tests torsion).", lim, m.CapacityAt3mmNcm)
		}
		if m.FractureFromTipMM != nil {
			add(AdviceFatigue, "%s", fractureText(m))
		} else if m.FatigueDamage >= 0.5 {
			add(AdviceFatigue, "The insertion uses %.0f %% of the fatigue life %.1f mm from the tip.", 100*m.FatigueDamage, m.PeakDamageFromTipMM)
		}
		if !transportNoted {
			at := c.Line.Length() - 1
			if shift := newCentroidDirections(c).centreShift(c, c.Rho, sr.Prepared, at); shift > apicalTransportLimit {
				add(AdviceTransportation, "The canal's centre 1 mm from the apical end has moved %.2f mm from where it was scanned "+
					"(Gambill's transportation there: %.2f mm, twice the shift for a canal widened on one side); above about "+
					"0.3 mm of such a shift the apical seal was found to suffer.", shift, transportAt(c, c.Rho, sr.Prepared, at).size())
				transportNoted = true
			}
		}
		// The wall to the root's surface: said when this step leaves it under the user's limit
		// where it cut (a wall already that thin as scanned is said once, in the warnings).
		metShare := res.ScannedWall.WallUnderLimitPct
		if prev != nil {
			metShare = prev.Metrics.WallUnderLimitPct
		}
		if w := m.Wall; w.ThinnestWallMM != nil && *w.ThinnestWallMM < *w.WallLimitMM &&
			(*w.WallThinnedMM > 0.0005 || metShare == nil || *w.WallUnderLimitPct > *metShare) {
			add(AdviceThinWall, "%s.", upperFirst(thinWallText(w)))
		}
		if mg := m.TorsionMargin; mg != nil && *mg < 1.5 {
			add(AdviceTorsion, "Cutting torque comes within a factor of %.2f of what the file carries %.1f mm from its tip.", *mg, *m.TorsionMarginFromTipMM)
		}
	}
}

// torqueJump words a rise in peak torque against the step before (empty: no jump worth a
// word). A ratio against next to nothing says nothing, so a rise from no cut or from almost none
// is stated as from-to.
func torqueJump(before, now float64, prevStep int) string {
	// N*cm at the illustrative coefficient: a peak under worthNcm is too small to remark on, one
	// under tinyNcm is next to no cutting.
	const worthNcm, tinyNcm = 0.05, 0.01
	switch {
	case now < worthNcm || now <= 2*before:
		return ""
	case before == 0:
		return fmt.Sprintf("Torque needed goes from none (step %d cut nothing) to %.3f N*cm.", prevStep, now)
	case before < tinyNcm || now > 20*before:
		return fmt.Sprintf("Torque needed goes from almost none (%.4f N*cm at step %d) to %.3f N*cm.", before, prevStep, now)
	}
	return fmt.Sprintf("Torque needed rises %.1f times against step %d (%.3f to %.3f N*cm).", now/before, prevStep, before, now)
}

// fractureText states a predicted fracture by when and where it happens: past a fatigue use of 1
// the figure only says how far the schedule goes beyond the fracture.
func fractureText(m *StepMetrics) string {
	text := fmt.Sprintf("In the model the file fractures %.1f s into the insertion, %.1f mm from its tip, with the tip %.1f mm deep.",
		*m.FractureTimeS, *m.FractureFromTipMM, *m.FractureTipDepthMM)
	if m.FatigueDamage >= 2 {
		text += fmt.Sprintf(" Its fatigue use of %.3g counts the life used %.0f times over by the end of the schedule: "+
			"past 1 the figure says no more than that.", m.FatigueDamage, math.Floor(m.FatigueDamage))
	}
	return text
}

// surfaceFromVoxels tells a surface extracted from a scan's voxels from a regular tube mesh
// (a parametric canal or a CAD export): a ring mesh has nearly every vertex shared by six
// triangles, a surface from voxels far fewer (about 78 % for the project's voxel surfaces,
// fewer for marching cubes). Only a scan has a voxel size that can lose a narrow apex.
func surfaceFromVoxels(m *mesh.Mesh) bool {
	if m == nil || len(m.Vertices) == 0 {
		return false
	}
	count := make([]int32, len(m.Vertices))
	for _, t := range m.Triangles {
		count[t[0]]++
		count[t[1]]++
		count[t[2]]++
	}
	six := 0
	for _, n := range count {
		if n == 6 {
			six++
		}
	}
	return float64(six) < 0.9*float64(len(count))
}

func sameTaper(a, b models.Instrument) bool {
	return math.Abs(a.TaperAt(0)-b.TaperAt(0)) < 1e-9 && !a.IsVariableTaper() && !b.IsVariableTaper()
}

// GlidePath is the yardstick of the glide-path advice for one canal (common practice: a file
// whose tip is wider than the canal at working length follows a smaller file taken there).
// The planner keeps to the same rule.
type GlidePath struct {
	Width         float64 // the canal's mean width at working length, mm
	WorkingLength float64 // mm from the orifice
}

// glidePathShortMM: a file stopped this close to working length still opens the glide path.
const glidePathShortMM = 0.5

// GlidePathOf measures the yardstick on canal c.
func GlidePathOf(c *Canal) GlidePath {
	return GlidePath{Width: 2 * c.MeanRadius(c.Line.Station(math.Min(c.WorkingLength, c.Line.Length()-StationSpacing))),
		WorkingLength: c.WorkingLength}
}

// Opens reports whether a file whose tip went to depth (mm) reaches working length.
func (g GlidePath) Opens(depth float64) bool { return depth >= g.WorkingLength-glidePathShortMM }

// OpenedBy is the smallest ISO size among the steps that reached working length (0: none).
func (g GlidePath) OpenedBy(steps []*StepResult) int {
	size := 0
	for _, s := range steps {
		if g.Opens(s.TipDepth) && (size == 0 || s.Step.Instrument.Size < size) {
			size = s.Step.Instrument.Size
		}
	}
	return size
}

// Missing reports whether file in is wider at the tip than the canal at working length with no
// smaller file taken there before it (openedBy: the smallest size that was, 0: none).
func (g GlidePath) Missing(in models.Instrument, openedBy int) bool {
	return in.TipDiameter() > g.Width && !(openedBy > 0 && openedBy < in.Size)
}

// Blocking lists a step's advice that says the file is taken where it fails or cannot follow
// (no glide path, strain past the recoverable strain, a predicted fracture): what a proposed
// sequence must not draw.
func Blocking(m *StepMetrics) []Advice {
	var out []Advice
	for _, a := range m.Advice {
		switch {
		case a.Code == AdviceNoGlidePath, a.Code == AdviceStrainLimit,
			a.Code == AdviceFatigue && m.FractureFromTipMM != nil:
			out = append(out, a)
		}
	}
	return out
}

// upperFirst starts a sentence.
func upperFirst(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}
