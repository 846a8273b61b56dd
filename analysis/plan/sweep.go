package plan

import (
	"math"

	"tapersweep/analysis"
	"tapersweep/models"
)

// grid is the coarse canal the search works on and the engagement kernel over it: the same
// sums analysis.Run uses, so the search ranks plans by the model's own figures.
type grid struct {
	canal *analysis.Canal
	k     *analysis.Kernel
}

func newGrid(c *analysis.Canal, opt analysis.RunOptions) *grid {
	return &grid{canal: c, k: analysis.NewKernel(c, opt)}
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
	file    analysis.Placed
	fatigue float64 // Miner's sum at the most used point, at full resolution
	taper   float64 // the tip taper; NaN for a variable taper (never "the same" as another)
	// overStrain: somewhere along the file the bending strain d k / 2 on the full canal's
	// centerline passes the alloy's recoverable strain (the tool then warns that the file
	// cannot follow the path).
	overStrain bool
}

func (mv *move) size() int { return mv.step.Instrument.Size }

func newMove(g *grid, inst int, st models.Step) *move {
	line := g.canal.Line
	D := math.Min(st.Depth.Resolve(g.canal.WorkingLength), line.Length())
	mv := &move{inst: inst, step: st, depth: D, taper: st.Instrument.TaperAt(0)}
	if st.Instrument.IsVariableTaper() {
		mv.taper = math.NaN()
	}
	mv.file = g.k.Place(st.Instrument, D)
	return mv
}

// strainOver reports whether file in with its tip at depth D (mm, on the full canal's line) is
// bent past its alloy's recoverable strain anywhere: d(D - s) k(s) / 2 (beam theory).
func strainOver(line *analysis.Centerline, in models.Instrument, D float64) bool {
	for i, s := range line.S {
		if s > D+1e-9 {
			break
		}
		if lim := in.Alloy.RecoverableStrain; lim > 0 && in.Diameter(D-s)*line.K[i]/2 > lim {
			return true
		}
	}
	return false
}

// stepMeasure is what one step does to the wall, as the search ranks it.
type stepMeasure struct {
	engaged float64 // engaged length, mm
	torque  float64 // peak torque, N*cm
	cuts    bool    // some cell cut deeper than the contact threshold
}

// sweep measures mv against the wall before[] widened by an earlier move (nil: none).
func (g *grid) sweep(before []float32, pre, mv *move) stepMeasure {
	var pf *analysis.Placed
	if pre != nil {
		pf = &pre.file
	}
	e := g.k.Sweep(before, pf, &mv.file, nil)
	return stepMeasure{engaged: e.LengthMM(g.canal.Line), torque: e.TorqueNcm, cuts: e.Cuts()}
}

// widen writes into dst the wall before[] after mv.
func (g *grid) widen(dst, before []float32, mv *move) { g.k.Widen(dst, before, &mv.file) }
