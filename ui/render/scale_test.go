package render

import (
	"image/color"
	"math"
	"testing"
)

// cieLab converts sRGB to CIE 1976 L*a*b* (D65), written out here from the standards
// so the check does not lean on the package: the sRGB transfer function and primaries of
// IEC 61966-2-1, the XYZ to L*a*b* formulas of CIE 15 (1976 colour space).
func cieLab(c color.RGBA) (L, a, b float64) {
	lin := func(v uint8) float64 {
		x := float64(v) / 255
		if x <= 0.04045 {
			return x / 12.92
		}
		return math.Pow((x+0.055)/1.055, 2.4)
	}
	r, g, bl := lin(c.R), lin(c.G), lin(c.B)
	X := (0.4124*r + 0.3576*g + 0.1805*bl) / 0.95047
	Y := 0.2126*r + 0.7152*g + 0.0722*bl
	Z := (0.0193*r + 0.1192*g + 0.9505*bl) / 1.08883
	f := func(t float64) float64 {
		if t > math.Pow(6.0/29, 3) {
			return math.Cbrt(t)
		}
		return t/(3*(6.0/29)*(6.0/29)) + 4.0/29
	}
	return 116*f(Y) - 16, 500 * (f(X) - f(Y)), 200 * (f(Y) - f(Z))
}

func deltaE76(p, q color.RGBA) float64 {
	l1, a1, b1 := cieLab(p)
	l2, a2, b2 := cieLab(q)
	return math.Sqrt((l1-l2)*(l1-l2) + (a1-a2)*(a1-a2) + (b1-b2)*(b1-b2))
}

// deltaE2000 is the CIEDE2000 colour difference (CIE 142-2001; formulas as in Sharma,
// Wu and Dalal, Color Res Appl 2005;30:21-30), the standard measure of how different two
// colours look.
func deltaE2000(p, q color.RGBA) float64 {
	L1, a1, b1 := cieLab(p)
	L2, a2, b2 := cieLab(q)
	return deltaE2000Lab(L1, a1, b1, L2, a2, b2)
}

func deltaE2000Lab(L1, a1, b1, L2, a2, b2 float64) float64 {
	rad := math.Pi / 180
	C1, C2 := math.Hypot(a1, b1), math.Hypot(a2, b2)
	Cm := (C1 + C2) / 2
	G := 0.5 * (1 - math.Sqrt(math.Pow(Cm, 7)/(math.Pow(Cm, 7)+math.Pow(25, 7))))
	a1p, a2p := (1+G)*a1, (1+G)*a2
	C1p, C2p := math.Hypot(a1p, b1), math.Hypot(a2p, b2)
	hue := func(b, a float64) float64 {
		if a == 0 && b == 0 {
			return 0
		}
		h := math.Atan2(b, a) / rad
		if h < 0 {
			h += 360
		}
		return h
	}
	h1p, h2p := hue(b1, a1p), hue(b2, a2p)
	dLp, dCp := L2-L1, C2p-C1p
	dhp := 0.0
	if C1p*C2p != 0 {
		dhp = h2p - h1p
		if dhp > 180 {
			dhp -= 360
		} else if dhp < -180 {
			dhp += 360
		}
	}
	dHp := 2 * math.Sqrt(C1p*C2p) * math.Sin(dhp/2*rad)
	Lmp, Cmp := (L1+L2)/2, (C1p+C2p)/2
	hmp := h1p + h2p
	if C1p*C2p != 0 {
		if math.Abs(h1p-h2p) <= 180 {
			hmp = (h1p + h2p) / 2
		} else if h1p+h2p < 360 {
			hmp = (h1p + h2p + 360) / 2
		} else {
			hmp = (h1p + h2p - 360) / 2
		}
	}
	T := 1 - 0.17*math.Cos((hmp-30)*rad) + 0.24*math.Cos(2*hmp*rad) + 0.32*math.Cos((3*hmp+6)*rad) - 0.20*math.Cos((4*hmp-63)*rad)
	dTheta := 30 * math.Exp(-math.Pow((hmp-275)/25, 2))
	Rc := 2 * math.Sqrt(math.Pow(Cmp, 7)/(math.Pow(Cmp, 7)+math.Pow(25, 7)))
	Sl := 1 + 0.015*(Lmp-50)*(Lmp-50)/math.Sqrt(20+(Lmp-50)*(Lmp-50))
	Sc := 1 + 0.045*Cmp
	Sh := 1 + 0.015*Cmp*T
	Rt := -math.Sin(2*dTheta*rad) * Rc
	return math.Sqrt(math.Pow(dLp/Sl, 2) + math.Pow(dCp/Sc, 2) + math.Pow(dHp/Sh, 2) + Rt*(dCp/Sc)*(dHp/Sh))
}

func TestDeltaE2000PublishedPairs(t *testing.T) {
	// Test data of Sharma, Wu and Dalal (2005), pairs 1, 7 and 17 (from memory).
	for _, c := range []struct{ l1, a1, b1, l2, a2, b2, want float64 }{
		{50, 2.6772, -79.7751, 50, 0, -82.7485, 2.0425},
		{50, 0, 0, 50, -1, 2, 2.3669},
		{50, 2.5, 0, 73, 25, -18, 27.1492},
	} {
		if d := deltaE2000Lab(c.l1, c.a1, c.b1, c.l2, c.a2, c.b2); math.Abs(d-c.want) > 1e-3 {
			t.Errorf("pair %v: dE2000 %.4f, want %.4f", c, d, c.want)
		}
	}
}

func TestLightnessOfKnownColours(t *testing.T) {
	// CIE 1976: white is L* = 100, black 0; sRGB 119/119/119 is the familiar mid grey,
	// L* = 50.0 (Y = 0.1845 by the IEC 61966-2-1 transfer function).
	for _, c := range []struct {
		c    color.RGBA
		want float64
	}{{color.RGBA{255, 255, 255, 255}, 100}, {color.RGBA{0, 0, 0, 255}, 0}, {color.RGBA{119, 119, 119, 255}, 50.03}} {
		if got := Lightness(c.c); math.Abs(got-c.want) > 0.05 {
			t.Errorf("Lightness(%v) = %.3f, want %.2f", c.c, got, c.want)
		}
		if got, _, _ := cieLab(c.c); math.Abs(got-c.want) > 0.05 {
			t.Errorf("test's own L*(%v) = %.3f, want %.2f", c.c, got, c.want)
		}
	}
}

func TestDepthScaleLightnessFallsSteadily(t *testing.T) {
	s := DepthScale()
	const n = 64
	prev := math.Inf(1)
	for i := 0; i <= n; i++ {
		L, _, _ := cieLab(s.At(float64(i) / n))
		// Sequential scale: lightness must fall monotonically (CIE 1976 L*).
		if !(L < prev) {
			t.Fatalf("L* at t=%.3f is %.2f, not below %.2f", float64(i)/n, L, prev)
		}
		prev = L
	}
	top, _, _ := cieLab(s.At(0))
	bottom, _, _ := cieLab(s.At(1))
	if top-bottom < 45 {
		t.Errorf("lightness range %.1f..%.1f too small to read", bottom, top)
	}
}

func TestScalesChangeAtAnEvenPace(t *testing.T) {
	// Perceptual uniformity, checked with CIEDE2000 (a different measure from the OKLab
	// distance the scale is spaced by): equal steps in t give differences within a factor of 2.
	for name, s := range map[string]*Scale{"depth": DepthScale(), "diverging": DivergingScale()} {
		const n = 16
		lo, hi := math.Inf(1), 0.0
		for i := 0; i < n; i++ {
			d := deltaE2000(s.At(float64(i)/n), s.At(float64(i+1)/n))
			lo, hi = math.Min(lo, d), math.Max(hi, d)
		}
		if testing.Verbose() {
			for i := 0; i < n; i++ {
				t.Logf("%s step %d: %.2f", name, i, deltaE2000(s.At(float64(i)/n), s.At(float64(i+1)/n)))
			}
		}
		if hi > 2*lo {
			t.Errorf("%s: steps of dE2000 from %.2f to %.2f", name, lo, hi)
		}
		// The no-value colour must not be mistaken for the scale's ends.
		if d := math.Min(deltaE76(s.Neutral, s.At(0)), deltaE76(s.Neutral, s.At(1))); d < 10 {
			t.Errorf("%s: neutral colour only dE76 %.1f from an end of the scale", name, d)
		}
	}
}

func TestDivergingScaleLightestInTheMiddle(t *testing.T) {
	s := DivergingScale()
	mid, _, _ := cieLab(s.At(0.5))
	for _, t0 := range []float64{0, 0.25, 0.75, 1} {
		if L, _, _ := cieLab(s.At(t0)); !(L < mid) {
			t.Errorf("L* at %.2f = %.1f, not below the middle's %.1f", t0, L, mid)
		}
	}
	if s.At(math.NaN()) != s.Neutral {
		t.Error("NaN does not map to the neutral colour")
	}
}

// TestDepthScaleAvoidsFileColours: no colour of the depth-of-cut scale may be read as a file's
// size colour. The ISO 3630-1 size colours (pink, grey, purple, white, yellow, red, blue, green,
// black; from memory, as the CSS named colours) are compared in CIE L*a*b* (CIE 15): every
// chromatic step of the scale keeps its hue angle at least 30 degrees from each chromatic size
// colour's, and every step is at least CIEDE2000 15 from every size colour.
func TestDepthScaleAvoidsFileColours(t *testing.T) {
	iso := map[string]color.RGBA{
		"pink": {0xFF, 0xC0, 0xCB, 255}, "grey": {0x80, 0x80, 0x80, 255}, "purple": {0x80, 0x00, 0x80, 255},
		"white": {0xFF, 0xFF, 0xFF, 255}, "yellow": {0xFF, 0xFF, 0x00, 255}, "red": {0xFF, 0x00, 0x00, 255},
		"blue": {0x00, 0x00, 0xFF, 255}, "green": {0x00, 0x80, 0x00, 255}, "black": {0, 0, 0, 255},
	}
	hue := func(c color.RGBA) (h, chroma float64) {
		_, a, b := cieLab(c)
		return math.Mod(math.Atan2(b, a)*180/math.Pi+360, 360), math.Hypot(a, b)
	}
	s := DepthScale()
	for i := 0; i <= 32; i++ {
		c := s.At(float64(i) / 32)
		h, ch := hue(c)
		for name, f := range iso {
			if d := deltaE2000(c, f); d < 15 {
				t.Errorf("t=%.2f %v is only dE2000 %.1f from the %s file colour", float64(i)/32, c, d, name)
			}
			fh, fch := hue(f)
			if ch < 10 || fch < 10 {
				continue
			}
			if d := math.Abs(math.Remainder(h-fh, 360)); d < 30 {
				t.Errorf("t=%.2f %v: hue %.0f° is %.0f° from the %s file colour's %.0f°", float64(i)/32, c, h, d, name, fh)
			}
		}
	}
}
