package analysis

import (
	"math"

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
