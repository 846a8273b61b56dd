package analysis

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
	"tapersweep/mesh/parallel"
)

// buildRadiusMap casts, from every station, one ray per angle in the normal plane and keeps the
// distance to the first wall hit. A ray that finds no wall (a hole, or the very end of the
// canal) takes the value of the nearest station that found one. It returns whether rays
// from inside the canal missed the wall (the surface has holes).
func (c *Canal) buildRadiusMap(workers int) (holes bool) {
	n, na := c.Line.Len(), c.Angles
	c.Rho = make([]float32, n*na)
	cs, sn := make([]float64, na), make([]float64, na)
	for j := 0; j < na; j++ {
		th := 2 * math.Pi * float64(j) / float64(na)
		cs[j], sn[j] = math.Cos(th), math.Sin(th)
	}
	reach := 4 * c.Line.Length() // the measures' length, which may not be ready
	ts := make([][]float64, parallel.Workers(workers, n))
	casters := make([]mesh.FanCaster, len(ts))
	parallel.For(workers, n, func(w, i int) {
		if ts[w] == nil {
			ts[w] = make([]float64, na)
			casters[w].BVH = c.Wall
		}
		casters[w].Cast(c.Line.Points[i], c.Line.N1[i], c.Line.N2[i], cs, sn, reach, ts[w])
		for j, t := range ts[w] {
			c.Rho[i*na+j] = float32(t) // -1 where no wall was found
		}
	})
	// The end stations lie on the end caps, where rays graze the cap itself: they take the
	// wall of their inner neighbours.
	L, zone := c.Line.Length(), 0.6*c.Line.DS
	first, last := 0, n-1
	for first < n-1 && c.Line.S[first] < zone {
		first++
	}
	for last > first && c.Line.S[last] > L-zone {
		last--
	}
	for i := 0; i < first; i++ {
		copy(c.Rho[i*na:(i+1)*na], c.Rho[first*na:(first+1)*na])
	}
	for i := last + 1; i < n; i++ {
		copy(c.Rho[i*na:(i+1)*na], c.Rho[last*na:(last+1)*na])
	}
	missing := 0
	for j := 0; j < na; j++ {
		for i := 0; i < n; i++ {
			if c.Rho[i*na+j] >= 0 {
				continue
			}
			missing++
			for d := 1; d < n; d++ {
				if i-d >= 0 && c.Rho[(i-d)*na+j] >= 0 {
					c.Rho[i*na+j] = c.Rho[(i-d)*na+j]
					break
				}
				if i+d < n && c.Rho[(i+d)*na+j] >= 0 {
					c.Rho[i*na+j] = c.Rho[(i+d)*na+j]
					break
				}
			}
			if c.Rho[i*na+j] < 0 {
				c.Rho[i*na+j] = 0
			}
		}
	}
	// Misses inside the canal mean the wall has a hole.
	return missing > na/4
}

// placeVertices gives every wall vertex its own (s, theta): the nearest point of the
// centerline, refined onto the neighbouring segment, and the angle in that station's frame.
func (c *Canal) placeVertices(workers int) {
	line := c.Line
	nv := len(c.Mesh.Vertices)
	c.VertexS = make([]float32, nv)
	c.VertexTheta = make([]float32, nv)
	stations := newStationFinder(line.Points)
	// Each worker takes runs of neighbouring vertices: the last one's station is a good start.
	// (Padded to a cache line each, so the workers do not fight over one.)
	last := make([]struct {
		i int
		_ [56]byte
	}, parallel.Workers(workers, nv))
	for w := range last {
		last[w].i = -1
	}
	parallel.For(workers, nv, func(w, v int) {
		p := c.Mesh.Vertices[v]
		i := stations.nearest(p, last[w].i)
		last[w].i = i
		s := line.S[i]
		// Refine onto the segment on either side.
		best := math.Inf(1)
		for _, k := range []int{i - 1, i} {
			if k < 0 || k+1 >= line.Len() {
				continue
			}
			a, b := line.Points[k], line.Points[k+1]
			ab := b.Sub(a)
			t := math.Max(0, math.Min(1, p.Sub(a).Dot(ab)/ab.Dot(ab)))
			if d := p.Sub(a.Add(ab.Mul(t))).Len(); d < best {
				best = d
				s = line.S[k] + t*(line.S[k+1]-line.S[k])
			}
		}
		q, _, n1, n2 := line.At(s)
		d := p.Sub(q)
		th := math.Atan2(d.Dot(n2), d.Dot(n1))
		if th < 0 {
			th += 2 * math.Pi
		}
		c.VertexS[v] = float32(s)
		c.VertexTheta[v] = float32(th)
	})
}

// stationFinder finds the station nearest a point by walking the line: no station can be
// nearer than a station's distance minus its step count times the longest segment, so from a
// station far from the point whole stretches of the line are skipped at once, and only the
// stations near the point are looked at one by one (a few dozen per query, where cells of
// space held a hundred).
type stationFinder struct {
	pts []mgl64.Vec3
	// perStep is one over a bound from above of every segment's length (rounding included):
	// a station k steps from another is at most k/perStep from it.
	perStep float64
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
func (f *stationFinder) nearest(p mgl64.Vec3, hint int) int {
	pts := f.pts
	n := len(pts)
	dist := func(i int) float64 { return pts[i].Sub(p).Len() }
	best, bd := 0, math.Inf(1)
	consider := func(i int, d float64) {
		if d < bd || (d == bd && i < best) {
			best, bd = i, d
		}
	}
	// The stations around the hint one by one (independent, so the processor overlaps them),
	// then the rest of the line from both ends toward them, skipping stations surely farther
	// than the best so far (the margin covers rounding: a skipped station is farther, never
	// as near).
	lo, hi := 0, 0
	if hint >= 0 {
		lo, hi = max(hint-stationWindow, 0), min(hint+stationWindow+1, n)
		for i := lo; i < hi; i++ {
			consider(i, dist(i))
		}
	}
	skip := func(d float64) int {
		if gap := d - bd - 1e-9*(d+bd) - 1e-12; gap > 0 && f.perStep > 0 {
			return int(min(gap*f.perStep, float64(n)))
		}
		return 0
	}
	for i := 0; i < lo; {
		d := dist(i)
		consider(i, d)
		i += 1 + skip(d)
	}
	for i := n - 1; i >= hi; {
		d := dist(i)
		consider(i, d)
		i -= 1 + skip(d)
	}
	return best
}

// stationWindow is how many stations on either side of the hint are looked at one by one.
const stationWindow = 8
