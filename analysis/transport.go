package analysis

import (
	"math"
	"strconv"
)

// Gambill's measures (Gambill JM, Alder M, del Rio CE, J Endod 1996;22:369-375): with m1, m2
// the distances from one side of the canal to the root's edge before and after preparation,
// and d1, d2 the same on the opposite side, transportation = (m1 - m2) - (d1 - d2) and the
// centring ratio is the smaller of (m1 - m2) and (d1 - d2) over the larger (1 = centred).
func Gambill(m1, m2, d1, d2 float64) (transportation float64, centering *float64) {
	a, b := m1-m2, d1-d2
	transportation = a - b
	lo, hi := math.Min(a, b), math.Max(a, b)
	if hi <= 0 {
		return transportation, nil // nothing removed on either side: no ratio
	}
	r := lo / hi
	return transportation, &r
}

// transportLevels are the distances from the apical end, mm, at which transportation is stated.
var transportLevels = [...]float64{1, 3, 5}

// TransportLevels returns the distances from the apical end, mm, at which transportation is
// stated (a fresh copy).
func TransportLevels() []float64 { return append([]float64(nil), transportLevels[:]...) }

// Transport is how a preparation moved the canal: Gambill's measures at 1, 3 and 5 mm from the
// apical end (keyed "1", "3", "5"), the shift of the canal's centre at the apical end, and where
// the largest transportation lies and toward which side (degrees about the axis, 0 = the inner
// side of the main curve, turning right-handed toward the apex).
type Transport struct {
	TransportationMM map[string]float64  `json:"transportation_mm"`
	CenteringRatio   map[string]*float64 `json:"centering_ratio"`
	ForamenShiftMM   float64             `json:"foramen_shift_mm"`
	Largest          TransportPlace      `json:"largest_transportation"`
}

// TransportPlace is one transportation with its place and direction.
type TransportPlace struct {
	MM         float64 `json:"mm"`
	FromApexMM float64 `json:"from_apex_mm"`
	TowardDeg  float64 `json:"toward_deg"`
}

// transportBetween compares two states of the canal (radius maps). The wall removed on the
// inner and outer side of the main curve gives transportation in its plane; the two sides across
// it give the other component; the size is their combination and the centring ratio is the one
// in the plane of the curve, where files move the canal.
func transportBetween(c *Canal, from, to []float32) Transport {
	tr := Transport{TransportationMM: map[string]float64{}, CenteringRatio: map[string]*float64{}}
	L := c.Line.Length()
	for _, x := range transportLevels {
		key := strconv.FormatFloat(x, 'f', -1, 64)
		if x >= L {
			tr.TransportationMM[key] = 0
			tr.CenteringRatio[key] = nil
			continue
		}
		mag, _, r := transportAt(c, from, to, L-x)
		tr.TransportationMM[key] = round(mag, 4)
		if r != nil {
			v := round(*r, 3)
			r = &v
		}
		tr.CenteringRatio[key] = r
	}
	for i := range c.Line.S {
		s := c.Line.S[i]
		if mag, toward, _ := transportAt(c, from, to, s); mag > tr.Largest.MM {
			tr.Largest = TransportPlace{MM: round(mag, 4), FromApexMM: round(L-s, 3), TowardDeg: round(toward, 1)}
		}
	}
	tr.ForamenShiftMM = round(centreShift(c, from, to, math.Max(0, L-0.1)), 4)
	return tr
}

// transportAt is the transportation at arc length s between two states of the canal: its size,
// the side it moves toward (degrees, 0 = inner side of the main curve) and the centring ratio
// in the plane of the curve (nil when neither side lost wall).
func transportAt(c *Canal, from, to []float32, s float64) (mag, toward float64, ratio *float64) {
	removed := func(th float64) float64 { return c.MapAt(to, s, th) - c.MapAt(from, s, th) }
	// m1 - m2 is the wall taken off one side (the root's outer edge does not move), so
	// with m1 = 0, m2 = -removed; a positive result moves the canal toward theta = 0
	// (in the plane) or theta = 90 degrees (across).
	inPlane, r := Gambill(0, -removed(0), 0, -removed(math.Pi))
	across, _ := Gambill(0, -removed(math.Pi/2), 0, -removed(3*math.Pi/2))
	return math.Hypot(inPlane, across), math.Mod(mgl360(math.Atan2(across, inPlane)), 360), r
}

func mgl360(rad float64) float64 {
	d := rad * 180 / math.Pi
	if d < 0 {
		d += 360
	}
	return d
}

// centreShift is how far the area centroid of the canal's cross-section at s moved.
func centreShift(c *Canal, from, to []float32, s float64) float64 {
	centroid := func(m []float32) (float64, float64) {
		n := c.Angles
		xs, ys := make([]float64, n), make([]float64, n)
		for j := 0; j < n; j++ {
			th := 2 * math.Pi * float64(j) / float64(n)
			r := c.MapAt(m, s, th)
			xs[j], ys[j] = r*math.Cos(th), r*math.Sin(th)
		}
		x, y, _ := polygonCentroid(xs, ys)
		return x, y
	}
	x0, y0 := centroid(from)
	x1, y1 := centroid(to)
	return math.Hypot(x1-x0, y1-y0)
}
