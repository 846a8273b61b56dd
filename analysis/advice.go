package analysis

import (
	"fmt"
	"math"

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
	canalAtWL := 2 * c.MeanRadius(c.Line.Station(math.Min(c.WorkingLength, c.Line.Length()-StationSpacing)))
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
		if tip := in.TipDiameter(); tip > canalAtWL && !smallerBefore(res.Steps[:k], in) {
			add(AdviceNoGlidePath, "The tip (%.2f mm) is wider than the canal at working length (%.2f mm) and no smaller file goes before it: consider a glide path first.", tip, canalAtWL)
		}
		if past := sr.TipDepth - c.WorkingLength; past > 1e-6 {
			add(AdvicePastWL, "The tip goes %.2f mm past working length.", past)
		}
		if e := m.StrainAtMaxCurvaturePct; e != nil && *e/100 > sr.Alloy.RecoverableStrain {
			add(AdviceStrainLimit, "Bending strain where the canal bends most (%.1f %%) is above the alloy's recoverable strain (%.1f %%): fatigue life collapses there.", *e, 100*sr.Alloy.RecoverableStrain)
		}
		if prev != nil {
			pl, l := prev.Metrics.EngagedLengthMM, m.EngagedLengthMM
			if l > pl+2 && l > 1.5*pl {
				add(AdviceEngagementJump, "Engaged length jumps from %.1f mm (step %d) to %.1f mm: more wall in contact means more torque and a higher risk of the tip binding.", pl, prev.Number, l)
			}
			pt, t := prev.Metrics.PeakTorqueIndex, m.PeakTorqueIndex
			if pt > 0 && t > 2*pt {
				add(AdviceTorqueJump, "Torque needed rises %.1f times against step %d.", t/pt, prev.Number)
			}
		}
		if !apexNoted && sr.TipDepth >= c.WorkingLength-1 {
			if res := c.SurfaceDetail; res > 0 && canalAtWL < 3*res {
				add(AdviceApexUnresolved, "The canal near working length (%.2f mm across) spans fewer than three scan voxels (about %.2f mm): the apical part may be lost in the scan.", canalAtWL, res)
			}
			apexNoted = true
		}
		if lim := st.TorqueLimitNcm; lim > 0 && lim > m.CapacityAt3mmNcm {
			add(AdviceMotorLimit, "The motor's torque limit (%.2f N*cm) is above what the file carries 3 mm from its tip (%.2f N*cm, where ISO 3630-1 tests torsion).", lim, m.CapacityAt3mmNcm)
		}
		if m.FractureFromTipMM != nil {
			add(AdviceFatigue, "The insertion uses up the fatigue life %.1f mm from the tip after %.0f s.", *m.FractureFromTipMM, *m.FractureTimeS)
		} else if m.FatigueDamage >= 0.5 {
			add(AdviceFatigue, "The insertion uses %.0f %% of the fatigue life %.1f mm from the tip.", 100*m.FatigueDamage, m.PeakDamageFromTipMM)
		}
		if !transportNoted {
			at := c.Line.Length() - 1
			if shift := centreShift(c, c.Rho, sr.Prepared, at); shift > apicalTransportLimit {
				add(AdviceTransportation, "The canal's centre 1 mm from the apical end has moved %.2f mm from where it was scanned "+
					"(Gambill's transportation there: %.2f mm, twice the shift for a canal widened on one side); above about "+
					"0.3 mm of such a shift the apical seal was found to suffer.", shift, transportAt(c, c.Rho, sr.Prepared, at).size())
				transportNoted = true
			}
		}
		if mg := m.TorsionMargin; mg != nil && *mg < 1.5 {
			add(AdviceTorsion, "Cutting torque comes within a factor of %.2f of what the file carries %.1f mm from its tip.", *mg, *m.TorsionMarginFromTipMM)
		}
	}
}

func sameTaper(a, b models.Instrument) bool {
	return math.Abs(a.TaperAt(0)-b.TaperAt(0)) < 1e-9 && !a.IsVariableTaper() && !b.IsVariableTaper()
}

func smallerBefore(steps []*StepResult, in models.Instrument) bool {
	for _, s := range steps {
		if s.Step.Instrument.Size < in.Size {
			return true
		}
	}
	return false
}
