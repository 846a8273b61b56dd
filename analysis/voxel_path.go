package analysis

import (
	"math"
	"slices"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// voxelGraph is the set of inside voxels of a grid with 26-connectivity, numbered compactly
// in grid order so every search over it is deterministic.
type voxelGraph struct {
	g     *mesh.Grid
	cells []int32   // grid index of each node
	node  []int32   // grid index -> node, -1 outside
	dist  []float64 // distance to the wall in mm, per node
	nbr   [26]struct {
		off        int32
		step       float64
		di, dj, dk int
	}
	// interior: no inside voxel touches the grid's border, so every neighbour offset stays
	// in the grid and the searches skip the bounds checks.
	interior bool
}

func newVoxelGraph(g *mesh.Grid, sq []float32) *voxelGraph {
	vg := graphOf(g)
	for n, c := range vg.cells {
		// Centre-to-centre distance to the nearest outside voxel overstates the distance to the
		// wall by about half a voxel. (max(r, 0.25) by a comparison: math.Max is a call.)
		r := math.Sqrt(float64(sq[c])) - 0.5
		if r < 0.25 {
			r = 0.25
		}
		vg.dist[n] = r * g.Voxel
	}
	return vg
}

// graphOf numbers the inside voxels of g and sets up the neighbour table; distances to the
// wall are left for the caller.
func graphOf(g *mesh.Grid) *voxelGraph {
	vg := &voxelGraph{g: g, node: make([]int32, len(g.Inside)), interior: true}
	idx := 0
	for k := range g.NZ {
		for j := range g.NY {
			rim := k == 0 || j == 0 || k == g.NZ-1 || j == g.NY-1
			for i := range g.NX {
				if g.Inside[idx] {
					vg.node[idx] = int32(len(vg.cells))
					vg.cells = append(vg.cells, int32(idx))
					// interior: no inside voxel on the grid's border.
					if rim || i == 0 || i == g.NX-1 {
						vg.interior = false
					}
				} else {
					vg.node[idx] = -1
				}
				idx++
			}
		}
	}
	vg.dist = make([]float64, len(vg.cells))
	k := 0
	for dk := -1; dk <= 1; dk++ {
		for dj := -1; dj <= 1; dj++ {
			for di := -1; di <= 1; di++ {
				if di == 0 && dj == 0 && dk == 0 {
					continue
				}
				vg.nbr[k].off = int32(di + g.NX*(dj+g.NY*dk))
				vg.nbr[k].step = math.Sqrt(float64(di*di+dj*dj+dk*dk)) * g.Voxel
				vg.nbr[k].di, vg.nbr[k].dj, vg.nbr[k].dk = di, dj, dk
				k++
			}
		}
	}
	return vg
}

// component marks the nodes joined to seed and counts them. Nodes are numbered in grid order,
// so each run of inside voxels along x is a range of node numbers; two runs in neighbouring
// x lines (one step in y, z or both) touch, 26-connected, when their x ranges come within one
// voxel, and runs in one line never do. Joining the runs that touch (union-find, each pair
// of neighbouring lines swept once) gives the same set as a flood fill over the voxels, for
// a fraction of the work: a canal's run holds a dozen voxels or more.
func (vg *voxelGraph) component(seed int32) ([]bool, int) {
	g, cells := vg.g, vg.cells
	// Runs: first node, x range, line; lineRuns[l] is the first run of line l (y + NY z).
	type run struct {
		first  int32
		i0, i1 int32
	}
	runs := make([]run, 0, len(cells)/8+1)
	lines := g.NY * g.NZ
	lineRuns := make([]int32, lines+1)
	lineEnd := 0 // the grid index past the current run's line
	for n := 0; n < len(cells); n++ {
		c := int(cells[n])
		if n > 0 && int(cells[n-1]) == c-1 && c < lineEnd {
			runs[len(runs)-1].i1++
			continue
		}
		l, i := c/g.NX, int32(c%g.NX)
		lineEnd = (l + 1) * g.NX
		runs = append(runs, run{first: int32(n), i0: i, i1: i})
		lineRuns[l+1]++
	}
	for l := 0; l < lines; l++ {
		lineRuns[l+1] += lineRuns[l]
	}
	parent := make([]int32, len(runs))
	for r := range parent {
		parent[r] = int32(r)
	}
	find := func(r int32) int32 {
		for parent[r] != r {
			parent[r] = parent[parent[r]]
			r = parent[r]
		}
		return r
	}
	// Each line with the four neighbouring lines before it (half of its eight), so every
	// pair of neighbouring lines is swept once, both in order of x.
	for l := 0; l < lines; l++ {
		a0, a1 := lineRuns[l], lineRuns[l+1]
		if a0 == a1 {
			continue
		}
		j, k := l%g.NY, l/g.NY
		for _, d := range [4][2]int{{-1, 0}, {-1, -1}, {0, -1}, {1, -1}} {
			jj, kk := j+d[0], k+d[1]
			if jj < 0 || jj >= g.NY || kk < 0 {
				continue
			}
			o := jj + g.NY*kk
			b, b1 := lineRuns[o], lineRuns[o+1]
			for a := a0; a < a1 && b < b1; {
				ra, rb := runs[a], runs[b]
				if ra.i0 <= rb.i1+1 && rb.i0 <= ra.i1+1 {
					if x, y := find(a), find(b); x != y {
						parent[max(x, y)] = min(x, y)
					}
				}
				// The run that ends first can touch nothing further along the other line.
				if ra.i1 < rb.i1 {
					a++
				} else {
					b++
				}
			}
		}
	}
	// The seed's run, then every run with the same root.
	sr := int32(0)
	for r := range runs {
		if runs[r].first <= seed {
			sr = int32(r)
		} else {
			break
		}
	}
	root := find(sr)
	in := make([]bool, len(cells))
	count := 0
	for r := range runs {
		if find(int32(r)) != root {
			continue
		}
		last := int32(len(cells))
		if r+1 < len(runs) {
			last = runs[r+1].first
		}
		for n := runs[r].first; n < last; n++ {
			in[n] = true
		}
		count += int(last - runs[r].first)
	}
	return in, count
}

// coarseGraph is the graph of a grid coarsened two times on each axis, for the searches that
// only need to know roughly how far things are: a coarse voxel is inside when any of its
// eight is, its distance to the wall is the largest of theirs.
type coarseGraph struct {
	*voxelGraph
	rep []int32 // per coarse node: the first of its fine nodes
	up  []int32 // per fine node: its coarse node (-1 when left out)
}

// coarsen builds the coarse graph of the fine nodes marked keep.
func (vg *voxelGraph) coarsen(keep []bool) *coarseGraph {
	g := vg.g
	cg := &mesh.Grid{Origin: g.Origin, Voxel: 2 * g.Voxel, NX: (g.NX + 1) / 2, NY: (g.NY + 1) / 2, NZ: (g.NZ + 1) / 2}
	cg.Inside = make([]bool, cg.NX*cg.NY*cg.NZ)
	// Each fine node's coarse voxel. Nodes come in grid order: a line's place is worked out
	// (by division) once per line met, the rest from the line's start.
	parent := make([]int32, len(vg.cells))
	lineStart, row := -g.NX, 0
	for n, c32 := range vg.cells {
		c := int(c32)
		if c >= lineStart+g.NX {
			l := c / g.NX
			lineStart = l * g.NX
			row = cg.NX * ((l%g.NY)/2 + cg.NY*((l/g.NY)/2))
		}
		parent[n] = int32(row + (c-lineStart)/2)
	}
	for n := range vg.cells {
		if keep[n] {
			cg.Inside[parent[n]] = true
		}
	}
	c := &coarseGraph{voxelGraph: graphOf(cg), up: make([]int32, len(vg.cells))}
	c.rep = make([]int32, len(c.cells))
	for i := range c.rep {
		c.rep[i] = -1
	}
	for n := range vg.cells {
		c.up[n] = -1
		if !keep[n] {
			continue
		}
		m := c.node[parent[n]]
		c.up[n] = m
		// max by a comparison (math.Max is a call); distances are positive.
		if d := vg.dist[n]; d > c.dist[m] {
			c.dist[m] = d
		}
		if c.rep[m] < 0 {
			c.rep[m] = int32(n)
		}
	}
	return c
}

func (vg *voxelGraph) ijk(n int32) (int, int, int) {
	c := int(vg.cells[n])
	nx, ny := vg.g.NX, vg.g.NY
	return c % nx, (c / nx) % ny, c / (nx * ny)
}

func (vg *voxelGraph) center(n int32) mgl64.Vec3 {
	i, j, k := vg.ijk(n)
	return vg.g.Center(i, j, k)
}

// neighbours calls fn for each inside neighbour of node n with the step length in mm.
func (vg *voxelGraph) neighbours(n int32, fn func(m int32, step float64)) {
	i, j, k := vg.ijk(n)
	g := vg.g
	c := vg.cells[n]
	for _, nb := range vg.nbr {
		ii, jj, kk := i+nb.di, j+nb.dj, k+nb.dk
		if ii < 0 || jj < 0 || kk < 0 || ii >= g.NX || jj >= g.NY || kk >= g.NZ {
			continue
		}
		if m := vg.node[c+nb.off]; m >= 0 {
			fn(m, nb.step)
		}
	}
}

// searchNode is what a search keeps per node, together so that a relaxation touches one
// place in memory: the distance so far and the predecessor (-1 for sources and unreached
// nodes), and whether it is settled.
type searchNode struct {
	dist float64
	half float64 // the node's half cost (weighted searches)
	prev int32
	done bool // settled
}

// dijkstra returns distances from the sources over the graph, where crossing an edge costs
// its length in mm. Nodes farther than limit stay unreached (+Inf).
func (vg *voxelGraph) dijkstra(sources []int32, limit ...float64) []float64 {
	bound := math.Inf(1)
	if len(limit) > 0 {
		bound = limit[0]
	}
	st := vg.search(sources, nil, bound, -1)
	dist := make([]float64, len(st))
	for i := range st {
		dist[i] = st[i].dist
	}
	return dist
}

// minimalPath is the path of least cost from source to target, where crossing an edge
// between nodes p and q costs its length times (cost[p] + cost[q])/2; the search stops once
// the target is settled.
func (vg *voxelGraph) minimalPath(source, target int32, cost []float64) []int32 {
	// Halved once here, not per edge: (a + b)/2 and a/2 + b/2 are the same number in binary
	// floating point (halving is exact), so the path is the same.
	half := make([]float64, len(cost))
	for i, c := range cost {
		half[i] = 0.5 * c
	}
	st := vg.search([]int32{source}, half, math.Inf(1), target)
	var path []int32
	for n := target; n >= 0; n = st[n].prev {
		path = append(path, n)
	}
	slices.Reverse(path)
	return path
}

// search is Dijkstra's algorithm over the inside voxels. With halfCost nil an edge costs its
// length; otherwise its length times the sum of its ends' half costs (positive and finite
// for the bucket queue; see searchQueue). It stops when target (>= 0) is settled; nodes
// beyond bound stay unreached. Each node's distance (+Inf when unreached) and predecessor are
// in the result.
//
// The answers do not depend on the order in which the queue settles nodes of nearly equal
// distance: a node's distance is the least over its neighbours of (their distance + the
// edge's cost), the same numbers whatever the order, and its predecessor is, among the
// neighbours that give that least, the one of least distance and then of least number (the
// first that a heap ordered by distance, then node, would settle), kept so by replacing it on
// a tie.
func (vg *voxelGraph) search(sources []int32, halfCost []float64, bound float64, target int32) []searchNode {
	n := len(vg.cells)
	st := make([]searchNode, n)
	for i := range st {
		st[i] = searchNode{dist: math.Inf(1), prev: -1}
	}
	if halfCost != nil {
		for i, c := range halfCost {
			st[i].half = c
		}
	}
	stepMin, stepMax := math.Inf(1), 0.0
	for _, nb := range vg.nbr {
		stepMin, stepMax = min(stepMin, nb.step), max(stepMax, nb.step)
	}
	wMin, wMax := stepMin, stepMax
	if halfCost != nil {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, c := range halfCost {
			lo, hi = min(lo, c), max(hi, c)
		}
		wMin, wMax = stepMin*2*lo, stepMax*2*hi
	}
	q := newSearchQueue(n, wMin, wMax)
	for _, s := range sources {
		if st[s].dist != 0 {
			st[s].dist = 0
			q.push(0, math.Inf(1), s)
		}
	}
	for {
		p, ok := q.pop()
		if !ok {
			break
		}
		if st[p].done {
			continue // an old entry: p was pushed again with a lower distance
		}
		st[p].done = true
		if p == target {
			break
		}
		// The 26 neighbours: this is most of the time a canal takes. Off the grid's border
		// (the usual case: grids are padded) no bounds are checked; each case has a loop of
		// its own, in a function of its own so that its few values stay in registers.
		switch {
		case vg.interior && halfCost != nil:
			vg.relaxWeighted(st, q, p, halfCost, bound)
		case vg.interior:
			vg.relaxUnit(st, q, p, bound)
		default:
			vg.relaxBorder(st, q, p, halfCost, bound)
		}
	}
	return st
}

// relaxWeighted lowers the distances of the neighbours of the settled node p through p, an
// edge costing its length times the sum of its ends' half costs; the node is off the grid's
// border. A settled neighbour needs no test of its own: nothing from p can reach or tie its
// distance (and the test would cost more in mispredicted branches than the sum it saves).
func (vg *voxelGraph) relaxWeighted(st []searchNode, q *searchQueue, p int32, halfCost []float64, bound float64) {
	node, nbr := vg.node, &vg.nbr
	c, d, hp := vg.cells[p], st[p].dist, st[p].half
	for k := range nbr {
		m := node[c+nbr[k].off]
		if m < 0 {
			continue
		}
		nd := d + nbr[k].step*(hp+st[m].half)
		if sm := &st[m]; nd < sm.dist {
			if nd <= bound {
				q.push(nd, sm.dist, m)
				sm.dist = nd
				sm.prev = p
			}
		} else if nd == sm.dist && sm.prev >= 0 && earlier(d, p, st[sm.prev].dist, sm.prev) {
			sm.prev = p
		}
	}
}

// relaxUnit is relaxWeighted where an edge costs its length.
func (vg *voxelGraph) relaxUnit(st []searchNode, q *searchQueue, p int32, bound float64) {
	node, nbr := vg.node, &vg.nbr
	c, d := vg.cells[p], st[p].dist
	for k := range nbr {
		m := node[c+nbr[k].off]
		if m < 0 {
			continue
		}
		nd := d + nbr[k].step
		if sm := &st[m]; nd < sm.dist {
			if nd <= bound {
				q.push(nd, sm.dist, m)
				sm.dist = nd
				sm.prev = p
			}
		} else if nd == sm.dist && sm.prev >= 0 && earlier(d, p, st[sm.prev].dist, sm.prev) {
			sm.prev = p
		}
	}
}

// relaxBorder is relaxWeighted (or relaxUnit with halfCost nil) for a node that may lie on the
// grid's border: each neighbour's place is checked against the grid's bounds.
func (vg *voxelGraph) relaxBorder(st []searchNode, q *searchQueue, p int32, halfCost []float64, bound float64) {
	g, node, nbr := vg.g, vg.node, &vg.nbr
	c, d := vg.cells[p], st[p].dist
	i, j, k := vg.ijk(p)
	hp := 0.0
	if halfCost != nil {
		hp = halfCost[p]
	}
	for e := range nbr {
		ii, jj, kk := i+nbr[e].di, j+nbr[e].dj, k+nbr[e].dk
		if ii < 0 || jj < 0 || kk < 0 || ii >= g.NX || jj >= g.NY || kk >= g.NZ {
			continue
		}
		m := node[c+nbr[e].off]
		if m < 0 {
			continue
		}
		w := nbr[e].step
		if halfCost != nil {
			w *= hp + halfCost[m]
		}
		nd := d + w
		if sm := &st[m]; nd < sm.dist {
			if nd <= bound {
				q.push(nd, sm.dist, m)
				sm.dist = nd
				sm.prev = p
			}
		} else if nd == sm.dist && sm.prev >= 0 && earlier(d, p, st[sm.prev].dist, sm.prev) {
			sm.prev = p
		}
	}
}

// earlier orders settled nodes by distance, then by number.
func earlier(d float64, p int32, e float64, q int32) bool {
	return d < e || d == e && p < q
}

// farthest returns the reached node with the largest finite distance (lowest index on ties).
func farthest(dist []float64) (int32, float64) {
	best, bd := int32(-1), -1.0
	for i, d := range dist {
		if !math.IsInf(d, 1) && d > bd {
			best, bd = int32(i), d
		}
	}
	return best, bd
}
