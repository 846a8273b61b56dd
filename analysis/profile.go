package analysis

import "math"

// Profile is a step (or the canal alone) along the canal, stations from the orifice to the
// apical end, ready to plot against the distance from the apical end. The window's and the
// report's profile plots are drawn from it.
type Profile struct {
	FromApexMM []float64 // L - s per station
	// CurvaturePerMM is the centerline's curvature at each station; MaxCurvatureFromApexMM is
	// where it is greatest (s*).
	CurvaturePerMM         []float64
	MaxCurvatureFromApexMM float64
	// CanalNarrowDMM and CanalWideDMM are the canal's narrowest and widest diameter across the
	// centerline as the step meets it (rho(theta) + rho(theta + pi)); as scanned without a step.
	CanalNarrowDMM, CanalWideDMM []float64

	// The rest is empty without a step.
	Step int // from 1; 0: the canal alone
	// DeepestCutMM is the deepest cut around the wall at each station (0 where the file does
	// not touch it).
	DeepestCutMM []float64
	// FileDMM is the file's diameter at each station (0 beyond its tip).
	FileDMM []float64
	// EngagedFromApexMM is the engaged zone, mm from the apical end ([0, 0] when none).
	EngagedFromApexMM [2]float64
	// Along the file: distance from the tip and outer-fibre strain in percent; the alloy's
	// recoverable strain in percent.
	FromTipMM, StrainPct []float64
	RecoverableStrainPct float64
}

// ProfileOf takes the canal and step st (nil: the canal alone) apart into profiles.
func ProfileOf(c *Canal, st *StepResult) Profile {
	n, na := c.Line.Len(), c.Angles
	L := c.Line.Length()
	p := Profile{
		FromApexMM: make([]float64, n), CurvaturePerMM: append([]float64(nil), c.Line.K...),
		MaxCurvatureFromApexMM: L - c.Measures.MaxCurvatureS,
		CanalNarrowDMM:         make([]float64, n), CanalWideDMM: make([]float64, n),
	}
	before := c.Rho
	if st != nil {
		before = st.Before
	}
	half := na / 2
	for i := 0; i < n; i++ {
		p.FromApexMM[i] = L - c.Line.S[i]
		row := before[i*na : (i+1)*na]
		narrow, wide := math.Inf(1), 0.0
		for j := 0; j < half; j++ {
			d := float64(row[j]) + float64(row[j+half])
			narrow, wide = math.Min(narrow, d), math.Max(wide, d)
		}
		if half == 0 {
			narrow = 0
		}
		p.CanalNarrowDMM[i], p.CanalWideDMM[i] = narrow, wide
	}
	if st == nil {
		return p
	}
	p.Step = st.Number
	p.DeepestCutMM, p.FileDMM = make([]float64, n), make([]float64, n)
	for i := 0; i < n; i++ {
		if i < len(st.FileRadius) {
			p.FileDMM[i] = 2 * float64(st.FileRadius[i])
		}
		deepest := 0.0
		for _, e := range st.Cut[i*na : (i+1)*na] {
			deepest = math.Max(deepest, float64(e))
		}
		p.DeepestCutMM[i] = deepest
	}
	if m := st.Metrics; m.EngagedLengthMM > 0 {
		tip := L - st.TipDepth
		p.EngagedFromApexMM = [2]float64{tip + m.EngagedFromTipMM[0], tip + m.EngagedFromTipMM[1]}
	}
	p.FromTipMM = make([]float64, len(st.Strain))
	p.StrainPct = make([]float64, len(st.Strain))
	for k, e := range st.Strain {
		p.FromTipMM[k] = float64(k) * c.Line.DS
		p.StrainPct[k] = 100 * e
	}
	p.RecoverableStrainPct = 100 * st.Alloy.RecoverableStrain
	return p
}
