package plan

import (
	"context"
	"fmt"
	"math"
	"strings"

	"tapersweep/analysis"
	"tapersweep/mesh/parallel"
	"tapersweep/models"
)

// Plan is a proposed sequence, measured at full resolution, and why it was chosen.
type Plan struct {
	Sequence *models.Sequence
	// Result is the plan run through the full-resolution canal.
	Result *analysis.Result
	// Baseline is the target file taken straight to working length, the plan's yardstick.
	Baseline *analysis.Result
	// Cost is the objective at full resolution; the baseline scores the sum of the weights.
	Cost float64
	// Explanation states the target, the objective, the constraints, the depths tried, each
	// step and the comparison with the baseline, in plain words.
	Explanation []string
}

// Propose searches for the sequence that reaches opt.Target at working length with the least
// stress. The context cancels the search. When no sequence keeps the constraints the error is
// an *InfeasibleError that names the constraint that binds.
func Propose(ctx context.Context, c *analysis.Canal, opt Options) (*Plan, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	if c == nil || c.Line == nil || c.Line.Len() < 2 {
		return nil, fmt.Errorf("plan: no measured canal")
	}
	if c.WorkingLength > c.Line.Length()+models.LengthTolerance {
		return nil, fmt.Errorf("plan: %s: working length %.2f mm is beyond the canal's apical end at %.2f mm",
			c.Name, c.WorkingLength, c.Line.Length())
	}
	ti := findTarget(opt.Instruments, opt.Target)
	if ti < 0 {
		return nil, fmt.Errorf("plan: the target %s is not among the %d instruments given", opt.Target.Label(), len(opt.Instruments))
	}
	if opt.KeepWallMM > 0 && c.Root == nil {
		return nil, fmt.Errorf("plan: %s: a wall to keep needs the root's outer surface (a root in the canal spec, a surface around the canal in its file, or a root file)", c.Name)
	}
	p := &planner{full: c, opt: opt, targetInst: ti}
	if err := p.prepare(ctx); err != nil {
		return nil, err
	}
	return p.propose(ctx)
}

// findTarget returns the first constant-taper instrument of the target's size and taper.
func findTarget(ins []models.Instrument, t Target) int {
	for i, in := range ins {
		if in.Size == t.Size && !in.IsVariableTaper() && math.Abs(in.TaperAt(0)-t.Taper) < models.TaperTolerance {
			return i
		}
	}
	return -1
}

// planner holds one call of Propose (its context is passed to each method that runs).
type planner struct {
	full       *analysis.Canal
	opt        Options
	targetInst int
	depths     []depthChoice
	g          *grid
	moves      []*move
	target     *move
	baseline   *analysis.Result
	glide      analysis.GlidePath
	fullLim    limits
	coarseLim  limits
	evaluated  int
	rechecked  int
	// wallRuled counts the plans re-checked at full resolution that the wall to keep ruled out.
	wallRuled int
	// wall is the wall to keep on the coarse canal (nil: none); wallSetAside counts the partial
	// plans the first search set aside for it, and wallFree is the best full plan among them.
	wall         *keepWall
	wallSetAside int
	wallFree     *complete
	// wallFreeChecked is wallFree re-checked at full resolution (nil: not needed).
	wallFreeChecked *checked
}

// prepare builds the coarse canal, lays out every (file, depth) move on it, finds each move's
// fatigue use at full resolution, and measures the baseline.
func (p *planner) prepare(ctx context.Context) error {
	c, opt := p.full, p.opt
	ds := math.Max(opt.CoarseDS, c.Line.DS)
	cc := coarse(c, ds, opt.CoarseAngles)
	p.g = newGrid(cc, opt.Run)
	p.wall = newKeepWall(c, cc, opt.KeepWallMM, opt.Workers)
	p.depths = depthChoices(c)
	p.glide = analysis.GlidePathOf(c)
	targetStep := models.NewStep(opt.Instruments[p.targetInst], models.DepthWL(0))
	p.target = newMove(p.g, p.targetInst, targetStep)
	for i, in := range opt.Instruments {
		if i == p.targetInst {
			continue
		}
		for _, d := range p.depths {
			mv := newMove(p.g, i, models.NewStep(in, d.depth))
			mv.index = len(p.moves)
			mv.overStrain = strainOver(c.Line, in, mv.depth)
			p.moves = append(p.moves, mv)
		}
	}
	// Fatigue use on the coarse canal first; the target, and every file whose coarse figure
	// comes within reach of a cap, again at full resolution, so that a cap means the same in the
	// search as in the final check. (Near an alloy's strain limit the coarse figure can be a
	// quarter off or more; a file whose coarse figure is a quarter of the cap is taken to stay
	// under it, and the final check at full resolution catches any that does not.)
	if err := p.fatigueOn(ctx, cc, p.moves); err != nil {
		return err
	}
	thin := fewAngles(c)
	if err := p.fatigueOn(ctx, thin, []*move{p.target}); err != nil {
		return err
	}
	if lim := p.fatigueCap(p.target.fatigue); lim > 0 {
		var near []*move
		for _, mv := range p.moves {
			if mv.fatigue >= fullFatigueShare*lim {
				near = append(near, mv)
			}
		}
		if err := p.fatigueOn(ctx, thin, near); err != nil {
			return err
		}
	}
	base, err := analysis.Run(ctx, c, &models.Sequence{Steps: []models.Step{targetStep}, PathModel: models.PathCentred,
		Name: "the target file alone"}, opt.Run)
	if err != nil {
		return err
	}
	p.baseline = base
	bm := base.Steps[0].Metrics
	p.fullLim = limits{w: opt.Weights, maxEngaged: opt.MaxEngagedMM,
		ref: measures{}.add(1, bm.EngagedLengthMM, bm.PeakTorqueIndex, bm.FatigueDamage)}
	sm := p.g.sweep(cc.Rho, nil, p.target)
	p.coarseLim = limits{w: opt.Weights, maxEngaged: opt.MaxEngagedMM, keepWall: opt.KeepWallMM,
		ref: measures{}.add(1, sm.engaged, sm.torque, p.target.fatigue)}
	switch {
	case opt.MaxFatigue > 0:
		p.fullLim.maxFatigue, p.coarseLim.maxFatigue = opt.MaxFatigue, opt.MaxFatigue
	case opt.MaxFatigue == 0:
		p.fullLim.maxFatigue, p.coarseLim.maxFatigue = bm.FatigueDamage, p.target.fatigue
		// Where the target file itself reaches the model's fracture point, that is no licence
		// for the files before it.
		p.fullLim.maxPrepFatigue, p.coarseLim.maxPrepFatigue = 1, 1
	}
	return nil
}

// fullFatigueShare: a file whose coarse fatigue use reaches this share of a cap is measured
// again at full resolution.
const fullFatigueShare = 0.25

// fatigueCap is the lowest fatigue cap in force for the files before the target, given the
// target's own use (0: none).
func (p *planner) fatigueCap(targetUse float64) float64 {
	switch {
	case p.opt.MaxFatigue > 0:
		return p.opt.MaxFatigue
	case p.opt.MaxFatigue == 0:
		return math.Min(targetUse, 1)
	}
	return 0
}

// fatigueOn finds the moves' fatigue use on canal c, in parallel.
func (p *planner) fatigueOn(ctx context.Context, c *analysis.Canal, moves []*move) error {
	errs := make([]error, len(moves))
	parallel.For(p.opt.Workers, len(moves), func(_, i int) {
		errs[i] = fatigueOf(ctx, c, moves[i], p.opt.Run)
	})
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// fatigueOf runs one move alone through canal c for its fatigue use.
func fatigueOf(ctx context.Context, cc *analysis.Canal, mv *move, opt analysis.RunOptions) error {
	res, err := analysis.Run(ctx, cc, &models.Sequence{Steps: []models.Step{mv.step}, PathModel: models.PathCentred}, opt)
	if err != nil {
		return err
	}
	mv.fatigue = res.Steps[0].Metrics.FatigueDamage
	return nil
}

func (p *planner) searcher(strict, taperRule bool) *searcher {
	return &searcher{g: p.g, glide: p.glide, moves: p.moves, target: p.target, lim: p.coarseLim, beamWidth: p.opt.BeamWidth,
		keep: p.opt.Recheck, maxSteps: p.opt.MaxSteps, sameTaper: taperRule, strict: strict, workers: p.opt.Workers, wall: p.wall}
}

// checked is a plan found on the coarse canal and run at full resolution.
type checked struct {
	seq    *models.Sequence
	res    *analysis.Result
	m      measures
	excess float64
	cost   float64
	// blocked is the advice at full resolution that rules the plan out, by step (from 1).
	blocked []blockedStep
	// found is the plan as the coarse search found and ranked it.
	found *complete
}

type blockedStep struct {
	step   int
	advice analysis.Advice
	wall   *float64 // the wall left, when the wall to keep rules the step out
}

// recheck runs the plans through the full-resolution canal and returns them best first
// (fewest broken constraints, then lowest cost, then the search's order).
func (p *planner) recheck(ctx context.Context, found []*complete) ([]*checked, error) {
	out := make([]*checked, len(found))
	errs := make([]error, len(found))
	parallel.For(p.opt.Workers, len(found), func(_, i int) {
		seq := p.sequence(found[i].moves)
		res, err := analysis.Run(ctx, p.full, seq, p.opt.Run)
		if err != nil {
			errs[i] = err
			return
		}
		var m measures
		for k, s := range res.Steps {
			add := m.addPrep
			if k == len(res.Steps)-1 {
				add = m.add
			}
			m = add(k+1, s.Metrics.EngagedLengthMM, s.Metrics.PeakTorqueIndex, s.Metrics.FatigueDamage)
		}
		ck := &checked{seq: seq, res: res, m: m, excess: p.fullLim.excess(m), cost: p.fullLim.cost(m), found: found[i]}
		for k, s := range res.Steps {
			for _, a := range analysis.Blocking(&s.Metrics) {
				ck.blocked = append(ck.blocked, blockedStep{step: k + 1, advice: a})
				ck.excess++
			}
			if p.opt.KeepWallMM > 0 {
				for _, a := range s.Metrics.Advice {
					if a.Code == analysis.AdviceThinWall {
						ck.blocked = append(ck.blocked, blockedStep{step: k + 1, advice: a, wall: s.Metrics.ThinnestWallMM})
						ck.excess++
					}
				}
			}
		}
		out[i] = ck
	})
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	for _, ck := range out {
		for _, b := range ck.blocked {
			if b.wall != nil {
				p.wallRuled++
				break
			}
		}
	}
	// A stable insertion sort keeps the search's order among equals.
	for i := 1; i < len(out); i++ {
		for j := i; j > 0 && (out[j].excess < out[j-1].excess ||
			out[j].excess == out[j-1].excess && out[j].cost < out[j-1].cost); j-- {
			out[j], out[j-1] = out[j-1], out[j]
		}
	}
	return out, nil
}

// sequence writes the preparing moves and the target file as a sequence.
func (p *planner) sequence(moves []*move) *models.Sequence {
	seq := &models.Sequence{PathModel: models.PathCentred, Name: "proposed plan"}
	for _, mv := range append(append([]*move{}, moves...), p.target) {
		st := mv.step
		seq.Steps = append(seq.Steps, st)
		a := st.Instrument.Alloy
		if b, ok := models.BuiltinAlloy(st.AlloyName); !ok || b != a {
			if seq.Alloys == nil {
				seq.Alloys = map[string]models.Alloy{}
			}
			seq.Alloys[st.AlloyName] = a
		}
	}
	return seq
}

// search runs one beam search and rechecks its best plans.
func (p *planner) search(ctx context.Context, strict, taperRule bool) ([]*checked, error) {
	s := p.searcher(strict, taperRule)
	found, err := s.run(ctx)
	p.evaluated += s.evaluated
	p.rechecked += len(found)
	if p.evaluated == s.evaluated { // the first search: the one whose plan is proposed when any keeps the limits
		p.wallSetAside, p.wallFree = s.wallSetAside, s.wallFree
	}
	if err != nil {
		return nil, err
	}
	return p.recheck(ctx, found)
}

func (p *planner) propose(ctx context.Context) (*Plan, error) {
	if err := p.targetFails(); err != nil {
		return nil, err
	}
	if f, lim := p.fullLim.ref.fatigue, p.fullLim.maxFatigue; lim > 0 && overCap(f, lim) {
		return nil, &InfeasibleError{Constraint: ConstraintFatigue, Limit: lim, Needed: f, Msg: fmt.Sprintf(
			"the %s taken to working length, which ends every plan, uses %.3g of its fatigue life, above the cap of %.3g",
			p.opt.Target.Label(), f, lim)}
	}
	rule := !p.opt.AllowSameTaper
	plans, err := p.search(ctx, true, rule)
	if err != nil {
		return nil, err
	}
	if len(plans) > 0 && plans[0].excess == 0 {
		best := plans[0]
		wf, err := p.checkWallFree(ctx, best)
		if err != nil {
			return nil, err
		}
		p.wallFreeChecked = wf
		if wf != nil && wf.excess == 0 && wf.cost < best.cost {
			best = wf // the search's bound of the wall was too cautious for this one
		}
		return p.explain(best), nil
	}
	best, err := p.infeasible(ctx, rule)
	if err != nil {
		return nil, err
	}
	return p.explain(best), nil
}

// targetFails says why no plan can pass the tool's own advice whatever comes before the target:
// the target file taken to working length fractures or is bent past its recoverable strain in
// this canal (neither depends on the files before it), or no file on the shelf is narrow enough
// to open a glide path for it.
func (p *planner) targetFails() error {
	tl := p.opt.Target.Label()
	for _, a := range analysis.Blocking(&p.baseline.Steps[0].Metrics) {
		switch a.Code {
		case analysis.AdviceStrainLimit:
			return &InfeasibleError{Constraint: ConstraintStrain, Msg: fmt.Sprintf(
				"the %s taken to working length, which ends every plan, is bent past its recoverable strain in this canal: %s", tl, a.Text)}
		case analysis.AdviceFatigue:
			m := p.baseline.Steps[0].Metrics
			return &InfeasibleError{Constraint: ConstraintFatigue, Limit: 1, Needed: m.FatigueDamage, Msg: fmt.Sprintf(
				"the %s taken to working length, which ends every plan, fractures in this canal in the model whatever files go "+
					"before it: %s", tl, a.Text)}
		}
	}
	if p.opt.KeepWallMM > 0 {
		for _, a := range p.baseline.Steps[0].Metrics.Advice {
			if a.Code == analysis.AdviceThinWall {
				w := p.baseline.Steps[0].Metrics.ThinnestWallMM
				return &InfeasibleError{Constraint: ConstraintWall, Limit: p.opt.KeepWallMM, Needed: *w, Step: 0, Msg: fmt.Sprintf(
					"the %s taken to working length, which ends every plan, leaves %s mm of wall to the root's outer surface, under the "+
						"%s mm to keep: %s", tl, mmText(*w), mmText(p.opt.KeepWallMM), a.Text)}
			}
		}
	}
	in := p.target.step.Instrument
	if p.glide.Missing(in, 0) {
		for _, mv := range p.moves {
			if mv.size() < in.Size && p.glide.Opens(mv.depth) && !p.glide.Missing(mv.step.Instrument, 0) && !mv.overStrain {
				return nil
			}
		}
		return &InfeasibleError{Constraint: ConstraintGlidePath, Msg: fmt.Sprintf(
			"the %s's tip (%.2f mm) is wider than the canal at working length (%.2f mm) and no file on the shelf is narrow "+
				"enough to be taken there before it (a glide path)", tl, in.TipDiameter(), p.glide.Width)}
	}
	return nil
}

// stepText names a step: "25/.06 to WL-2".
func stepText(st models.Step) string {
	d := st.Depth.String()
	if !st.Depth.FromWL {
		d += " mm"
	}
	return st.Instrument.Label() + " to " + d
}

func (p *planner) explain(best *checked) *Plan {
	opt := p.opt
	wl := p.full.WorkingLength
	tl := opt.Target.Label()
	ref := p.fullLim.ref
	pl := &Plan{Sequence: best.seq, Result: best.res, Baseline: p.baseline, Cost: best.cost}
	add := func(format string, a ...any) { pl.Explanation = append(pl.Explanation, fmt.Sprintf(format, a...)) }
	add("Target: the last file is the %s taken to working length (%.2f mm), so the canal ends at its size there "+
		"and is at least as wide as that file wherever it reaches.", tl, wl)
	add("Objective: %s (%.2f mm, %.3f N*cm, %.3f for the %s alone).", opt.Weights.ObjectiveText(tl),
		ref.engaged, ref.torque, ref.fatigue, tl)
	var cons []string
	cons = append(cons, fmt.Sprintf("at most %d file%s, each used once", opt.MaxSteps, map[bool]string{true: "s"}[opt.MaxSteps != 1]))
	if !opt.AllowSameTaper {
		cons = append(cons, "every change of file changes the taper")
	}
	if opt.MaxEngagedMM > 0 {
		cons = append(cons, fmt.Sprintf("no file engaged over more than %.2f mm", opt.MaxEngagedMM))
	}
	switch {
	case opt.MaxFatigue > 0:
		cons = append(cons, fmt.Sprintf("no file using more than %.3g of its fatigue life", opt.MaxFatigue))
	case opt.MaxFatigue == 0:
		cons = append(cons, fmt.Sprintf("no file using more of its fatigue life than the %s at working length (%.3g)", tl, ref.fatigue))
	}
	if opt.KeepWallMM > 0 {
		cons = append(cons, fmt.Sprintf("every file leaves at least %s mm of wall to the root's outer surface (where the canal as scanned "+
			"has less, it does not thin the wall)", mmText(opt.KeepWallMM)))
	}
	cons = append(cons, "the tool's own advice: sizes never go down, a glide path before any file wider than the canal at "+
		"working length, no file bent past its recoverable strain or reaching the model's fracture point")
	cons = append(cons, fmt.Sprintf("no file engaged over a longer stretch or needing more torque than the %s taken straight to working length", tl))
	add("Constraints: %s.", strings.Join(cons, "; "))
	add("Depths tried for each preparing file: %s.", depthText(p.depths, wl))
	for _, s := range best.res.Steps {
		m := s.Metrics
		add("Step %d, %s (%.2f mm): engaged over %.2f mm, peak torque %.3f N*cm, fatigue use %.3g.",
			s.Number, stepText(s.Step), m.TipDepthMM, m.EngagedLengthMM, m.PeakTorqueIndex, m.FatigueDamage)
	}
	add("Against the %s taken straight to working length: largest engaged length %.2f mm (against %.2f mm), "+
		"highest peak torque %.3f N*cm (against %.3f), highest fatigue use %.3g (against %.3g).",
		tl, best.m.engaged, ref.engaged, best.m.torque, ref.torque, best.m.fatigue, ref.fatigue)
	if len(best.res.Steps) == 1 {
		add("No sequence of these instruments within the constraints does better than the %s taken straight to working length.", tl)
	}
	for _, r := range taperDownReasons(best.res) {
		add("%s", r)
	}
	if opt.KeepWallMM > 0 {
		for _, line := range p.wallText(best) {
			add("%s", line)
		}
	}
	if p.opt.MaxFatigue < 0 {
		add("The fatigue cap was lifted; no file reaches the model's fracture point all the same (the tool's own advice).")
	}
	add("Searched on a coarse copy of the canal (%.2f mm between stations, %d directions): %d partial plans "+
		"measured; the best %d full plans re-checked at full resolution.", p.g.canal.Line.DS, p.g.canal.Angles,
		p.evaluated, p.rechecked)
	return pl
}

// taperDownReasons says, for each change of file to a smaller taper, why the plan makes it: the
// next file goes deeper or carries a larger tip, while the smaller taper keeps the rest of it
// off the wall the earlier file already shaped (common practice: shape the coronal part with
// larger tapers, then carry smaller ones apically).
func taperDownReasons(res *analysis.Result) []string {
	var out []string
	for k := 1; k < len(res.Steps); k++ {
		a, b := res.Steps[k-1], res.Steps[k]
		ia, ib := a.Step.Instrument, b.Step.Instrument
		if ia.IsVariableTaper() || ib.IsVariableTaper() || !(ib.TaperAt(0) < ia.TaperAt(0)-1e-9) {
			continue
		}
		if a.Metrics.EngagedLengthMM == 0 {
			out = append(out, fmt.Sprintf("The taper goes down from %s (step %d, %s) to %s (step %d, %s): the %s cut nothing; it "+
				"only opened a glide path to working length.", models.TaperLabel(ia.TaperAt(0)), a.Number, ia.Label(),
				models.TaperLabel(ib.TaperAt(0)), b.Number, ib.Label(), ia.Label()))
			continue
		}
		var why []string
		if d := b.TipDepth - a.TipDepth; d > 1e-6 {
			why = append(why, fmt.Sprintf("it goes %.1f mm deeper, to %.2f mm", d, b.TipDepth))
		}
		if ib.Size > ia.Size {
			why = append(why, fmt.Sprintf("its tip is larger (%.2f against %.2f mm)", ib.TipDiameter(), ia.TipDiameter()))
		}
		if len(why) == 0 {
			why = append(why, fmt.Sprintf("it still cuts %.2f mm of wall the earlier file left", b.Metrics.EngagedLengthMM))
		}
		out = append(out, fmt.Sprintf("The taper goes down from %s (step %d, %s) to %s (step %d, %s): %s, while the smaller taper "+
			"keeps the rest of the file off the wall the %s already shaped.", models.TaperLabel(ia.TaperAt(0)), a.Number,
			ia.Label(), models.TaperLabel(ib.TaperAt(0)), b.Number, ib.Label(), strings.Join(why, " and "), ia.Label()))
	}
	return out
}
