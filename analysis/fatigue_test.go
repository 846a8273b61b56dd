package analysis

import (
	"fmt"
	"math"
	"testing"
)

// TestFatigueFractureDiameter: taken through a curve tight enough to pass the recoverable
// strain, files of one tip size and different tapers separate at about the same diameter, the
// doubled taper closer to its tip (common practice of the trade: "about half as far"; in the
// model, strain d k/2 passes the alloy's recoverable strain at the same d and life falls
// steeply past it). Three curves of 2 mm radius or less (k >= 0.5/mm: the superelastic alloy's
// 7 % is passed from d = 0.28 mm). With a continuous strain-life law a point just past the
// recoverable strain still survives about N_r cycles, so the file whose diameter grows faster
// gets a little further before one breaks: the model gives 0.58-0.79 of the distance, not 0.5.
func TestFatigueFractureDiameter(t *testing.T) {
	for _, canal := range []string{
		`{"kind":"straight","length":8},{"kind":"arc","radius":2,"angle":90},{"kind":"straight","length":3}`,
		`{"kind":"straight","length":8},{"kind":"arc","radius":2,"angle":70},{"kind":"straight","length":4}`,
		`{"kind":"straight","length":8},{"kind":"arc","radius":1.8,"angle":90},{"kind":"straight","length":2}`,
	} {
		c := canalFor(t, canal, 1.4, 0.6)
		res := runFor(t, c, fmt.Sprintf(`{"size":25,"taper":0.02,"depth":%g},{"size":25,"taper":0.04,"depth":%g}`,
			c.WorkingLength, c.WorkingLength), RunOptions{})
		a, b := res.Steps[0].Metrics, res.Steps[1].Metrics
		if a.FractureFromTipMM == nil || b.FractureFromTipMM == nil {
			t.Fatalf("no fracture predicted: damage %.2f and %.2f", a.FatigueDamage, b.FatigueDamage)
		}
		ua, ub := *a.FractureFromTipMM, *b.FractureFromTipMM
		da, db := 0.25+0.02*ua, 0.25+0.04*ub
		t.Logf("25/.02 breaks %.2f mm from its tip (d %.3f), 25/.04 %.2f mm (d %.3f)", ua, da, ub, db)
		if math.Abs(da-db) > 0.10*math.Max(da, db) {
			t.Errorf("fracture diameters %.3f and %.3f differ by more than 10%%", da, db)
		}
		if r := ub / ua; r < 0.4 || r > 0.8 {
			t.Errorf("the .04 breaks at %.2f of the .02's distance from the tip, want 0.4-0.8", r)
		}
	}
}

// TestFatigueGrowsWithRpmCurvatureAndDiameter: below the recoverable strain, damage per
// schedule grows with rpm (more revolutions in the same schedule), with a smaller radius of
// curvature and with a larger diameter (Pruett, Clement, Carnes, J Endod 1997;23:77; from
// memory). Cycles to failure themselves do not depend on rpm (Pruett et al.): damage scales
// exactly with revolutions.
func TestFatigueGrowsWithRpmCurvatureAndDiameter(t *testing.T) {
	tight := canalFor(t, `{"kind":"straight","length":8},{"kind":"arc","radius":5,"angle":45},{"kind":"straight","length":3}`, 1.4, 0.6)
	gentle := canalFor(t, `{"kind":"straight","length":8},{"kind":"arc","radius":10,"angle":22.5},{"kind":"straight","length":4.2}`, 1.4, 0.6)
	step := func(size int, rpm float64, c *Canal) string {
		return fmt.Sprintf(`{"size":%d,"taper":0.04,"depth":%g,"rpm":%g}`, size, c.WorkingLength-0.5, rpm)
	}
	slowRun := runFor(t, tight, step(25, 300, tight), RunOptions{}).Steps[0]
	fastRun := runFor(t, tight, step(25, 600, tight), RunOptions{}).Steps[0]
	slow := slowRun.Metrics
	wide := runFor(t, tight, step(40, 300, tight), RunOptions{}).Steps[0].Metrics
	soft := runFor(t, gentle, step(25, 300, gentle), RunOptions{}).Steps[0].Metrics
	if slow.FractureFromTipMM != nil {
		t.Fatalf("the reference case should stay below fracture (damage %.2f)", slow.FatigueDamage)
	}
	for k := range slowRun.Damage {
		if r := fastRun.Damage[k] / slowRun.Damage[k]; slowRun.Damage[k] > 0 && math.Abs(r-2) > 1e-9 {
			t.Fatalf("doubling rpm multiplies damage %.2f mm from the tip by %.6f, want exactly 2 (life in cycles does not depend on rpm)", float64(k)*StationSpacing, r)
		}
	}
	if !(wide.FatigueDamage > slow.FatigueDamage) {
		t.Errorf("larger file: damage %.4f not above %.4f", wide.FatigueDamage, slow.FatigueDamage)
	}
	if !(soft.FatigueDamage < slow.FatigueDamage) {
		t.Errorf("larger radius: damage %.4f not below %.4f", soft.FatigueDamage, slow.FatigueDamage)
	}
}

// TestInsertionSchedule checks the schedule against its definition (DEVELOPERS.md, "The model in code"): pecks of
// peck_mm past the deepest point, withdrawals of retract_mm, then out to the orifice.
func TestInsertionSchedule(t *testing.T) {
	moves := insertionSchedule(3, 1, 2, 1.5)
	want := []move{{0, 1, 1.5}, {1, 0, 1.5}, {0, 2, 1.5}, {2, 0, 1.5}, {0, 3, 1.5}, {3, 0, 1.5}}
	if fmt.Sprint(moves) != fmt.Sprint(want) {
		t.Fatalf("schedule %v, want %v", moves, want)
	}
	// Travel 1+1+2+2+3+3 = 12 mm at 1.5 mm/s.
	if got := scheduleTime(moves); math.Abs(got-8) > 1e-9 {
		t.Errorf("schedule time %.3f s, want 8", got)
	}
}

// TestTorsionMarginAtCoronalEndOfContact: with engagement at the tip alone, torque grows over
// the engaged zone and stays constant above it while capacity grows with d^3 (torsion of a
// round shaft, tau = 16T/(pi d^3), Gere & Timoshenko), so the smallest margin sits at the
// coronal end of the engaged zone, within one station.
func TestTorsionMarginAtCoronalEndOfContact(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":16}`, 1.2, 0.2)
	res := runFor(t, c, `{"size":25,"taper":0.02,"depth":"WL"}`, RunOptions{})
	m := res.Steps[0].Metrics
	if m.TorsionMargin == nil {
		t.Fatal("no torsional margin although the tip is engaged")
	}
	zoneEnd := m.EngagedFromTipMM[1]
	if zoneEnd <= 0.2 || zoneEnd > 3 {
		t.Fatalf("engaged zone ends %.2f mm from the tip: not a tip-only contact", zoneEnd)
	}
	if d := math.Abs(*m.TorsionMarginFromTipMM - zoneEnd); d > StationSpacing+1e-9 {
		t.Errorf("smallest margin %.3f mm from the tip, engaged zone ends at %.3f", *m.TorsionMarginFromTipMM, zoneEnd)
	}
	// Nothing engaged: no margin (null in JSON).
	wide := canalFor(t, `{"kind":"straight","length":16}`, 1.6, 1.0)
	free := runFor(t, wide, `{"size":25,"taper":0.02,"depth":"WL"}`, RunOptions{}).Steps[0].Metrics
	if free.TorsionMargin != nil || free.EngagedAreaMM2 != 0 {
		t.Errorf("a file that touches nothing has margin %v and area %.4f", free.TorsionMargin, free.EngagedAreaMM2)
	}
}

// TestFatigueSumIsMiners: the damage the fast sum gives each material point equals Miner's sum
// (Miner 1945) written out directly, stroke by stroke, with the alloy's own strain-life law
// (models.Alloy.CyclesToFailure, both branches) at the strain d k / 2 of every visit; and the
// fracture point is the first point whose running sum reaches 1.
func TestFatigueSumIsMiners(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":8},{"kind":"arc","radius":2.5,"angle":80},{"kind":"straight","length":3}`, 1.4, 0.6)
	for _, step := range []string{`{"size":25,"taper":0.04,"depth":"WL-2"}`, `{"size":30,"taper":0.06,"depth":"WL"}`} {
		st := runFor(t, c, step, RunOptions{}).Steps[0]
		in, alloy := st.Step.Instrument, st.Alloy
		moves := insertionSchedule(st.TipDepth, st.Step.PeckMM, st.Step.RetractMM, st.Step.AdvanceMMs)
		ds := c.Line.DS
		kmax := len(st.Damage) - 1
		want := make([]float64, kmax+1)
		first, firstT := -1, 0.0
		tm := 0.0
		for _, v := range scheduleSteps(moves, ds, kmax, st.Step.RPM/60) {
			tm += v.dt
			for k := 0; k <= v.tip; k++ {
				eps := in.Diameter(float64(k)*ds) * c.Line.K[v.tip-k] / 2
				want[k] += v.revs / alloy.CyclesToFailure(eps)
				if first < 0 && want[k] >= 1 {
					first, firstT = k, tm
				}
			}
		}
		for k := range want {
			if math.Abs(st.Damage[k]-want[k]) > 1e-9*math.Max(1, want[k]) {
				t.Fatalf("%s: damage %.3f mm from the tip %.10g, Miner's sum written out %.10g", step, float64(k)*ds, st.Damage[k], want[k])
			}
		}
		m := st.Metrics
		t.Logf("%s: peak damage %.4g, fracture %v", step, m.FatigueDamage, m.FractureFromTipMM)
		if (first >= 0) != (m.FractureFromTipMM != nil) {
			t.Fatalf("%s: fracture %v, written out: point %d", step, m.FractureFromTipMM, first)
		}
		if first >= 0 && (math.Abs(*m.FractureFromTipMM-float64(first)*ds) > 1e-9 || math.Abs(*m.FractureTimeS-firstT) > 0.01) {
			t.Errorf("%s: fracture %.3f mm at %.2f s, written out %.3f mm at %.2f s", step, *m.FractureFromTipMM, *m.FractureTimeS, float64(first)*ds, firstT)
		}
	}
}
