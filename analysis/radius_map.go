package analysis

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh/parallel"
)

// buildRadiusMap casts, from every station, one ray per angle in the normal plane and keeps the
// distance to the first wall hit. A ray that finds no wall (a hole, or the very end of the
// canal) takes the value of the nearest station that found one.
func (c *Canal) buildRadiusMap(workers int) {
	n, na := c.Line.Len(), c.Angles
	c.Rho = make([]float32, n*na)
	cs, sn := make([]float64, na), make([]float64, na)
	for j := 0; j < na; j++ {
		th := 2 * math.Pi * float64(j) / float64(na)
		cs[j], sn[j] = math.Cos(th), math.Sin(th)
	}
	reach := 4 * c.Measures.Length
	parallel.For(workers, n, func(_, i int) {
		p, n1, n2 := c.Line.Points[i], c.Line.N1[i], c.Line.N2[i]
		for j := 0; j < na; j++ {
			dir := n1.Mul(cs[j]).Add(n2.Mul(sn[j]))
			if hit, ok := c.Wall.Ray(p, dir, reach); ok {
				c.Rho[i*na+j] = float32(hit.T)
			} else {
				c.Rho[i*na+j] = -1
			}
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
	if missing > na/4 {
		c.Warnings = append(c.Warnings, "some rays from the centerline found no wall: the surface may have holes")
	}
}

// placeVertices gives every wall vertex its own (s, theta): the nearest point of the
// centerline, refined onto the neighbouring segment, and the angle in that station's frame.
func (c *Canal) placeVertices(workers int) {
	line := c.Line
	nv := len(c.Mesh.Vertices)
	c.VertexS = make([]float32, nv)
	c.VertexTheta = make([]float32, nv)
	maxR := 0.0
	for _, r := range c.Rho {
		maxR = math.Max(maxR, float64(r))
	}
	cell := math.Max(maxR, 4*line.DS)
	grid := newPointGrid(line.Points, cell)
	parallel.For(workers, nv, func(_, v int) {
		p := c.Mesh.Vertices[v]
		i := grid.nearest(p)
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

// pointGrid finds the nearest of a set of points by looking in nearby cells first. The cells
// cover the points' box in one flat array (a station list is small: a few thousand cells).
type pointGrid struct {
	cell  float64
	lo    mgl64.Vec3
	n     [3]int
	start []int32 // cell c holds order[start[c]:start[c+1]]
	order []int32
	pts   []mgl64.Vec3
}

func newPointGrid(pts []mgl64.Vec3, cell float64) *pointGrid {
	g := &pointGrid{cell: cell, lo: pts[0], pts: pts}
	hi := pts[0]
	for _, p := range pts {
		for a := range 3 {
			g.lo[a] = math.Min(g.lo[a], p[a])
			hi[a] = math.Max(hi[a], p[a])
		}
	}
	for a := range 3 {
		g.n[a] = int(math.Floor((hi[a]-g.lo[a])/cell)) + 1
	}
	cells := g.n[0] * g.n[1] * g.n[2]
	g.start = make([]int32, cells+1)
	at := make([]int, len(pts))
	for i, p := range pts {
		k := g.key(p)
		at[i] = k[0] + g.n[0]*(k[1]+g.n[1]*k[2])
		g.start[at[i]+1]++
	}
	for c := 1; c <= cells; c++ {
		g.start[c] += g.start[c-1]
	}
	g.order = make([]int32, len(pts))
	fill := append([]int32(nil), g.start[:cells]...)
	for i := range pts {
		g.order[fill[at[i]]] = int32(i)
		fill[at[i]]++
	}
	return g
}

func (g *pointGrid) key(p mgl64.Vec3) [3]int {
	d := p.Sub(g.lo).Mul(1 / g.cell)
	return [3]int{int(math.Floor(d[0])), int(math.Floor(d[1])), int(math.Floor(d[2]))}
}

// at lists the points of cell k (none outside the grid).
func (g *pointGrid) at(k [3]int) []int32 {
	for a := range 3 {
		if k[a] < 0 || k[a] >= g.n[a] {
			return nil
		}
	}
	c := k[0] + g.n[0]*(k[1]+g.n[1]*k[2])
	return g.order[g.start[c]:g.start[c+1]]
}

// nearest searches rings of cells outward until a ring cannot hold anything closer. A ring
// costs its (2r+1)^3 cells, so once that is more than the points themselves a full scan is
// cheaper and exact: a point far from every station (a centerline that covers only part of the
// canal) then costs one scan, not millions of cells.
func (g *pointGrid) nearest(p mgl64.Vec3) int {
	k := g.key(p)
	best, bd := 0, math.Inf(1)
	for r := 0; r < 1<<20; r++ {
		if float64(r-1)*g.cell > bd {
			break
		}
		if side := 2*r + 1; side*side*side > len(g.pts) {
			for i, q := range g.pts {
				if d := q.Sub(p).Len(); d < bd || (d == bd && i < best) {
					best, bd = i, d
				}
			}
			break
		}
		for dx := -r; dx <= r; dx++ {
			for dy := -r; dy <= r; dy++ {
				for dz := -r; dz <= r; dz++ {
					if max(abs(dx), abs(dy), abs(dz)) != r {
						continue
					}
					for _, i := range g.at([3]int{k[0] + dx, k[1] + dy, k[2] + dz}) {
						if d := g.pts[i].Sub(p).Len(); d < bd || (d == bd && int(i) < best) {
							best, bd = int(i), d
						}
					}
				}
			}
		}
	}
	return best
}
