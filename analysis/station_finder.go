package analysis

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// stationFinder finds the station nearest a point. A point within its hint station's reach
// certificate (station_reach.go) needs only the 7 stations around the hint. Otherwise it
// walks the line: no station can be nearer than a station's distance minus its step count
// times the longest segment, so from a station far from the point whole stretches of the line
// are skipped at once, and only the stations near the point are looked at one by one (about
// twenty per query, where cells of space held a hundred).
type stationFinder struct {
	pts []mgl64.Vec3
	// perStep is one over a bound from above of every segment's length (rounding included):
	// a station k steps from another is at most k/perStep from it.
	perStep float64
	// Reach certificates (station_reach.go; nil until buildReach): each station's unit
	// direction, the squared reach across the line (negative: none), and the reach along it.
	axis   [][3]float64
	reach2 []float64
	along  float64
}

func newStationFinder(pts []mgl64.Vec3) *stationFinder {
	step := 0.0
	for i := 1; i < len(pts); i++ {
		step = max(step, pts[i].Sub(pts[i-1]).Len())
	}
	f := &stationFinder{pts: pts}
	if step > 0 {
		f.perStep = 1 / (step * (1 + 1e-9))
	}
	return f
}

// nearest is the station nearest p, the lowest index among equally near ones (distances as
// Vec3.Len gives them). hint (or -1) is a station likely to be near (the answer for a
// neighbouring point): it only makes the search quicker, never changes the answer.
func (f *stationFinder) nearest(p *mgl64.Vec3, hint int) int {
	pts := f.pts
	n := len(pts)
	px, py, pz := p[0], p[1], p[2]
	// sq is a station's squared distance, summed as Vec3.Len sums it (its root is Len's).
	sq := func(i int) float64 {
		q := &pts[i]
		dx, dy, dz := q[0]-px, q[1]-py, q[2]-pz
		return dx*dx + dy*dy + dz*dz
	}
	// A point within the hint's reach certificate has its nearest among the few stations
	// around the hint (compared in rising order, as below).
	if hint >= 0 && f.reach2 != nil && f.reach2[hint] >= 0 {
		lo, hi := max(hint-reachWindow, 0), min(hint+reachWindow+1, n)
		best, bsq := 0, math.Inf(1)
		var hx, hy, hz, hsq float64
		for i := lo; i < hi; i++ {
			q := &pts[i]
			dx, dy, dz := q[0]-px, q[1]-py, q[2]-pz
			d := dx*dx + dy*dy + dz*dz
			if i == hint {
				hx, hy, hz, hsq = dx, dy, dz, d
			}
			if lenLess(d, bsq) {
				best, bsq = i, d
			}
		}
		if f.certified(hint, hx, hy, hz, hsq) {
			return best
		}
	}
	best, bsq := 0, math.Inf(1)
	// The stations around the hint one by one (independent, so the processor overlaps them),
	// compared by their squares: in rising order a station replaces the best only when
	// nearer, which the squares tell without roots unless they are within rounding.
	lo, hi := 0, 0
	if hint >= 0 {
		lo, hi = max(hint-stationWindow, 0), min(hint+stationWindow+1, n)
		win := pts[lo:hi]
		for i := range win {
			q := &win[i]
			dx, dy, dz := q[0]-px, q[1]-py, q[2]-pz
			if d := dx*dx + dy*dy + dz*dz; lenLess(d, bsq) {
				best, bsq = lo+i, d
			}
		}
	}
	// Then the rest of the line from both ends toward them, skipping stations surely farther
	// than the best so far (the margin covers rounding: a skipped station is farther, never
	// as near).
	bd := math.Sqrt(bsq)
	consider := func(i int, d float64) {
		if d < bd || (d == bd && i < best) {
			best, bd = i, d
		}
	}
	skip := func(d float64) int {
		if gap := d - bd - 1e-9*(d+bd) - 1e-12; gap > 0 && f.perStep > 0 {
			return int(min(gap*f.perStep, float64(n)))
		}
		return 0
	}
	for i := 0; i < lo; {
		d := math.Sqrt(sq(i))
		consider(i, d)
		i += 1 + skip(d)
	}
	for i := n - 1; i >= hi; {
		d := math.Sqrt(sq(i))
		consider(i, d)
		i -= 1 + skip(d)
	}
	return best
}

// stationWindow is how many stations on either side of the hint are looked at one by one.
const stationWindow = 8

// lenLess reports whether math.Sqrt(a) < math.Sqrt(b), for a and b not negative, taking the
// roots only when the squares are too close for their order to tell (the roots of two squares
// within rounding may be equal).
func lenLess(a, b float64) bool {
	if !(a < b) {
		return false
	}
	// A square below (1 - 4e-15) times a normal one has a root below the other's by more than
	// the two roots' rounding (each within 2^-53 of the true root).
	return a < b*(1-4e-15) && b >= 0x1p-1000 || math.Sqrt(a) < math.Sqrt(b)
}
