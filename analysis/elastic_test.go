package analysis

import (
	"fmt"
	"math"
	"testing"
)

// TestStraightCanalNoOffset: in a straight canal the elastic file lies on the centerline and
// moves nothing, whatever the file (beam theory: no curvature, no load).
func TestStraightCanalNoOffset(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":16}`, 1.0, 0.2)
	for _, f := range []string{`"size":25,"taper":0.06`, `"size":40,"taper":0.04,"alloy":"stainless-steel"`} {
		res := runFor(t, c, fmt.Sprintf(`{%s,"depth":"WL"}`, f), RunOptions{PathModel: "elastic"})
		st := res.Steps[0]
		for i := range st.Offset1 {
			if o := math.Hypot(st.Offset1[i], st.Offset2[i]); o > 0.01 { // a measured straight centerline still bends by noise (k < 0.04/mm)
				t.Fatalf("%s: offset %.4f mm at station %d", f, o, i)
			}
		}
		if tr := st.Metrics.TransportationMM["1"]; tr > 0.005 {
			t.Errorf("%s: transportation %.4f mm in a straight canal", f, tr)
		}
	}
}

func tipOffset(st *StepResult) float64 {
	n := len(st.Offset1) - 1
	return math.Hypot(st.Offset1[n], st.Offset2[n])
}

// TestElasticOffsetGrowsWithStiffness: in a curved canal a stiffer file straightens more: a
// stainless-steel file transports more than a nickel-titanium one of the same size (the
// comparison of Gambill et al. 1996), and a larger or more tapered file more than a smaller one
// (beam theory: offset grows with E I). The wall removed sits toward the outer side near the
// apical end and toward the inner side at the curve (common practice: zip and elbow).
func TestElasticOffsetGrowsWithStiffness(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":10},{"kind":"arc","radius":4,"angle":50}`, 0.7, 0.25)
	run := func(step string) *StepResult {
		return runFor(t, c, step, RunOptions{PathModel: "elastic"}).Steps[0]
	}
	niti := run(`{"size":30,"taper":0.04,"depth":"WL"}`)
	steel := run(`{"size":30,"taper":0.04,"depth":"WL","alloy":"stainless-steel"}`)
	small := run(`{"size":20,"taper":0.04,"depth":"WL"}`)
	tapered := run(`{"size":30,"taper":0.06,"depth":"WL"}`)
	t.Logf("tip offset: NiTi %.4f, steel %.4f, 20/.04 %.4f, 30/.06 %.4f mm", tipOffset(niti), tipOffset(steel), tipOffset(small), tipOffset(tapered))
	t.Logf("largest transportation: NiTi %.4f, steel %.4f", niti.Metrics.Largest.MM, steel.Metrics.Largest.MM)
	if !(tipOffset(steel) > tipOffset(niti)) || !(steel.Metrics.Largest.MM > niti.Metrics.Largest.MM) {
		t.Error("the stainless-steel file does not move the canal more than the nickel-titanium one")
	}
	if !(tipOffset(niti) > tipOffset(small)) {
		t.Error("the larger file does not straighten more than the smaller one")
	}
	if !(tipOffset(tapered) > tipOffset(niti)) {
		t.Error("the more tapered file does not straighten more")
	}
	// Where the wall goes: outer side (theta = pi) near the apical end, inner (theta = 0) at
	// the curve.
	L := c.Line.Length()
	removed := func(st *StepResult, s, th float64) float64 {
		return c.MapAt(st.Prepared, s, th) - c.MapAt(st.Before, s, th)
	}
	apex := L - 0.3
	if !(removed(steel, apex, math.Pi) > removed(steel, apex, 0)) {
		t.Errorf("near the apical end: outer %.4f, inner %.4f mm removed", removed(steel, apex, math.Pi), removed(steel, apex, 0))
	}
	bend := 10 + 0.25*4*50*math.Pi/180 // a quarter into the arc
	if !(removed(steel, bend, 0) > removed(steel, bend, math.Pi)) {
		t.Errorf("at the curve: inner %.4f, outer %.4f mm removed", removed(steel, bend, 0), removed(steel, bend, math.Pi))
	}
}

// TestElasticStrainNotAboveCentred: a file that straightens bends less, so the elastic path's
// peak strain is no higher than the centred model's (beam theory: strain = d k / 2).
func TestElasticStrainNotAboveCentred(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":10},{"kind":"arc","radius":4,"angle":50}`, 1.1, 0.35)
	step := `{"size":30,"taper":0.06,"depth":"WL"}`
	centred := runFor(t, c, step, RunOptions{}).Steps[0].Metrics
	elastic := runFor(t, c, step, RunOptions{PathModel: "elastic"}).Steps[0].Metrics
	t.Logf("peak strain centred %.3f %%, elastic %.3f %%", centred.PeakStrainPct, elastic.PeakStrainPct)
	if elastic.PeakStrainPct > centred.PeakStrainPct+1e-9 {
		t.Errorf("elastic peak strain %.3f %% above centred %.3f %%", elastic.PeakStrainPct, centred.PeakStrainPct)
	}
}
