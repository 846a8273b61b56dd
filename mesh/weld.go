package mesh

import (
	"math"
	"unsafe"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh/parallel"
)

// Weld turns a triangle soup (three corners per triangle, in input order) into an indexed
// mesh, merging corners that lie within tol of an already kept vertex. Vertices are numbered
// in order of first appearance and keep the coordinates of that first corner. A corner
// identical to an earlier one joins that corner's vertex; a new position joins the first kept
// vertex found within tol, searching its own grid cell (newest first), then the neighbouring
// cells in a fixed order. So the result depends only on the input order, never on map order or
// core count. tol <= 0 merges only identical points. Non-finite corners are never merged.
// Corners past a multiple of three are ignored.
func Weld(corners []mgl64.Vec3, tol float64) *Mesh {
	return weld(corners, tol, 0, 0)
}

// weld is Weld with, when relTol > 0, the tolerance relTol times the largest coordinate
// magnitude (float32 rounding grows with the magnitude, not with the model's size).
//
// It works in two stages, so that a file whose triangles are scattered costs little more than
// one in building order. First the identical corners (an STL lists each vertex about six
// times) are found (firstOccurrences, on up to workers goroutines; 0: every core). Then only the distinct positions, about a sixth of the
// corners, go through the grid welder for the tolerance, in order of first appearance.
func weld(corners []mgl64.Vec3, tol, relTol float64, workers int) *Mesh {
	nt := len(corners) / 3
	corners = corners[:3*nt]
	if nt == 0 {
		return &Mesh{Triangles: [][3]int32{}}
	}
	return weldFirst(corners, firstOccurrences(corners, workers), tol, relTol, workers)
}

// weldFirst is weld once first (see firstOccurrences) is known.
func weldFirst(corners []mgl64.Vec3, first []int32, tol, relTol float64, workers int) *Mesh {
	pos := make([]mgl64.Vec3, 0, len(corners)/5)
	for i, f := range first {
		if int(f) == i {
			pos = append(pos, corners[i])
		}
		first[i] = first[f] // the first corner itself (first[f] is final: f <= i)
	}
	return weldPositions(first, pos, nil, tol, relTol, workers)
}

// weldPositions is the tolerance weld once the identical corners are known: first[i] is
// the first corner with corner i's position, pos the positions of the corners that are their
// own first, in corner order (only these are read, about a sixth of the corners); starts,
// when not nil, is distinctStarts(first).
func weldPositions(first []int32, pos []mgl64.Vec3, starts []int32, tol, relTol float64, workers int) *Mesh {
	m := &Mesh{Triangles: make([][3]int32, len(first)/3)}
	if len(m.Triangles) == 0 {
		return m
	}
	w := newWelder(pos, tol, relTol)
	alone := w.alone(pos, workers)
	hashed := len(pos) - countTrue(alone)
	// vertex[d] is position d's vertex: the one part that must go in order, and only over
	// the positions; nil when every position is a vertex of its own.
	var vertex []int32
	if hashed == 0 {
		m.Vertices = pos
	} else {
		w.reserve(len(pos), hashed)
		vertex = make([]int32, len(pos))
		for d, p := range pos {
			if alone[d] {
				vertex[d] = w.add(p)
			} else {
				vertex[d] = w.lookup(p)
			}
		}
		m.Vertices = w.verts
	}
	// Then every corner's vertex, stretches on every core: the first corner of a position
	// takes the position's vertex, and a repeat its first corner's, at once when that lies
	// in the same stretch (as it mostly does in an ordered file), after every stretch is done
	// otherwise.
	out := unsafeFlatten(m.Triangles)
	if starts == nil {
		starts = distinctStarts(first[:len(out)], workers)
	}
	parallel.For(workers, len(starts), func(_, st int) {
		d := starts[st]
		lo, hi := st*cornerStretch, min(len(out), (st+1)*cornerStretch)
		for i := lo; i < hi; i++ {
			switch f := int(first[i]); {
			case f == i:
				if vertex == nil {
					out[i] = d
				} else {
					out[i] = vertex[d]
				}
				d++
			case f >= lo:
				out[i] = out[f]
			}
		}
	})
	parallel.For(workers, len(starts), func(_, st int) {
		lo, hi := st*cornerStretch, min(len(out), (st+1)*cornerStretch)
		for i := lo; i < hi; i++ {
			if f := first[i]; int(f) < lo {
				out[i] = out[f]
			}
		}
	})
	return m
}

// cornerStretch is how many corners one goroutine takes at a time in a per-corner pass.
const cornerStretch = 1 << 16

// distinctStarts returns, for each stretch of cornerStretch corners, how many corners
// before it are their own first (first[i] == i): where its distinct positions start.
func distinctStarts(first []int32, workers int) []int32 {
	starts := make([]int32, (len(first)+cornerStretch-1)/cornerStretch)
	parallel.For(workers, len(starts), func(_, st int) {
		n := int32(0)
		for i := st * cornerStretch; i < min(len(first), (st+1)*cornerStretch); i++ {
			if int(first[i]) == i {
				n++
			}
		}
		starts[st] = n
	})
	at := int32(0)
	for st, n := range starts {
		starts[st] = at
		at += n
	}
	return starts
}

func countTrue(b []bool) int {
	n := 0
	for _, x := range b {
		if x {
			n++
		}
	}
	return n
}

// alone tells, for each distinct position (in corner order), whether no other distinct
// position can lie within the tolerance of it: no other position's grid cell is one of the
// cells its box of twice the tolerance (the margin covers rounding) touches, nor touched by
// another's box. A position within the tolerance of p lies in p's box, so its own cell is one
// of p's. Such a position can neither find nor be found by another, so it becomes a vertex
// without the grid hash, whose random probes into a table far larger than the cache are most
// of a weld; the few positions left go through the hash in the same order as before and find
// the same vertices among themselves, so the mesh is the same. Cells are compared through
// their 64-bit hash: two cells that share one only send their positions through the hash.
func (w *welder) alone(pos []mgl64.Vec3, workers int) []bool {
	n := len(pos)
	alone := make([]bool, n)
	for j := range alone {
		alone[j] = true
	}
	if w.exact {
		// Distinct positions are never identical, and only identical ones merge.
		return alone
	}
	// Each position on its own: stretches of them on every core. A cell is 64 tolerances
	// wide, so a box touches at most two per axis, and one in most cases.
	const stretch = 1 << 14
	parts := make([][]cellRec, (n+stretch-1)/stretch)
	parallel.For(workers, len(parts), func(_, sj int) {
		recs := make([]cellRec, 0, stretch+stretch/2)
		for j := sj * stretch; j < min(n, (sj+1)*stretch); j++ {
			p := pos[j]
			if !finiteVec(p) {
				continue // never merged, never in the table
			}
			var lo, hi [3]int64
			for a := range 3 {
				lo[a] = weldCellIndex((p[a] - 2*w.tol) * w.inv)
				hi[a] = weldCellIndex((p[a] + 2*w.tol) * w.inv)
			}
			for x := lo[0]; x <= hi[0]; x++ {
				for y := lo[1]; y <= hi[1]; y++ {
					for z := lo[2]; z <= hi[2]; z++ {
						recs = append(recs, cellRec{weldHash([3]int64{x, y, z}), int32(j)})
					}
				}
			}
		}
		parts[sj] = recs
	})
	// Group by the top bits of the hash into cache-sized blocks, then find shared cells in
	// each block through a small open-addressing table.
	total := 0
	for _, r := range parts {
		total += len(r)
	}
	bits := 0
	for total>>bits > dedupBlock {
		bits++
	}
	shift := 64 - bits
	start := make([]int32, 1<<bits+1)
	for _, part := range parts {
		for _, r := range part {
			start[r.h>>shift+1]++
		}
	}
	for b := 1; b <= 1<<bits; b++ {
		start[b] += start[b-1]
	}
	recs := make([]cellRec, total)
	fill := append([]int32(nil), start[:1<<bits]...)
	for _, part := range parts {
		for _, r := range part {
			b := r.h >> shift
			recs[fill[b]] = r
			fill[b]++
		}
	}
	blocks := 1 << bits
	k := min(parallel.Workers(workers, blocks), maxDedupWorkers)
	tables := make([][]cellRec, k)
	parallel.For(k, blocks, func(wk, b int) {
		blk := recs[start[b]:start[b+1]]
		size := 16
		for size < 2*len(blk) {
			size <<= 1
		}
		if cap(tables[wk]) < size {
			tables[wk] = make([]cellRec, size)
		}
		table := tables[wk][:size]
		for i := range table {
			table[i].j = -1
		}
		mask := uint64(size - 1)
		for _, r := range blk {
			s := r.h & mask
			for {
				e := &table[s]
				if e.j < 0 {
					*e = r
					break
				}
				if e.h == r.h {
					if e.j != r.j {
						alone[e.j], alone[r.j] = false, false
					}
					break
				}
				s = (s + 1) & mask
			}
		}
	})
	return alone
}

// cellRec is a grid cell (its hash) that position j's box touches.
type cellRec struct {
	h uint64
	j int32
}

// unsafeFlatten views the triangles as one list of corner indices.
func unsafeFlatten(t [][3]int32) []int32 {
	return unsafe.Slice(&t[0][0], 3*len(t))
}

// dedupBlock is the size of the blocks identical corners are looked for in: the block and its
// table stay in the L2 cache.
const dedupBlock = 16384

// maxDedupWorkers: the exact dedup reads memory more than it computes; more goroutines than
// this gain nothing.
const maxDedupWorkers = 4

// firstOccurrences returns, for every corner, the index of an earlier corner (or itself) with
// the same coordinates (-0 equal to 0; a NaN only equal to itself), such that following it once
// more (first[first[i]]) gives the first corner of that position.
//
// Most repeats are near their first corner in the file, so a small cache of recent positions
// (it stays in L1/L2) answers them; the corners it misses, which include every first
// occurrence, are deduplicated exactly in cache-sized blocks.
func firstOccurrences(corners []mgl64.Vec3, workers int) []int32 {
	n := len(corners)
	first := make([]int32, n)
	// The corners split into one stretch per core, each with its own cache (see recentPass
	// for why any split gives the same mesh).
	segs := parallel.Workers(workers, max(1, n/weldRecentMinStretch))
	missedIn := make([][]int32, segs)
	parallel.For(segs, segs, func(_, sg int) {
		missedIn[sg] = recentPass(corners, first, sg*n/segs, (sg+1)*n/segs, newRecentCache())
	})
	exactPass(corners, first, joinMissed(missedIn), workers)
	return first
}

// recentCache is the state of recentPass for one goroutine: the cache, and how well it has
// done. A file whose triangles are scattered repeats almost no corner while it is still in
// the cache: once the first recentProbe corners show that, the cache is no longer asked and
// every corner goes to exactPass, which finds the repeats anyway.
type recentCache struct {
	slots        []int32
	seen, missed int
	off          bool
}

const recentProbe = 1 << 14

// newRecentCache is an empty cache for recentPass.
func newRecentCache() *recentCache {
	rc := &recentCache{slots: make([]int32, weldRecentSize)}
	for i := range rc.slots {
		rc.slots[i] = -1
	}
	return rc
}

// recentPass sets first[i] for corners lo..hi-1 that repeat a position the cache holds (it
// holds earlier corners that it missed), provisionally first[i] = i for the others, and
// returns those (ascending): they go to exactPass. A corner the cache answers points at a
// corner the cache missed, and exactPass points every missed corner at the first corner of
// its position (always missed: no cache has seen it before), so first[first[i]] is right
// however the corners are split between caches, as long as each cache sees its corners in
// ascending order.
func recentPass(corners []mgl64.Vec3, first []int32, lo, hi int, rc *recentCache) []int32 {
	// Only indices are kept here; exactPass packs the positions it needs.
	if rc.off {
		missed := make([]int32, hi-lo)
		for i := lo; i < hi; i++ {
			first[i] = int32(i)
			missed[i-lo] = int32(i)
		}
		return missed
	}
	recent := rc.slots
	missed := make([]int32, 0, (hi-lo)/4)
	for i := lo; i < hi; i++ {
		c := corners[i]
		// Neighbouring triangles in a file share corners: the two triangles before this
		// one's answer most repeats without hashing. Their corners' first is set already
		// (they lie in this stretch) and names a corner the cache missed, as needed.
		if t0 := i - i%3 - 6; t0 >= lo {
			if j := matchCorner(corners[t0:t0+6], c); j >= 0 {
				first[i] = first[t0+j]
				continue
			}
		}
		r := &recent[exactHash(c)>>(64-weldRecentBits)]
		if *r >= 0 && corners[*r] == c {
			first[i] = *r
			continue
		}
		first[i] = int32(i)
		missed = append(missed, int32(i))
		if finiteVec(c) {
			*r = int32(i)
		}
	}
	if rc.seen < recentProbe {
		rc.seen += hi - lo
		rc.missed += len(missed)
		// Half the corners missed: an ordered file misses about one in six.
		rc.off = rc.seen >= recentProbe && 2*rc.missed > rc.seen
	}
	return missed
}

// matchCorner returns the place in cs of a corner equal to c (the last such), or -1.
func matchCorner(cs []mgl64.Vec3, c mgl64.Vec3) int {
	for j := len(cs) - 1; j >= 0; j-- {
		if cs[j] == c {
			return j
		}
	}
	return -1
}

// joinMissed puts lists of ascending, successive stretches end to end.
func joinMissed(parts [][]int32) []int32 {
	if len(parts) == 1 {
		return parts[0]
	}
	total := 0
	for _, m := range parts {
		total += len(m)
	}
	missed := make([]int32, 0, total)
	for _, m := range parts {
		missed = append(missed, m...)
	}
	return missed
}

// exactPass points every missed corner (ascending) at the first missed corner of its
// position, deduplicating exactly in cache-sized blocks.
func exactPass(corners []mgl64.Vec3, first []int32, missed []int32, workers int) {
	bits := 0
	for len(missed)>>bits > dedupBlock {
		bits++
	}
	shift := 64 - bits
	count := make([]int32, 1<<bits+1)
	recs := missed
	if bits > 0 {
		packable := true
		for _, i := range missed {
			c := &corners[i]
			count[exactHash(*c)>>shift+1]++
			packable = packable && float32Exact(c)
		}
		for b := 1; b <= 1<<bits; b++ {
			count[b] += count[b-1]
		}
		if packable {
			exactPassPacked(corners, first, missed, count, shift, workers)
			return
		}
		recs = make([]int32, len(missed))
		fill := append([]int32(nil), count[:1<<bits]...)
		for _, i := range missed {
			b := exactHash(corners[i]) >> shift
			recs[fill[b]] = i
			fill[b]++
		}
	} else {
		count[1] = int32(len(missed))
	}
	// Blocks are independent and each sets only its own corners' entries, so they split
	// across cores with the same result on any number.
	blocks := 1 << bits
	k := min(parallel.Workers(workers, blocks), maxDedupWorkers)
	tables := make([][]int32, k)
	parallel.For(k, blocks, func(w, b int) {
		if tables[w] == nil {
			tables[w] = make([]int32, 2*dedupBlock*2)
		}
		dedupInto(first, corners, recs[count[b]:count[b+1]], tables[w])
	})
}

// float32Exact: every coordinate is finite and a float32 value exactly (a binary STL's are).
func float32Exact(c *mgl64.Vec3) bool {
	return float64(float32(c[0])) == c[0] && float64(float32(c[1])) == c[1] && float64(float32(c[2])) == c[2] &&
		c[0]-c[0] == 0 && c[1]-c[1] == 0 && c[2]-c[2] == 0
}

// exactPassPacked is exactPass's blocked dedup on packed copies of the corners (their
// folded float32 bits), grouped by the same top bits of exactHash (count holds the block
// starts): a block is deduplicated without reading the corners, which a scattered file would
// read in random order, a cache miss each.
func exactPassPacked(corners []mgl64.Vec3, first, missed, count []int32, shift, workers int) {
	blocks := len(count) - 1
	recs := make([]keyedCorner, len(missed))
	fill := append([]int32(nil), count[:blocks]...)
	bits := func(v float64) uint32 { return fold32(math.Float32bits(float32(v))) }
	for _, i := range missed {
		c := &corners[i]
		b := exactHash(*c) >> shift
		recs[fill[b]] = keyedCorner{bits(c[0]), bits(c[1]), bits(c[2]), i}
		fill[b]++
	}
	dedupKeyed(first, recs, count, workers)
}

// The recent-positions cache holds the index of the last corner the cache missed for each
// hash slot (64 kB, so it stays in L1/L2; the corner it names was read moments ago).
const (
	weldRecentBits = 14
	weldRecentSize = 1 << weldRecentBits
	// weldRecentMinStretch: fewer corners than this per stretch are not worth a goroutine.
	weldRecentMinStretch = 1 << 18
)

// dedupInto sets first[] for one block of corner indices (ascending) through an
// open-addressing table of positions in the block (table is scratch space).
func dedupInto(first []int32, corners []mgl64.Vec3, blk []int32, table []int32) {
	size := 16
	for size < 2*len(blk) {
		size <<= 1
	}
	if cap(table) < size {
		table = make([]int32, size) // a block the hash filled beyond its share
	}
	table = table[:size]
	for i := range table {
		table[i] = -1
	}
	mask := uint64(size - 1)
	for _, ci := range blk {
		p := corners[ci]
		if !finiteVec(p) {
			first[ci] = ci
			continue
		}
		j := exactHash(p) & mask
		for {
			e := table[j]
			if e < 0 {
				table[j] = ci
				first[ci] = ci
				break
			}
			if corners[e] == p {
				first[ci] = e
				break
			}
			j = (j + 1) & mask
		}
	}
}

// exactHash mixes the bits of a position (+0 folds -0 into 0).
func exactHash(p mgl64.Vec3) uint64 {
	return weldHash([3]int64{int64(math.Float64bits(p[0] + 0)), int64(math.Float64bits(p[1] + 0)), int64(math.Float64bits(p[2] + 0))})
}

// welder is a grid hash: an open-addressing table from cell key to the first vertex of that
// cell, and a per-vertex link to the next vertex of the same cell.
type welder struct {
	tol, tol2 float64
	inv       float64 // 1 / cell size; 0 in exact mode
	exact     bool
	slots     []weldSlot
	mask      uint64
	used      int
	verts     []mgl64.Vec3
	next      []int32
}

// weldSlot is one table entry: a 64-bit hash of the cell stands for the cell. Two cells that
// share a hash share a chain, which costs a few distance checks and never a wrong merge.
type weldSlot struct {
	key  uint64
	head int32 // -1 = empty
}

// weldCellTols is the grid cell of the tolerance search in multiples of the tolerance.
const weldCellTols = 64

// weldMaxCell keeps cell indices far inside int64 whatever the coordinates.
const weldMaxCell = 1 << 40

// newWelder sets the tolerance and grid; pos holds every distinct position (the largest
// coordinate is theirs). Call reserve before adding vertices.
func newWelder(pos []mgl64.Vec3, tol, relTol float64) *welder {
	w := &welder{}
	maxAbs := 0.0
	if tol > 0 || relTol > 0 {
		for ci := range pos {
			c := &pos[ci]
			for k := 0; k < 3; k++ {
				if a := math.Abs(c[k]); a > maxAbs && a <= math.MaxFloat64 {
					maxAbs = a
				}
			}
		}
		if relTol > 0 {
			tol = relTol * maxAbs
		}
	}
	if !(tol > 0) || math.IsInf(tol, 0) {
		w.exact = true
	} else {
		// A cell weldCellTols*tol wide means the tol-box around a point touches at most two
		// cells per axis and seldom more than one, so few points look into a neighbour cell;
		// widen it further when coordinates are huge so indices stay small.
		cell := math.Max(weldCellTols*tol, maxAbs/weldMaxCell)
		w.tol, w.tol2, w.inv = tol, tol*tol, 1/cell
	}
	return w
}

// reserve makes room for verts vertices, hashed of them through the grid hash, so that
// neither the lists nor the table (under half load) grow.
func (w *welder) reserve(verts, hashed int) {
	size := 1024
	for size <= 2*hashed {
		size <<= 1
	}
	w.alloc(size)
	w.verts = make([]mgl64.Vec3, 0, verts)
	w.next = make([]int32, 0, verts)
}

// add makes p a vertex of its own without entering it in the grid hash (a position alone
// in its cell, or a non-finite one).
func (w *welder) add(p mgl64.Vec3) int32 {
	w.verts = append(w.verts, p)
	w.next = append(w.next, -1)
	return int32(len(w.verts) - 1)
}

func (w *welder) alloc(size int) {
	w.slots = make([]weldSlot, size)
	for i := range w.slots {
		w.slots[i].head = -1
	}
	w.mask = uint64(size - 1)
	w.used = 0
}

func weldHash(k [3]int64) uint64 {
	h := uint64(k[0])*0x9E3779B97F4A7C15 ^ uint64(k[1])*0xC2B2AE3D27D4EB4F ^ uint64(k[2])*0x165667B19E3779F9
	return h ^ h>>29
}

// slot returns the table slot of key k: the one holding it, or the empty one where it belongs.
func (w *welder) slot(k [3]int64) uint64 {
	return w.slotOf(weldHash(k))
}

func (w *welder) slotOf(h uint64) uint64 {
	i := h & w.mask
	for w.slots[i].head >= 0 && w.slots[i].key != h {
		i = (i + 1) & w.mask
	}
	return i
}

func (w *welder) cellOf(p mgl64.Vec3) [3]int64 {
	if w.exact {
		// Identical points share their bits; +0 folds -0 into 0.
		return [3]int64{int64(math.Float64bits(p[0] + 0)), int64(math.Float64bits(p[1] + 0)), int64(math.Float64bits(p[2] + 0))}
	}
	return [3]int64{weldCellIndex(p[0] * w.inv), weldCellIndex(p[1] * w.inv), weldCellIndex(p[2] * w.inv)}
}

func weldCellIndex(x float64) int64 {
	f := math.Floor(x)
	if !(f > -weldMaxCell) { // also NaN
		return -weldMaxCell
	}
	if f > weldMaxCell {
		return weldMaxCell
	}
	return int64(f)
}

// findIn returns the first vertex of cell k within tol of p (or -1) and the cell's slot.
func (w *welder) findIn(k [3]int64, p mgl64.Vec3) (int32, uint64) {
	s := w.slot(k)
	for v := w.slots[s].head; v >= 0; v = w.next[v] {
		q := w.verts[v]
		if w.exact {
			if q == p {
				return v, s
			}
			continue
		}
		d := q.Sub(p)
		if d.Dot(d) <= w.tol2 {
			return v, s
		}
	}
	return -1, s
}

// lookup finds or makes the vertex for p through the grid hash.
func (w *welder) lookup(p mgl64.Vec3) int32 {
	if !finiteVec(p) {
		// NaN never equals anything; keeping such points out of the table stops one cell
		// from collecting them all.
		w.verts = append(w.verts, p)
		w.next = append(w.next, -1)
		return int32(len(w.verts) - 1)
	}
	k := w.cellOf(p)
	v, s := w.findIn(k, p)
	if v >= 0 {
		return v
	}
	if !w.exact {
		// Neighbouring cells touched by the tol-box around p (at most two per axis).
		var lo, hi [3]int64
		near := false
		for a := 0; a < 3; a++ {
			lo[a] = weldCellIndex((p[a] - w.tol) * w.inv)
			hi[a] = weldCellIndex((p[a] + w.tol) * w.inv)
			if lo[a] != k[a] || hi[a] != k[a] {
				near = true
			}
		}
		if near {
			for x := lo[0]; x <= hi[0]; x++ {
				for y := lo[1]; y <= hi[1]; y++ {
					for z := lo[2]; z <= hi[2]; z++ {
						c := [3]int64{x, y, z}
						if c == k {
							continue
						}
						if v, _ := w.findIn(c, p); v >= 0 {
							return v
						}
					}
				}
			}
		}
	}
	// The neighbour search did not change the table, so slot s is still k's.
	v = int32(len(w.verts))
	w.verts = append(w.verts, p)
	if w.slots[s].head < 0 {
		w.slots[s] = weldSlot{key: weldHash(k), head: v}
		w.next = append(w.next, -1)
		w.used++
		if 2*w.used > len(w.slots) {
			w.grow()
		}
		return v
	}
	// Prepend keeps the chain walk cheap; order within a cell stays deterministic.
	w.next = append(w.next, w.slots[s].head)
	w.slots[s].head = v
	return v
}

func (w *welder) grow() {
	old := w.slots
	w.alloc(2 * len(old))
	for _, e := range old {
		if e.head >= 0 {
			w.slots[w.slotOf(e.key)] = e
			w.used++
		}
	}
}

// finiteVec: x - x is 0 for finite x and NaN for NaN and infinities.
func finiteVec(p mgl64.Vec3) bool {
	return p[0]-p[0] == 0 && p[1]-p[1] == 0 && p[2]-p[2] == 0
}
