package render

import (
	"image/color"
	"math"
)

// Scale maps t in 0..1 to a colour. Built in OKLab so equal steps in t look like equal
// steps in colour; Neutral is the separate colour for "no value" (no contact).
type Scale struct {
	lut     [256]color.RGBA
	Neutral color.RGBA
}

// DepthScale is a sequential scale for depth of cut: a light teal (shallow) through teal to a
// deep petrol (deep), lightness falling steadily. Its hues (about 190 to 215 degrees in OKLCh)
// lie in the widest gap between the ISO 3630-1 size colours (green and blue), so no file's
// colour reads as cutting; its neutral is a light warm grey.
func DepthScale() *Scale {
	return newSequential(
		func(t float64) (l, c, h float64) {
			// The shallowest contact is already a clear teal, never mistaken for the neutral
			// wall: lightness starts below the neutral's and chroma well above it.
			l = 0.84 - 0.50*t
			c = 0.085 + 0.04*math.Sin(math.Pi*t)
			h = 190 + 25*t
			return
		},
		okLabToSRGB(0.87, 0.006, 0.014),
	)
}

// WallScale is a sequential scale for the wall left to the root's outer surface: a strong
// red-orange where it is thinnest (t = 0) through ochre to a pale sand where it is thick, hues
// (about 30 to 85 degrees in OKLCh) clear of the depth-of-cut scale's teal.
func WallScale() *Scale {
	return newSequential(
		func(t float64) (l, c, h float64) {
			l = 0.52 + 0.40*t
			c = 0.17 - 0.13*t
			h = 30 + 55*t
			return
		},
		okLabToSRGB(0.87, 0.006, 0.014),
	)
}

// DivergingScale runs from a blue (t = 0) through a light neutral (t = 0.5) to a red
// (t = 1), lightness rising to the middle and falling after it; for signed values such
// as curvature relative to a reference.
func DivergingScale() *Scale {
	return newSequential(
		func(t float64) (l, c, h float64) {
			u := math.Abs(2*t - 1)
			l = 0.95 - 0.50*u
			c = 0.16 * u
			h = 255
			if t > 0.5 {
				h = 30
			}
			return
		},
		okLabToSRGB(0.87, 0.006, 0.014),
	)
}

// newSequential samples path (OKLCh, hue in degrees) finely, pulls each sample's chroma
// into the sRGB gamut, and re-spaces the table by distance travelled in OKLab so the
// colour changes at an even pace.
func newSequential(path func(t float64) (l, c, h float64), neutral color.RGBA) *Scale {
	const fine = 2048
	var lab [fine + 1][3]float64
	var dist [fine + 1]float64
	for i := 0; i <= fine; i++ {
		l, c, h := path(float64(i) / fine)
		lab[i] = inGamut(l, c, h*math.Pi/180)
		if i > 0 {
			d := 0.0
			for k := 0; k < 3; k++ {
				d += (lab[i][k] - lab[i-1][k]) * (lab[i][k] - lab[i-1][k])
			}
			dist[i] = dist[i-1] + math.Sqrt(d)
		}
	}
	s := &Scale{Neutral: neutral}
	j := 0
	for i := range s.lut {
		target := dist[fine] * float64(i) / float64(len(s.lut)-1)
		for j < fine-1 && dist[j+1] < target {
			j++
		}
		f := 0.0
		if seg := dist[j+1] - dist[j]; seg > 0 {
			f = math.Min(1, math.Max(0, (target-dist[j])/seg))
		}
		var p [3]float64
		for k := 0; k < 3; k++ {
			p[k] = lab[j][k] + (lab[j+1][k]-lab[j][k])*f
		}
		s.lut[i] = okLabToSRGB(p[0], p[1], p[2])
	}
	return s
}

// inGamut returns the OKLab point of lightness l and hue h with the largest chroma up to c
// that sRGB can show (bisection on chroma).
func inGamut(l, c, h float64) [3]float64 {
	sh, ch := math.Sincos(h)
	if r, g, b := okLabToLinear(l, c*ch, c*sh); inUnit(r, g, b) {
		return [3]float64{l, c * ch, c * sh}
	}
	lo, hi := 0.0, c
	for range 40 {
		mid := (lo + hi) / 2
		if r, g, b := okLabToLinear(l, mid*ch, mid*sh); inUnit(r, g, b) {
			lo = mid
		} else {
			hi = mid
		}
	}
	return [3]float64{l, lo * ch, lo * sh}
}

func inUnit(r, g, b float64) bool {
	const e = 1e-9
	return r >= -e && r <= 1+e && g >= -e && g <= 1+e && b >= -e && b <= 1+e
}

// At returns the colour at t (clamped to 0..1); NaN gives Neutral.
func (s *Scale) At(t float64) color.RGBA {
	if math.IsNaN(t) {
		return s.Neutral
	}
	t = math.Max(0, math.Min(1, t))
	return s.lut[int(t*float64(len(s.lut)-1)+0.5)]
}

// Lightness returns the CIE 1976 L* (0..100) of the colour at t.
func (s *Scale) Lightness(t float64) float64 { return Lightness(s.At(t)) }

// Lightness returns the CIE 1976 L* (0..100) of an sRGB colour (IEC 61966-2-1, D65 white).
func Lightness(c color.RGBA) float64 {
	y := 0.2126*srgbToLinear(c.R) + 0.7152*srgbToLinear(c.G) + 0.0722*srgbToLinear(c.B)
	if y > 216.0/24389 {
		return 116*math.Cbrt(y) - 16
	}
	return y * 24389 / 27
}

func srgbToLinear(v uint8) float64 {
	c := float64(v) / 255
	if c <= 0.04045 {
		return c / 12.92
	}
	return math.Pow((c+0.055)/1.055, 2.4)
}

func linearToSRGB(c float64) uint8 {
	c = math.Max(0, math.Min(1, c))
	if c <= 0.0031308 {
		c *= 12.92
	} else {
		c = 1.055*math.Pow(c, 1/2.4) - 0.055
	}
	return uint8(math.Round(c * 255))
}

// okLabToLinear converts OKLab to linear sRGB (Ottosson's published matrices, 2020).
func okLabToLinear(L, a, b float64) (r, g, bl float64) {
	l := L + 0.3963377774*a + 0.2158037573*b
	m := L - 0.1055613458*a - 0.0638541728*b
	s := L - 0.0894841775*a - 1.2914855480*b
	l, m, s = l*l*l, m*m*m, s*s*s
	r = 4.0767416621*l - 3.3077115913*m + 0.2309699292*s
	g = -1.2684380046*l + 2.6097574011*m - 0.3413193965*s
	bl = -0.0041960863*l - 0.7034186147*m + 1.7076147010*s
	return
}

func okLabToSRGB(L, a, b float64) color.RGBA {
	r, g, bl := okLabToLinear(L, a, b)
	return color.RGBA{linearToSRGB(r), linearToSRGB(g), linearToSRGB(bl), 255}
}
