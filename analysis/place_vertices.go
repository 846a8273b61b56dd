package analysis

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh/parallel"
)

// placeVertices gives every wall vertex its own (s, theta): the nearest point of the
// centerline, refined onto the neighbouring segment, and the angle in the frame
// Centerline.At gives there.
//
// The arithmetic is written out on plain numbers, each operation in the order the Vec3
// methods and Centerline.At take them, so every result rounds exactly as theirs does (Vec3
// values go through memory, which made this several times slower);
// TestPlaceVerticesMatchesDefinition holds it to those formulas bit for bit.
func (c *Canal) placeVertices(workers int) {
	line := c.Line
	nv := len(c.Mesh.Vertices)
	c.VertexS = make([]float32, nv)
	c.VertexTheta = make([]float32, nv)
	stations := newStationFinder(line.Points)
	stations.buildReach(workers)
	// Each worker takes runs of neighbouring vertices: the last one's station is a good start.
	// (Padded to a cache line each, so the workers do not fight over one.)
	last := make([]struct {
		i int
		_ [56]byte
	}, parallel.Workers(workers, nv))
	for w := range last {
		last[w].i = -1
	}
	// Vertices go in small batches, each step for the whole batch before the next step: the
	// steps' chains of roots and divisions for neighbouring vertices are independent and sit
	// close together in the instruction stream, so the processor overlaps them.
	nb := (nv + placeBatch - 1) / placeBatch
	parallel.For(workers, nb, func(w, b int) {
		lo := b * placeBatch
		n := min(placeBatch, nv-lo)
		vs := c.Mesh.Vertices[lo : lo+n]
		var near [placeBatch]int
		var s, y, x [placeBatch]float64
		i := last[w].i
		for k := range vs {
			i = stations.nearest(&vs[k], i)
			near[k] = i
		}
		last[w].i = i
		for k := range vs {
			s[k] = line.nearestArc(&vs[k], near[k])
		}
		for k := range vs {
			y[k], x[k] = line.frameCoords(&vs[k], s[k])
		}
		for k := range vs {
			th := math.Atan2(y[k], x[k])
			if th < 0 {
				th += 2 * math.Pi
			}
			c.VertexS[lo+k] = float32(s[k])
			c.VertexTheta[lo+k] = float32(th)
		}
	})
}

// placeBatch is how many vertices placeVertices takes a step at a time.
const placeBatch = 8

// nearestArc is the arc length of the point of the segments on either side of station i
// nearest p (the earlier segment on a tie; station i's own when neither has a length).
func (c *Centerline) nearestArc(p *mgl64.Vec3, i int) float64 {
	pts, arc := c.Points, c.S
	px, py, pz := p[0], p[1], p[2]
	s, best := arc[i], math.Inf(1)
	for k := i - 1; k <= i; k++ {
		if k < 0 || k+1 >= len(pts) {
			continue
		}
		a, b := &pts[k], &pts[k+1]
		abx, aby, abz := b[0]-a[0], b[1]-a[1], b[2]-a[2]
		pax, pay, paz := px-a[0], py-a[1], pz-a[2]
		// Clamped to the segment; a segment of no length gives NaN here and is passed over.
		t := max(0, min(1, (pax*abx+pay*aby+paz*abz)/(abx*abx+aby*aby+abz*abz)))
		dx, dy, dz := px-(a[0]+abx*t), py-(a[1]+aby*t), pz-(a[2]+abz*t)
		// Compared as their roots (Len) compare, without taking them.
		if d := dx*dx + dy*dy + dz*dz; lenLess(d, best) {
			best = d
			s = arc[k] + t*(arc[k+1]-arc[k])
		}
	}
	return s
}

// frameCoords are p's coordinates along n2 and n1 of the frame At(s) gives (the angle about
// the line is their Atan2), with At's arithmetic (frameAt, then n2 = t.Cross(n1) and the two
// dot products written out).
func (c *Centerline) frameCoords(p *mgl64.Vec3, s float64) (y, x float64) {
	qx, qy, qz, tx, ty, tz, nx, ny, nz := c.frameAt(s)
	mx, my, mz := ty*nz-tz*ny, tz*nx-tx*nz, tx*ny-ty*nx
	dx, dy, dz := p[0]-qx, p[1]-qy, p[2]-qz
	return dx*mx + dy*my + dz*mz, dx*nx + dy*ny + dz*nz
}
