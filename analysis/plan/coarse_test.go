package plan

import (
	"context"
	"math"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
)

// TestCoarseKeepsTheCanal: the coarse copy of the 60 degree, 3 mm radius curve keeps its length
// and working length, its stations every 0.2 mm, unit orthogonal frames, the curvature of the
// arc (1/3 per mm mid-arc, analytic geometry) and the radius law (1.0 mm across at the orifice
// narrowing linearly to 0.25 mm: radius 0.375 mm halfway along the canal).
func TestCoarseKeepsTheCanal(t *testing.T) {
	_, c := testCanals(t)
	cc := coarse(c, 0.2, 32)
	line := cc.Line
	if line.Length() != c.Line.Length() || cc.WorkingLength != c.WorkingLength || cc.Angles != 32 {
		t.Fatalf("length %g/%g, WL %g/%g, angles %d", line.Length(), c.Line.Length(), cc.WorkingLength, c.WorkingLength, cc.Angles)
	}
	if len(cc.Rho) != line.Len()*32 {
		t.Fatalf("radius map has %d cells for %d stations", len(cc.Rho), line.Len())
	}
	for i := 1; i < line.Len()-1; i++ {
		if math.Abs(line.S[i]-line.S[i-1]-0.2) > 1e-9 {
			t.Fatalf("station %d at %g mm after %g", i, line.S[i], line.S[i-1])
		}
	}
	for i := range line.S {
		t1, n1, n2 := line.T[i], line.N1[i], line.N2[i]
		if math.Abs(t1.Len()-1) > 1e-9 || math.Abs(n1.Len()-1) > 1e-9 || math.Abs(t1.Dot(n1)) > 1e-9 || math.Abs(n2.Dot(t1)) > 1e-9 {
			t.Fatalf("station %d: frame not orthonormal", i)
		}
	}
	// Mid-arc: 10 mm of straight plus half of the arc's 3.14 mm.
	mid := line.Station(10 + math.Pi/2)
	if k := line.K[mid]; math.Abs(k-1.0/3) > 0.02 {
		t.Errorf("curvature mid-arc %.4f per mm, want 1/3 (analytic, within 0.02)", k)
	}
	half := line.Station(line.Length() / 2)
	want := (1.0 + 0.25) / 4
	if r := cc.MeanRadius(half); math.Abs(r-want) > 0.01 {
		t.Errorf("mean radius halfway %.4f mm, want %.4f (linear radius law, within 0.01)", r, want)
	}
}

// TestCoarseRunsTheWorkedCheck: analysis.Run works on a coarse copy and gives the geometry of
// centred tapers: after a 25/.06 to D, a 25/.04 to D+2 engages from its tip to 6.0 mm from its
// tip, where 0.25 + 0.04 u = 0.25 + 0.06 (u - 2) (common practice of the trade; ISO 3630-1
// diameters), within one coarse station.
func TestCoarseRunsTheWorkedCheck(t *testing.T) {
	spec, err := models.ParseCanalSpec("cone.json", []byte(`{"segments":[{"kind":"straight","length":20}],"orifice_d":0.2,"apical_d":0.2}`))
	if err != nil {
		t.Fatal(err)
	}
	c, err := analysis.CanalFromSpec(context.Background(), "narrow tube", spec, analysis.CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	cc := coarse(c, 0.2, 32)
	seq, err := models.ParseSequence("s.json", []byte(`{"steps":[{"size":25,"taper":0.06,"depth":12},{"size":25,"taper":0.04,"depth":14}]}`))
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Run(context.Background(), cc, seq, analysis.RunOptions{ContactThreshold: 1e-7})
	if err != nil {
		t.Fatal(err)
	}
	if e := res.Steps[1].Metrics.EngagedLengthMM; math.Abs(e-6.0) > 0.2+1e-9 {
		t.Errorf("second file engaged over %.3f mm on the coarse canal, want 6.0 +/- 0.2", e)
	}
}

// TestSweepMatchesRun: the search's own sums give, step after step, the engaged length and peak
// torque analysis.Run gives on the same coarse canal (the planner must rank plans by the
// model's own figures).
func TestSweepMatchesRun(t *testing.T) {
	demo, _ := testCanals(t)
	cc := coarse(demo, 0.2, 32)
	opt := runDefaults(analysis.RunOptions{})
	g := newGrid(cc, opt)
	seq, err := models.ParseSequence("s.json", []byte(`{"steps":[{"size":40,"taper":0.06,"depth":9.5},
		{"size":30,"taper":0.05,"depth":"WL-4"},{"size":20,"taper":0.06,"depth":"WL"},{"size":30,"taper":0.04,"depth":"WL"}]}`))
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Run(context.Background(), cc, seq, opt)
	if err != nil {
		t.Fatal(err)
	}
	before := cc.Rho
	for k, st := range seq.Steps {
		mv := newMove(g, k, st)
		sm := g.sweep(before, nil, mv)
		m := res.Steps[k].Metrics
		if math.Abs(sm.engaged-m.EngagedLengthMM) > 1e-3 || math.Abs(sm.torque-m.PeakTorqueIndex) > 1e-4*math.Max(1, m.PeakTorqueIndex) {
			t.Errorf("step %d: search %.3f mm, %.5f N*cm; analysis.Run %.3f mm, %.5f N*cm",
				k+1, sm.engaged, sm.torque, m.EngagedLengthMM, m.PeakTorqueIndex)
		}
		// The same step measured on the canal before the previous file, widened on the fly.
		if k > 0 {
			prev := newMove(g, k-1, seq.Steps[k-1])
			lazy := g.sweep(res.Steps[k-1].Before, prev, mv)
			if lazy != sm {
				t.Errorf("step %d: widening on the fly gives %+v, the widened canal %+v", k+1, lazy, sm)
			}
		}
		next := make([]float32, len(before))
		g.widen(next, before, mv)
		for i := range next {
			if next[i] != res.Steps[k].Prepared[i] {
				t.Fatalf("step %d: prepared canal differs from analysis.Run at cell %d", k+1, i)
			}
		}
		before = next
	}
}

// TestFewAnglesKeepsFatigue: a file's fatigue use depends on the centerline it bends along, not
// on the radius map (Miner's sum of the strain d k / 2 over the schedule), so the thinned copy
// gives the same figure as the full canal.
func TestFewAnglesKeepsFatigue(t *testing.T) {
	_, c := testCanals(t)
	seq, err := models.ParseSequence("s.json", []byte(`{"steps":[{"size":30,"taper":0.04,"depth":"WL"}]}`))
	if err != nil {
		t.Fatal(err)
	}
	thin := fewAngles(c)
	if thin.Angles != 4 || len(thin.Rho) != 4*c.Line.Len() {
		t.Fatalf("thinned to %d angles", thin.Angles)
	}
	a, err := analysis.Run(context.Background(), c, seq, analysis.RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	b, err := analysis.Run(context.Background(), thin, seq, analysis.RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if fa, fb := a.Steps[0].Metrics.FatigueDamage, b.Steps[0].Metrics.FatigueDamage; fa != fb || fa <= 0 {
		t.Errorf("fatigue use %g on the full canal, %g on the thinned copy", fa, fb)
	}
}
