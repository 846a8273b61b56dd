package plan

import (
	"context"
	"math"
	"slices"

	"tapersweep/analysis"
	"tapersweep/mesh/parallel"
)

// measures are a plan's three figures: the largest of each over its files so far, and the step
// (from 1) where each was reached.
type measures struct {
	engaged, torque, fatigue       float64
	engagedAt, torqueAt, fatigueAt int
	// The highest fatigue use among the files before the target, and where.
	prepFatigue   float64
	prepFatigueAt int
	// wallShort is how far the files so far leave the wall under the wall to keep, at worst,
	// by the coarse search's lower bound (mm; 0: kept, or no wall to keep).
	wallShort float64
}

// addPrep adds a file that prepares for the target.
func (m measures) addPrep(step int, engaged, torque, fatigue float64) measures {
	if fatigue > m.prepFatigue {
		m.prepFatigue, m.prepFatigueAt = fatigue, step
	}
	return m.add(step, engaged, torque, fatigue)
}

func (m measures) add(step int, engaged, torque, fatigue float64) measures {
	if engaged > m.engaged {
		m.engaged, m.engagedAt = engaged, step
	}
	if torque > m.torque {
		m.torque, m.torqueAt = torque, step
	}
	if fatigue > m.fatigue {
		m.fatigue, m.fatigueAt = fatigue, step
	}
	return m
}

// limits turn measures into the objective and into how far a plan breaks the constraints.
type limits struct {
	w          Weights
	ref        measures // the target file taken straight to working length
	maxEngaged float64  // 0: none
	maxFatigue float64  // 0: none
	// maxPrepFatigue caps the files before the target (0: none).
	maxPrepFatigue float64
	// keepWall is the wall to keep, mm (0: none); measures.wallShort counts against it.
	keepWall float64
}

func norm(v float64) float64 {
	if v > 0 {
		return v
	}
	return 1 // the target alone does not engage: the measure counts in its own units
}

func (l *limits) cost(m measures) float64 {
	return l.w.Engaged*m.engaged/norm(l.ref.engaged) + l.w.Torque*m.torque/norm(l.ref.torque) +
		l.w.Fatigue*m.fatigue/norm(l.ref.fatigue)
}

// excess is how far a plan breaks the constraints, as the sum of relative overshoots (0: it
// keeps them all).
func (l *limits) excess(m measures) float64 {
	over := func(v, lim float64) float64 {
		if lim <= 0 || !overCap(v, lim) {
			return 0
		}
		return v/lim - 1
	}
	return over(m.engaged, l.maxEngaged) + over(m.fatigue, l.maxFatigue) + over(m.prepFatigue, l.maxPrepFatigue) +
		over(m.engaged, l.ref.engaged) + over(m.torque, l.ref.torque) + l.wallExcess(m)
}

// wallExcess is how far the files leave the wall under the wall to keep, relative to it.
func (l *limits) wallExcess(m measures) float64 {
	if l.keepWall <= 0 || m.wallShort <= 0 {
		return 0
	}
	return m.wallShort / l.keepWall
}

// state is a partial plan kept in the beam: the files so far and the canal they leave.
type state struct {
	parent   *state
	mv       *move // nil for the untouched canal
	steps    int
	glide    int // the smallest ISO size taken to working length so far (0: none)
	prepared []float32
	m        measures
	excess   float64
	cost     float64
}

func (s *state) uses(inst int) bool {
	for p := s; p.mv != nil; p = p.parent {
		if p.mv.inst == inst {
			return true
		}
	}
	return false
}

// after is the smallest size taken to working length once mv is added.
func (s *state) after(g analysis.GlidePath, mv *move) int {
	if g.Opens(mv.depth) && (s.glide == 0 || mv.size() < s.glide) {
		return mv.size()
	}
	return s.glide
}

// path lists the moves from the first file on.
func (s *state) path() []*move {
	var out []*move
	for p := s; p != nil && p.mv != nil; p = p.parent {
		out = append(out, p.mv)
	}
	slices.Reverse(out)
	return out
}

// candidate is a partial plan one file longer than a beam state, and the full plan its
// completion with the target file makes.
type candidate struct {
	parent    *state
	mv        *move
	order     int // parent's place in the beam times the number of moves plus the move's: tie-break
	valid     bool
	m         measures
	excess    float64
	cost      float64
	fin       measures
	finExcess float64
	finCost   float64
	canFinish bool
	// wallOnly: the strict search set the candidate aside for the wall to keep alone.
	wallOnly bool
}

// complete is a full plan found by the search (its preparing files, then the target).
type complete struct {
	moves  []*move // preparing files; the target follows
	m      measures
	excess float64
	cost   float64
}

// searcher runs one beam search on the coarse canal.
type searcher struct {
	g         *grid
	glide     analysis.GlidePath // the full canal's glide-path yardstick
	moves     []*move
	target    *move
	lim       limits
	beamWidth int
	keep      int
	maxSteps  int
	sameTaper bool      // the rule: consecutive files differ in taper
	strict    bool      // drop plans that break a constraint; else rank them by how far they do
	workers   int       // goroutines for expanding the beam (0: all cores)
	wall      *keepWall // the wall to keep on the coarse canal (nil: none)
	evaluated int
	// wallSetAside counts the partial plans the strict search set aside for the wall alone, and
	// wallFree is the best full plan among them (nil: none): the plan the search would have
	// preferred without the wall to keep, when it ranks above the one proposed.
	wallSetAside int
	wallFree     *complete
}

// overCap tells a figure above its cap; one equal to it, give or take the rounding of sums, keeps it.
func overCap(v, limit float64) bool { return v > limit*(1+1e-9) }

// minEngagedMM is the least engaged length of a file before the target: one that touches
// less wall does no real work and would only slip between two files of one taper.
const minEngagedMM = 1.0

func sameTaper(a, b *move) bool {
	return a.taper == b.taper // NaN (a variable taper) is never equal
}

// less orders full plans: fewer broken constraints, lower cost, fewer steps, then the fixed
// order of moves.
func lessComplete(a, b *complete) bool {
	if a.excess != b.excess {
		return a.excess < b.excess
	}
	if a.cost != b.cost {
		return a.cost < b.cost
	}
	if len(a.moves) != len(b.moves) {
		return len(a.moves) < len(b.moves)
	}
	for i := range a.moves {
		if a.moves[i].index != b.moves[i].index {
			return a.moves[i].index < b.moves[i].index
		}
	}
	return false
}

// run searches plans of 1 to maxSteps files and returns the best ones, best first.
func (s *searcher) run(ctx context.Context) ([]*complete, error) {
	g := s.g
	root := &state{prepared: g.canal.Rho}
	var best []*complete
	addComplete := func(c *complete) {
		if s.strict && c.excess > 0 {
			return
		}
		i, _ := slices.BinarySearchFunc(best, c, func(a, b *complete) int {
			if lessComplete(a, b) {
				return -1
			}
			return 1
		})
		if i < s.keep {
			best = slices.Insert(best, i, c)
			if len(best) > s.keep {
				best = best[:s.keep]
			}
		}
	}
	alone := &complete{m: s.lim.ref, excess: s.lim.excess(s.lim.ref), cost: s.lim.cost(s.lim.ref)}
	if s.glide.Missing(s.target.step.Instrument, 0) {
		alone.excess++ // the target alone would need a glide path first
	}
	addComplete(alone)
	seen := map[uint64][]*state{}
	beam := []*state{root}
	for depth := 1; depth < s.maxSteps && len(beam) > 0; depth++ {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		bound := math.Inf(1)
		if s.strict && len(best) == s.keep {
			bound = best[len(best)-1].cost
		}
		cands := make([]candidate, len(beam)*len(s.moves))
		if err := s.expand(ctx, beam, cands, bound); err != nil {
			return nil, err
		}
		s.evaluated += len(cands)
		var live []*candidate
		for i := range cands {
			c := &cands[i]
			if c.wallOnly {
				s.wallSetAside++
				if c.canFinish && c.finExcess == 0 {
					fc := &complete{moves: append(c.parent.path(), c.mv), m: c.fin, cost: c.finCost}
					if s.wallFree == nil || lessComplete(fc, s.wallFree) {
						s.wallFree = fc
					}
				}
			}
			if !c.valid {
				continue
			}
			live = append(live, c)
			if c.canFinish {
				addComplete(&complete{moves: append(c.parent.path(), c.mv), m: c.fin, excess: c.finExcess, cost: c.finCost})
			}
		}
		slices.SortFunc(live, func(a, b *candidate) int {
			switch {
			case a.finExcess != b.finExcess:
				return cmpF(a.finExcess, b.finExcess)
			case a.finCost != b.finCost:
				return cmpF(a.finCost, b.finCost)
			case a.excess != b.excess:
				return cmpF(a.excess, b.excess)
			case a.cost != b.cost:
				return cmpF(a.cost, b.cost)
			}
			return a.order - b.order
		})
		next := make([]*state, 0, s.beamWidth)
		scratch := make([]float32, len(root.prepared))
		for _, c := range live {
			if len(next) == s.beamWidth {
				break
			}
			g.widen(scratch, c.parent.prepared, c.mv)
			h := s.shapeKey(scratch, c.mv)
			if s.dominated(seen[h], scratch, c) {
				continue
			}
			st := &state{parent: c.parent, mv: c.mv, steps: c.parent.steps + 1, glide: c.parent.after(s.glide, c.mv),
				prepared: slices.Clone(scratch), m: c.m, excess: c.excess, cost: c.cost}
			seen[h] = append(seen[h], st)
			next = append(next, st)
		}
		beam = next
	}
	return best, nil
}

func cmpF(a, b float64) int {
	if a < b {
		return -1
	}
	return 1
}

// expand measures every (beam state, move) pair in parallel; each result lands at its own
// index, so the outcome does not depend on the number of cores.
func (s *searcher) expand(ctx context.Context, beam []*state, cands []candidate, bound float64) error {
	nm := len(s.moves)
	parallel.For(s.workers, len(cands), func(_, i int) {
		if ctx.Err() == nil {
			s.evaluate(&cands[i], beam[i/nm], s.moves[i%nm], i, bound)
		}
	})
	return ctx.Err()
}

// evaluate measures one file added to one partial plan and the plan's completion with the
// target file.
func (s *searcher) evaluate(c *candidate, p *state, mv *move, order int, bound float64) {
	*c = candidate{parent: p, mv: mv, order: order}
	if p.uses(mv.inst) {
		return
	}
	if s.sameTaper && p.mv != nil && sameTaper(p.mv, mv) {
		return
	}
	// Sizes never go down (common practice: a smaller tip after a larger one enlarges nothing
	// at its tip), and a file wider than the canal at working length needs a smaller one before
	// it (the tool's own glide-path advice).
	if p.mv != nil && mv.size() < p.mv.size() || s.glide.Missing(mv.step.Instrument, p.glide) {
		return
	}
	// No file the tool would warn cannot follow the canal or fractures in it.
	if s.strict && (mv.overStrain || mv.fatigue >= 1) {
		return
	}
	if s.strict && (s.lim.maxFatigue > 0 && overCap(mv.fatigue, s.lim.maxFatigue) ||
		s.lim.maxPrepFatigue > 0 && mv.fatigue > s.lim.maxPrepFatigue) {
		return
	}
	g := s.g
	sm := g.sweep(p.prepared, nil, mv)
	// A file that barely touches the wall only adds a step, unless it opens the glide path the
	// target needs.
	opens := s.glide.Missing(s.target.step.Instrument, p.glide) && !s.glide.Missing(s.target.step.Instrument, p.after(s.glide, mv))
	if (!sm.cuts || sm.engaged < minEngagedMM) && !opens {
		return
	}
	step := p.steps + 1
	c.m = p.m.addPrep(step, sm.engaged, sm.torque, mv.fatigue)
	// The wall to keep: the target file is not tested here (whether it keeps the wall alone is
	// settled at full resolution before the search), and a cell of the finished canal is the
	// wider of the target's radius and the files' before it, so a plan keeps the wall when each
	// of its files does.
	short := s.wall.short(p.prepared, &mv.file, g.canal.Angles)
	c.m.wallShort = max(c.m.wallShort, short)
	c.excess = s.lim.excess(c.m)
	c.cost = s.lim.cost(c.m)
	if s.strict && (c.excess-s.lim.wallExcess(c.m) > 0 || c.cost >= bound) {
		return
	}
	fs := g.sweep(p.prepared, mv, s.target)
	c.fin = c.m.add(step+1, fs.engaged, fs.torque, s.target.fatigue)
	c.finExcess = s.lim.excess(c.fin)
	c.finCost = s.lim.cost(c.fin)
	c.canFinish = !(s.sameTaper && sameTaper(mv, s.target)) && mv.size() <= s.target.size() &&
		!s.glide.Missing(s.target.step.Instrument, p.after(s.glide, mv))
	if s.strict && short > 0 {
		// Kept only to say what the wall to keep costs; no plan grows from it (a file only
		// widens the canal, so what follows cannot give the wall back).
		c.wallOnly = true
		c.finExcess -= s.lim.wallExcess(c.fin)
		return
	}
	c.valid = true
}

// shapeKey hashes a prepared canal (and, under the taper rule, the last file's taper, which
// limits what may follow).
func (s *searcher) shapeKey(prepared []float32, last *move) uint64 {
	// FNV-1a over 32-bit words.
	h := uint64(14695981039346656037)
	mix := func(v uint64) { h = (h ^ v) * 1099511628211 }
	for _, v := range prepared {
		mix(uint64(math.Float32bits(v)))
	}
	if s.sameTaper {
		mix(math.Float64bits(last.taper))
	}
	return h
}

// dominated reports whether a kept state leaves the same canal (and, under the taper rule, the
// same last taper) with no more steps and no worse figures: the candidate can then do nothing
// the kept state cannot. (Which files remain unused may differ; the search accepts that.)
func (s *searcher) dominated(kept []*state, prepared []float32, c *candidate) bool {
	for _, k := range kept {
		if !slices.Equal(k.prepared, prepared) {
			continue
		}
		if s.sameTaper && (k.mv == nil || !sameTaper(k.mv, c.mv)) {
			continue
		}
		if k.steps <= c.parent.steps+1 && k.m.engaged <= c.m.engaged && k.m.torque <= c.m.torque &&
			k.m.fatigue <= c.m.fatigue && k.excess <= c.excess {
			return true
		}
	}
	return false
}
