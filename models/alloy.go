package models

import (
	"fmt"
	"math"
)

// Alloy holds the material parameters a file's strain, fatigue and torsion figures need.
//
// Fatigue follows a continuous two-branch strain-life law (the Manson-Coffin-Basquin power
// form, Manson NACA TN 2933, 1953; Coffin, Trans ASME 1954): below the recoverable strain
// eps_r, eps_a = C N^-b; from eps_r up, a steeper low-cycle branch eps_a = eps_r (N/N_r)^-b2
// (b2 = LowCycleB), where N_r = (eps_r/C)^(-1/b) is the life at eps_r, so the two branches
// meet there and life falls without a jump. DEVELOPERS.md ("Fatigue") says where the built-in
// constants come from.
type Alloy struct {
	Name              string  `json:"-"`
	ElasticModulusGPa float64 `json:"elastic_modulus_gpa"`
	ShearUltimateMPa  float64 `json:"shear_ultimate_mpa"`
	RecoverableStrain float64 `json:"recoverable_strain"`
	StrainLifeC       float64 `json:"strain_life_c"`
	StrainLifeB       float64 `json:"strain_life_b"`
	LowCycleB         float64 `json:"low_cycle_b"`
	// Illustrative marks built-in parameters that are plausible textbook-style values, not
	// measurements of any product; they must be labelled so wherever they are shown.
	Illustrative bool `json:"-"`
}

// IllustrativeNote is the wording shown next to a built-in alloy's figures.
const IllustrativeNote = "illustrative parameters, not measured values of any product"

// DefaultLowCycleB is the low-cycle exponent b2 of an alloy that does not state one
// (illustrative, as the built-in alloys' own).
const DefaultLowCycleB = 0.1

// LegacyCyclesAboveLimitNote is what reading the field cycles_above_limit of older files says:
// it set a fixed life above the recoverable strain (a jump no published law has) and is no
// longer used.
const LegacyCyclesAboveLimitNote = "cycles_above_limit is no longer used: fatigue life now falls " +
	"continuously past the recoverable strain, at the rate low_cycle_b sets"

// alloyJSON is an alloy as sequence and instruments files write it: Alloy's fields, with
// low_cycle_b optional (DefaultLowCycleB) and cycles_above_limit of older files read and set
// aside with a note (LegacyCyclesAboveLimitNote).
type alloyJSON struct {
	ElasticModulusGPa float64  `json:"elastic_modulus_gpa"`
	ShearUltimateMPa  float64  `json:"shear_ultimate_mpa"`
	RecoverableStrain float64  `json:"recoverable_strain"`
	StrainLifeC       float64  `json:"strain_life_c"`
	StrainLifeB       float64  `json:"strain_life_b"`
	LowCycleB         *float64 `json:"low_cycle_b,omitempty"`
	CyclesAboveLimit  *float64 `json:"cycles_above_limit,omitempty"`
}

// alloy is the file's alloy under its key; legacy tells that it carried cycles_above_limit.
func (j alloyJSON) alloy(name string) (a Alloy, legacy bool) {
	a = Alloy{Name: name, ElasticModulusGPa: j.ElasticModulusGPa, ShearUltimateMPa: j.ShearUltimateMPa,
		RecoverableStrain: j.RecoverableStrain, StrainLifeC: j.StrainLifeC, StrainLifeB: j.StrainLifeB,
		LowCycleB: DefaultLowCycleB}
	if j.LowCycleB != nil {
		a.LowCycleB = *j.LowCycleB
	}
	return a, j.CyclesAboveLimit != nil
}

// fileForm is the alloy as a file writes it.
func (a Alloy) fileForm() alloyJSON {
	b := a.LowCycleB
	return alloyJSON{ElasticModulusGPa: a.ElasticModulusGPa, ShearUltimateMPa: a.ShearUltimateMPa,
		RecoverableStrain: a.RecoverableStrain, StrainLifeC: a.StrainLifeC, StrainLifeB: a.StrainLifeB, LowCycleB: &b}
}

// Built-in alloy names.
const (
	AlloyNiTiSuperelastic = "niti-superelastic"
	AlloyNiTiMartensitic  = "niti-martensitic"
	AlloyStainlessSteel   = "stainless-steel"
)

// builtinAlloys are illustrative. The high-cycle constants are chosen so that a 25/.04 whose
// 0.45 mm section rides a 5 mm radius curve (4.5 % strain) lasts several hundred cycles in the
// superelastic alloy and a few thousand in the more fatigue-resistant martensitic one. The
// low-cycle exponent b2 puts one reversal (N = 1/2) near the strain at which the wire breaks in
// a single bend, as Coffin's fatigue ductility coefficient approximates the fracture ductility:
// about 12-15 % for nickel-titanium and a few percent for drawn stainless-steel wire (from
// memory). DEVELOPERS.md ("Fatigue") compares the law with what test canals show.
var builtinAlloys = [...]Alloy{
	{Name: AlloyNiTiSuperelastic, ElasticModulusGPa: 40, ShearUltimateMPa: 900, RecoverableStrain: 0.07,
		StrainLifeC: 0.33, StrainLifeB: 0.3, LowCycleB: 0.1, Illustrative: true},
	{Name: AlloyNiTiMartensitic, ElasticModulusGPa: 30, ShearUltimateMPa: 800, RecoverableStrain: 0.08,
		StrainLifeC: 0.40, StrainLifeB: 0.28, LowCycleB: 0.1, Illustrative: true},
	{Name: AlloyStainlessSteel, ElasticModulusGPa: 200, ShearUltimateMPa: 1100, RecoverableStrain: 0.01,
		StrainLifeC: 0.015, StrainLifeB: 0.12, LowCycleB: 0.3, Illustrative: true},
}

// BuiltinAlloys returns the built-in alloys in a fixed order.
func BuiltinAlloys() []Alloy {
	out := make([]Alloy, len(builtinAlloys))
	copy(out, builtinAlloys[:])
	return out
}

// BuiltinAlloy returns the built-in alloy with the given name.
func BuiltinAlloy(name string) (Alloy, bool) {
	for _, a := range builtinAlloys {
		if a.Name == name {
			return a, true
		}
	}
	return Alloy{}, false
}

// CyclesToFailure returns the number of bending cycles (revolutions) the alloy survives at a
// constant strain amplitude, by the two-branch law (see Alloy). Rotational speed plays no part:
// in rotating-bending tests cycles to failure did not depend on rpm (Pruett et al. 1997), so
// faster rotation only spends cycles faster. eps <= 0 gives +Inf; NaN gives NaN.
func (a Alloy) CyclesToFailure(strainAmplitude float64) float64 {
	switch {
	case math.IsNaN(strainAmplitude):
		return math.NaN()
	case strainAmplitude <= 0:
		return math.Inf(1)
	case strainAmplitude < a.RecoverableStrain:
		return math.Pow(strainAmplitude/a.StrainLifeC, -1/a.StrainLifeB)
	}
	return a.CyclesAtRecoverableStrain() * math.Pow(strainAmplitude/a.RecoverableStrain, -1/a.LowCycleB)
}

// CyclesAtRecoverableStrain is N_r, the life at the recoverable strain, where the two branches
// of the strain-life law meet.
func (a Alloy) CyclesAtRecoverableStrain() float64 {
	return math.Pow(a.RecoverableStrain/a.StrainLifeC, -1/a.StrainLifeB)
}

// Validate checks that every parameter is usable; the error names the JSON field.
func (a Alloy) Validate() error {
	if field, msg := a.invalidField(); field != "" {
		return fmt.Errorf("%s: %s", field, msg)
	}
	return nil
}

// invalidField returns the JSON name of the first bad parameter and what is wrong with it.
func (a Alloy) invalidField() (field, msg string) {
	positive := []struct {
		name string
		v    float64
	}{
		{"elastic_modulus_gpa", a.ElasticModulusGPa},
		{"shear_ultimate_mpa", a.ShearUltimateMPa},
		{"recoverable_strain", a.RecoverableStrain},
		{"strain_life_c", a.StrainLifeC},
		{"strain_life_b", a.StrainLifeB},
		{"low_cycle_b", a.LowCycleB},
	}
	for _, p := range positive {
		if math.IsNaN(p.v) || math.IsInf(p.v, 0) {
			return p.name, "must be a finite number"
		}
		if p.v <= 0 {
			return p.name, fmt.Sprintf("must be above 0 (got %g)", p.v)
		}
	}
	if a.RecoverableStrain >= maxRecoverableStrain {
		return "recoverable_strain", fmt.Sprintf("must be below %g (a strain, not a percentage; got %g)",
			maxRecoverableStrain, a.RecoverableStrain)
	}
	return "", ""
}

// maxRecoverableStrain bounds recoverable strain: no file alloy recovers 20 % strain, and a value
// that large is most likely a percentage typed as a fraction.
const maxRecoverableStrain = 0.2
