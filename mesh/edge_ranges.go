package mesh

import (
	"math/bits"
	"slices"

	"tapersweep/mesh/parallel"
)

// edgeCountsInRanges is edgeCounts in two streaming passes, for triangles in any order: every
// half-edge is first written, as a key (its smaller vertex's place in its range, the other
// vertex, the direction bit), into the range of vertices its smaller vertex falls in (a few
// hundred ranges; each part of the triangles on a core of its own, one stream of pages per
// range), then each range's keys are radix-sorted in the cache and every run of one edge is
// classified. Nothing is read or written at random over the whole mesh, which a file whose
// triangles are scattered otherwise makes every half-edge do.
func edgeCountsInRanges(m *Mesh, workers int) (boundary, nonManifold, inconsistent int) {
	nv := int32(len(m.Vertices))
	if nv == 0 {
		return 0, 0, 0
	}
	shift, hiBits, wide := rangeLayout(nv)
	var t edgeTally
	if wide {
		t = countInRanges[uint64](m, shift, hiBits, workers)
	} else {
		t = countInRanges[uint32](m, shift, hiBits, workers)
	}
	return t.boundary, t.nonManifold, t.inconsistent
}

// rangeLayout gives, for nv vertices, the ranges' size (1 << shift vertices), the bits of a
// key's other vertex and direction, and whether keys need 64 bits: ranges of at least 4096
// vertices and at most 256 of them, or keys of 32 bits (half the bytes to write and sort)
// when up to 1024 ranges allow it.
func rangeLayout(nv int32) (shift, hiBits uint, wide bool) {
	vbits := uint(bits.Len32(uint32(nv)))
	hiBits = uint(bits.Len32(uint32(max(nv, 1)-1))) + 1
	shift = 12
	if vbits > 20 {
		shift = vbits - 8
	}
	switch {
	case shift+hiBits <= 32:
		return shift, hiBits, false
	case vbits >= 10 && 32-hiBits >= vbits-10:
		return 32 - hiBits, hiBits, false
	}
	return shift, hiBits, true
}

// edgeKey is a half-edge as edgeCountsInRanges keys it.
type edgeKey interface{ ~uint32 | ~uint64 }

func countInRanges[K edgeKey](m *Mesh, shift, hiBits uint, workers int) edgeTally {
	nv := int32(len(m.Vertices))
	nr := int(nv>>shift) + 1
	nt := len(m.Triangles)
	parts := make([]rangeStreams[K], parallel.Workers(workers, (nt+triangleStretch-1)/triangleStretch))
	parallel.For(len(parts), len(parts), func(_, p int) {
		tris := m.Triangles[p*nt/len(parts) : (p+1)*nt/len(parts)]
		parts[p].fill(tris, nv, nr, shift, hiBits)
	})
	k := parallel.Workers(workers, nr)
	sorters := make([]rangeSorter[K], k)
	parallel.For(k, nr, func(w, r int) {
		sorters[w].classify(parts, r, shift, hiBits)
	})
	var t edgeTally
	for _, s := range sorters {
		t.boundary += s.tally.boundary
		t.nonManifold += s.tally.nonManifold
		t.inconsistent += s.tally.inconsistent
	}
	return t
}

// rangePage is how many keys a page of a range's stream holds.
const rangePage = 1024

// rangeStreams holds one part of the triangles' half-edges, range by range, in pages taken in
// turn from one arena: no counting pass first.
type rangeStreams[K edgeKey] struct {
	arena []K
	pages [][]int // pages[r]: range r's pages, by their start in arena
	last  []int   // keys in range r's last page
}

func (s *rangeStreams[K]) fill(tris [][3]int32, nv int32, nr int, shift, hiBits uint) {
	// Enough for every half-edge and one page a range left part full.
	arena := make([]K, 3*len(tris)+nr*rangePage)
	s.arena = arena
	s.pages = make([][]int, nr)
	s.last = make([]int, nr)
	// Where range r's next key goes (int32: an arena of three keys a triangle fits for any
	// surface a file may hold, MaxTriangles, and far beyond).
	at := make([]int32, nr)
	used := 0
	for r := range nr {
		at[r] = int32(used)
		s.pages[r] = append(s.pages[r], used)
		used += rangePage
	}
	mask := int32(1)<<shift - 1
	// put writes the half-edge a -> b, without a branch on its direction (as good as random
	// in a file whose triangles are scattered).
	put := func(a, b int32) {
		lo, hi := min(a, b), max(a, b)
		r := lo >> shift
		i := at[r]
		arena[i] = K(lo&mask)<<hiBits | K(hi)<<1 | K(b2i(b < a))
		i++
		if i%rangePage == 0 {
			i = int32(used)
			s.pages[r] = append(s.pages[r], used)
			used += rangePage
		}
		at[r] = i
	}
	for _, tri := range tris {
		a, b, c := tri[0], tri[1], tri[2]
		if !triInRange(tri, nv) {
			continue
		}
		if a != b {
			put(a, b)
		}
		if b != c {
			put(b, c)
		}
		if c != a {
			put(c, a)
		}
	}
	for r := range nr {
		s.last[r] = int(at[r]) % rangePage
	}
}

// rangeSorter is one goroutine's scratch space for sorting a range at a time.
type rangeSorter[K edgeKey] struct {
	a, b  []K
	tally edgeTally
}

const radixBits = 11

// classify sorts range r's keys of every part and tallies the edges. A least-significant-digit
// radix sort: the other vertex's low 11 bits, then the place in the range (one pass of up to
// 13 bits, or two); the keys of one edge then lie together, and so, rarely, do other edges of
// the same vertex with the same low bits, a group then sorted on its own.
func (s *rangeSorter[K]) classify(parts []rangeStreams[K], r int, shift, hiBits uint) {
	// Digits from the lowest: (shift, width); at most 23 bits of place in a range.
	digits := [3][2]uint{{1, radixBits}, {hiBits, shift}, {0, 0}}
	n := 2
	if shift > 13 {
		digits[1][1] = shift / 2
		digits[2] = [2]uint{hiBits + shift/2, shift - shift/2}
		n = 3
	}
	var hist [3][1 << 13]int32
	sh0, sh1, sh2 := digits[0][0], digits[1][0], digits[2][0]
	m0, m1, m2 := K(1)<<digits[0][1]-1, K(1)<<digits[1][1]-1, K(1)<<digits[2][1]-1
	// The keys of every part, each page counted into the histograms as it is copied.
	a := s.a[:0]
	for p := range parts {
		st := &parts[p]
		for i, pg := range st.pages[r] {
			end := pg + rangePage
			if i == len(st.pages[r])-1 {
				end = pg + st.last[r]
			}
			from := len(a)
			a = append(a, st.arena[pg:end]...)
			for _, x := range a[from:] {
				hist[0][x>>sh0&m0]++
				hist[1][x>>sh1&m1]++
				hist[2][x>>sh2&m2]++
			}
		}
	}
	s.a = a
	if len(a) == 0 {
		return
	}
	if cap(s.b) < len(a) {
		s.b = make([]K, cap(a))
	}
	b := s.b[:len(a)]
	for d := range n {
		radixPass(a, b, hist[d][:1<<digits[d][1]], digits[d][0], 1<<digits[d][1]-1)
		a, b = b, a
	}
	tallyGroups(&s.tally, a, ^K(0)<<hiBits|(1<<radixBits-1)<<1)
}

// radixPass places the keys of from into to by their digit x >> sh & mask, hist holding each
// digit's count.
func radixPass[K edgeKey](from, to []K, hist []int32, sh uint, mask K) {
	at := int32(0)
	for d, n := range hist {
		hist[d] = at
		at += n
	}
	for _, x := range from {
		d := x >> sh & mask
		to[hist[d]] = x
		hist[d]++
	}
}

// tallyGroups tallies keys sorted on their bits in mask: a group of one edge at once, a group
// of several edges after sorting it.
func tallyGroups[K edgeKey](c *edgeTally, keys []K, mask K) {
	for i := 0; i < len(keys); {
		x := keys[i]
		j := i + 1
		for j < len(keys) && keys[j]&mask == x&mask {
			j++
		}
		if j == i+2 && keys[i+1]>>1 == x>>1 {
			// The common case: an edge used once each way, or twice one way.
			c.inconsistent += b2i(keys[i+1] == x)
		} else {
			g := keys[i:j]
			sortKeys(g)
			tallySortedKeys(c, g)
		}
		i = j
	}
}

// sortKeys is an insertion sort: a vertex's buckets and groups mostly hold a few keys.
func sortKeys[K edgeKey](a []K) {
	if len(a) > 32 {
		slices.Sort(a)
		return
	}
	for i := 1; i < len(a); i++ {
		x := a[i]
		j := i - 1
		for j >= 0 && a[j] > x {
			a[j+1] = a[j]
			j--
		}
		a[j+1] = x
	}
}

// tallySortedKeys classifies the runs of sorted keys (edge << 1 | direction bit).
func tallySortedKeys[K edgeKey](c *edgeTally, keys []K) {
	for i := 0; i < len(keys); {
		j := i + 1
		fwd := int(^keys[i] & 1)
		for j < len(keys) && keys[j]>>1 == keys[i]>>1 {
			fwd += int(^keys[j] & 1)
			j++
		}
		switch n := j - i; {
		case n == 1:
			c.boundary++
		case n > 2:
			c.nonManifold++
		case fwd != 1:
			c.inconsistent++
		}
		i = j
	}
}
