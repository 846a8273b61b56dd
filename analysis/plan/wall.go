package plan

import (
	"context"
	"fmt"
	"math"
	"strings"

	"tapersweep/analysis"
)

// wallCutTolerance is the least cut, mm, that counts as thinning the wall (the run's thin-wall
// advice counts a step that thinned the wall by more than half a micrometre).
const wallCutTolerance = 0.0005

// keepWall lets the search see the wall to keep on the coarse canal. The wall to the root is
// measured once, from the coarse canal as scanned, by the same code as every output
// (analysis.Canal.WallThickness). A file widening a cell by delta leaves at least wall - delta
// there (a distance cannot fall faster than its point moves), so the radius a cell may be cut
// to is as scanned + wall - keep, or as scanned where the wall is already thinner than keep: a
// lower bound of the wall, cheap to test for every candidate. The full-resolution re-check
// with the exact wall has the final word.
type keepWall struct {
	keep float64
	// limit is the radius each cell (station-major, as the coarse radius map) may be cut to.
	limit []float32
	// stationLimit is the least limit around each station: a file narrower there keeps the
	// wall at that station whatever came before.
	stationLimit []float32
}

// newKeepWall measures the wall of the coarse canal cc to the root of full (nil when keep is 0
// or no root is known).
func newKeepWall(full, cc *analysis.Canal, keep float64, workers int) *keepWall {
	if keep <= 0 || full.Root == nil {
		return nil
	}
	withRoot := *cc
	withRoot.Root = full.Root
	th := withRoot.WallThickness(cc.Rho, workers)
	if th == nil {
		return nil
	}
	na := cc.Angles
	kw := &keepWall{keep: keep, limit: make([]float32, len(th)), stationLimit: make([]float32, cc.Line.Len())}
	for i := range kw.stationLimit {
		least := float32(math.Inf(1))
		for j := 0; j < na; j++ {
			k := i*na + j
			room := max(float64(th[k])-keep, 0)
			kw.limit[k] = cc.Rho[k] + float32(room+wallCutTolerance)
			least = min(least, kw.limit[k])
		}
		kw.stationLimit[i] = least
	}
	return kw
}

// short is how far file f, cutting the wall prepared[], leaves the wall under the limit at its
// worst cell, mm (0: it keeps it everywhere), by the lower bound above.
func (kw *keepWall) short(prepared []float32, f *analysis.Placed, na int) float64 {
	if kw == nil {
		return 0
	}
	worst := 0.0
	for i := f.Cutting; i <= f.Tip(); i++ {
		r := f.Radius[i]
		if r <= kw.stationLimit[i] {
			continue
		}
		for j := 0; j < na; j++ {
			k := i*na + j
			if r > prepared[k] && r > kw.limit[k] {
				worst = max(worst, float64(r-kw.limit[k]))
			}
		}
	}
	return worst
}

// thinWall is the thin-wall advice a full-resolution run draws at the wall to keep, by step
// (from 1); nil when every step keeps it.
func thinWall(res *analysis.Result) (step int, w analysis.Wall) {
	for k, s := range res.Steps {
		for _, a := range s.Metrics.Advice {
			if a.Code == analysis.AdviceThinWall {
				return k + 1, s.Metrics.Wall
			}
		}
	}
	return 0, analysis.Wall{}
}

// checkWallFree re-checks at full resolution the best plan the search set aside for the wall
// alone, when it ranks above the plan found (nil otherwise). The search's bound of the wall is
// cautious, so such a plan may keep the wall after all: it is then the better proposal.
func (p *planner) checkWallFree(ctx context.Context, found *checked) (*checked, error) {
	if p.wallFree == nil || found == nil || found.found == nil || !lessComplete(p.wallFree, found.found) {
		return nil, nil
	}
	out, err := p.recheck(ctx, []*complete{p.wallFree})
	if err != nil {
		return nil, err
	}
	p.rechecked++
	return out[0], nil
}

// wallText states whether the wall to keep binds, and what the plan leaves.
func (p *planner) wallText(best *checked) []string {
	keep := mmText(p.opt.KeepWallMM)
	last := best.res.Steps[len(best.res.Steps)-1].Metrics.Wall
	if last.ThinnestWallMM == nil {
		return nil
	}
	leaves := fmt.Sprintf("this plan leaves %.2f mm at its thinnest, %.1f mm from the apical end toward %.0f°",
		*last.ThinnestWallMM, *last.ThinnestWallFromApexMM, *last.ThinnestWallTowardDeg)
	var out []string
	wf := p.wallFreeChecked
	if wf != nil && wf != best {
		if step, w := thinWall(wf.res); step > 0 {
			var names []string
			for _, st := range wf.seq.Steps {
				names = append(names, stepText(st))
			}
			out = append(out, fmt.Sprintf("The wall to keep (%s mm) binds: the search set aside plans it ranked above this one for "+
				"the wall alone; the best of them, %s (cost %.3f against %.3f), leaves %.2f mm of wall to the root's outer surface "+
				"at step %d, %.1f mm from the apical end toward %.0f°; %s.",
				keep, strings.Join(names, ", "), wf.cost, best.cost, *w.ThinnestWallMM, step, *w.ThinnestWallFromApexMM,
				*w.ThinnestWallTowardDeg, leaves))
		}
	}
	if len(out) == 0 && p.wallRuled > 0 {
		out = append(out, fmt.Sprintf("The wall to keep (%s mm) binds: it ruled out %d of the %d plans re-checked at full resolution; %s.",
			keep, p.wallRuled, p.rechecked, leaves))
	}
	if len(out) == 0 {
		out = append(out, fmt.Sprintf("The wall to keep (%s mm) does not bind: %s.", keep, leaves))
	}
	if p.wallSetAside > 0 {
		out = append(out, fmt.Sprintf("On the coarse copy the search set aside %d partial plans whose files would leave less than %s mm "+
			"(the wall as scanned less the depth each file cuts: a cautious bound, the full-resolution check has the final word).",
			p.wallSetAside, keep))
	}
	return out
}
