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
	// canal apart is dentine all around it: a sample counts as dark only as far as it is
	// darker than what lies on both sides of it across two of the three axes (within
	// sideReach). A sheet (the periodontal space: dentine on one side, bone on the other) or
	// bone next to the root does not pass; a line inside dentine does, and so does the middle
	// of a canal up to twice sideReach wide.
	sideReach  = 0.8 // mm, and at least sideVoxels samples
	sideVoxels = 2.5
)

// pathCost is the cost per mm of each sample of the box.
func pathCost(b *box, dark, bright float64) []float32 {
	sp := b.spacing()
	walls := enclosure(b, math.Max(sideReach, sideVoxels*math.Max(sp[0], math.Max(sp[1], sp[2]))))
	c := make([]float32, len(b.val))
	analysis.ParallelFor(len(c), func(q int) {
		span := bright - dark
		n := clamp01((float64(b.val[q]) - dark) / span)
		n = math.Max(n, 1-clamp01((float64(walls[q])-float64(b.val[q]))/span))
		c[q] = float32(costFloor + math.Exp(costSteepness*(n-1)))
	})
	return c
}

func clamp01(x float64) float64 { return math.Max(0, math.Min(1, x)) }

// enclosure is, per sample, the brightness that closes it in: along each axis the lower of
// the brightest samples within r mm on either side, and of the three axes the second
// highest (a line is closed in across two axes, a sheet across one).
func enclosure(b *box, r float64) []float32 {
	sp := b.spacing()
	n := len(b.val)
	first := make([]float32, n)  // highest so far
	second := make([]float32, n) // second highest so far
	inf := float32(math.Inf(-1))
	for q := range n {
		first[q], second[q] = inf, inf
	}
	dims := [3]int{b.nx, b.ny, b.nz}
	strides := [3]int{1, b.nx, b.nx * b.ny}
	for a := range 3 {
		w := max(1, int(math.Round(r/sp[a])))
		cnt, st := dims[a], strides[a]
		lines := n / cnt
		workers := min(lines, 64)
		analysis.ParallelFor(workers, func(wk int) {
			line := make([]float32, cnt)
			win := make([]float32, cnt+2*w)
			scratch := make([]float32, 2*(cnt+2*w))
			for l := wk; l < lines; l += workers {
				start := l%st + (l/st)*st*cnt
				for q := range cnt {
					line[q] = b.val[start+q*st]
				}
				windowMax(line, w, win, scratch)
				for q := range cnt {
					lo := win[q+w-1] // max of line[q-w .. q-1]
					hi := win[q+2*w] // max of line[q+1 .. q+w]
					m := min(lo, hi)
					at := start + q*st
					if m > first[at] {
						first[at], second[at] = m, first[at]
					} else if m > second[at] {
						second[at] = m
					}
				}
			}
		})
	}
	return second
}

// windowMax works on x padded by w values of -Inf on either side (padded index i holds
// x[i-w]) and sets out[j] to the largest of the w padded values ending at j, so out[q+w-1]
// is the largest of x[q-w .. q-1] and out[q+2w] of x[q+1 .. q+w]. Linear time: running maxima
// within blocks of w from the left and from the right (van Herk M, Pattern Recognit Lett
// 1992;13:517-521).
func windowMax(x []float32, w int, out, scratch []float32) {
	n := len(x) + 2*w
	inf := float32(math.Inf(-1))
	pad := func(i int) float32 {
		if i < w || i >= w+len(x) {
			return inf
		}
		return x[i-w]
	}
	g, h := scratch[:n], scratch[n:2*n]
	for i := range n {
		if i%w == 0 {
			g[i] = pad(i)
		} else {
			g[i] = max(g[i-1], pad(i))
		}
	}
	for i := n - 1; i >= 0; i-- {
		if i == n-1 || (i+1)%w == 0 {
			h[i] = pad(i)
		} else {
			h[i] = max(h[i+1], pad(i))
		}
	}
	for j := range n {
		if j < w-1 {
			out[j] = inf
			continue
		}
		out[j] = max(h[j-w+1], g[j])
	}
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
