package analysis

import (
	"math"

	"tapersweep/models"
)

// fatigueResult is Miner's damage along the file after its insertion schedule.
type fatigueResult struct {
	damage      []float64 // per material point u = k*ds from the tip
	peak        float64
	peakU       float64
	fractured   bool
	fractureU   float64 // material point that reached damage 1 first, mm from the tip
	fractureT   float64 // time into the schedule, s
	fractureTip float64 // tip depth then, mm from the orifice
	revolutions float64
	time        float64
}

// fatigue sums damage = revolutions / N(strain) over the schedule for every material point
// (Miner, J Appl Mech 1945). The strain of a point is d(u) k(s) / 2 where it sits in the canal.
// Below the recoverable strain N follows eps = C N^-b, so 1/N = (d/(2C))^(1/b) k^(1/b) splits
// into a factor of the file and a factor of the canal; above it, N is the alloy's few cycles.
// Cycles to failure do not depend on rpm (Pruett et al. 1997); rpm only sets revolutions.
//
// pathK gives, for the tip at a station, the curvature of the file's axis at each station up
// to it (the centerline's curvature in the centred model).
func fatigue(line *Centerline, in models.Instrument, alloy models.Alloy, moves []move, rpm float64, pathK func(tip int) []float64) fatigueResult {
	ds := line.DS
	n := line.Len()
	var far float64
	for _, m := range moves {
		far = math.Max(far, math.Max(m.from, m.to))
	}
	kmax := min(n-1, int(math.Ceil(far/ds)))
	res := fatigueResult{damage: make([]float64, kmax+1)}
	inv := 1 / alloy.StrainLifeB
	fileF := make([]float64, kmax+1) // (d/(2C))^(1/b)
	limitK := make([]float64, kmax+1)
	for k := range fileF {
		d := in.Diameter(float64(k) * ds)
		fileF[k] = math.Pow(d/(2*alloy.StrainLifeC), inv)
		limitK[k] = math.Inf(1)
		if d > 0 {
			limitK[k] = 2 * alloy.RecoverableStrain / d
		}
	}
	// k^(1/b) along the file's axis, per tip station (computed once for each).
	type canalFactors struct{ k, f []float64 }
	cache := map[*float64]canalFactors{} // keyed by the curvature slice pathK returned
	factorsAt := func(tip int) canalFactors {
		k := pathK(tip)
		key := &k[0]
		if cf, ok := cache[key]; ok {
			return cf
		}
		cf := canalFactors{k: k, f: make([]float64, len(k))}
		for i, ki := range k {
			cf.f[i] = math.Pow(ki, inv)
		}
		cache[key] = cf
		return cf
	}
	above := 1 / math.Max(alloy.CyclesAboveLimit, 1e-9)
	revsPerSecond := rpm / 60
	t := 0.0
	// The tip visits stations one by one; each visit spends ds/speed seconds.
	for _, m := range moves {
		steps := int(math.Round(math.Abs(m.to-m.from) / ds))
		if steps == 0 {
			continue
		}
		dir := 1
		if m.to < m.from {
			dir = -1
		}
		start := int(math.Round(m.from / ds))
		dt := math.Abs(m.to-m.from) / float64(steps) / m.speed
		revs := revsPerSecond * dt
		for st := 1; st <= steps; st++ {
			tip := min(start+dir*st, kmax)
			t += dt
			res.revolutions += revs
			cf := factorsAt(tip)
			for k := 0; k <= tip; k++ {
				i := tip - k
				var dmg float64
				if cf.k[i] >= limitK[k] {
					dmg = revs * above
				} else {
					dmg = revs * fileF[k] * cf.f[i]
				}
				res.damage[k] += dmg
				if !res.fractured && res.damage[k] >= 1 {
					res.fractured = true
					res.fractureU = float64(k) * ds
					res.fractureT = t
					res.fractureTip = float64(tip) * ds
				}
			}
		}
	}
	res.time = t
	for k, d := range res.damage {
		if d > res.peak {
			res.peak, res.peakU = d, float64(k)*ds
		}
	}
	return res
}
