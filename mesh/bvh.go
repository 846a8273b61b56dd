package mesh

import (
	"math"
	"slices"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh/parallel"
)

// BVH is a bounding volume hierarchy over a mesh's triangles for ray casts, closest points
// and inside tests. It is immutable once built: any number of goroutines may query it, and
// queries do not allocate.
type BVH struct {
	nodes []bvhNode
	tris  []bvhTri // in leaf order
	// slabs[i] bounds node i's triangles between two planes (nearly flat patches only), a
	// lower bound of distance without the slack an axis-aligned box has across a tilted patch;
	// nil unless AddSlabs was called.
	slabs []bvhSlab
}

// bvhSlab holds a node's triangles between the planes n.x = lo and n.x = hi; n is zero where
// the patch is too curved for the planes to help.
type bvhSlab struct {
	n      mgl64.Vec3
	lo, hi float64
}

// slabMaxTriangles: larger nodes are curved surfaces, whose slabs bound nothing.
const slabMaxTriangles = 64

// AddSlabs fits each small node's slab along its triangles' mean normal, for closest-point
// queries from points whose distance to the surface hardly changes along it (inside a tube:
// the wall to a root's outer surface); it costs about a fifth of the build, so only the users
// that need it pay. Not safe to call while the BVH is queried.
//
// Children come after their parent, so one pass from the end gathers each node's range of
// triangles (a subtree's triangles lie together in leaf order) and how many its leaves hold.
func (b *BVH) AddSlabs() {
	b.slabs = make([]bvhSlab, len(b.nodes))
	first := make([]int32, len(b.nodes))
	end := make([]int32, len(b.nodes))
	count := make([]int32, len(b.nodes))
	for i := len(b.nodes) - 1; i >= 0; i-- {
		nd := &b.nodes[i]
		if nd.count > 0 {
			first[i], end[i], count[i] = nd.first, nd.first+nd.count, nd.count
		} else {
			l, r := nd.first, nd.first+1
			first[i], end[i], count[i] = min(first[l], first[r]), max(end[l], end[r]), count[l]+count[r]
		}
		if count[i] > slabMaxTriangles || end[i]-first[i] != count[i] {
			continue
		}
		var n mgl64.Vec3
		area := 0.0
		for t := first[i]; t < end[i]; t++ {
			c := b.tris[t].e1.Cross(b.tris[t].e2)
			n = n.Add(c)
			area += c.Len()
		}
		l := n.Len()
		if !(l > 0.9*area) || l == 0 {
			continue // curved: the planes would lie far apart
		}
		n = n.Mul(1 / l)
		lo, hi := math.Inf(1), math.Inf(-1)
		for t := first[i]; t < end[i]; t++ {
			tr := &b.tris[t]
			a := n.Dot(tr.a)
			for _, d := range [3]float64{a, a + n.Dot(tr.e1), a + n.Dot(tr.e2)} {
				lo, hi = min(lo, d), max(hi, d)
			}
		}
		pad := 1e-12*(math.Abs(lo)+math.Abs(hi)) + 1e-12
		b.slabs[i] = bvhSlab{n: n, lo: lo - pad, hi: hi + pad}
	}
}

// lowerDist2 is a lower bound of the squared distance from p to node i's triangles: the box's,
// or the slab's where that is larger.
func (b *BVH) lowerDist2(i int32, p mgl64.Vec3) float64 {
	n := &b.nodes[i]
	d2 := boxDist2(n.lo, n.hi, p)
	if b.slabs == nil {
		return d2
	}
	if sl := &b.slabs[i]; sl.n != (mgl64.Vec3{}) {
		x := sl.n.Dot(p)
		if d := max(sl.lo-x, x-sl.hi); d > 0 && d*d > d2 {
			return d * d
		}
	}
	return d2
}

// bvhNode is a box; a leaf lists count triangles from first, an inner node (count 0) has its
// children at first and first+1.
type bvhNode struct {
	lo, hi mgl64.Vec3
	first  int32
	count  int32
}

// bvhTri stores a corner and two edges, as the ray test wants them.
type bvhTri struct {
	a, e1, e2 mgl64.Vec3
	id        int32
}

// Hit is where a ray first meets the surface: Point = orig + T*dir.
type Hit struct {
	T     float64
	Tri   int32
	Point mgl64.Vec3
}

const (
	bvhLeafSize = 4
	bvhBins     = 12
	// Nodes of at most bvhSmallNode triangles split at the middle of their centres.
	bvhSmallNode = 32
	// Nodes above bvhSampleAbove triangles bin a strided sample of about bvhSample.
	bvhSampleAbove = 8192
	bvhSample      = 2048
	// Past this depth splits go by count, so the tree is at most about 40 + 31 deep and a
	// query's stack (one entry per level plus one) cannot overflow.
	bvhSAHDepth   = 40
	bvhStackDepth = 96
)

// bvhItem is a triangle's box and centre while building, in float32 to halve the memory the
// build streams through; node boxes are refitted in float64 afterwards.
type bvhItem struct {
	lo, hi [3]float32
	id     int32
}

// centre is kept doubled ((lo + hi), not halved): only comparisons and bins use it.
func (it *bvhItem) centre(k int) float32 { return it.lo[k] + it.hi[k] }

// bvhBounds is a box plus the box of the (doubled) centres inside it.
type bvhBounds struct{ lo, hi, clo, chi [3]float32 }

func emptyBounds() bvhBounds {
	inf := float32(math.Inf(1))
	return bvhBounds{lo: [3]float32{inf, inf, inf}, hi: [3]float32{-inf, -inf, -inf},
		clo: [3]float32{inf, inf, inf}, chi: [3]float32{-inf, -inf, -inf}}
}

// add grows the bounds by an item (branch-free min and max; items carry no NaN).
func (b *bvhBounds) add(it *bvhItem) {
	for k := 0; k < 3; k++ {
		b.lo[k] = min(b.lo[k], it.lo[k])
		b.hi[k] = max(b.hi[k], it.hi[k])
		c := it.centre(k)
		b.clo[k] = min(b.clo[k], c)
		b.chi[k] = max(b.chi[k], c)
	}
}

// addCentre grows only the box of centres: a child's own box is never read while building
// (splits look at centres, bins at boxes, and finish refits every box), so partitions skip it.
func (b *bvhBounds) addCentre(it *bvhItem) {
	for k := 0; k < 3; k++ {
		c := it.centre(k)
		b.clo[k] = min(b.clo[k], c)
		b.chi[k] = max(b.chi[k], c)
	}
}

func (b *bvhBounds) merge(o *bvhBounds) {
	for k := 0; k < 3; k++ {
		b.lo[k] = min(b.lo[k], o.lo[k])
		b.hi[k] = max(b.hi[k], o.hi[k])
		b.clo[k] = min(b.clo[k], o.clo[k])
		b.chi[k] = max(b.chi[k], o.chi[k])
	}
}

// mergeBox grows only the box (bestBin reads areas, not centres).
func (b *bvhBounds) mergeBox(o *bvhBounds) {
	for k := 0; k < 3; k++ {
		b.lo[k] = min(b.lo[k], o.lo[k])
		b.hi[k] = max(b.hi[k], o.hi[k])
	}
}

func (b *bvhBounds) area() float64 {
	dx, dy, dz := float64(b.hi[0]-b.lo[0]), float64(b.hi[1]-b.lo[1]), float64(b.hi[2]-b.lo[2])
	if !(dx >= 0) {
		return 0
	}
	return dx*dy + dy*dz + dz*dx
}

type bvhBuilder struct {
	items []bvhItem
	bin   []uint8 // scratch: each item's bin in the current split
	nodes []bvhNode
	// forkAbove: subtrees of more items are split into tasks (bvhForkAbove; tests build
	// serially with a larger one to compare).
	forkAbove int
}

// NewBVH builds the hierarchy by binned surface-area-heuristic splits (Wald, "On fast
// construction of SAH-based bounding volume hierarchies", 2007), large subtrees as tasks the
// cores share. The tree depends only on the mesh, not on how the work was shared. Triangles
// whose indices are out of range are left out.
func NewBVH(m *Mesh) *BVH { return newBVH(m, bvhForkAbove) }

func newBVH(m *Mesh, forkAbove int) *BVH {
	nv := int32(len(m.Vertices))
	b := &bvhBuilder{items: make([]bvhItem, 0, len(m.Triangles)), forkAbove: forkAbove}
	root := emptyBounds()
	for t, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		p, q, r := &m.Vertices[tri[0]], &m.Vertices[tri[1]], &m.Vertices[tri[2]] // not copied
		it := bvhItem{id: int32(t)}
		for k := 0; k < 3; k++ {
			lo, hi := min(p[k], q[k], r[k]), max(p[k], q[k], r[k])
			if !(lo-lo == 0 && hi-hi == 0) { // NaN or infinite corner: park it at 0; it is never hit
				lo, hi = 0, 0
			}
			it.lo[k], it.hi[k] = float32(lo), float32(hi)
		}
		b.items = append(b.items, it)
		root.add(&b.items[len(b.items)-1])
	}
	out := &BVH{}
	n := len(b.items)
	if n == 0 {
		return out
	}
	b.bin = make([]uint8, n)
	out.tris = make([]bvhTri, n)
	b.buildRoot(root, m, out.tris)
	out.nodes = b.nodes
	return out
}

// finish fills the triangles of the builder's leaves (its share of tris, in leaf order) and
// refits its boxes exactly in float64, bottom-up: children always come after their parent.
func (b *bvhBuilder) finish(m *Mesh, tris []bvhTri) {
	// Each item is in one leaf: fill a leaf's triangles and its box together, while in cache.
	nodes := b.nodes
	for i := range nodes {
		nd := &nodes[i]
		if nd.count == 0 {
			continue
		}
		for j := nd.first; j < nd.first+nd.count; j++ {
			t := b.items[j].id
			// Written out by coordinate: the same subtractions as Vec3.Sub without the
			// copies of whole vectors through the stack.
			tri := &m.Triangles[t]
			p, q, r := &m.Vertices[tri[0]], &m.Vertices[tri[1]], &m.Vertices[tri[2]]
			tr := &tris[j]
			tr.a = *p
			tr.e1 = mgl64.Vec3{q[0] - p[0], q[1] - p[1], q[2] - p[2]}
			tr.e2 = mgl64.Vec3{r[0] - p[0], r[1] - p[1], r[2] - p[2]}
			tr.id = t
		}
		lo, hi := triBox(&tris[nd.first])
		for j := nd.first + 1; j < nd.first+nd.count; j++ {
			l, h := triBox(&tris[j])
			growBox(&lo, &hi, l, h)
		}
		nd.lo, nd.hi = lo, hi
	}
	for i := len(nodes) - 1; i >= 0; i-- {
		nd := &nodes[i]
		if nd.count > 0 {
			continue
		}
		lo, hi := nodes[nd.first].lo, nodes[nd.first].hi
		growBox(&lo, &hi, nodes[nd.first+1].lo, nodes[nd.first+1].hi)
		nd.lo, nd.hi = lo, hi
	}
}

func triBox(t *bvhTri) (lo, hi mgl64.Vec3) {
	for k := 0; k < 3; k++ {
		p, q, r := t.a[k], t.a[k]+t.e1[k], t.a[k]+t.e2[k]
		lo[k], hi[k] = min(p, q, r), max(p, q, r)
	}
	return
}

// bvhForkAbove is the size above which a subtree's two halves are built as separate tasks:
// small enough that many tasks keep both cores busy to the end (two halves alone finished
// 0.4 s apart on a 4M-triangle canal while other work shared the cores), large enough that
// a task's own node array and goroutine cost nothing beside its build.
const bvhForkAbove = 1 << 15

// bvhTask is a subtree built on its own: either a serial build into its own node array
// (sub), or a split whose two sides are tasks (its node is refitted from theirs once joined).
type bvhTask struct {
	sub         *bvhBuilder
	left, right *bvhTask
	// below is how many nodes the subtree holds besides its root.
	below int
}

// buildRoot builds the tree as tasks (the right side of each large split on a goroutine of
// its own, so the cores share the work to the end), then joins their node arrays into the
// layout a serial build gives: a node's two children side by side, then the left child's
// subtree, then the right's. Items and bins of separate tasks are disjoint ranges.
func (b *bvhBuilder) buildRoot(root bvhBounds, m *Mesh, tris []bvhTri) {
	t := b.task(0, len(b.items), 0, root, m, tris)
	if t.sub != nil {
		b.nodes = t.sub.nodes
		return
	}
	b.nodes = make([]bvhNode, 1+t.below)
	var serial []placedTask
	t.place(b.nodes, 0, 1, &serial)
	parallel.For(0, len(serial), func(_, i int) { serial[i].copyInto(b.nodes) })
	t.refit(b.nodes, 0)
}

// task builds items[begin:end] (whose bounds are bd) as a serial subtree, or splits it and
// builds the two sides as tasks, the right one on another goroutine.
func (b *bvhBuilder) task(begin, end, depth int, bd bvhBounds, m *Mesh, tris []bvhTri) *bvhTask {
	if end-begin <= b.forkAbove {
		sub := &bvhBuilder{items: b.items, bin: b.bin, nodes: make([]bvhNode, 1, bvhNodesFor(end-begin))}
		sub.build(0, begin, end, depth, bd)
		sub.finish(m, tris)
		return &bvhTask{sub: sub, below: len(sub.nodes) - 1}
	}
	top := &bvhBuilder{items: b.items, bin: b.bin, nodes: make([]bvhNode, 1)}
	mid, lb, rb := top.split(0, begin, end, depth, bd)
	if mid < 0 { // a leaf (never at this size, but split decides)
		top.finish(m, tris)
		return &bvhTask{sub: top}
	}
	t := &bvhTask{}
	done := make(chan struct{})
	go func() {
		t.right = b.task(mid, end, depth+1, rb, m, tris)
		close(done)
	}()
	t.left = b.task(begin, mid, depth+1, lb, m, tris)
	<-done
	t.below = 2 + t.left.below + t.right.below
	return t
}

// placedTask is a serial subtree with the places of its root (at) and of the rest (from).
type placedTask struct {
	sub      *bvhBuilder
	at, from int32
}

// place puts a split's own node at nodes[at] (its children at from and from + 1, their
// subtrees after them) and lists the serial subtrees with their places.
func (t *bvhTask) place(nodes []bvhNode, at, from int32, serial *[]placedTask) {
	if t.sub != nil {
		*serial = append(*serial, placedTask{sub: t.sub, at: at, from: from})
		return
	}
	nodes[at] = bvhNode{first: from}
	t.left.place(nodes, from, from+2, serial)
	t.right.place(nodes, from+1, from+2+int32(t.left.below), serial)
}

// copyInto copies a serial subtree into its places: its local index i > 0 goes to
// from + i - 1, so an inner node's children index moves with it.
func (p placedTask) copyInto(nodes []bvhNode) {
	local := p.sub.nodes
	move := func(nd bvhNode) bvhNode {
		if nd.count == 0 {
			nd.first += p.from - 1
		}
		return nd
	}
	nodes[p.at] = move(local[0])
	dst := nodes[p.from : p.from+int32(len(local))-1]
	for i, nd := range local[1:] {
		dst[i] = move(nd)
	}
}

// refit gives the splits' nodes (t's at index at) their boxes from their children, bottom-up;
// serial subtrees came refitted.
func (t *bvhTask) refit(nodes []bvhNode, at int32) {
	if t.sub != nil {
		return
	}
	nd := &nodes[at]
	t.left.refit(nodes, nd.first)
	t.right.refit(nodes, nd.first+1)
	l, r := &nodes[nd.first], &nodes[nd.first+1]
	nd.lo, nd.hi = l.lo, l.hi
	growBox(&nd.lo, &nd.hi, r.lo, r.hi)
}

// bvhNodesFor is room for the nodes of a tree over n triangles: leaves hold at most
// bvhLeafSize and on canal meshes about 3 on average (0.63 nodes per triangle on tubes of
// 20k and 4M triangles), so the node array is seldom grown (each growth copies it).
func bvhNodesFor(n int) int { return 2*n/3 + 16 }

// build makes node the root of the subtree over items[begin:end].
func (b *bvhBuilder) build(node int, begin, end, depth int, bd bvhBounds) {
	mid, lb, rb := b.split(node, begin, end, depth, bd)
	if mid < 0 {
		return
	}
	left := len(b.nodes)
	b.nodes = append(b.nodes, bvhNode{}, bvhNode{})
	b.nodes[node].first = int32(left)
	b.build(left, begin, mid, depth+1, lb)
	b.build(left+1, mid, end, depth+1, rb)
}

// split makes node a leaf (returning -1) or partitions its items, returning the split index
// and the bounds of the two sides.
func (b *bvhBuilder) split(node int, begin, end, depth int, bd bvhBounds) (int, bvhBounds, bvhBounds) {
	count := end - begin
	if count <= bvhLeafSize {
		b.nodes[node].first, b.nodes[node].count = int32(begin), int32(count)
		return -1, bd, bd
	}
	axis := 0
	ext := [3]float32{bd.chi[0] - bd.clo[0], bd.chi[1] - bd.clo[1], bd.chi[2] - bd.clo[2]}
	if ext[1] > ext[axis] {
		axis = 1
	}
	if ext[2] > ext[axis] {
		axis = 2
	}
	mid := -1
	var lb, rb bvhBounds
	switch {
	case ext[axis] > 0 && depth < bvhSAHDepth && count <= bvhSmallNode:
		mid, lb, rb = b.midpointSplit(begin, end, axis, bd.clo[axis]+ext[axis]/2)
	case ext[axis] > 0 && depth < bvhSAHDepth:
		mid, lb, rb = b.sahSplit(begin, end, axis, bd.clo[axis], ext[axis])
	}
	if mid <= begin || mid >= end {
		// Equal centres or too deep: halve by count.
		mid = (begin + end) / 2
		slices.SortFunc(b.items[begin:end], func(x, y bvhItem) int {
			switch {
			case x.centre(axis) < y.centre(axis):
				return -1
			case x.centre(axis) > y.centre(axis):
				return 1
			}
			return int(x.id - y.id)
		})
		lb, rb = emptyBounds(), emptyBounds()
		for i := begin; i < mid; i++ {
			lb.addCentre(&b.items[i])
		}
		for i := mid; i < end; i++ {
			rb.addCentre(&b.items[i])
		}
	}
	return mid, lb, rb
}

// sahSplit bins centres along axis and partitions at the plane of least surface-area cost.
// It returns the split index (or -1 when binning cannot separate the triangles) and the
// bounds of the two sides.
func (b *bvhBuilder) sahSplit(begin, end, axis int, c0, ext float32) (int, bvhBounds, bvhBounds) {
	var cnt [bvhBins]int
	var bins [bvhBins]bvhBounds
	items, binOf := b.items[begin:end], b.bin[begin:end]
	scale := bvhBins / ext
	binIndex := func(it *bvhItem) int {
		k := int((it.centre(axis) - c0) * scale)
		return min(max(k, 0), bvhBins-1)
	}
	// Large nodes choose their plane from an evenly strided sample (the cost curve is smooth
	// at that size) and get exact child bounds while partitioning, saving a pass.
	if len(items) > bvhSampleAbove {
		for i := range bins {
			bins[i] = emptyBounds()
		}
		for i := 0; i < len(items); i += len(items) / bvhSample {
			k := binIndex(&items[i])
			cnt[k]++
			bins[k].add(&items[i])
		}
		if best := bestBin(&cnt, &bins); best >= 0 {
			lb, rb := emptyBounds(), emptyBounds()
			i, j := 0, len(items)-1
			for i <= j {
				if binIndex(&items[i]) < best {
					lb.addCentre(&items[i])
					i++
				} else {
					rb.addCentre(&items[i])
					items[i], items[j] = items[j], items[i]
					j--
				}
			}
			return begin + i, lb, rb
		}
		cnt = [bvhBins]int{} // the sample fell in one bin: bin everything
	}
	for i := range bins {
		bins[i] = emptyBounds()
	}
	for i := range items {
		k := binIndex(&items[i])
		binOf[i] = uint8(k)
		cnt[k]++
		bins[k].add(&items[i])
	}
	best := bestBin(&cnt, &bins)
	if best < 0 {
		return -1, bvhBounds{}, bvhBounds{}
	}
	lb, rb := emptyBounds(), emptyBounds()
	for k := 0; k < bvhBins; k++ {
		if k < best {
			lb.merge(&bins[k])
		} else {
			rb.merge(&bins[k])
		}
	}
	i, j := 0, len(items)-1
	for i <= j {
		if int(binOf[i]) < best {
			i++
		} else {
			items[i], items[j] = items[j], items[i]
			binOf[i], binOf[j] = binOf[j], binOf[i]
			j--
		}
	}
	return begin + i, lb, rb
}

// midpointSplit partitions small nodes at the middle of their centres' extent in one pass:
// binning costs more than it saves there. Both sides get at least one item when the extent
// is not zero.
func (b *bvhBuilder) midpointSplit(begin, end, axis int, at float32) (int, bvhBounds, bvhBounds) {
	items := b.items[begin:end]
	lb, rb := emptyBounds(), emptyBounds()
	i, j := 0, len(items)-1
	for i <= j {
		if items[i].centre(axis) < at {
			lb.addCentre(&items[i])
			i++
		} else {
			rb.addCentre(&items[i])
			items[i], items[j] = items[j], items[i]
			j--
		}
	}
	return begin + i, lb, rb
}

// bestBin returns the cheapest split plane (bins below it go left), or -1.
func bestBin(cnt *[bvhBins]int, bins *[bvhBins]bvhBounds) int {
	var rightArea [bvhBins]float64
	var rightCnt [bvhBins]int
	acc := emptyBounds()
	rc := 0
	for i := bvhBins - 1; i > 0; i-- {
		acc.mergeBox(&bins[i])
		rc += cnt[i]
		rightArea[i], rightCnt[i] = acc.area(), rc
	}
	left := emptyBounds()
	lc := 0
	best, bestCost := -1, math.Inf(1)
	for i := 1; i < bvhBins; i++ {
		left.mergeBox(&bins[i-1])
		lc += cnt[i-1]
		if lc == 0 || rightCnt[i] == 0 {
			continue
		}
		if c := float64(lc)*left.area() + float64(rightCnt[i])*rightArea[i]; c < bestCost {
			best, bestCost = i, c
		}
	}
	return best
}

func growBox(lo, hi *mgl64.Vec3, plo, phi mgl64.Vec3) {
	for k := 0; k < 3; k++ {
		if plo[k] < lo[k] {
			lo[k] = plo[k]
		}
		if phi[k] > hi[k] {
			hi[k] = phi[k]
		}
	}
}

// rayBox returns whether the ray enters the box before tMax (and after 0).
func rayBox(lo, hi, o, inv mgl64.Vec3, tMax float64) bool {
	_, ok := rayBoxEnter(lo, hi, o, inv, tMax)
	return ok
}

// rayTri is the Moller-Trumbore test; it returns t, the barycentric u, v and det.
func rayTri(tr *bvhTri, o, d mgl64.Vec3) (t, u, v, det float64, ok bool) {
	p := d.Cross(tr.e2)
	det = tr.e1.Dot(p)
	if det == 0 {
		return
	}
	inv := 1 / det
	s := o.Sub(tr.a)
	u = s.Dot(p) * inv
	if u < 0 || u > 1 {
		return
	}
	q := s.Cross(tr.e1)
	v = d.Dot(q) * inv
	if v < 0 || u+v > 1 {
		return
	}
	t = tr.e2.Dot(q) * inv
	return t, u, v, det, true
}

func inverse(d mgl64.Vec3) mgl64.Vec3 {
	return mgl64.Vec3{1 / d[0], 1 / d[1], 1 / d[2]}
}

// Ray returns the first hit with 0 < T < tMax along orig + T*dir (dir need not be unit;
// T is in units of dir).
func (b *BVH) Ray(orig, dir mgl64.Vec3, tMax float64) (Hit, bool) {
	var hit Hit
	if len(b.nodes) == 0 || !(tMax > 0) || dir == (mgl64.Vec3{}) {
		return hit, false
	}
	inv := inverse(dir)
	best := tMax
	found := false
	// Each entry keeps where the ray enters its box: both children are tested at their
	// parent, the nearer is visited first, and a box entered beyond the best hit so far is
	// dropped when its turn comes.
	var stack [bvhStackDepth]struct {
		node  int32
		enter float64
	}
	root := &b.nodes[0]
	t0, ok := rayBoxEnter(root.lo, root.hi, orig, inv, best)
	if !ok {
		return hit, false
	}
	stack[0].enter = t0
	sp := 1
	for sp > 0 {
		sp--
		if stack[sp].enter > best {
			continue
		}
		n := &b.nodes[stack[sp].node]
		if n.count > 0 {
			for i := n.first; i < n.first+n.count; i++ {
				tr := &b.tris[i]
				if t, _, _, _, ok := rayTri(tr, orig, dir); ok && t > 0 && t < best {
					best, found = t, true
					hit.Tri = tr.id
				}
			}
			continue
		}
		l, r := n.first, n.first+1
		tl, okl := rayBoxEnter(b.nodes[l].lo, b.nodes[l].hi, orig, inv, best)
		tr, okr := rayBoxEnter(b.nodes[r].lo, b.nodes[r].hi, orig, inv, best)
		switch {
		case okl && okr:
			if tr < tl {
				l, r, tl, tr = r, l, tr, tl
			}
			stack[sp].node, stack[sp].enter = r, tr
			stack[sp+1].node, stack[sp+1].enter = l, tl
			sp += 2
		case okl:
			stack[sp].node, stack[sp].enter = l, tl
			sp++
		case okr:
			stack[sp].node, stack[sp].enter = r, tr
			sp++
		}
	}
	if !found {
		return Hit{}, false
	}
	hit.T = best
	hit.Point = orig.Add(dir.Mul(best))
	return hit, true
}

// rayBoxEnter is rayBox that also returns where the ray enters the box (0 from inside).
func rayBoxEnter(lo, hi, o, inv mgl64.Vec3, tMax float64) (float64, bool) {
	tn, tf := 0.0, tMax
	for k := 0; k < 3; k++ {
		t1 := (lo[k] - o[k]) * inv[k]
		t2 := (hi[k] - o[k]) * inv[k]
		if t1 > t2 {
			t1, t2 = t2, t1
		}
		// NaN (origin on a slab plane of a flat direction) constrains nothing.
		if t1 > tn {
			tn = t1
		}
		if t2 < tf {
			tf = t2
		}
	}
	return tn, tn <= tf
}

// Closest returns the surface point nearest p, its triangle and the distance. With no
// triangles it returns p, -1 and +Inf.
func (b *BVH) Closest(p mgl64.Vec3) (q mgl64.Vec3, tri int32, dist float64) {
	q, tri, dist, _ = b.ClosestWithin(p, math.Inf(1))
	if tri < 0 {
		return p, -1, math.Inf(1)
	}
	return q, tri, dist
}

// ClosestWithin is Closest among the surface points nearer p than limit: a bound known
// beforehand (a nearby query's answer plus how far p moved) prunes most of the tree. ok is
// false when no point is that near.
func (b *BVH) ClosestWithin(p mgl64.Vec3, limit float64) (q mgl64.Vec3, tri int32, dist float64, ok bool) {
	tri = -1
	if len(b.nodes) == 0 {
		return p, -1, math.Inf(1), false
	}
	best2 := limit * limit
	var stack [bvhStackDepth]int32
	sp := 1
	for sp > 0 {
		sp--
		n := &b.nodes[stack[sp]]
		if b.lowerDist2(stack[sp], p) >= best2 {
			continue
		}
		if n.count > 0 {
			for i := n.first; i < n.first+n.count; i++ {
				if d2, c := closestOnStored(&p, &b.tris[i]); d2 < best2 {
					best2, q, tri = d2, c, b.tris[i].id
				}
			}
			continue
		}
		l, r := n.first, n.first+1
		dl := b.lowerDist2(l, p)
		dr := b.lowerDist2(r, p)
		if dl > dr {
			l, r = r, l
		}
		stack[sp], stack[sp+1] = r, l
		sp += 2
	}
	if tri < 0 {
		return p, -1, math.Inf(1), false
	}
	return q, tri, math.Sqrt(best2), true
}

func boxDist2(lo, hi, p mgl64.Vec3) float64 {
	d2 := 0.0
	for k := 0; k < 3; k++ {
		if p[k] < lo[k] {
			d := lo[k] - p[k]
			d2 += d * d
		} else if p[k] > hi[k] {
			d := p[k] - hi[k]
			d2 += d * d
		}
	}
	return d2
}

// closestOnTriangle finds the point of triangle abc nearest p by its Voronoi regions
// (Ericson, Real-Time Collision Detection, 5.1.5).
func closestOnTriangle(p, a, b, c mgl64.Vec3) mgl64.Vec3 {
	x, y, z := closestOnTriangleXYZ(p[0], p[1], p[2], a[0], a[1], a[2], b[0], b[1], b[2], c[0], c[1], c[2])
	return mgl64.Vec3{x, y, z}
}

// closestOnTriangleXYZ is closestOnTriangle on plain numbers, each operation in the order the
// Vec3 methods take it, so every result rounds the same: Vec3 values are arrays, which Go
// passes and keeps in memory, and this test runs for every triangle a closest-point query
// looks at (a third of its instructions went to copying vectors).
func closestOnTriangleXYZ(px, py, pz, ax, ay, az, bx, by, bz, cx, cy, cz float64) (x, y, z float64) {
	abx, aby, abz := bx-ax, by-ay, bz-az
	acx, acy, acz := cx-ax, cy-ay, cz-az
	apx, apy, apz := px-ax, py-ay, pz-az
	d1 := abx*apx + aby*apy + abz*apz
	d2 := acx*apx + acy*apy + acz*apz
	if d1 <= 0 && d2 <= 0 {
		return ax, ay, az
	}
	bpx, bpy, bpz := px-bx, py-by, pz-bz
	d3 := abx*bpx + aby*bpy + abz*bpz
	d4 := acx*bpx + acy*bpy + acz*bpz
	if d3 >= 0 && d4 <= d3 {
		return bx, by, bz
	}
	vc := d1*d4 - d3*d2
	if vc <= 0 && d1 >= 0 && d3 <= 0 {
		t := d1 / (d1 - d3)
		return ax + abx*t, ay + aby*t, az + abz*t
	}
	cpx, cpy, cpz := px-cx, py-cy, pz-cz
	d5 := abx*cpx + aby*cpy + abz*cpz
	d6 := acx*cpx + acy*cpy + acz*cpz
	if d6 >= 0 && d5 <= d6 {
		return cx, cy, cz
	}
	vb := d5*d2 - d1*d6
	if vb <= 0 && d2 >= 0 && d6 <= 0 {
		t := d2 / (d2 - d6)
		return ax + acx*t, ay + acy*t, az + acz*t
	}
	va := d3*d6 - d5*d4
	if va <= 0 && d4-d3 >= 0 && d5-d6 >= 0 {
		t := (d4 - d3) / ((d4 - d3) + (d5 - d6))
		return bx + (cx-bx)*t, by + (cy-by)*t, bz + (cz-bz)*t
	}
	den := va + vb + vc
	if den == 0 { // zero-area triangle not caught above: fall back to the nearest corner
		q := nearestOf(mgl64.Vec3{px, py, pz}, mgl64.Vec3{ax, ay, az}, mgl64.Vec3{bx, by, bz}, mgl64.Vec3{cx, cy, cz})
		return q[0], q[1], q[2]
	}
	v, w := vb/den, vc/den
	return ax + abx*v + acx*w, ay + aby*v + acy*w, az + abz*v + acz*w
}

// closestOnStored is the point of stored triangle tr nearest p and its squared distance, as
// closestOnTriangle(p, a, a+e1, a+e2) and (c-p).Dot(c-p) give them.
func closestOnStored(p *mgl64.Vec3, tr *bvhTri) (d2 float64, c mgl64.Vec3) {
	a, e1, e2 := &tr.a, &tr.e1, &tr.e2
	x, y, z := closestOnTriangleXYZ(p[0], p[1], p[2], a[0], a[1], a[2],
		a[0]+e1[0], a[1]+e1[1], a[2]+e1[2], a[0]+e2[0], a[1]+e2[1], a[2]+e2[2])
	dx, dy, dz := x-p[0], y-p[1], z-p[2]
	return dx*dx + dy*dy + dz*dz, mgl64.Vec3{x, y, z}
}

func nearestOf(p mgl64.Vec3, pts ...mgl64.Vec3) mgl64.Vec3 {
	best, bd := pts[0], math.Inf(1)
	for _, q := range pts {
		if d := q.Sub(p).LenSqr(); d < bd {
			best, bd = q, d
		}
	}
	return best
}

// insideDirs are fixed, irregular directions so rays rarely run along mesh features.
var insideDirs = [...]mgl64.Vec3{
	{0.3217, 0.7891, 0.5232},
	{-0.6124, 0.2219, 0.7589},
	{0.1187, -0.9063, 0.4055},
	{-0.4471, -0.3352, -0.8291},
	{0.8543, -0.1678, -0.4921},
	{-0.2609, 0.9378, -0.2291},
}

// Inside reports whether p lies inside the closed surface by the parity of crossings along a
// ray. A ray that grazes an edge, a corner or a face's plane is ambiguous, so another
// direction is tried; if every direction grazes, the last count decides.
func (b *BVH) Inside(p mgl64.Vec3) bool {
	if len(b.nodes) == 0 {
		return false
	}
	inside := false
	for _, d := range insideDirs {
		n, clean := b.crossings(p, d)
		inside = n%2 == 1
		if clean {
			break
		}
	}
	return inside
}

// crossings counts the triangles the ray p + t d (t > 0) passes through, and whether every
// crossing was clear of edges and of the triangle's plane.
func (b *BVH) crossings(p, d mgl64.Vec3) (n int, clean bool) {
	const edgeEps = 1e-9
	inv := inverse(d)
	clean = true
	var stack [bvhStackDepth]int32
	sp := 1
	for sp > 0 {
		sp--
		nd := &b.nodes[stack[sp]]
		if !rayBox(nd.lo, nd.hi, p, inv, math.Inf(1)) {
			continue
		}
		if nd.count == 0 {
			stack[sp], stack[sp+1] = nd.first, nd.first+1
			sp += 2
			continue
		}
		for i := nd.first; i < nd.first+nd.count; i++ {
			tr := &b.tris[i]
			t, u, v, det, ok := rayTri(tr, p, d)
			if !ok {
				// A ray nearly in the plane can slip between neighbours: note it.
				if nearPlane(tr, d, det) && planeCloseToRay(tr, p, d) {
					clean = false
				}
				continue
			}
			scale := tr.e1.Len() + tr.e2.Len()
			if math.Abs(t)*d.Len() < 1e-12*scale {
				clean = false // p on the surface
				continue
			}
			if t <= 0 {
				continue
			}
			n++
			if u < edgeEps || v < edgeEps || 1-u-v < edgeEps || nearPlane(tr, d, det) {
				clean = false
			}
		}
	}
	return n, clean
}

// nearPlane: the ray meets the triangle's plane at a grazing angle.
func nearPlane(tr *bvhTri, d mgl64.Vec3, det float64) bool {
	return math.Abs(det) <= 1e-9*tr.e1.Len()*tr.e2.Len()*d.Len()
}

// planeCloseToRay: the ray's line passes near the triangle's box (only then does a grazing
// miss matter).
func planeCloseToRay(tr *bvhTri, p, d mgl64.Vec3) bool {
	lo, hi := tr.a, tr.a
	for _, q := range [2]mgl64.Vec3{tr.a.Add(tr.e1), tr.a.Add(tr.e2)} {
		growBox(&lo, &hi, q, q)
	}
	pad := 1e-9 * (tr.e1.Len() + tr.e2.Len())
	lo = lo.Sub(mgl64.Vec3{pad, pad, pad})
	hi = hi.Add(mgl64.Vec3{pad, pad, pad})
	return rayBox(lo, hi, p, inverse(d), math.Inf(1))
}
