package models

import (
	"math"
	"testing"
)

func TestDiameterISO(t *testing.T) {
	// ISO 3630-1: d0 = size/100 and d = d0 + taper*u; the trade's worked figures (references.md).
	cases := []struct {
		size    int
		taper   float64
		u, want float64
	}{
		{25, 0.02, 15, 0.55},
		{25, 0.04, 7, 0.53},
		{20, 0.06, 6, 0.56},
		{25, 0.02, 16, 0.57}, // D16 of a 25/.02
		{25, 0.06, 0, 0.25},  // the tip
	}
	for _, c := range cases {
		in := NewInstrument(c.size, c.taper)
		if got := in.Diameter(c.u); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("%s at %g mm: d = %.4f, want %.2f (ISO 3630-1)", in.Label(), c.u, got, c.want)
		}
	}
	if d := NewInstrument(25, 0.04).Diameter(-0.1); d != 0 {
		t.Errorf("diameter before the tip = %g, want 0 (no file there)", d)
	}
}

func TestDiameterVariableTaperJoins(t *testing.T) {
	in := NewInstrument(25, 0.04)
	in.Tapers = []TaperSegment{{0, 0.04}, {4, 0.06}, {9, 0.02}}
	const h = 1e-7
	for _, join := range []float64{4, 9} {
		// Analytic geometry: the piecewise-linear profile is continuous at each join...
		below, above := in.Diameter(join-h), in.Diameter(join+h)
		if math.Abs(above-below) > 2*h { // at most the steepest taper (< 1) times 2h
			t.Errorf("step of %g mm at the join at %g mm", above-below, join)
		}
		// ...and takes the next segment's taper right after it.
		slope := (in.Diameter(join+0.5) - in.Diameter(join)) / 0.5
		if want := in.TaperAt(join + 0.25); math.Abs(slope-want) > 1e-12 {
			t.Errorf("slope after %g mm = %g, want %g", join, slope, want)
		}
	}
	// d = d0 + the integral of the taper: 0.25 + 4*0.04 + 5*0.06 + 3*0.02 at 12 mm.
	if got, want := in.Diameter(12), 0.25+4*0.04+5*0.06+3*0.02; math.Abs(got-want) > 1e-12 {
		t.Errorf("d(12) = %g, want %g", got, want)
	}
	if l := in.Label(); l != "25/.04-.06-.02" {
		t.Errorf("label %q", l)
	}
}

func TestDiameterCapAndShaft(t *testing.T) {
	in := NewInstrument(25, 0.08) // d reaches 1.2 at u = (1.2-0.25)/0.08 = 11.875 mm
	prev := 0.0
	for u := 0.0; u <= 20; u += 0.01 {
		d := in.Diameter(u)
		if d > in.MaxFluteD+1e-15 {
			t.Fatalf("d(%g) = %g above the flute cap %g", u, d, in.MaxFluteD)
		}
		if d < prev {
			t.Fatalf("d falls from %g to %g at %g", prev, d, u)
		}
		prev = d
	}
	if d := in.Diameter(11); math.Abs(d-(0.25+0.08*11)) > 1e-12 {
		t.Errorf("below the cap d(11) = %g, want the ISO 3630-1 value %g", d, 0.25+0.08*11)
	}
	if d := in.Diameter(13); d != 1.2 {
		t.Errorf("past the cap d(13) = %g, want 1.2", d)
	}
	// Beyond the cutting length: the shaft, by default the flute diameter where the flutes end.
	small := NewInstrument(15, 0.02)
	if got, want := small.Diameter(20), small.Diameter(small.CuttingLength); got != want {
		t.Errorf("default shaft d = %g, want %g", got, want)
	}
	small.ShaftD = 0.9
	if got := small.Diameter(20); got != 0.9 {
		t.Errorf("explicit shaft d = %g, want 0.9", got)
	}
	if got := small.Diameter(16); math.Abs(got-0.47) > 1e-12 {
		t.Errorf("end of flutes d = %g, want 0.47 (ISO 3630-1 D16)", got)
	}
}

func TestTorsionCapacity(t *testing.T) {
	in := NewInstrument(25, 0.04)
	const tau = 900.0 // MPa
	// Gere & Timoshenko: T = tau pi d^3/16 for a round shaft; N*mm / 10 = N*cm.
	for _, u := range []float64{0, 3, 7} {
		d := in.Diameter(u)
		want := tau * math.Pi * d * d * d / 16 / 10
		if got := in.TorsionCapacity(u, tau); relErr(got, want) > 1e-12 {
			t.Errorf("T_cap(%g) = %g N*cm, want %g", u, got, want)
		}
	}
	// The capacity grows with d^3 (same source): 25/.04 at 0 and at 6.25 mm doubles d to 0.5 mm.
	if r := in.TorsionCapacity(6.25, tau) / in.TorsionCapacity(0, tau); relErr(r, 8) > 1e-12 {
		t.Errorf("doubling d multiplies capacity by %g, want 8", r)
	}
	// A triangular section keeps 0.165 of it (Timoshenko & Goodier; Roark), within 1 %.
	tri := in
	tri.Section = Section{Name: SectionTriangle}
	if r := tri.TorsionCapacity(3, tau) / in.TorsionCapacity(3, tau); relErr(r, 0.165) > 0.01 {
		t.Errorf("triangle/round capacity = %g, want 0.165", r)
	}
	if c := in.TorsionCapacity(-1, tau); c != 0 {
		t.Errorf("capacity before the tip = %g", c)
	}
	// Second moment follows the section at d(u): round pi d^4/64 (Gere & Timoshenko).
	d := in.Diameter(5)
	if got, want := in.SecondMoment(5), math.Pi*math.Pow(d, 4)/64; relErr(got, want) > 1e-12 {
		t.Errorf("I(5) = %g, want %g", got, want)
	}
}

func TestLabel(t *testing.T) {
	cases := []struct {
		in   Instrument
		want string
	}{
		{NewInstrument(25, 0.06), "25/.06"},
		{NewInstrument(6, 0.02), "06/.02"},
		{NewInstrument(30, 0.10), "30/.10"},
		{NewInstrument(100, 0.045), "100/.045"},
		{Instrument{Size: 25, Tapers: []TaperSegment{{0, 0.04}, {4, 0.06}}}, "25/.04-.06"},
		{Instrument{Size: 25, Tapers: []TaperSegment{{0, 0.04}, {4, 0.04}}}, "25/.04"},
	}
	for _, c := range cases {
		if got := c.in.Label(); got != c.want {
			t.Errorf("Label() = %q, want %q", got, c.want)
		}
	}
}

func BenchmarkDiameterVariableTaper(b *testing.B) {
	in := NewInstrument(25, 0.04)
	in.Tapers = []TaperSegment{{0, 0.04}, {3, 0.06}, {6, 0.08}, {10, 0.05}}
	var sink float64
	for i := 0; b.Loop(); i++ {
		sink += in.Diameter(float64(i%2000) * 0.01)
	}
	_ = sink
}
