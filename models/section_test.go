package models

import (
	"math"
	"testing"
)

func relErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

func TestSectionTorsionFactors(t *testing.T) {
	// Timoshenko & Goodier, Theory of Elasticity (Saint-Venant torsion) and Roark's Formulas: an
	// equilateral triangle inscribed in d carries 0.165 of the round section's torque, a square 0.374.
	for _, c := range []struct {
		name string
		want float64
	}{{SectionRound, 1}, {SectionTriangle, 0.165}, {SectionSquare, 0.374}} {
		s, err := SectionByName(c.name)
		if err != nil {
			t.Fatal(err)
		}
		if got := s.TorsionFactor(); relErr(got, c.want) > 0.01 {
			t.Errorf("%s torsion factor = %.4f, want %.3f within 1 %% (Timoshenko & Goodier; Roark)", c.name, got, c.want)
		}
	}
}

func TestRoundTorsionModulus(t *testing.T) {
	// Gere & Timoshenko, Mechanics of Materials: tau_max = 16 T/(pi d^3) for a solid round shaft.
	const T, d = 5.0, 0.4 // N*mm, mm
	tau := 16 * T / (math.Pi * d * d * d)
	if got := T / (Section{}).TorsionModulus(d); relErr(got, tau) > 1e-12 {
		t.Errorf("zero-value (round) section: tau = %g, want %g", got, tau)
	}
	// Capacity grows with d^3 (same source), for every shape.
	for _, name := range SectionNames() {
		s, _ := SectionByName(name)
		if r := s.TorsionModulus(2*d) / s.TorsionModulus(d); relErr(r, 8) > 1e-12 {
			t.Errorf("%s: Z_t(2d)/Z_t(d) = %g, want 8 (d^3 scaling)", name, r)
		}
	}
}

// polygonSecondMoment integrates y^2 dA over a simple polygon (Green's theorem), about the x axis
// through the origin.
func polygonSecondMoment(xs, ys []float64) float64 {
	var sum float64
	n := len(xs)
	for i := 0; i < n; i++ {
		j := (i + 1) % n
		cross := xs[i]*ys[j] - xs[j]*ys[i]
		sum += cross * (ys[i]*ys[i] + ys[i]*ys[j] + ys[j]*ys[j])
	}
	return math.Abs(sum) / 12
}

// inscribedPolygon returns a regular n-gon with its corners on the circle of diameter d, one
// corner rotated by phase from the x axis.
func inscribedPolygon(n int, d, phase float64) (xs, ys []float64) {
	for i := 0; i < n; i++ {
		a := phase + 2*math.Pi*float64(i)/float64(n)
		xs = append(xs, d/2*math.Cos(a))
		ys = append(ys, d/2*math.Sin(a))
	}
	return xs, ys
}

func TestSectionSecondMoment(t *testing.T) {
	// Analytic geometry: the second moment of the polygon with corners on the circle of diameter d,
	// by Green's theorem, must match the closed forms (round pi d^4/64, equilateral triangle
	// sqrt(3) a^4/96 with a = d sqrt(3)/2, square a^4/12 with a = d/sqrt(2)), about any centroidal
	// axis for the regular shapes.
	const d = 0.6
	for _, c := range []struct {
		name    string
		corners int
		tol     float64
	}{{SectionRound, 4000, 1e-5}, {SectionTriangle, 3, 1e-12}, {SectionSquare, 4, 1e-12}} {
		s, _ := SectionByName(c.name)
		for _, phase := range []float64{0, 0.3, 1.1} {
			xs, ys := inscribedPolygon(c.corners, d, phase)
			want := polygonSecondMoment(xs, ys)
			if got := s.SecondMoment(d); relErr(got, want) > c.tol {
				t.Errorf("%s I(%g) = %.6g, polygon integral (phase %g) %.6g", c.name, d, got, phase, want)
			}
		}
	}
}

func TestSectionByNameUnknown(t *testing.T) {
	if _, err := SectionByName("hexagon"); err == nil {
		t.Error("SectionByName(hexagon) gave no error")
	}
	if v := (Section{Name: "hexagon"}).TorsionModulus(1); !math.IsNaN(v) {
		t.Errorf("unknown section torsion modulus = %g, want NaN", v)
	}
}
