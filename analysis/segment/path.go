package segment

import (
	"container/heap"
	"context"
	"errors"
	"math"

	"tapersweep/analysis"
)

// costSteepness shapes the cost of a sample from its darkness n (0 canal, 1 dentine):
// cost = floor + exp(steepness (n - 1)). Dentine costs the full step; the grey centre of a
// canal blurred below the voxel size (n up to about 0.85) costs a hundredth of it, so a path
// along an unresolved canal stays far cheaper than a short cut through a thin wall to the
// darker periodontal space or bone.
const (
	costSteepness = 30
	costFloor     = 0.01
	// Bone and the periodontal space are darker than a blurred narrow canal. What sets a
	// canal apart is dentine all around it: a grey sample counts as dark only as far as it is
	// darker than the brightest sample within topHatRadius (a black top-hat). Very dark
	// samples (n below clearlyDark) are canal whatever surrounds them, so a canal wider than
	// the top-hat stays cheap in its middle.
	topHatRadius = 0.3 // mm
	clearlyDark  = 0.3
)

// pathCost is the cost per mm of each sample of the box.
func pathCost(b *box, dark, bright float64) []float32 {
	top := maxFilter(b, topHatRadius)
	c := make([]float32, len(b.val))
	analysis.ParallelFor(len(c), func(q int) {
		span := bright - dark
		n := clamp01((float64(b.val[q]) - dark) / span)
		if n >= clearlyDark {
			n = math.Max(n, 1-clamp01((float64(top[q])-float64(b.val[q]))/span))
		}
		c[q] = float32(costFloor + math.Exp(costSteepness*(n-1)))
	})
	return c
}

func clamp01(x float64) float64 { return math.Max(0, math.Min(1, x)) }

// maxFilter is the largest sample within r mm along each axis (a box-shaped grey dilation,
// one axis at a time).
func maxFilter(b *box, r float64) []float32 {
	sp := b.spacing()
	cur := append([]float32(nil), b.val...)
	tmp := make([]float32, len(cur))
	dims := [3]int{b.nx, b.ny, b.nz}
	strides := [3]int{1, b.nx, b.nx * b.ny}
	for a := range 3 {
		w := int(math.Round(r / sp[a]))
		if w < 1 {
			continue
		}
		n, st := dims[a], strides[a]
		analysis.ParallelFor(len(cur)/n, func(line int) {
			// the line's first sample: all samples whose coordinate along a is 0
			lo := line % st
			hi := line / st
			start := lo + hi*st*n
			for q := range n {
				m := cur[start+q*st]
				for d := max(0, q-w); d <= min(n-1, q+w); d++ {
					m = max(m, cur[start+d*st])
				}
				tmp[start+q*st] = m
			}
		})
		cur, tmp = tmp, cur
	}
	return cur
}

// minimalPath is the path of least summed cost between two samples of the box, over its 26
// neighbours (Dijkstra 1959; the discrete form of the minimal paths of Deschamps and Cohen,
// Med Image Anal 2001;5:281-299). A step costs its length in mm times the mean of the two
// samples' costs (pathCost). allowed (may be nil) limits the search. The path runs from start
// to goal.
func minimalPath(ctx context.Context, b *box, start, goal int, dark, bright float64, allowed []bool) ([]int, error) {
	n := len(b.val)
	costs := pathCost(b, dark, bright)
	cost := func(q int) float32 { return costs[q] }
	sp := b.spacing()
	type nb struct {
		off        int
		di, dj, dk int
		step       float32
	}
	var nbs []nb
	for dk := -1; dk <= 1; dk++ {
		for dj := -1; dj <= 1; dj++ {
			for di := -1; di <= 1; di++ {
				if di == 0 && dj == 0 && dk == 0 {
					continue
				}
				l := math.Sqrt(sq(float64(di)*sp[0]) + sq(float64(dj)*sp[1]) + sq(float64(dk)*sp[2]))
				nbs = append(nbs, nb{di + b.nx*(dj+b.ny*dk), di, dj, dk, float32(l)})
			}
		}
	}
	dist := make([]float32, n)
	for i := range dist {
		dist[i] = float32(math.Inf(1))
	}
	from := make([]uint8, n) // 1 + index of the neighbour step that reached the sample
	done := make([]bool, n)
	h := &pathHeap{}
	dist[start] = 0
	heap.Push(h, pathItem{0, int32(start)})
	pops := 0
	for h.Len() > 0 {
		it := heap.Pop(h).(pathItem)
		p := int(it.node)
		if done[p] {
			continue
		}
		done[p] = true
		if p == goal {
			break
		}
		if pops++; pops%(1<<16) == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		i, j, k := b.ijk(p)
		cp := cost(p)
		for d, e := range nbs {
			ii, jj, kk := i+e.di, j+e.dj, k+e.dk
			if ii < 0 || jj < 0 || kk < 0 || ii >= b.nx || jj >= b.ny || kk >= b.nz {
				continue
			}
			q := p + e.off
			if done[q] || (allowed != nil && !allowed[q]) {
				continue
			}
			nd := it.dist + e.step*0.5*(cp+cost(q))
			if nd < dist[q] {
				dist[q] = nd
				from[q] = uint8(d + 1)
				heap.Push(h, pathItem{nd, int32(q)})
			}
		}
	}
	if !done[goal] {
		return nil, errors.New("no path joins the two points through the scan")
	}
	var path []int
	for p := goal; ; {
		path = append(path, p)
		if p == start {
			break
		}
		d := from[p]
		if d == 0 {
			return nil, errors.New("no path joins the two points through the scan")
		}
		p -= nbs[d-1].off
	}
	for l, r := 0, len(path)-1; l < r; l, r = l+1, r-1 {
		path[l], path[r] = path[r], path[l]
	}
	return path, nil
}

func sq(x float64) float64 { return x * x }

type pathItem struct {
	dist float32
	node int32
}

// pathHeap orders by distance, then by sample index, so the path never depends on push order.
type pathHeap []pathItem

func (h pathHeap) Len() int { return len(h) }
func (h pathHeap) Less(a, b int) bool {
	if h[a].dist != h[b].dist {
		return h[a].dist < h[b].dist
	}
	return h[a].node < h[b].node
}
func (h pathHeap) Swap(a, b int) { h[a], h[b] = h[b], h[a] }
func (h *pathHeap) Push(x any)   { *h = append(*h, x.(pathItem)) }
func (h *pathHeap) Pop() any {
	old := *h
	it := old[len(old)-1]
	*h = old[:len(old)-1]
	return it
}
