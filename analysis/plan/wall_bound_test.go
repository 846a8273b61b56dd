package plan

import (
	"context"
	"math"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
)

// TestKeepWallBoundConcentric: in a straight round canal inside a round root about the same
// axis the wall after a centred file of radius r is R - r wherever it cuts (analytic geometry:
// concentric circles), and the search's bound (the wall as scanned less the cut) is exact
// there. So the shortfall the search charges a file is max(r - (R - keep)) over the stations it
// cuts (max(r - rho) where R - rho, the wall as scanned, is already under keep: there it may not
// cut at all), less the half-micrometre it lets pass, and nothing for a file that keeps the wall. The
// root is a 192-sided tube (the spec's mesh): its flats lie R cos(pi/192) from the axis,
// 0.0001 mm inside R at R = 1 mm.
func TestKeepWallBoundConcentric(t *testing.T) {
	spec, err := models.ParseCanalSpec("tubes.json", []byte(`{"name": "concentric tubes (invented)",
		"segments": [{"kind": "straight", "length": 16}], "orifice_d": 0.6, "apical_d": 0.2,
		"root": {"coronal_d": 2.0, "apical_d": 1.0}}`))
	if err != nil {
		t.Fatal(err)
	}
	c, err := analysis.CanalFromSpec(context.Background(), "tubes.json", spec, analysis.CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	cc := coarse(c, DefaultCoarseDS, DefaultCoarseAngles)
	g := newGrid(cc, runDefaults(analysis.RunOptions{}))
	L := c.Line.Length()
	rootR := func(s float64) float64 { return (2.0 + (1.0-2.0)*s/L) / 2 }
	canalR := func(s float64) float64 { return (0.6 + (0.2-0.6)*s/L) / 2 }
	for _, tc := range []struct {
		size  int
		taper float64
		D     float64
		keep  float64
	}{
		{30, 0.06, 16, 0.5}, {30, 0.06, 16, 0.3}, {40, 0.04, 14, 0.45}, {25, 0.08, 12, 0.4}, {20, 0.02, 16, 0.2},
	} {
		in := models.NewInstrument(tc.size, tc.taper)
		kw := newKeepWall(c, cc, tc.keep, 1)
		f := g.k.Place(in, tc.D)
		got := kw.short(cc.Rho, &f, cc.Angles)
		want := 0.0
		for i := f.Cutting; i <= f.Tip(); i++ {
			s := cc.Line.S[i]
			r := in.Diameter(tc.D-s) / 2
			if r <= canalR(s) {
				continue // the file does not cut here
			}
			// Where the wall as scanned is already under keep, the file may not cut at all.
			want = max(want, r-max(rootR(s)-tc.keep, canalR(s))-wallCutTolerance)
		}
		if math.Abs(got-want) > 0.002 {
			t.Errorf("%s to %g mm, keep %g: the search charges %.4f mm, want %.4f (R - r against keep)", in.Label(), tc.D, tc.keep, got, want)
		}
	}
}
