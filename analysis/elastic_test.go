package analysis

import (
	"fmt"
	"math"
	"testing"

	"tapersweep/models"
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

// TestElasticClassicPattern: in a curved canal a file that straightens takes wall from the
// outer side near the apical end and from the inner side where the curve begins (common
// practice: the apical zip and the elbow on the inner wall; Gambill et al. 1996 measured steel
// against nickel-titanium this way), and it does so the more, the stiffer it is (beam theory:
// the push on the wall grows with E I): more for stainless steel than nickel-titanium, more for
// a larger or more tapered file than a smaller one. A stiffer file of the same size also lies
// further off the centerline at its tip.
func TestElasticClassicPattern(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":10},{"kind":"arc","radius":4,"angle":50}`, 0.7, 0.25)
	L := c.Line.Length()
	bend := 10 + 0.25*4*50*math.Pi/180 // a quarter into the arc
	type pattern struct{ zip, elbow, tip float64 }
	run := func(step string) pattern {
		st := runFor(t, c, step, RunOptions{PathModel: "elastic"}).Steps[0]
		removed := func(s, th float64) float64 { return c.MapAt(st.Prepared, s, th) - c.MapAt(st.Before, s, th) }
		p := pattern{zip: removed(L-0.3, math.Pi) - removed(L-0.3, 0), elbow: removed(bend, 0) - removed(bend, math.Pi), tip: tipOffset(st)}
		t.Logf("%s: outer less inner wall removed 0.3 mm from the apical end %.4f mm; inner less outer a quarter into the curve %.4f mm; tip %.4f mm off axis",
			step, p.zip, p.elbow, p.tip)
		return p
	}
	niti := run(`{"size":30,"taper":0.04,"depth":"WL"}`)
	steel := run(`{"size":30,"taper":0.04,"depth":"WL","alloy":"stainless-steel"}`)
	small := run(`{"size":20,"taper":0.04,"depth":"WL"}`)
	large := run(`{"size":40,"taper":0.04,"depth":"WL"}`)
	tapered := run(`{"size":30,"taper":0.06,"depth":"WL"}`)
	for _, p := range []pattern{niti, steel, large, tapered} {
		if !(p.zip > 0) || !(p.elbow > 0) {
			t.Errorf("not the classic pattern: apical zip %.4f, elbow %.4f mm", p.zip, p.elbow)
		}
	}
	for _, pair := range []struct {
		what         string
		stiff, other pattern
	}{
		{"steel against nickel-titanium", steel, niti},
		{"40/.04 against 30/.04", large, niti},
		{"30/.04 against 20/.04", niti, small},
		{"30/.06 against 30/.04", tapered, niti},
	} {
		if !(pair.stiff.zip > pair.other.zip) || !(pair.stiff.elbow > pair.other.elbow) {
			t.Errorf("%s: zip %.4f vs %.4f, elbow %.4f vs %.4f mm: the stiffer file should move the canal more",
				pair.what, pair.stiff.zip, pair.other.zip, pair.stiff.elbow, pair.other.elbow)
		}
	}
	if !(steel.tip > niti.tip) {
		t.Errorf("the steel file's tip lies %.4f mm off axis, the nickel-titanium one's %.4f", steel.tip, niti.tip)
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

// TestElasticCantileverOnOneWall: a straight canal 1 mm in radius with one place, 8 mm below the
// orifice, where a ridge on one side comes to 0.05 mm from the axis; a round file of constant
// diameter 0.3 mm held at the orifice, tip at 12 mm. Only that wall touches the file, so the file
// is a cantilever pushed sideways at one point by r - 0.05 = 0.10 mm (a stiff wall): by
// Euler-Bernoulli beam theory (Gere & Timoshenko, cantilever with a point load at a) its offset
// is v(a) x^2 (3a - x) / (2 a^3) up to the wall and v(a) (3x - a) / (2a) beyond it, away from
// the wall, whatever its stiffness. A foundation acting on both sides everywhere would hold the
// file near the axis away from the wall instead.
func TestElasticCantileverOnOneWall(t *testing.T) {
	base := canalFor(t, `{"kind":"straight","length":14}`, 2.0, 2.0)
	c := *base
	c.Rho = make([]float32, len(base.Rho))
	const rho0, D = 0.05, 12.0
	ia := c.Line.Station(8)
	a := c.Line.S[ia]
	for i := 0; i < c.Line.Len(); i++ {
		for j := 0; j < c.Angles; j++ {
			v := float32(1.0)
			if i == ia && j == 0 {
				v = rho0 // a ridge on the inner side (theta = 0)
			}
			c.Rho[i*c.Angles+j] = v
		}
	}
	in := models.NewInstrument(30, 0)
	tip := c.Line.Station(D)
	// A measured straight centerline still carries a little curvature; clear it so the wall is
	// the only load.
	line := *c.Line
	line.K, line.KN1, line.KN2 = make([]float64, line.Len()), make([]float64, line.Len()), make([]float64, line.Len())
	c.Line = &line
	p := newElasticSolver(&c, 1e7).prepare(in, 40, c.Rho).path(D, tip)
	va := p.o1[ia]
	if math.Abs(va+(0.15-rho0)) > 1e-3 {
		t.Fatalf("offset at the wall %.5f mm, want -0.100 (pushed away from the wall by r - rho)", va)
	}
	for _, x := range []float64{2, 4, 6, 7, 9, 10, 12} {
		want := va * x * x * (3*a - x) / (2 * a * a * a)
		if x > a {
			want = va * (3*x - a) / (2 * a)
		}
		got := p.o1[c.Line.Station(x)]
		if math.Abs(got-want) > 0.02*math.Abs(va) || math.Abs(p.o2[c.Line.Station(x)]) > 1e-6 {
			t.Errorf("offset %g mm from the orifice: %.5f mm (across %.2g), cantilever %.5f", x, got, p.o2[c.Line.Station(x)], want)
		}
	}
}

// TestElasticFatigueBlend: the schedule's fatigue on the elastic path solves the beam at every
// pathEvery-th tip station and blends between solves; against a solve at every station it stays
// within 5 % (or 0.0005 of the life) on two curved canals for a whole sequence (a check of the shortcut against the
// model itself, the stated tolerance of the speed-up).
func TestElasticFatigueBlend(t *testing.T) {
	seq := `{"size":15,"taper":0.02,"depth":"WL"},{"size":20,"taper":0.04,"depth":"WL-3"},{"size":25,"taper":0.06,"depth":"WL-2"},
		{"size":25,"taper":0.04,"depth":"WL"},{"size":30,"taper":0.06,"depth":"WL-1"},{"size":35,"taper":0.06,"depth":"WL-0.5"}`
	for _, canal := range []string{
		`{"kind":"straight","length":10},{"kind":"arc","radius":5,"angle":40},{"kind":"arc","radius":8,"angle":20,"plane_turn":180},{"kind":"straight","length":2}`,
		`{"kind":"straight","length":8},{"kind":"arc","radius":3,"angle":60},{"kind":"straight","length":2}`,
	} {
		c := canalFor(t, canal, 1.0, 0.25)
		blended := runFor(t, c, seq, RunOptions{PathModel: "elastic"})
		every, stride := pathEvery, pathStride
		pathEvery, pathStride = 1, 1
		exact := runFor(t, c, seq, RunOptions{PathModel: "elastic"})
		pathEvery, pathStride = every, stride
		for k, st := range blended.Steps {
			got, want := st.Metrics.FatigueDamage, exact.Steps[k].Metrics.FatigueDamage
			t.Logf("step %d: fatigue use %.5g blended, %.5g solved at every station", k+1, got, want)
			if math.Abs(got-want) > 0.05*want+5e-4 { // 5e-4: a use that small is nothing
				t.Errorf("step %d: fatigue use %.5g blended, %.5g solved at every station", k+1, got, want)
			}
		}
	}
}

// TestBandSolve: the banded LDL^T solve gives back the right-hand side when multiplied out
// (linear algebra; random diagonally dominant symmetric band matrices of half-bandwidth 4), and
// a system whose rows changed from some row on, solved again from that row, gives the bits a
// solve of the whole changed system gives.
func TestBandSolve(t *testing.T) {
	const n = 40
	a := make([]float64, n*bandW)
	b := make([]float64, n)
	fill := func(from int, seed float64) {
		for i := from; i < n; i++ {
			a[i*bandW] = 10 + float64(i%7) + seed
			for k := 1; k <= halfBand && i+k < n; k++ {
				a[i*bandW+k] = math.Sin(float64(3*i+k)+seed) / 2
			}
			b[i] = math.Cos(float64(i) + seed)
		}
	}
	at := func(i, j int) float64 {
		if j < i {
			i, j = j, i
		}
		if j-i > halfBand {
			return 0
		}
		return a[i*bandW+j-i]
	}
	check := func(x []float64) {
		t.Helper()
		for i := 0; i < n; i++ {
			sum := 0.0
			for j := 0; j < n; j++ {
				sum += at(i, j) * x[j]
			}
			if math.Abs(sum-b[i]) > 1e-12 {
				t.Fatalf("row %d: A x = %.15g, b = %.15g", i, sum, b[i])
			}
		}
	}
	fill(0, 0)
	f := newBandFactor(n)
	x := make([]float64, n)
	f.solve(a, b, x, n, 0)
	check(x)
	for _, from := range []int{0, 1, 2, 3, 4, 5, 17, n - 1, n} {
		fill(from, float64(from)/3)
		again := make([]float64, n)
		f.solve(a, b, again, n, from)
		check(again)
		whole := newBandFactor(n)
		whole.solve(a, b, x, n, 0)
		for i := range x {
			if math.Float64bits(x[i]) != math.Float64bits(again[i]) {
				t.Fatalf("solved again from row %d: x[%d] = %v, %v solving the whole system", from, i, again[i], x[i])
			}
		}
	}
}

// TestElasticContactSettles: the contact iteration settles in a few rounds per solve along a
// schedule (each solve starting from the one before) and never runs to its bound, for files from
// narrower than the canal to wider than it (the speed of the elastic path rests on this).
func TestElasticContactSettles(t *testing.T) {
	c := canalFor(t, `{"kind":"straight","length":8},{"kind":"arc","radius":3,"angle":60},{"kind":"straight","length":2}`, 1.0, 0.25)
	for _, in := range []models.Instrument{models.NewInstrument(10, 0.02), models.NewInstrument(25, 0.06),
		models.NewInstrument(35, 0.04)} {
		es := newElasticSolver(c, DefaultWallStiffness).prepare(in, in.Alloy.ElasticModulusGPa, c.Rho)
		along := pathCurvature(c, es)
		tip := c.Line.Len() - 1
		for z := 0; z < tip+pathEvery; z += pathEvery {
			along(min(z, tip))
		}
		before := es.rounds
		es.path(c.Line.Length(), tip)
		last := es.rounds - before
		per := float64(es.rounds) / float64(es.solves)
		t.Logf("%s: %d solves, %.2f rounds each; the file at its target %d", in.Label(), es.solves, per, last)
		if per > 5 || last >= maxContactRounds {
			t.Errorf("%s: %.2f rounds per solve, %d for the last", in.Label(), per, last)
		}
	}
}
