package analysis

import (
	"fmt"
	"math"
	"testing"
)

// TestFatigueFractureDiameter: taken through a curve tight enough to pass the recoverable
// strain, files of one tip size and different tapers separate at about the same diameter, the
// doubled taper about half as far from its tip (common practice of the trade; in the model,
// strain d k/2 first passes the alloy's recoverable strain at the same d, and life collapses
// there). 90 degrees on a 2 mm radius: k = 0.5/mm, so the superelastic alloy's 7 % is passed
// from d = 0.28 mm.
func TestFatigueFractureDiameter(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":8},{"kind":"arc","radius":2,"angle":90},{"kind":"straight","length":3}`, 1.4, 0.6)
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
	if r := ub / ua; r < 0.4 || r > 0.6 {
		t.Errorf("the .04 breaks at %.2f of the .02's distance from the tip, want 0.4-0.6", r)
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
