package models

import (
	"math"
	"strings"
	"testing"
)

func TestCyclesToFailureRegimes(t *testing.T) {
	for _, a := range BuiltinAlloys() {
		// Below the recoverable strain: the strain-life form eps_a = C N^-b (Manson 1953, Coffin
		// 1954) must give back the strain we asked about.
		for _, f := range []float64{0.1, 0.5, 0.9, 0.999} {
			eps := f * a.RecoverableStrain
			n := a.CyclesToFailure(eps)
			if back := a.StrainLifeC * math.Pow(n, -a.StrainLifeB); relErr(back, eps) > 1e-9 {
				t.Errorf("%s: eps %g -> N %g -> C N^-b = %g", a.Name, eps, n, back)
			}
		}
		// At or above it the low-cycle branch eps_a = eps_r (N/N_r)^-b2 must give back the strain
		// too, with N_r the life at eps_r by the first branch (same power form).
		nr := a.CyclesAtRecoverableStrain()
		if back := a.StrainLifeC * math.Pow(nr, -a.StrainLifeB); relErr(back, a.RecoverableStrain) > 1e-9 {
			t.Errorf("%s: N_r %g is not the first branch's life at eps_r", a.Name, nr)
		}
		for _, f := range []float64{1, 1.01, 1.2, 2} {
			eps := f * a.RecoverableStrain
			n := a.CyclesToFailure(eps)
			if back := a.RecoverableStrain * math.Pow(n/nr, -a.LowCycleB); relErr(back, eps) > 1e-9 {
				t.Errorf("%s: eps %g -> N %g -> eps_r (N/N_r)^-b2 = %g", a.Name, eps, n, back)
			}
		}
		// No strain, no fatigue.
		if n := a.CyclesToFailure(0); !math.IsInf(n, 1) {
			t.Errorf("%s: N(0) = %g, want +Inf", a.Name, n)
		}
		if n := a.CyclesToFailure(-0.01); !math.IsInf(n, 1) {
			t.Errorf("%s: N(-0.01) = %g, want +Inf", a.Name, n)
		}
	}
}

func TestCyclesToFailureFallWithStrain(t *testing.T) {
	// Pruett et al., J Endod 1997: cycles to failure fall as the curve's radius shrinks and as the
	// file grows (from memory); in the model both raise the bending strain eps = d/(2R)
	// (Gere & Timoshenko), so N must not rise with strain. Rotational speed did not matter there,
	// which is why CyclesToFailure takes no rpm.
	for _, a := range BuiltinAlloys() {
		prev := math.Inf(1)
		for eps := 0.0005; eps < 0.15; eps *= 1.05 {
			n := a.CyclesToFailure(eps)
			if n > prev {
				t.Errorf("%s: N rises from %g to %g at eps %g", a.Name, prev, n, eps)
			}
			prev = n
		}
	}
}

// TestStrainLifeHasNoCliff: the two branches meet at the recoverable strain (no published
// strain-life law jumps; Manson 1953 / Coffin 1954 power form on each side): life just below and
// just above eps_r agree to within the change of strain itself, and it falls steadily with
// strain on both sides.
func TestStrainLifeHasNoCliff(t *testing.T) {
	for _, a := range BuiltinAlloys() {
		er := a.RecoverableStrain
		below, above := a.CyclesToFailure(er*(1-1e-9)), a.CyclesToFailure(er)
		if relErr(below, above) > 1e-6 {
			t.Errorf("%s: N jumps from %g to %g at the recoverable strain", a.Name, below, above)
		}
		// One percent more strain costs a few percent of life at most on either side
		// (|dlnN/dln eps| = 1/b or 1/b2), never a factor.
		for _, eps := range []float64{0.98 * er, 0.99 * er, er, 1.01 * er, 1.02 * er} {
			n0, n1 := a.CyclesToFailure(eps), a.CyclesToFailure(eps*1.01)
			if !(n1 < n0) || n0/n1 > math.Pow(1.01, 1/min(a.StrainLifeB, a.LowCycleB))*(1+1e-9) {
				t.Errorf("%s: from strain %.5f to 1 %% more, N goes %g -> %g", a.Name, eps, n0, n1)
			}
		}
		// One reversal (N = 1/2) falls near the strain that breaks the wire in a single bend
		// (Coffin 1954: the fatigue ductility coefficient is about the fracture ductility):
		// 10-20 % for nickel-titanium, 2-6 % for drawn stainless steel (from memory).
		lo, hi := 0.10, 0.20
		if a.Name == AlloyStainlessSteel {
			lo, hi = 0.02, 0.06
		}
		if once := er * math.Pow(0.5/a.CyclesAtRecoverableStrain(), -a.LowCycleB); once < lo || once > hi {
			t.Errorf("%s: one reversal at %.3f strain, outside the plausible %.2f-%.2f", a.Name, once, lo, hi)
		}
	}
}

func TestBuiltinAlloysPlausible(t *testing.T) {
	sup, ok1 := BuiltinAlloy(AlloyNiTiSuperelastic)
	mart, ok2 := BuiltinAlloy(AlloyNiTiMartensitic)
	steel, ok3 := BuiltinAlloy(AlloyStainlessSteel)
	if !ok1 || !ok2 || !ok3 {
		t.Fatal("a built-in alloy is missing")
	}
	for _, a := range BuiltinAlloys() {
		if !a.Illustrative {
			t.Errorf("%s is not marked illustrative", a.Name)
		}
		if err := a.Validate(); err != nil {
			t.Errorf("%s: %v", a.Name, err)
		}
	}
	// A 25/.04 is 0.45 mm across 5 mm from its tip (ISO 3630-1, d = d0 + taper*u); on a 5 mm radius
	// its outer fibre is strained d/(2R) = 4.5 % (Gere & Timoshenko). The brief asks for a life of
	// a few hundred to a thousand or more cycles there: a plausibility range, not a measurement.
	eps := NewInstrument(25, 0.04).Diameter(5) / (2 * 5)
	if n := sup.CyclesToFailure(eps); n < 200 || n > 3000 {
		t.Errorf("superelastic at %.3f strain: N = %.0f, outside the plausible 200-3000", eps, n)
	}
	// The martensitic alloy is the more fatigue-resistant one at every strain (common practice).
	for e := 0.005; e < 0.12; e += 0.005 {
		if mart.CyclesToFailure(e) <= sup.CyclesToFailure(e) {
			t.Errorf("at strain %.3f martensitic N %g <= superelastic N %g", e, mart.CyclesToFailure(e), sup.CyclesToFailure(e))
		}
	}
	// Common handbook values: NiTi E of some tens of GPa and 6-8 % recoverable strain; stainless
	// steel about 200 GPa and about 1 %.
	if sup.ElasticModulusGPa < 20 || sup.ElasticModulusGPa > 90 || sup.RecoverableStrain < 0.06 || sup.RecoverableStrain > 0.08 {
		t.Errorf("superelastic NiTi parameters implausible: %+v", sup)
	}
	if steel.ElasticModulusGPa < 180 || steel.ElasticModulusGPa > 220 || math.Abs(steel.RecoverableStrain-0.01) > 0.003 {
		t.Errorf("stainless steel parameters implausible: %+v", steel)
	}
}

func TestAlloyValidate(t *testing.T) {
	good, _ := BuiltinAlloy(AlloyNiTiSuperelastic)
	cases := []struct {
		field string
		edit  func(*Alloy)
	}{
		{"elastic_modulus_gpa", func(a *Alloy) { a.ElasticModulusGPa = 0 }},
		{"shear_ultimate_mpa", func(a *Alloy) { a.ShearUltimateMPa = -5 }},
		{"recoverable_strain", func(a *Alloy) { a.RecoverableStrain = 0 }},
		{"recoverable_strain", func(a *Alloy) { a.RecoverableStrain = 7 }}, // a percentage by mistake
		{"strain_life_c", func(a *Alloy) { a.StrainLifeC = math.NaN() }},
		{"strain_life_b", func(a *Alloy) { a.StrainLifeB = 0 }},
		{"strain_life_b", func(a *Alloy) { a.StrainLifeB = -0.3 }},
		{"low_cycle_b", func(a *Alloy) { a.LowCycleB = math.Inf(1) }},
		{"low_cycle_b", func(a *Alloy) { a.LowCycleB = 0 }},
	}
	for _, c := range cases {
		a := good
		c.edit(&a)
		err := a.Validate()
		if err == nil || !strings.HasPrefix(err.Error(), c.field+":") {
			t.Errorf("want an error naming %s, got %v", c.field, err)
		}
	}
}

func BenchmarkCyclesToFailure(b *testing.B) {
	a, _ := BuiltinAlloy(AlloyNiTiSuperelastic)
	var sink float64
	for i := 0; b.Loop(); i++ {
		sink += a.CyclesToFailure(0.001 + 0.0001*float64(i%700))
	}
	_ = sink
}
