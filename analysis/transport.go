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

// Transport is how a preparation moved the canal, stated at 1, 3 and 5 mm from the apical end
// (maps keyed "1", "3", "5"), with the shift of the canal's centre at the apical end and where
// the largest transportation lies and toward which side.
//
// Gambill's transportation along a line across the canal is the wall removed on one side less
// the wall removed on the other: twice the shift of the midpoint between the two walls (for a
// round canal widened on one side, twice the shift of its centre). It is stated in the plane of
// the main curve (signed: + toward its inner side, theta = 0) and across it (+ toward
// theta = 90 degrees, right-handed about the tangent toward the apex); TransportationMM is their
// combination. The centring ratio is stated in both planes and along the direction of transport
// (CenteringRatio): a canal moved straight across the plane of the curve reads a ratio below 1
// there, whatever its sides in the plane did.
type Transport struct {
	TransportationMM        map[string]float64  `json:"transportation_mm"`
	TransportationInPlaneMM map[string]float64  `json:"transportation_in_plane_mm"`
	TransportationAcrossMM  map[string]float64  `json:"transportation_across_mm"`
	CenteringRatio          map[string]*float64 `json:"centering_ratio"`
	CenteringRatioInPlane   map[string]*float64 `json:"centering_ratio_in_plane"`
	CenteringRatioAcross    map[string]*float64 `json:"centering_ratio_across"`
	// CentreShiftMM is how far the area centroid of the canal's cross-section moved.
	CentreShiftMM  map[string]float64 `json:"centre_shift_mm"`
	ForamenShiftMM float64            `json:"foramen_shift_mm"`
	Largest        TransportPlace     `json:"largest_transportation"`
}

// TransportPlace is one transportation with its place and direction.
type TransportPlace struct {
	MM         float64 `json:"mm"`
	FromApexMM float64 `json:"from_apex_mm"`
	// TowardDeg is the side it moves toward, in [0, 360): 0 is the inner side of the main curve.
	TowardDeg float64 `json:"toward_deg"`
}

// transportBetween compares two states of the canal (radius maps).
func transportBetween(c *Canal, from, to []float32) Transport {
	tr := Transport{TransportationMM: map[string]float64{}, TransportationInPlaneMM: map[string]float64{},
		TransportationAcrossMM: map[string]float64{}, CenteringRatio: map[string]*float64{},
		CenteringRatioInPlane: map[string]*float64{}, CenteringRatioAcross: map[string]*float64{},
		CentreShiftMM: map[string]float64{}}
	L := c.Line.Length()
	dirs := newCentroidDirections(c)
	ratio := func(r *float64) *float64 {
		if r == nil {
			return nil
		}
		v := round(*r, 3)
		return &v
	}
	for _, x := range transportLevels {
		key := strconv.FormatFloat(x, 'f', -1, 64)
		if x >= L {
			tr.TransportationMM[key], tr.TransportationInPlaneMM[key], tr.TransportationAcrossMM[key] = 0, 0, 0
			tr.CentreShiftMM[key] = 0
			tr.CenteringRatio[key], tr.CenteringRatioInPlane[key], tr.CenteringRatioAcross[key] = nil, nil, nil
			continue
		}
		at := transportAt(c, from, to, L-x)
		tr.TransportationMM[key] = round(at.size(), 4)
		tr.TransportationInPlaneMM[key] = round(at.inPlane, 4)
		tr.TransportationAcrossMM[key] = round(at.across, 4)
		tr.CenteringRatio[key] = ratio(at.ratioAlong)
		tr.CenteringRatioInPlane[key] = ratio(at.ratioInPlane)
		tr.CenteringRatioAcross[key] = ratio(at.ratioAcross)
		tr.CentreShiftMM[key] = round(dirs.centreShift(c, from, to, L-x), 4)
	}
	largest := largestTransport(c, from, to)
	if largest.mag > 0 {
		tr.Largest = TransportPlace{MM: round(largest.mag, 4), FromApexMM: round(L-c.Line.S[largest.station], 3),
			TowardDeg: towardDeg(largest.inPlane, largest.across)}
	}
	tr.ForamenShiftMM = round(dirs.centreShift(c, from, to, math.Max(0, L-0.1)), 4)
	return tr
}

// transportSample is Gambill's transportation at one place: signed in the plane of the main
// curve and across it, and the centring ratios (nil where neither side lost wall).
type transportSample struct {
	inPlane, across                       float64
	ratioInPlane, ratioAcross, ratioAlong *float64
}

func (t transportSample) size() float64 { return math.Hypot(t.inPlane, t.across) }

// transportAt is the transportation at arc length s between two states of the canal.
func transportAt(c *Canal, from, to []float32, s float64) transportSample {
	removed := func(th float64) float64 { return c.MapAt(to, s, th) - c.MapAt(from, s, th) }
	// m1 - m2 is the wall taken off one side (the root's outer edge does not move), so with
	// m1 = 0, m2 = -removed; a positive result moves the canal toward the first side.
	var t transportSample
	t.inPlane, t.ratioInPlane = Gambill(0, -removed(0), 0, -removed(math.Pi))
	t.across, t.ratioAcross = Gambill(0, -removed(math.Pi/2), 0, -removed(3*math.Pi/2))
	t.ratioAlong = t.ratioInPlane
	if t.size() > 0 {
		th := math.Atan2(t.across, t.inPlane)
		_, t.ratioAlong = Gambill(0, -removed(th), 0, -removed(th+math.Pi))
	}
	return t
}

// largestPlace is the station where Gambill's transportation is largest.
type largestPlace struct {
	station              int
	mag, inPlane, across float64
}

// largestTransport scans every station, reading the maps at the four directions of the two
// planes directly where they are directions of the map (its number of angles a multiple of 4).
func largestTransport(c *Canal, from, to []float32) largestPlace {
	var best largestPlace
	na := c.Angles
	for i, s := range c.Line.S {
		var in, ac float64
		if na%4 == 0 {
			row := i * na
			rm := func(j int) float64 { return float64(to[row+j]) - float64(from[row+j]) }
			in = rm(0) - rm(na/2)
			ac = rm(na/4) - rm(3*na/4)
		} else {
			at := transportAt(c, from, to, s)
			in, ac = at.inPlane, at.across
		}
		if mag := math.Hypot(in, ac); mag > best.mag {
			best = largestPlace{station: i, mag: mag, inPlane: in, across: ac}
		}
	}
	return best
}

// towardDeg is the direction of a transportation, degrees in [0, 360) after rounding to 0.1.
func towardDeg(inPlane, across float64) float64 {
	d := round(math.Mod(math.Atan2(across, inPlane)*180/math.Pi+360, 360), 1)
	if d >= 360 {
		d -= 360
	}
	return d
}

// centroidDirections are the directions a cross-section's area centroid is taken along: the
// map's own angles, each with its place in the map and its cosine and sine, found once for
// every section compared.
type centroidDirections struct {
	place    []mapPlace
	cos, sin []float64
}

func newCentroidDirections(c *Canal) centroidDirections {
	n := c.Angles
	d := centroidDirections{place: make([]mapPlace, n), cos: make([]float64, n), sin: make([]float64, n)}
	for j := 0; j < n; j++ {
		th := 2 * math.Pi * float64(j) / float64(n)
		d.place[j] = c.anglePlace(th)
		d.cos[j], d.sin[j] = math.Cos(th), math.Sin(th)
	}
	return d
}

// centreShift is how far the area centroid of the canal's cross-section at s moved.
func (d centroidDirections) centreShift(c *Canal, from, to []float32, s float64) float64 {
	st := c.stationPlace(s)
	n := len(d.place)
	xs, ys := make([]float64, n), make([]float64, n)
	centroid := func(m []float32) (float64, float64) {
		for j, an := range d.place {
			r := c.mapAt(m, st, an)
			xs[j], ys[j] = r*d.cos[j], r*d.sin[j]
		}
		x, y, _ := polygonCentroid(xs, ys)
		return x, y
	}
	x0, y0 := centroid(from)
	x1, y1 := centroid(to)
	return math.Hypot(x1-x0, y1-y0)
}
