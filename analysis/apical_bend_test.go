package analysis

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
	"tapersweep/models"
)

// TestSharpBendNearTheApicalEnd: a gentle coronal curve, then a sharp arc that ends a short
// straight stretch (0.3-1.0 mm) before a wide apical end (0.9-1.45 mm across, the canal
// nearly uniform), imaged at 0.05-0.12 mm voxels with vertex noise. The sharp arc lies
// within the stretch a medial path cannot reach (one and a half end radii); the line must
// still follow it to the end, with the orifice named (as the alike-ends warning asks) or not.
// Criteria of the scan-like family, from analytic geometry of the spec: length within
// 0.5 mm, the tightest bend's radius within 15 % and its place within the true arc +-0.6 mm.
func TestSharpBendNearTheApicalEnd(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 103))
	u := func(a, b float64) float64 { return a + (b-a)*rng.Float64() }
	for i := range 6 {
		r, tail := u(2.5, 4), u(0.3, 1.0)
		spec, scan, m, truth := scanSharpEnd(t, rng, r, tail, int64(i), sharpEndDraw{
			straight: [2]float64{3, 6}, gentleR: [2]float64{12, 16}, gentleDeg: [2]float64{15, 25},
			between: [2]float64{3, 5}, sharpDeg: [2]float64{30, 40}, orifice: [2]float64{1.0, 1.6},
			oval: [2]float64{1, 1.8}, voxel: [2]float64{0.05, 0.12}, noise: [2]float64{0, 0.015}})
		from, to, radius, _ := spec.TightestArc()
		for _, named := range []bool{false, true} {
			opt := CanalOptions{}
			if named {
				opt.Extract.Orifice = &truth[0]
			}
			c, err := NewCanal(context.Background(), "sharp near the end", m, opt)
			if err != nil {
				t.Fatal(err)
			}
			L, got := spec.Length(), c.Line.Length()
			R := c.Measures.MaxCurvatureR
			sStar := trueArcLength(c.Line.Points[c.Line.Station(c.Measures.MaxCurvatureS)], truth)
			msg := fmt.Sprintf("canal %d (r %.2f mm, tail %.2f mm, apical %.2f mm, voxel %.3f), orifice named %v: length %.2f of %.2f, R %.2f of %.2f, s* %.2f in [%.2f, %.2f]",
				i, r, tail, spec.ApicalD, scan.Voxel, named, got, L, R, radius, sStar, from, to)
			if math.Abs(got-L) > 0.5 || math.Abs(R-radius) > 0.15*radius || sStar < from-0.6 || sStar > to+0.6 {
				t.Error(msg)
			} else {
				t.Log(msg)
			}
		}
	}
}

// TestShortSharpBendAtAWideEndIsMeasuredOrWarned: canals of the family's "gentle then sharp"
// kind whose sharp arc is short (20-25 degrees, about 1.1 mm) and ends 0.4-0.8 mm before a wide,
// nearly uniform, oval apical end (what family canal 157-087 is): the sections there narrow a
// little in the bend, as an end cap's cut makes them, so the grown end may be cut back and
// carried straight across the bend. Either the tightest bend is measured (the family's
// criteria, from analytic geometry of the spec: radius within 15 %, place within the true arc
// +-0.6 mm), or its radius band holds the true radius (a short arc read through a wider fit
// is flattened, and the band says so), or a warning says the canal turns where the line was
// carried straight; never a confident wrong radius.
func TestShortSharpBendAtAWideEndIsMeasuredOrWarned(t *testing.T) {
	rng := rand.New(rand.NewPCG(157, 87))
	u := func(a, b float64) float64 { return a + (b-a)*rng.Float64() }
	warned := 0
	for i := range 8 {
		r, tail := u(2.8, 3.5), u(0.4, 0.8)
		spec, scan, m, truth := scanSharpEnd(t, rng, r, tail, int64(100+i), sharpEndDraw{
			straight: [2]float64{5, 7}, gentleR: [2]float64{12, 15}, gentleDeg: [2]float64{20, 26},
			between: [2]float64{1, 1.5}, sharpDeg: [2]float64{20, 25}, orifice: [2]float64{1.2, 1.6},
			oval: [2]float64{1.2, 1.6}, voxel: [2]float64{0.07, 0.12}, noise: [2]float64{0.005, 0.02}})
		from, to, radius, _ := spec.TightestArc()
		// The orifice named, as the alike-ends warning asks.
		c, err := NewCanal(context.Background(), "short sharp bend at a wide end", m, CanalOptions{Extract: ExtractOptions{Orifice: &truth[0]}})
		if err != nil {
			t.Fatal(err)
		}
		R := c.Measures.MaxCurvatureR
		sStar := trueArcLength(c.Line.Points[c.Line.Station(c.Measures.MaxCurvatureS)], truth)
		measured := math.Abs(R-radius) <= 0.15*radius && sStar >= from-0.6 && sStar <= to+0.6
		warning := slices.ContainsFunc(c.Warnings, func(w string) bool { return strings.Contains(w, "carried straight there") })
		msg := fmt.Sprintf("canal %d (r %.2f mm, tail %.2f mm, apical %.2f mm, voxel %.3f): R %.2f of %.2f band %.2f, s* %.2f in [%.2f, %.2f], warned %v %q",
			i, r, tail, spec.ApicalD, scan.Voxel, R, radius, c.Measures.RadiusRange, sStar, from, to, warning, c.Warnings)
		if warning {
			warned++
		}
		rr := c.Measures.RadiusRange
		inBand := rr[0] <= radius && radius <= rr[1]
		if !measured && !inBand && !warning {
			t.Error(msg)
		} else {
			t.Log(msg)
		}
	}
	t.Logf("%d of 8 warned", warned)
}

// sharpEndDraw are the ranges a canal of a gentle coronal arc, then a sharp arc near a
// nearly uniform apical end, is drawn from (mm and degrees; apical diameter 0.85-0.95 of the
// orifice's).
type sharpEndDraw struct {
	straight, gentleR, gentleDeg, between, sharpDeg, orifice, oval, voxel, noise [2]float64
	// apicalShare is the apical diameter's share of the orifice's (zero: 0.85-0.95, nearly
	// uniform); sCurve turns the sharp arc's plane half a turn from the gentle one's.
	apicalShare [2]float64
	sCurve      bool
}

// scanSharpEnd draws such a canal, with its sharp arc of radius r ending tail mm before the
// apical end, turns and places it at random and images it (scan seed seed): the spec, the
// scan's options, the mesh and the exact centerline in the scan's frame.
func scanSharpEnd(t *testing.T, rng *rand.Rand, r, tail float64, seed int64, d sharpEndDraw) (*models.CanalSpec, models.ScanOptions, *mesh.Mesh, []mgl64.Vec3) {
	t.Helper()
	u := func(ab [2]float64) float64 { return ab[0] + (ab[1]-ab[0])*rng.Float64() }
	turn := 0
	if d.sCurve {
		turn = 180
	}
	segs := fmt.Sprintf(`{"kind":"straight","length":%.3f},{"kind":"arc","radius":%.3f,"angle":%.3f},{"kind":"straight","length":%.3f},{"kind":"arc","radius":%.3f,"angle":%.3f,"plane_turn":%d},{"kind":"straight","length":%.3f}`,
		u(d.straight), u(d.gentleR), u(d.gentleDeg), u(d.between), r, u(d.sharpDeg), turn, tail)
	share := d.apicalShare
	if share == [2]float64{} {
		share = [2]float64{0.85, 0.95}
	}
	orifice := u(d.orifice)
	spec := specJSON(t, segs, orifice, orifice*u(share), u(d.oval))
	axis := mgl64.Vec3{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}.Normalize()
	scan := models.ScanOptions{Voxel: u(d.voxel), Noise: u(d.noise), Seed: seed,
		Turn: mgl64.QuatRotate(u([2]float64{0, 2 * math.Pi}), axis), Offset: mgl64.Vec3{rng.Float64(), rng.Float64(), rng.Float64()}}
	m, err := models.Scan(spec, scan)
	if err != nil {
		t.Fatal(err)
	}
	return spec, scan, m, models.ScanTruth(spec, scan, StationSpacing)
}
