package report

import (
	"math"

	"tapersweep/analysis"
)

// Profile is one step along the canal, stations from the orifice to the apical end, ready
// to plot against the distance from the apical end.
type Profile struct {
	FromApexMM []float64 // L - s per station
	// DeepestCutMM is the deepest cut around the wall at each station (0 where the file does
	// not touch it).
	DeepestCutMM []float64
	// FileDMM is the file's diameter at each station (0 beyond its tip).
	FileDMM []float64
	// CanalNarrowDMM and CanalWideDMM are the canal's narrowest and widest diameter across the
	// centerline as the step meets it (rho(theta) + rho(theta + pi)).
	CanalNarrowDMM, CanalWideDMM []float64
	// Along the file: distance from the tip and outer-fibre strain in percent.
	FromTipMM, StrainPct []float64
}

// StepProfile takes a step's maps apart into profiles.
func StepProfile(c *analysis.Canal, st *analysis.StepResult) Profile {
	n, na := c.Line.Len(), c.Angles
	L := c.Line.Length()
	p := Profile{
		FromApexMM: make([]float64, n), DeepestCutMM: make([]float64, n), FileDMM: make([]float64, n),
		CanalNarrowDMM: make([]float64, n), CanalWideDMM: make([]float64, n),
	}
	half := na / 2
	for i := 0; i < n; i++ {
		p.FromApexMM[i] = L - c.Line.S[i]
		if i < len(st.FileRadius) {
			p.FileDMM[i] = 2 * float64(st.FileRadius[i])
		}
		row := st.Cut[i*na : (i+1)*na]
		deepest := 0.0
		for _, e := range row {
			deepest = math.Max(deepest, float64(e))
		}
		p.DeepestCutMM[i] = deepest
		before := st.Before[i*na : (i+1)*na]
		narrow, wide := math.Inf(1), 0.0
		for j := 0; j < half; j++ {
			d := float64(before[j]) + float64(before[j+half])
			narrow, wide = math.Min(narrow, d), math.Max(wide, d)
		}
		if half == 0 {
			narrow = 0
		}
		p.CanalNarrowDMM[i], p.CanalWideDMM[i] = narrow, wide
	}
	p.FromTipMM = make([]float64, len(st.Strain))
	p.StrainPct = make([]float64, len(st.Strain))
	for k, e := range st.Strain {
		p.FromTipMM[k] = float64(k) * c.Line.DS
		p.StrainPct[k] = 100 * e
	}
	return p
}
