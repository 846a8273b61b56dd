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

// lifeLaw is an alloy's two-branch strain-life law (models.Alloy) laid out along one file: the
// strain of material point k at a place of curvature K is d_k K / 2, and on either branch
// 1/N = (file factor of k) * (canal factor of K):
//
//	below eps_r: 1/N = (eps/C)^(1/b)                = (d_k/(2C))^(1/b)          * K^(1/b)
//	from eps_r:  1/N = (eps/eps_r)^(1/b2) / N_r     = (d_k/(2 eps_r))^(1/b2)/N_r * K^(1/b2)
//
// so Miner's sum is a multiply-add per point and tip station.
type lifeLaw struct {
	invB, invB2 float64
	below       []float64 // (d_k/(2C))^(1/b)
	above       []float64 // (d_k/(2 eps_r))^(1/b2) / N_r
	limitK      []float64 // curvature at which point k reaches eps_r: 2 eps_r / d_k
	lowestLimit float64   // the smallest of limitK
}

func newLifeLaw(in models.Instrument, alloy models.Alloy, points int, ds float64) *lifeLaw {
	l := &lifeLaw{invB: 1 / alloy.StrainLifeB, invB2: 1 / alloy.LowCycleB,
		below: make([]float64, points), above: make([]float64, points), limitK: make([]float64, points),
		lowestLimit: math.Inf(1)}
	invNr := 1 / alloy.CyclesAtRecoverableStrain()
	for k := range l.below {
		d := in.Diameter(float64(k) * ds)
		l.below[k] = math.Pow(d/(2*alloy.StrainLifeC), l.invB)
		l.above[k] = math.Pow(d/(2*alloy.RecoverableStrain), l.invB2) * invNr
		l.limitK[k] = math.Inf(1)
		if d > 0 {
			l.limitK[k] = 2 * alloy.RecoverableStrain / d
		}
		l.lowestLimit = math.Min(l.lowestLimit, l.limitK[k])
	}
	return l
}

// canalFactors are K^(1/b) and, where some point of the file could pass eps_r, K^(1/b2).
type canalFactors struct {
	k, below, above []float64
	passes          bool // some point could pass eps_r somewhere (else every point takes the lower branch)
}

func (l *lifeLaw) factors(k []float64) canalFactors {
	cf := canalFactors{k: k, below: make([]float64, len(k)), above: make([]float64, len(k))}
	for i, ki := range k {
		cf.below[i] = math.Pow(ki, l.invB)
		if ki >= l.lowestLimit {
			cf.above[i] = math.Pow(ki, l.invB2)
			cf.passes = true
		}
	}
	return cf
}

// perRevolution is the damage one revolution does to point k sitting at station i.
func (l *lifeLaw) perRevolution(cf *canalFactors, k, i int) float64 {
	if cf.k[i] >= l.limitK[k] {
		return l.above[k] * cf.above[i]
	}
	return l.below[k] * cf.below[i]
}

// pathFactors are the canal factors for one tip station: those of the path hi, or, with w < 1,
// a blend of the paths lo and hi solved with the tip at the stations on either side (lo reaches
// fewer stations; beyond them hi alone counts).
type pathFactors struct {
	lo, hi *canalFactors
	w      float64
}

// accumulate adds to damage[k], for every material point k up to the tip, what revs
// revolutions do with the tip at station tip (point k at station tip - k): the loop of the sum,
// written out so it needs no call per point. Where lo reaches (stations below len(lo.k)), the
// rates of lo and hi are blended with the weight w of hi.
func (l *lifeLaw) accumulate(damage []float64, pf pathFactors, tip int, revs float64) {
	hi, lo := pf.hi, pf.lo
	below, above, limit := l.below[:tip+1], l.above[:tip+1], l.limitK[:tip+1]
	split := tip + 1 // points from here on sit where lo reaches
	if lo != nil {
		split = max(0, tip+1-len(lo.k))
	}
	if !hi.passes && (lo == nil || !lo.passes) {
		l.accumulateBelow(damage, pf, tip, split, revs)
		return
	}
	for k := 0; k < split; k++ {
		i := tip - k
		if hi.k[i] >= limit[k] {
			damage[k] += revs * above[k] * hi.above[i]
		} else {
			damage[k] += revs * below[k] * hi.below[i]
		}
	}
	if lo == nil {
		return
	}
	wh, wl := revs*pf.w, revs*(1-pf.w)
	for k := split; k <= tip; k++ {
		i := tip - k
		var rh, rl float64
		if hi.k[i] >= limit[k] {
			rh = above[k] * hi.above[i]
		} else {
			rh = below[k] * hi.below[i]
		}
		if lo.k[i] >= limit[k] {
			rl = above[k] * lo.above[i]
		} else {
			rl = below[k] * lo.below[i]
		}
		damage[k] += wh*rh + wl*rl
	}
}

// accumulateBelow is accumulate where no point passes eps_r: the lower branch throughout.
func (l *lifeLaw) accumulateBelow(damage []float64, pf pathFactors, tip, split int, revs float64) {
	below, hi := l.below[:tip+1], pf.hi.below[:tip+1]
	for k := 0; k < split; k++ {
		damage[k] += revs * below[k] * hi[tip-k]
	}
	if pf.lo == nil {
		return
	}
	lo := pf.lo.below
	wh, wl := revs*pf.w, revs*(1-pf.w)
	for k := split; k <= tip; k++ {
		i := tip - k
		rh := below[k] * hi[i]
		rl := below[k] * lo[i]
		damage[k] += wh*rh + wl*rl
	}
}

func (l *lifeLaw) blended(pf pathFactors, k, i int) float64 {
	r := l.perRevolution(pf.hi, k, i)
	if pf.lo != nil && i < len(pf.lo.k) {
		r = pf.w*r + (1-pf.w)*l.perRevolution(pf.lo, k, i)
	}
	return r
}

// pathAt gives, for the tip at a station, the curvature of the file's axis at each station up
// to it: hi alone (lo nil, w 1), or the paths lo and hi solved at stations on either side of the
// tip with the weight w of hi. A slice given again for another station is the same curvature.
type pathAt func(tip int) (lo, hi []float64, w float64)

// fatigue sums damage = revolutions / N(strain) over the schedule for every material point
// (Miner, J Appl Mech 1945). The strain of a point is d(u) k(s) / 2 where it sits in the canal.
// Cycles to failure do not depend on rpm (Pruett et al. 1997); rpm only sets revolutions.
//
// The schedule is first gathered into the revolutions spent with the tip at each station, so the
// sum costs one pass over (tip station, material point) pairs whatever the number of strokes;
// only when some point reaches 1 is the schedule replayed in time order to find when and where.
//
// path gives the curvature of the file's axis for each tip station (the centerline's in the
// centred model).
func fatigue(line *Centerline, in models.Instrument, alloy models.Alloy, moves []move, rpm float64, path pathAt) fatigueResult {
	ds := line.DS
	n := line.Len()
	var far float64
	for _, m := range moves {
		far = math.Max(far, math.Max(m.from, m.to))
	}
	kmax := min(n-1, int(math.Ceil(far/ds)))
	res := fatigueResult{damage: make([]float64, kmax+1)}
	law := newLifeLaw(in, alloy, kmax+1, ds)
	cache := map[*float64]*canalFactors{} // keyed by the curvature slice path returned
	factorsOf := func(k []float64) *canalFactors {
		if k == nil {
			return nil
		}
		key := &k[0]
		if cf, ok := cache[key]; ok {
			return cf
		}
		cf := law.factors(k)
		cache[key] = &cf
		return &cf
	}
	factorsAt := func(tip int) pathFactors {
		lo, hi, w := path(tip)
		return pathFactors{lo: factorsOf(lo), hi: factorsOf(hi), w: w}
	}
	revsAt := make([]float64, kmax+1) // revolutions with the tip at each station
	sched := scheduleSteps(moves, ds, kmax, rpm/60)
	for _, v := range sched {
		revsAt[v.tip] += v.revs
		res.revolutions += v.revs
		res.time += v.dt
	}
	for tip, revs := range revsAt {
		if revs == 0 {
			continue
		}
		law.accumulate(res.damage[:tip+1], factorsAt(tip), tip, revs)
	}
	for k, d := range res.damage {
		if d > res.peak {
			res.peak, res.peakU = d, float64(k)*ds
		}
	}
	if res.peak >= 1 {
		replayToFracture(&res, sched, law, factorsAt, ds)
	}
	return res
}

// scheduleVisit is the tip resting at one station for one stretch of a stroke.
type scheduleVisit struct {
	tip      int
	dt, revs float64
}

// scheduleSteps lays the strokes out station by station: each visit spends ds/speed seconds.
func scheduleSteps(moves []move, ds float64, kmax int, revsPerSecond float64) []scheduleVisit {
	visits := 0
	for _, m := range moves {
		visits += m.steps(ds)
	}
	out := make([]scheduleVisit, 0, visits)
	for _, m := range moves {
		steps := m.steps(ds)
		if steps == 0 {
			continue
		}
		dir := 1
		if m.to < m.from {
			dir = -1
		}
		start := int(math.Round(m.from / ds))
		dt := math.Abs(m.to-m.from) / float64(steps) / m.speed
		for st := 1; st <= steps; st++ {
			out = append(out, scheduleVisit{tip: min(start+dir*st, kmax), dt: dt, revs: revsPerSecond * dt})
		}
	}
	return out
}

// steps is how many stations of ds the stroke passes.
func (m move) steps(ds float64) int { return int(math.Round(math.Abs(m.to-m.from) / ds)) }

// replayToFracture walks the schedule in time order until the first material point's damage
// reaches 1 and records when, where and with the tip how deep.
func replayToFracture(res *fatigueResult, sched []scheduleVisit, law *lifeLaw, factorsAt func(int) pathFactors, ds float64) {
	damage := make([]float64, len(res.damage))
	t := 0.0
	for _, v := range sched {
		t += v.dt
		pf := factorsAt(v.tip)
		for k := 0; k <= v.tip; k++ {
			damage[k] += v.revs * law.blended(pf, k, v.tip-k)
			// The totals were summed in another order: allow for rounding.
			if damage[k] >= 1-1e-9 {
				res.fractured = true
				res.fractureU = float64(k) * ds
				res.fractureT = t
				res.fractureTip = float64(v.tip) * ds
				return
			}
		}
	}
}
