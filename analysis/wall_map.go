package analysis

import (
	"math"
	"sync"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
	"tapersweep/mesh/parallel"
)

// WallThickness is the wall left between a station-major map of the canal (the radius map, a
// step's prepared canal) and the root's outer surface at every (station, direction): the
// shortest distance from the canal's wall there to the root surface, negative where the canal
// passes outside the root, every cell measured exactly. nil without a root.
func (c *Canal) WallThickness(m []float32, workers int) []float32 {
	if w := c.wallThickness(m, nil, math.NaN(), wallExact, workers); w != nil {
		return w.th
	}
	return nil
}

// wallMap is a thickness map with bounds: each cell's exact wall lies between low and th (th
// is the figure drawn and stated), the two equal where the cell was measured exactly; near is
// the root point th was taken from, and the seed of a later query there.
type wallMap struct {
	rho, th, low []float32
	near         []nearPoint
	// limit and tol are what the map was settled for (limit NaN: none).
	limit float64
	tol   wallTolerance
}

// wallTolerance is how far a cell of a map may lie above the exact wall: mm, or share of the
// wall where that is more. A cell whose bounds lie farther apart is measured exactly.
type wallTolerance struct{ mm, share float64 }

// wallMapTolerance and wallMapShare are the pictures' tolerance (a colour scale is read in
// shares).
const (
	wallMapTolerance = 0.05
	wallMapShare     = 0.1
)

var (
	wallExact    = wallTolerance{}
	wallPictures = wallTolerance{wallMapTolerance, wallMapShare}
	// wallScanned is the map as scanned: tighter than the pictures' since every step's
	// bounds start from it (on the benchmark the steps' figures take about 950 queries from
	// it, 1300 from a map at the pictures' tolerance; the map itself 3300 instead of 1700).
	wallScanned = wallTolerance{0.02, 0.05}
	// wallFigures bounds the cells as loosely as the figures allow.
	wallFigures = wallTolerance{math.Inf(1), 0}
)

// wallCoarseStride: of the directions around a station, every wallCoarseStride-th is settled
// first (measured where its own bounds are not enough); the directions between take their
// bounds from those two. On the benchmark (stride 8, step 4) the map as scanned measures about
// 3300 of its 47 000 cells; a stride of 16, or a step of 8, takes more CPU in all, a step of 2
// about the same.
const wallCoarseStride = 8

// wallCoarseStep: along the coarse directions, every wallCoarseStep-th station is settled
// first, the stations between bounded from those two.
const wallCoarseStep = 4

// wallThickness measures the wall of map m to within tol above the exact wall (0: every cell
// exactly; +Inf: only what the figures need), with every figure of the outputs exact: a cell
// is measured exactly where its bounds do not tell its sign, whether it lies under limit (NaN:
// no limit), or whether it could be the thinnest wall (its lower bound is under the least upper
// bound of the map), and where they lie more than max(tol, wallMapShare of its wall) apart.
//
// The bounds: the distance to the root is 1-Lipschitz, so a cell's wall is at least a nearby
// cell's lower bound less the distance between their points (and a cell moved by delta along
// its direction since from, the map the step met, keeps at least its old lower bound less
// delta); and at most the distance to any point of the root, such as the nearest point of its
// own earlier triangle or of a neighbour's. Cells of m that equal from keep from's bounds. Of
// the cells that moved (all of them without from), first every wallCoarseStride-th direction
// is settled, each query seeded by the station before; the directions between are bounded
// from the two settled ones on their sides; what remains open is measured, seeded by the
// nearest point its bounds found.
func (c *Canal) wallThickness(m []float32, from *wallMap, limit float64, tol wallTolerance, workers int) *wallMap {
	if c.Root == nil {
		return nil
	}
	if from == nil && tol == wallExact {
		return c.measuredWall(m, workers)
	}
	n, na := c.Line.Len(), c.Angles
	dirs := c.wallDirections()
	point := func(i, j int) mgl64.Vec3 {
		return c.Line.Points[i].Add(c.Line.N1[i].Mul(dirs[j][0]).Add(c.Line.N2[i].Mul(dirs[j][1])).Mul(float64(m[i*na+j])))
	}
	out, open := c.priorWall(m, from, limit, tol, point, workers)
	fromPoint := func(i, j int) mgl64.Vec3 {
		return c.Line.Points[i].Add(c.Line.N1[i].Mul(dirs[j][0]).Add(c.Line.N2[i].Mul(dirs[j][1])).Mul(float64(from.rho[i*na+j])))
	}
	settled := func(k int) bool {
		low, up := float64(out.low[k]), float64(out.th[k])
		return low == up || (low > 0 && !(low < limit && up >= limit) && up-low <= max(tol.mm, tol.share*low))
	}
	measure := func(k int, p mgl64.Vec3, seed nearPoint) {
		d, q := c.Root.signedDistance(p, seed)
		out.th[k], out.low[k], out.near[k] = float32(d), float32(d), q
	}

	// bound narrows the bounds of cell (i, j) with two cells nearby: the 1-Lipschitz bound
	// from each, the union of their empty balls with the cell's own ball on from, and the
	// nearest points of its own root triangle and of theirs (each a point of the root).
	bound := func(i, j int, nbrs [2][2]int) {
		k := i*na + j
		p := point(i, j)
		low, up, near := float64(out.low[k]), float64(out.th[k]), out.near[k]
		if near.tri >= 0 {
			up, near = c.Root.nearOn(p, near.tri)
		}
		var balls [3]ball
		nb := 0
		if from != nil && low > 0 {
			balls[nb] = ball{c: fromPoint(i, j), r: float64(from.low[k])}
			nb++
		}
		for _, ij := range nbrs {
			kn := ij[0]*na + ij[1]
			if out.near[kn].tri < 0 {
				continue
			}
			pn := point(ij[0], ij[1])
			low = max(low, float64(out.low[kn])-p.Sub(pn).Len())
			if out.low[kn] > 0 {
				balls[nb] = ball{c: pn, r: float64(out.low[kn])}
				nb++
			}
		}
		for a := 0; a < nb; a++ {
			for b := a + 1; b < nb; b++ {
				low = max(low, outsideTwoBalls(&p, &balls[a], &balls[b]))
			}
		}
		for _, ij := range nbrs {
			kn := ij[0]*na + ij[1]
			if tri := out.near[kn].tri; tri >= 0 && tri != near.tri {
				if d, q := c.Root.nearOn(p, tri); d < up {
					up, near = d, q
				}
			}
		}
		out.low[k], out.th[k], out.near[k] = mesh.Down32(low), mesh.Up32(up), near
	}
	// Coarse directions are every stride-th; along them, coarse stations every step-th and
	// the last.
	stride, step := wallCoarseStride, wallCoarseStep
	coarseStation := func(i int) bool { return i%step == 0 || i == n-1 }

	// The cells the bounds so far leave open: of the coarse directions at coarse stations (by
	// direction, down the canal), at the stations between, and the directions between.
	var coarse [][]int
	var along, between []int
	for col := 0; col*stride < na; col++ {
		var cells []int
		for i := 0; i < n; i++ {
			if k := i*na + col*stride; coarseStation(i) && open[k] && !settled(k) {
				cells = append(cells, k)
			}
		}
		if cells != nil {
			coarse = append(coarse, cells)
		}
	}
	for k := range open {
		if !open[k] || k%na%stride == 0 && coarseStation(k/na) || settled(k) {
			continue
		}
		if k%na%stride == 0 {
			along = append(along, k)
		} else {
			between = append(between, k)
		}
	}
	// few is a short list's share of the workers: one, where starting more costs more.
	few := func(cells int) int {
		if cells < 64 {
			return 1
		}
		return workers
	}

	// The coarse cells, each down its direction: the one measured before seeds the query.
	parallel.For(few(len(coarse)*8), len(coarse), func(_, col int) {
		prev := nearPoint{tri: -1}
		for _, k := range coarse[col] {
			i, j := k/na, k%na
			p := point(i, j)
			seed := out.near[k]
			if prev.tri >= 0 && (seed.tri < 0 || p.Sub(prev.q).Len() < p.Sub(seed.q).Len()) {
				seed = prev
			}
			measure(k, p, seed)
			prev = out.near[k]
		}
	})
	// The rest of the coarse directions, from the coarse stations on either side.
	parallel.For(few(len(along)), len(along), func(_, n2 int) {
		k := along[n2]
		i, j := k/na, k%na
		below := i - i%step
		bound(i, j, [2][2]int{{below, j}, {min(below+step, n-1), j}})
		if !settled(k) {
			measure(k, point(i, j), out.near[k])
		}
	})
	// The directions between, from the coarse ones on either side.
	parallel.For(few(len(between)), len(between), func(_, n2 int) {
		k := between[n2]
		i, j := k/na, k%na
		left := j - j%stride
		right := left + stride
		if right >= na {
			right = 0
		}
		bound(i, j, [2][2]int{{i, left}, {i, right}})
	})
	// What the bounds leave open, anywhere on the map (a cell that did not move is settled
	// already where from was settled for the same limit and as close a tolerance).
	keep := from != nil && from.limit == limit && from.tol.mm <= tol.mm && from.tol.share <= tol.share
	top := math.Inf(1)
	for _, v := range out.th {
		top = min(top, float64(v))
	}
	top += 1e-6
	parallel.For(workers, n, func(_, i int) {
		for j := 0; j < na; j++ {
			k := i*na + j
			if out.low[k] == out.th[k] || float64(out.low[k]) >= top && (!open[k] && keep || settled(k)) {
				continue
			}
			measure(k, point(i, j), out.near[k])
		}
	})
	return out
}

// priorWall is map m's bounds before any query: from's where m equals it; for a cell that
// moved by delta, from's lower bound less delta and the distance to its earlier root point;
// nothing known without from. open marks the cells whose bounds are
// new.
func (c *Canal) priorWall(m []float32, from *wallMap, limit float64, tol wallTolerance, point func(i, j int) mgl64.Vec3, workers int) (*wallMap, []bool) {
	n, na := c.Line.Len(), c.Angles
	out := &wallMap{rho: m, th: make([]float32, n*na), low: make([]float32, n*na), near: make([]nearPoint, n*na), limit: limit, tol: tol}
	open := make([]bool, n*na)
	if from == nil {
		inf, ninf := float32(math.Inf(1)), float32(math.Inf(-1))
		for k := range open {
			out.low[k], out.th[k], out.near[k], open[k] = ninf, inf, nearPoint{tri: -1}, true
		}
		return out, open
	}
	copy(out.low, from.low)
	copy(out.th, from.th)
	copy(out.near, from.near)
	parallel.For(workers, n, func(_, i int) {
		for j := 0; j < na; j++ {
			k := i*na + j
			if m[k] == from.rho[k] {
				continue
			}
			open[k] = true
			moved := math.Abs(float64(m[k]) - float64(from.rho[k]))
			out.low[k] = mesh.Down32(float64(from.low[k]) - moved)
			out.th[k] = float32(math.Inf(1))
			if from.near[k].tri >= 0 {
				out.th[k] = mesh.Up32(point(i, j).Sub(from.near[k].q).Len())
			}
		}
	})
	return out, open
}

// measuredWall measures every cell of map m exactly, each query seeded with its neighbour's
// nearest point around the station.
func (c *Canal) measuredWall(m []float32, workers int) *wallMap {
	n, na := c.Line.Len(), c.Angles
	out := &wallMap{rho: m, th: make([]float32, n*na), near: make([]nearPoint, n*na), limit: math.NaN()}
	parallel.For(workers, n, func(_, i int) {
		prev := nearPoint{tri: -1}
		for j := 0; j < na; j++ {
			var d float64
			d, prev = c.Root.signedDistance(c.wallPoint(m, i, j), prev)
			out.th[i*na+j], out.near[i*na+j] = float32(d), prev
		}
	})
	out.low = out.th
	return out
}

// exactAt is the wall of cell k of map w, measured where w only bounds it.
func (c *Canal) exactAt(w *wallMap, k int) float64 {
	if w.low[k] == w.th[k] {
		return float64(w.th[k])
	}
	d, _ := c.Root.signedDistance(c.wallPoint(w.rho, k/c.Angles, k%c.Angles), w.near[k])
	return float64(float32(d))
}

// wallDirections are the map's directions' cosines and sines (theta = 2 pi j / Angles).
func (c *Canal) wallDirections() [][2]float64 {
	dirs := make([][2]float64, c.Angles)
	for j := range dirs {
		s, co := math.Sincos(2 * math.Pi * float64(j) / float64(c.Angles))
		dirs[j] = [2]float64{co, s}
	}
	return dirs
}

// nearOn is the point of root triangle tri nearest p and its distance: a point of the root,
// so an upper bound of the wall at p without a search.
func (r *Root) nearOn(p mgl64.Vec3, tri int32) (float64, nearPoint) {
	a, b, cc := r.Mesh.Corners(int(tri))
	q := mesh.ClosestOnTriangle(p, a, b, cc)
	return p.Sub(q).Len(), nearPoint{q: q, tri: tri}
}

// wallAtLimit keeps the canal's map as scanned with the cells about one limit measured
// exactly (a run's figures as scanned are exact at its limit), for the last limit asked.
type wallAtLimit struct {
	mu    sync.Mutex
	limit float64
	w     *wallMap
}

// scannedWallAt is the canal's map as scanned, exact where a figure at limit needs it.
func (c *Canal) scannedWallAt(limit float64, workers int) *wallMap {
	cache := c.wallAtLimit
	if cache == nil {
		return c.wallThickness(c.Rho, c.scannedWall, limit, wallScanned, workers)
	}
	cache.mu.Lock()
	defer cache.mu.Unlock()
	// (a copy of the canal shares the cache: the map must be of this radius map)
	if cache.w == nil || cache.limit != limit || len(cache.w.rho) != len(c.Rho) || len(c.Rho) > 0 && &cache.w.rho[0] != &c.Rho[0] {
		cache.w, cache.limit = c.wallThickness(c.Rho, c.scannedWall, limit, wallScanned, workers), limit
	}
	return cache.w
}
