package analysis

import (
	"math"

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
}

func newVoxelGraph(g *mesh.Grid, sq []float32) *voxelGraph {
	vg := &voxelGraph{g: g, node: make([]int32, len(g.Inside))}
	for i, in := range g.Inside {
		if in {
			vg.node[i] = int32(len(vg.cells))
			vg.cells = append(vg.cells, int32(i))
		} else {
			vg.node[i] = -1
		}
	}
	vg.dist = make([]float64, len(vg.cells))
	for n, c := range vg.cells {
		// Centre-to-centre distance to the nearest outside voxel overstates the distance to the
		// wall by about half a voxel.
		vg.dist[n] = math.Max(math.Sqrt(float64(sq[c]))-0.5, 0.25) * g.Voxel
	}
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

type heapItem struct {
	d float64
	n int32
}

// minHeap is a binary heap of (distance, node), smallest first, ties by node so every search
// is deterministic. Typed rather than container/heap: no boxing, no allocation per push.
type minHeap []heapItem

func (h minHeap) less(a, b int) bool {
	if h[a].d != h[b].d {
		return h[a].d < h[b].d
	}
	return h[a].n < h[b].n
}

func (h *minHeap) push(it heapItem) {
	*h = append(*h, it)
	q := *h
	for i := len(q) - 1; i > 0; {
		p := (i - 1) / 2
		if !q.less(i, p) {
			break
		}
		q[i], q[p] = q[p], q[i]
		i = p
	}
}

func (h *minHeap) pop() heapItem {
	q := *h
	top := q[0]
	last := len(q) - 1
	q[0] = q[last]
	q = q[:last]
	for i := 0; ; {
		l, r, m := 2*i+1, 2*i+2, i
		if l < len(q) && q.less(l, m) {
			m = l
		}
		if r < len(q) && q.less(r, m) {
			m = r
		}
		if m == i {
			break
		}
		q[i], q[m] = q[m], q[i]
		i = m
	}
	*h = q
	return top
}

// dijkstra returns distances from the sources over the graph, where crossing an edge costs
// step * weight(a, b), and the predecessor of every node (-1 for sources and unreached nodes).
// Nodes farther than limit stay unreached (+Inf).
func (vg *voxelGraph) dijkstra(sources []int32, weight func(a, b int32) float64, limit ...float64) ([]float64, []int32) {
	n := len(vg.cells)
	dist := make([]float64, n)
	prev := make([]int32, n)
	for i := range dist {
		dist[i] = math.Inf(1)
		prev[i] = -1
	}
	bound := math.Inf(1)
	if len(limit) > 0 {
		bound = limit[0]
	}
	h := make(minHeap, 0, 1024)
	for _, s := range sources {
		dist[s] = 0
		h.push(heapItem{0, s})
	}
	for len(h) > 0 {
		it := h.pop()
		if it.d > dist[it.n] {
			continue
		}
		vg.neighbours(it.n, func(m int32, step float64) {
			w := step
			if weight != nil {
				w *= weight(it.n, m)
			}
			if nd := it.d + w; nd < dist[m] && nd <= bound {
				dist[m] = nd
				prev[m] = it.n
				h.push(heapItem{nd, m})
			}
		})
	}
	return dist, prev
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

// tracePath follows predecessors from n back to a source and returns the nodes source-first.
func tracePath(prev []int32, n int32) []int32 {
	var path []int32
	for ; n >= 0; n = prev[n] {
		path = append(path, n)
	}
	for i, j := 0, len(path)-1; i < j; i, j = i+1, j-1 {
		path[i], path[j] = path[j], path[i]
	}
	return path
}
