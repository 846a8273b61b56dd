package plan

import (
	"math"

	"tapersweep/analysis"
	"tapersweep/models"
)

// grid holds what every step on the coarse canal needs, computed once.
type grid struct {
	canal    *analysis.Canal
	n, na    int
	s        []float64
	kn1, kn2 []float64
	cos, sin []float64
	dTheta   float64
	weight   []float64 // trapezoid length of each station, mm (as analysis.Run weighs them)
	thr, ct  float64
}

func newGrid(c *analysis.Canal, opt analysis.RunOptions) *grid {
	line := c.Line
	g := &grid{canal: c, n: line.Len(), na: c.Angles, s: line.S, kn1: line.KN1, kn2: line.KN2,
		dTheta: 2 * math.Pi / float64(c.Angles), thr: opt.ContactThreshold, ct: opt.CuttingCoefficient}
	g.cos = make([]float64, g.na)
	g.sin = make([]float64, g.na)
	for j := range g.cos {
		th := float64(j) * g.dTheta
		g.cos[j], g.sin[j] = math.Cos(th), math.Sin(th)
	}
	g.weight = make([]float64, g.n)
	for i := range g.s {
		lo, hi := g.s[max(0, i-1)], g.s[min(g.n-1, i+1)]
		g.weight[i] = (hi - lo) / 2
	}
	return g
}

// move is one file taken to one depth, laid out on the coarse grid. Its fatigue use does not
// depend on what earlier files removed (it depends on the file, the canal's curvature and the
// insertion schedule), so it is found once per move, at full resolution: the cap on fatigue
// use then means the same in the search as in the final check.
type move struct {
	index   int // place in the search's list of moves: the fixed tie-break order
	inst    int // place in the instrument list
	step    models.Step
	depth   float64 // mm from the orifice
	radius  []float32
	tipW    float64 // weight of the tip's station, which ends at the tip
	fatigue float64 // Miner's sum at the most used point, at full resolution
	taper   float64 // the tip taper; NaN for a variable taper (never "the same" as another)
}

func newMove(g *grid, inst int, st models.Step) *move {
	line := g.canal.Line
	D := math.Min(st.Depth.Resolve(g.canal.WorkingLength), line.Length())
	mv := &move{inst: inst, step: st, depth: D, taper: st.Instrument.TaperAt(0)}
	if st.Instrument.IsVariableTaper() {
		mv.taper = math.NaN()
	}
	for i := 0; i < g.n && g.s[i] <= D+1e-9; i++ {
		mv.radius = append(mv.radius, float32(st.Instrument.Diameter(D-g.s[i])/2))
	}
	if tip := len(mv.radius) - 1; tip >= 0 {
		mv.tipW = math.Max(0, math.Min(g.weight[tip], D-g.s[tip]+g.weight[tip]/2))
	}
	return mv
}

// stepMeasure is what one step does to the wall, as the search ranks it.
type stepMeasure struct {
	engaged float64 // engaged length, mm
	torque  float64 // peak torque, N*cm
	cuts    bool    // some cell cut deeper than the contact threshold
}

// sweep measures mv against the wall before[] widened by an earlier file of radius pre[] (nil:
// none), the same sums as analysis.Run: a cell is engaged where the file's radius passes the
// wall by more than the contact threshold; dA = r (1 - k r cos(theta)) dtheta ds; torque per
// engaged cell c_t r dA. Widening on the fly spares materialising every candidate's canal.
func (g *grid) sweep(before, pre []float32, mv *move) stepMeasure {
	var out stepMeasure
	first, last := -1, -1
	na := g.na
	tip := len(mv.radius) - 1
	torque := 0.0
	for i := 0; i <= tip; i++ {
		r32 := mv.radius[i]
		r := float64(r32)
		w := g.weight[i]
		if i == tip {
			w = mv.tipW
		}
		var p float32
		if i < len(pre) {
			p = pre[i]
		}
		if r32 <= p {
			continue // the earlier file already took the wall past this radius all round
		}
		row := before[i*na : (i+1)*na]
		kc, ks := g.kn1[i], g.kn2[i]
		engaged := false
		st := 0.0
		for j, rho32 := range row {
			rho := float64(max(rho32, p))
			e := r - rho
			if e <= g.thr {
				continue
			}
			engaged = true
			dA := r * (1 - (kc*g.cos[j]+ks*g.sin[j])*r) * g.dTheta * w
			st += r * dA
		}
		if engaged {
			if first < 0 {
				first = i
			}
			last = i
			torque += g.ct * st
		}
	}
	if first >= 0 {
		out.cuts = true
		out.engaged = g.s[last] - g.s[first]
	}
	out.torque = torque / 10 // N*mm -> N*cm
	return out
}

// widen writes into dst the wall before[] after a file of radius r[] (the larger of the two).
func (g *grid) widen(dst, before []float32, r []float32) {
	copy(dst, before)
	na := g.na
	for i, ri := range r {
		row := dst[i*na : (i+1)*na]
		for j, rho := range row {
			if ri > rho {
				row[j] = ri
			}
		}
	}
}
