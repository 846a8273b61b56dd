package models

import (
	"fmt"
	"math"
	"strings"
)

// Section is a file's cross-section shape. Every shape is taken with its corners on the circle of
// the file's diameter d, so the outer-fibre distance in bending is d/2 for all of them; the shape
// changes the torsion and bending stiffness, not the peak bending strain.
//
// The zero value behaves as a round section. Use SectionByName to check a name.
type Section struct {
	Name string
}

// Section names understood by SectionByName.
const (
	SectionRound    = "round"
	SectionTriangle = "triangle"
	SectionSquare   = "square"
)

// SectionNames lists the known section names.
func SectionNames() []string {
	return []string{SectionRound, SectionTriangle, SectionSquare}
}

// SectionByName returns the section with the given name.
func SectionByName(name string) (Section, error) {
	switch name {
	case SectionRound, SectionTriangle, SectionSquare:
		return Section{Name: name}, nil
	}
	return Section{}, fmt.Errorf("unknown section %q (known: %s)", name, strings.Join(SectionNames(), ", "))
}

// kind maps the zero value to round; an unknown name gives "".
func (s Section) kind() string {
	if s.Name == "" {
		return SectionRound
	}
	switch s.Name {
	case SectionRound, SectionTriangle, SectionSquare:
		return s.Name
	}
	return ""
}

// TorsionModulus returns Z_t in mm^3 for a section whose corners lie on a circle of diameter d mm,
// so that the largest shear stress under a torque T (N*mm) is T/Z_t. Saint-Venant torsion:
// round tau = 16 T/(pi d^3); equilateral triangle of side a = d*sqrt(3)/2, tau = 20 T/a^3;
// square of side a = d/sqrt(2), tau = T/(0.208 a^3). NaN for an unknown name.
func (s Section) TorsionModulus(d float64) float64 {
	switch s.kind() {
	case SectionRound:
		return math.Pi * d * d * d / 16
	case SectionTriangle:
		a := d * math.Sqrt(3) / 2
		return a * a * a / 20
	case SectionSquare:
		a := d / math.Sqrt2
		return 0.208 * a * a * a
	}
	return math.NaN()
}

// TorsionFactor is the section's torsion capacity over that of a round section of the same
// circumscribed diameter (about 0.165 for the triangle, 0.374 for the square).
func (s Section) TorsionFactor() float64 {
	return s.TorsionModulus(1) / Section{Name: SectionRound}.TorsionModulus(1)
}

// SecondMoment returns the bending second moment of area in mm^4 about a centroidal axis for a
// section inscribed in diameter d mm: round pi d^4/64; equilateral triangle of side a
// sqrt(3) a^4/96; square a^4/12 (both the same about every centroidal axis). NaN for an unknown name.
func (s Section) SecondMoment(d float64) float64 {
	switch s.kind() {
	case SectionRound:
		return math.Pi * d * d * d * d / 64
	case SectionTriangle:
		a := d * math.Sqrt(3) / 2
		return math.Sqrt(3) * a * a * a * a / 96
	case SectionSquare:
		a := d / math.Sqrt2
		return a * a * a * a / 12
	}
	return math.NaN()
}
