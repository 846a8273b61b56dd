package analysis

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"math/rand"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/models"
)

// TestOutsideTwoBalls: the distance from a point to the nearest point outside two balls.
// Two equal balls of radius R with centres a apart meet in a circle of radius
// sqrt(R^2 - a^2/4) about the midpoint, the point of the union's boundary nearest the midpoint
// (analytic geometry). On random pairs the answer is never more than the distance to any
// point of either sphere outside the other ball (a dense sample of the union's boundary), and
// within the sample's spacing of the least of them.
func TestOutsideTwoBalls(t *testing.T) {
	R, a := 1.3, 0.4
	got := outsideTwoBalls(&mgl64.Vec3{}, &ball{c: mgl64.Vec3{-a / 2, 0, 0}, r: R}, &ball{c: mgl64.Vec3{a / 2, 0, 0}, r: R})
	if want := math.Sqrt(R*R - a*a/4); math.Abs(got-want) > 1e-8 {
		t.Errorf("midpoint of two equal balls: %.9f, want sqrt(R^2 - a^2/4) = %.9f", got, want)
	}
	rng := rand.New(rand.NewSource(3))
	rnd := func(s float64) mgl64.Vec3 {
		return mgl64.Vec3{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}.Mul(s)
	}
	const m = 90
	for n := 0; n < 200; n++ {
		b1 := ball{c: rnd(0.3), r: 0.2 + rng.Float64()}
		b2 := ball{c: rnd(0.3), r: 0.2 + rng.Float64()}
		p := rnd(0.3)
		got := outsideTwoBalls(&p, &b1, &b2)
		if p.Sub(b1.c).Len() >= b1.r && p.Sub(b2.c).Len() >= b2.r {
			if got != 0 {
				t.Fatalf("pair %d: %.6f for a point in neither ball", n, got)
			}
			continue
		}
		least := math.Inf(1)
		for _, s := range [2][2]ball{{b1, b2}, {b2, b1}} {
			for i := 0; i <= m; i++ {
				th := math.Pi * float64(i) / m
				for j := 0; j < 2*m; j++ {
					ph := math.Pi * float64(j) / m
					x := s[0].c.Add(mgl64.Vec3{math.Sin(th) * math.Cos(ph), math.Sin(th) * math.Sin(ph), math.Cos(th)}.Mul(s[0].r))
					if x.Sub(s[1].c).Len() >= s[1].r {
						least = min(least, x.Sub(p).Len())
					}
				}
			}
		}
		// The sample's points lie at most about pi r / m apart.
		if got > least+1e-9 || got < least-math.Pi*max(b1.r, b2.r)/m {
			t.Fatalf("pair %d: %.6f, the union's sampled boundary is %.6f away", n, got, least)
		}
	}
}

// runWallFigures is the wall of every step of a run as the outputs state it, as JSON lines.
func runWallFigures(res *Result) []string {
	js, _ := json.Marshal(res.ScannedWall)
	out := []string{"as scanned " + string(js)}
	for _, sr := range res.Steps {
		js, _ := json.Marshal(sr.Metrics.Wall)
		out = append(out, fmt.Sprintf("step %d %s", sr.Number, js))
	}
	return out
}

// checkWallMaps compares a run's wall maps and figures with every cell measured exactly, at
// each limit: each cell of the map as scanned and of the pictures' maps is an upper bound of
// the exact wall, at most wallMapTolerance (or wallMapShare of the wall) above it and on its
// side of the limit; every figure (thinnest wall, where, toward, share under the limit,
// thinned) is the one the exact maps give.
func checkWallMaps(t *testing.T, name string, c *Canal, seq *models.Sequence, limits ...float64) {
	t.Helper()
	var exact []*wallMap // as scanned, then after each step (the steps do not depend on the limit)
	exactMap := func(m []float32) *wallMap {
		th := c.WallThickness(m, 0)
		return &wallMap{rho: m, th: th, low: th}
	}
	for _, limit := range limits {
		res, err := Run(context.Background(), c, seq, RunOptions{MinWallMM: limit})
		if err != nil {
			t.Fatal(err)
		}
		if exact == nil {
			exact = append(exact, exactMap(c.Rho))
			for _, sr := range res.Steps {
				exact = append(exact, exactMap(sr.Prepared))
			}
		}
		worst := 0.0
		cmp := func(what string, got []float32, exact *wallMap, onLimit bool) {
			for k, e := range exact.th {
				g, e := float64(got[k]), float64(e)
				if g < e-1e-6 || g-e > max(wallMapTolerance, wallMapShare*e)+1e-6 || (g < 0) != (e < 0) {
					t.Fatalf("%s %s cell %d: %.6f, measured exactly %.6f", name, what, k, g, e)
				}
				if onLimit && (g < limit) != (e < limit) {
					t.Fatalf("%s %s cell %d: %.6f and exactly %.6f lie on either side of the limit %g", name, what, k, g, e, limit)
				}
				worst = max(worst, g-e)
			}
		}
		cmp("as scanned (attached)", c.Thickness, exact[0], false)
		cmp("as scanned", res.WallMap(0), exact[0], true)
		want := &Result{ScannedWall: c.wallOf(exact[0], nil, limit)}
		want.ScannedWall.WallThinnedMM = nil
		for _, sr := range res.Steps {
			cmp(fmt.Sprintf("step %d", sr.Number), res.WallMap(sr.Number), exact[sr.Number], true)
			want.Steps = append(want.Steps, &StepResult{Number: sr.Number, Metrics: StepMetrics{Wall: c.wallOf(exact[sr.Number], exact[sr.Number-1], limit)}})
		}
		got, exp := runWallFigures(res), runWallFigures(want)
		for i := range exp {
			if got[i] != exp[i] {
				t.Errorf("%s, limit %g: %s; measured exactly: %s", name, limit, got[i], exp[i])
			}
		}
		t.Logf("%s, limit %g: cells at most %.4f mm above the exact wall; %s", name, limit, worst, got[len(got)-1])
	}
}

// TestWallMapsAgreeWithExact checks the bounded maps against exact per-cell queries on the
// benchmark's canal (the demo canal as a 200k-triangle scan in a grooved oval root of 200k)
// and on a family of grooved roots of other depths, sides, widths and ovals around scanned
// canals (other numbers of directions), at the default limit and at a limit that cuts through
// many cells.
func TestWallMapsAgreeWithExact(t *testing.T) {
	seq, err := models.ParseSequence("bench.json", []byte(benchSequence))
	if err != nil {
		t.Fatal(err)
	}
	if !testing.Short() {
		c := benchRootScan(t)
		checkWallMaps(t, "benchmark canal", c, seq, DefaultMinWallMM, 0.9)
	}
	// Direction counts that the coarse stride of 8 does not divide as well.
	for k, g := range []struct {
		depth, toward, width, oval, coronal, apical float64
		angles                                      int
	}{
		{0.7, 0, 80, 1.5, 3.6, 2.0, 128}, {0.8, 90, 120, 1.2, 3.4, 1.9, 100}, {0.6, 200, 60, 1.0, 3.0, 1.8, 64}, {0.9, 300, 100, 1.6, 3.8, 2.0, 90},
	} {
		spec := benchDemo()
		spec.Root = &models.RootSpec{CoronalD: g.coronal, ApicalD: g.apical, Oval: g.oval,
			Concavity: &models.Concavity{DepthMM: g.depth, TowardDeg: g.toward, WidthDeg: g.width, FromApexMM: 8, LengthMM: 10}}
		if err := spec.Validate(); err != nil {
			t.Fatal(err)
		}
		m, err := models.ScanLike(spec, 0.05, 0.01, int64(k+2))
		if err != nil {
			t.Fatal(err)
		}
		c, err := NewCanal(context.Background(), "grooved", m, CanalOptions{WorkingLength: spec.WorkingLength(), Angles: g.angles,
			Root: spec.RootMesh(0.08, 160), RootSource: "grooved"})
		if err != nil {
			t.Fatal(err)
		}
		checkWallMaps(t, fmt.Sprintf("grooved root %d", k+1), c, seq, DefaultMinWallMM, 0.6)
	}
}
