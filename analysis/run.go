package analysis

import (
	"context"
	"fmt"
	"math"
	"sync"

	"tapersweep/models"
)

// RunOptions are the model's settings that are not part of a sequence.
type RunOptions struct {
	// ContactThreshold is the depth of cut, mm, below which a cell counts as untouched: one
	// threshold serves numbers and colours alike.
	ContactThreshold float64
	// CuttingCoefficient c_t, N/mm2: cutting torque per engaged cell is c_t * r * dA. An
	// illustrative setting: torques scale with it, margins and comparisons between steps hold.
	CuttingCoefficient float64
	// PathModel overrides the sequence's path_model when set: "centred" or "elastic".
	PathModel string
	// WallStiffness k_w, N/mm2, for the elastic path (illustrative; 0 = the default).
	WallStiffness float64
	// MinWallMM is the least wall to the root's outer surface the thin-wall warning asks to keep
	// (0 = DefaultMinWallMM); used only when the canal's root is known.
	MinWallMM float64
	// Workers bounds the goroutines of the wall measure (0 = every core).
	Workers int
}

// Defaults of RunOptions.
const (
	DefaultContactThreshold   = 0.005
	DefaultCuttingCoefficient = 2.0
)

// WithDefaults fills every setting left at zero with its default, as Run does.
func (o RunOptions) WithDefaults() RunOptions {
	if o.ContactThreshold <= 0 {
		o.ContactThreshold = DefaultContactThreshold
	}
	if o.CuttingCoefficient <= 0 {
		o.CuttingCoefficient = DefaultCuttingCoefficient
	}
	if o.WallStiffness <= 0 {
		o.WallStiffness = DefaultWallStiffness
	}
	if o.MinWallMM <= 0 {
		o.MinWallMM = DefaultMinWallMM
	}
	return o
}

// Result is a sequence run through one canal. It is immutable once built.
type Result struct {
	Canal    *Canal
	Sequence *models.Sequence
	Options  RunOptions
	Steps    []*StepResult
	Warnings []string
	// Moved is how the whole sequence moved the canal (final prepared against scanned).
	Moved Transport
	// ScannedWall is the wall to the root's outer surface before any step (empty without a root).
	ScannedWall Wall

	wallMapsOnce sync.Once
	wallMaps     [][]float32 // WallMap's, per step
}

// StepResult is what one file does. Maps are station-major like Canal.Rho.
type StepResult struct {
	Number   int // from 1
	Step     models.Step
	Alloy    models.Alloy
	TipDepth float64 // mm from the orifice
	// FileRadius[i] is the file's radius at station i (0 beyond its tip).
	FileRadius []float32
	// Before is the canal as the earlier steps left it; Cut is the depth of cut against it;
	// Prepared is the canal after this step.
	Before, Cut, Prepared []float32
	// Along the file, per material point u = k * DS from the tip (as far as the tip went):
	Strain   []float64 // outer-fibre strain with the tip at the target depth (fraction)
	Damage   []float64 // Miner's sum over the insertion schedule
	Torque   []float64 // torque carried by the section, N*cm
	Capacity []float64 // torque the section can carry, N*cm
	// Offset1, Offset2: the file's axis off the centerline along N1 and N2 at each station it
	// reaches, mm (nil in the centred model).
	Offset1, Offset2 []float64
	Metrics          StepMetrics
	touched          float64 // the canal's own wall cut past the threshold so far, mm2
}

// Run sweeps each file of the sequence through the canal in turn. Step N's depth of cut is
// measured against the canal as steps 1..N-1 left it.
func Run(ctx context.Context, c *Canal, seq *models.Sequence, opt RunOptions) (*Result, error) {
	opt = opt.WithDefaults()
	if opt.PathModel == "" {
		opt.PathModel = seq.PathModel
	}
	if opt.PathModel == "" {
		opt.PathModel = models.PathCentred
	}
	if opt.PathModel != models.PathCentred && opt.PathModel != models.PathElastic {
		return nil, fmt.Errorf("%s: path model %q: use %q or %q", seqName(seq), opt.PathModel, models.PathCentred, models.PathElastic)
	}
	if err := seq.CheckDepths(c.Line.Length(), c.WorkingLength); err != nil {
		return nil, err
	}
	res := &Result{Canal: c, Sequence: seq, Options: opt}
	res.Warnings = append(res.Warnings, seq.Warnings...)
	before := c.Rho
	kern := NewKernel(c, opt)
	var es *elasticSolver // the elastic path's work space, shared by the steps
	if opt.PathModel == models.PathElastic {
		es = newElasticSolver(c, opt.WallStiffness)
	}
	for k, st := range seq.Steps {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		alloy, ok := seq.Alloy(st.AlloyName)
		if !ok {
			alloy = st.Instrument.Alloy
		}
		touched := 0.0
		if k > 0 {
			touched = res.Steps[k-1].touched
		}
		sr := runStep(c, kern, es, st, alloy, before, touched)
		sr.Number = k + 1
		sr.Metrics.Step = k + 1
		sr.Metrics.Alloy = st.AlloyName
		res.Steps = append(res.Steps, sr)
		before = sr.Prepared
	}

	res.Moved = transportBetween(c, c.Rho, before)
	res.measureWall()
	addAdvice(res)
	return res, nil
}

// measureWall states the wall to the root's outer surface as scanned and after each step; each
// step's map is measured again only where the step moved the wall.
func (res *Result) measureWall() {
	c := res.Canal
	if c.Root == nil || c.scannedWall == nil || len(c.scannedWall.th) != len(c.Rho) {
		return // no root, or a copy of the canal on other stations (the planner's)
	}
	limit := res.Options.MinWallMM
	from := c.scannedWallAt(limit, res.Options.Workers)
	res.ScannedWall = c.wallOf(from, nil, limit)
	res.ScannedWall.WallThinnedMM = nil
	if t := res.ScannedWall.ThinnestWallMM; t != nil && *t < limit {
		res.Warnings = append(res.Warnings, "as scanned: "+thinWallText(res.ScannedWall))
	}
	for _, sr := range res.Steps {
		w := c.wallThickness(sr.Prepared, from, limit, wallFigures, res.Options.Workers)
		sr.Metrics.Wall = c.wallOf(w, from, limit)
		from = w
	}
}

// WallMap is the wall left to the root's outer surface after step k (from 1; 0 = as scanned) at
// every cell of the canal's map, each at most wallMapTolerance (or a tenth of the wall) above the
// exact distance and on its side of the run's limit, for pictures; nil without a root. The maps
// of all steps are measured on the first call and kept.
func (res *Result) WallMap(k int) []float32 {
	c := res.Canal
	if c.Root == nil || c.scannedWall == nil || len(c.scannedWall.th) != len(c.Rho) || k < 0 || k > len(res.Steps) {
		return nil
	}
	scanned := c.scannedWallAt(res.Options.MinWallMM, res.Options.Workers)
	if k == 0 {
		return scanned.th
	}
	res.wallMapsOnce.Do(func() {
		from := scanned
		for _, sr := range res.Steps {
			w := c.wallThickness(sr.Prepared, from, res.Options.MinWallMM, wallPictures, res.Options.Workers)
			res.wallMaps = append(res.wallMaps, w.th)
			from = w
		}
	})
	return res.wallMaps[k-1]
}

func seqName(seq *models.Sequence) string {
	if seq.Name != "" {
		return seq.Name
	}
	return "sequence"
}

// runStep sweeps one file with its tip at the target depth, on its own path when es is set.
// touched is the canal's own wall the earlier steps have cut past the contact threshold, mm2.
func runStep(c *Canal, k *Kernel, es *elasticSolver, st models.Step, alloy models.Alloy, before []float32, touched float64) *StepResult {
	line := c.Line
	n := line.Len()
	in := st.Instrument
	D := math.Min(st.Depth.Resolve(c.WorkingLength), line.Length())
	sr := &StepResult{Step: st, Alloy: alloy, TipDepth: D, Before: before}
	f := k.Place(in, D)
	tip := f.Tip()
	sr.FileRadius = make([]float32, n)
	copy(sr.FileRadius, f.Radius)
	sr.Cut = make([]float32, len(before))
	sr.Prepared = append([]float32(nil), before...)
	m := &sr.Metrics
	m.Label, m.TipDepthMM, m.TipFromApexMM = in.Label(), D, line.Length()-D
	path := elasticPath{k: line.K}
	var along pathAt
	if es != nil {
		es.prepare(in, alloy.ElasticModulusGPa, before)
		// The schedule's solves first, tip advancing from the orifice (each starts from the one
		// before), then the file at its target, which starts from the deepest of them.
		along = pathCurvature(c, es)
		for z := 0; z < tip+pathEvery; z += pathEvery {
			along(min(z, tip))
		}
		path = es.path(D, tip)
		sr.Offset1, sr.Offset2 = path.o1, path.o2
		f.Off1, f.Off2 = path.o1, path.o2
	}
	cellTorque := make([]float64, n) // N*mm per station
	eg := k.Sweep(before, nil, &f, &Traces{Cut: sr.Cut, Prepared: sr.Prepared, StationTorque: cellTorque})
	m.ContactThresholdMM = k.ContactThreshold()
	m.EngagedAreaMM2, m.RemovedVolumeMM3, m.MaxDepthOfCutMM = eg.AreaMM2, eg.VolumeMM3, eg.MaxCutMM
	if eg.Cuts() {
		m.EngagedLengthMM = eg.LengthMM(line)
		m.EngagedFromTipMM = [2]float64{D - line.S[eg.Last], D - line.S[eg.First]}
	}
	m.ShankContactMM = eg.ShankContactMM(line)
	sr.touched = touched + eg.NewlyTouchedMM2
	m.UntouchedWallPct = k.UntouchedShare(sr.touched)
	if along == nil {
		along = pathCurvature(c, nil)
	}
	strainAndFatigue(c, sr, tip, path.k, along)
	torsion(sr, line, cellTorque, tip)
	m.Transport = transportBetween(c, before, sr.Prepared)
	roundMetrics(m)
	return sr
}

// strainAndFatigue fills strain along the file at the target depth, the diameter and strain at
// the point of greatest curvature, and Miner's damage over the insertion schedule.
//
// pathK is the curvature of the file's axis with the tip at the target; path gives it for the
// other tip stations (the schedule's).
func strainAndFatigue(c *Canal, sr *StepResult, tip int, pathK []float64, path pathAt) {
	line, m, in := c.Line, &sr.Metrics, sr.Step.Instrument
	D := sr.TipDepth
	sr.Strain = make([]float64, tip+1)
	for k := 0; k <= tip; k++ {
		i := tip - k
		// Outer-fibre bending strain d k / 2 (beam theory); the section's shape does not change
		// it when its edges lie on the circle of diameter d.
		e := in.Diameter(D-line.S[i]) * pathK[i] / 2
		sr.Strain[k] = e
		if e > m.PeakStrainPct/100 {
			m.PeakStrainPct = 100 * e
			m.PeakStrainFromTipMM = D - line.S[i]
		}
	}
	sStar := c.Measures.MaxCurvatureS
	if D >= sStar {
		d := in.Diameter(D - sStar)
		k := pathK[min(line.Station(sStar), tip)]
		m.DiameterAtMaxCurvatureMM = finite(d)
		m.StrainAtMaxCurvaturePct = finite(100 * d * k / 2)
	}
	moves := insertionSchedule(D, sr.Step.PeckMM, sr.Step.RetractMM, sr.Step.AdvanceMMs)
	f := fatigue(line, in, sr.Alloy, moves, sr.Step.RPM, path)
	sr.Damage = f.damage
	m.FatigueDamage = f.peak
	m.PeakDamageFromTipMM = f.peakU
	m.ScheduleTimeS = f.time
	m.Revolutions = f.revolutions
	if f.fractured {
		m.FractureFromTipMM = finite(f.fractureU)
		m.FractureTimeS = finite(f.fractureT)
		m.FractureTipDepthMM = finite(f.fractureTip)
	}
}

// torsion sums the cutting torque from the tip up and compares it with what each section can
// carry: tau_u * Z_t(d), Z_t = pi d^3 / 16 for round, times the section's Saint-Venant factor.
func torsion(sr *StepResult, line *Centerline, cellTorque []float64, tip int) {
	m, in := &sr.Metrics, sr.Step.Instrument
	tau := sr.Alloy.ShearUltimateMPa
	sr.Torque = make([]float64, tip+1)
	sr.Capacity = make([]float64, tip+1)
	carried := 0.0
	best := math.Inf(1)
	bestU := 0.0
	for k := 0; k <= tip; k++ {
		i := tip - k
		carried += cellTorque[i] / 10 // N*mm -> N*cm
		u := math.Max(0, sr.TipDepth-line.S[i])
		sr.Torque[k] = carried
		sr.Capacity[k] = in.TorsionCapacity(u, tau)
		if carried > 0 {
			if mg := sr.Capacity[k] / carried; mg < best {
				best, bestU = mg, u
			}
		}
	}
	m.PeakTorqueIndex = carried
	m.CapacityAt3mmNcm = in.TorsionCapacity(3, tau)
	if !math.IsInf(best, 1) {
		m.TorsionMargin = finite(best)
		m.TorsionMarginFromTipMM = finite(bestU)
	}
	if lim := sr.Step.TorqueLimitNcm; lim > 0 {
		m.TorqueLimitNcm = finite(lim)
	}
}

// pathCurvature gives, for a tip station, the curvature of the file's axis at each station up
// to it. Centred (es nil): the centerline's. Elastic: the beam solved with the tip at every
// pathEvery-th station, blended between the two solves on either side of the tip.
func pathCurvature(c *Canal, es *elasticSolver) pathAt {
	if es == nil {
		return func(int) ([]float64, []float64, float64) { return nil, c.Line.K, 1 }
	}
	every := pathEvery
	cache := map[int][]float64{}
	last := c.Line.Len() - 1
	solved := func(z int) []float64 {
		if k, ok := cache[z]; ok {
			return k
		}
		k := es.solve(c.Line.S[z], z, pathStride)
		cache[z] = k
		return k
	}
	return func(tip int) ([]float64, []float64, float64) {
		lo := tip / every * every
		hi := min(last, lo+every)
		if tip == lo || hi == lo {
			return nil, solved(tip), 1
		}
		return solved(lo), solved(hi), float64(tip-lo) / float64(hi-lo)
	}
}
