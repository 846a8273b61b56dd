package analysis

import (
	"math"

	"tapersweep/mesh/parallel"
)

// Reach certificates let stationFinder.nearest look at only the 2*reachWindow+1 stations
// around the hint h when the point p lies close to h: along the line's direction there (u)
// no farther than `along`, across it no farther than reach[h]. Then every station j outside
// that window is surely farther from p than station h, so the nearest is inside it.
//
// Why (v = p - p_h, w = p_j - p_h, a = w.u, b = |w - a u|, T = along): |p - p_j|^2 - |v|^2 =
// |w|^2 - 2 v.w >= |w|^2 - 2 T |a| - 2 |v_across| b = num - 2 |v_across| b. With |v_across| at
// most num / (4 b) this is at least num / 2; reach[h] is the least such bound over the
// stations outside the window, no more than keeps num / 2 above 1e-6 |v|^2 (so station j is
// farther by far more than Len's rounding, never as near), and reachCap. A station whose
// distance from p_h is at least 4 reachCap + 2 T has num / (4 b) >= reachCap whatever its
// direction, so stretches of such stations are skipped as the finder's walk skips (a station
// k steps away is at most k longest segments nearer). Every computed quantity carries a
// margin well above its rounding (1e-9 relative, 1e-7 |w| on b, which comes from a difference
// of squares).
const (
	reachWindow = 3
	// reachCap is the largest reach looked for, mm: about a wide canal's half-width at its
	// orifice, so most wall vertices fall within it; a point farther out takes the full
	// search (the same answer, found more slowly). A larger cap costs more to build.
	reachCap = 1.0
	// reachMargin is how much farther (as a share of the squared distance) every station
	// outside the window must surely be.
	reachMargin = 1e-6
	// reachVisits bounds the stations looked at one by one for one certificate (a canal's
	// line has about 170 within 4 reachCap at 0.05 mm steps): a line coiled on itself gets
	// no certificates rather than a build that grows with the square of its stations.
	reachVisits = 512
)

// buildReach makes the reach certificates (on workers goroutines; 0: all cores). A station
// where the line turns back too near (no window of stations clears the point), with no
// direction (repeated stations), or with too many stations near it, gets none and its
// queries take the full search.
func (f *stationFinder) buildReach(workers int) {
	pts := f.pts
	n := len(pts)
	if n < 2*reachWindow+2 || f.perStep == 0 {
		return
	}
	length := 0.0
	for i := 1; i < n; i++ {
		length += pts[i].Sub(pts[i-1]).Len()
	}
	// A point's nearest station is usually its hint's neighbour at most: along is one and a
	// half mean steps.
	f.along = 1.5 * length / float64(n-1)
	T := f.along * (1 + 1e-9)
	far := (4*reachCap + 2*T) * (1 + 1e-9)
	f.axis = make([][3]float64, n)
	f.reach2 = make([]float64, n)
	parallel.For(workers, n, func(_, h int) {
		f.reach2[h] = -1
		hx, hy, hz := pts[h][0], pts[h][1], pts[h][2]
		a, b := &pts[max(h-1, 0)], &pts[min(h+1, n-1)]
		ux, uy, uz := b[0]-a[0], b[1]-a[1], b[2]-a[2]
		l := math.Sqrt(ux*ux + uy*uy + uz*uz)
		if !(l > 0) || math.IsInf(l, 0) {
			return
		}
		ux, uy, uz = ux/l, uy/l, uz/l
		f.axis[h] = [3]float64{ux, uy, uz}
		reach, numMin, visits := reachCap, math.Inf(1), 0
		// visit bounds reach by station j and returns how many stations after it (in the
		// direction of travel) are surely as far from p_h as `far`, or -1 when no
		// certificate can be had.
		visit := func(j int) int {
			wx, wy, wz := pts[j][0]-hx, pts[j][1]-hy, pts[j][2]-hz
			ww := wx*wx + wy*wy + wz*wz
			dist := math.Sqrt(ww)
			if dist >= far {
				numMin = min(numMin, far*(far-2*T))
				return int(min((dist-far)*f.perStep, float64(n)))
			}
			if visits++; visits > reachVisits {
				return -1
			}
			along := math.Abs(wx*ux + wy*uy + wz*uz)
			across := math.Sqrt(max(0, ww-along*along)) + 1e-7*dist
			num := ww - 2*T*along
			num -= 1e-9 * (ww + 2*T*along)
			if !(num > 0) {
				return -1
			}
			numMin = min(numMin, num)
			reach = min(reach, num/(4*across))
			return 0
		}
		lo, hi := max(h-reachWindow, 0), min(h+reachWindow+1, n)
		for j := 0; j < lo; {
			k := visit(j)
			if k < 0 {
				return
			}
			j += 1 + k
		}
		for j := n - 1; j >= hi; {
			k := visit(j)
			if k < 0 {
				return
			}
			j -= 1 + k
		}
		// Keep reachMargin |v|^2 (|v|^2 <= T^2 + reach^2) within numMin / 4.
		if room := numMin/(4*reachMargin) - T*T; room > 0 {
			reach = min(reach, math.Sqrt(room))
		} else {
			return
		}
		// Too small a reach next to T would leave the across test within its own rounding.
		if reach < 0.01*T {
			return
		}
		f.reach2[h] = reach * reach * (1 - 1e-9)
	})
}

// certified reports whether p (with p - p_h = -(dx, dy, dz), squared length sq as summed for
// Len) lies within station h's reach certificate.
func (f *stationFinder) certified(h int, dx, dy, dz, sq float64) bool {
	u := &f.axis[h]
	vt := dx*u[0] + dy*u[1] + dz*u[2]
	return vt <= f.along && -vt <= f.along && sq-vt*vt <= f.reach2[h]
}
