package analysis

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// TestShortTightBendBesideAGentleOne: S-curves whose long gentle arc (r 4-5 mm, 30-35
// degrees) is followed by a short tight one (r 2.6-3.2 mm, 20-24 degrees, about 1.1 mm long)
// ending 0.5-0.9 mm before a tapered apical end, imaged at 0.09-0.12 mm voxels with vertex
// noise (what family canal 304-034 is). A fit wide enough to hold still over the gentle arc
// flattens the tight one and cannot read it whole so near the end. Where the gentle arc is
// taken for the tightest (s* outside the true arc +-0.6 mm), the radius band must hold the
// true radius, the place band meet the true arc and a warning name a second bend: never a
// confident wrong radius. Where the tight arc is found, its radius must be within 20 % (the
// family's 15 % and the flattening a short arc at a voxel near 0.1 mm shows, up to 16 % over
// the family: DEVELOPERS.md) or inside its band. Exact answers from analytic geometry of the
// spec.
func TestShortTightBendBesideAGentleOne(t *testing.T) {
	rng := rand.New(rand.NewPCG(304, 34))
	u := func(a, b float64) float64 { return a + (b-a)*rng.Float64() }
	for i := range 8 {
		r, tail := u(2.6, 3.2), u(0.5, 0.9)
		spec, scan, m, truth := scanSharpEnd(t, rng, r, tail, int64(200+i), sharpEndDraw{
			straight: [2]float64{6, 8}, gentleR: [2]float64{4, 5}, gentleDeg: [2]float64{30, 35},
			between: [2]float64{1.5, 2.5}, sharpDeg: [2]float64{20, 24}, orifice: [2]float64{0.6, 0.8},
			oval: [2]float64{1, 1.8}, voxel: [2]float64{0.09, 0.12}, noise: [2]float64{0.005, 0.02},
			apicalShare: [2]float64{0.45, 0.55}, sCurve: true})
		from, to, radius, _ := spec.TightestArc()
		c, err := NewCanal(context.Background(), "short tight bend beside a gentle one", m, CanalOptions{})
		if err != nil {
			t.Fatal(err)
		}
		ms := c.Measures
		R := ms.MaxCurvatureR
		sStar := trueArcLength(c.Line.Points[c.Line.Station(ms.MaxCurvatureS)], truth)
		// The place band is in the line's arc length, the true arc in the spec's: they agree
		// to the family's length criterion (0.5 mm).
		rr, sr := ms.RadiusRange, ms.SRange
		bandHolds := rr[0] <= radius && radius <= rr[1]
		found := sStar >= from-0.6 && sStar <= to+0.6
		named := strings.Contains(strings.Join(c.Warnings, " | "), "a second bend") && sr[0] <= to+0.5 && sr[1] >= from-0.5
		ok := bandHolds && named
		if found {
			ok = math.Abs(R-radius) <= 0.2*radius || bandHolds
		}
		msg := fmt.Sprintf("canal %d (r %.2f mm, arc %.2f-%.2f, voxel %.3f): R %.2f band %.2f, s* %.2f band %.2f, warnings %q",
			i, radius, from, to, scan.Voxel, R, rr, sStar, sr, c.Warnings)
		if !ok {
			t.Error(msg)
		} else {
			t.Log(msg)
		}
	}
}
