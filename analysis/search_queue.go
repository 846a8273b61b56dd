package analysis

import (
	"math"
	"math/bits"
)

// searchQueue is the priority queue of the voxel searches: nodes by distance, popped in order
// of distance (which of nearly equal distances first is left open: the searches give the
// same answers whatever the order, see search). A node whose distance is lowered is pushed
// again and its old entry comes out after it was settled, to be skipped (lazy decrease-key).
//
// Where every edge costs at least wMin > 0 it is a bucket queue (Dial's): buckets a little
// narrower than wMin, so that nothing settled from one bucket can land in it again, every
// node in the lowest bucket is final and may be settled in any order; no node is ever
// compared with another, and a node whose lower distance stays in its bucket is not pushed
// again. Otherwise (an edge of cost 0, costs not finite, or distances past what the buckets
// resolve) it is a radix heap.
type searchQueue struct {
	buckets bucketQueue
	radix   *radixQueue
}

// Bucket widths are wMin less this fraction, far above the rounding of the distances and of
// their bucket numbers (2^-53 of a number below 2^40 buckets, under 2^-12 of a bucket), so a
// relaxation always lands in a later bucket.
const bucketSlack = 1.0 / 256

// maxBuckets bounds the ring of buckets; entries farther ahead wait in an overflow list.
const maxBuckets = 1 << 16

// newSearchQueue makes the queue of a search of n nodes whose edges cost between wMin and
// wMax.
func newSearchQueue(n int, wMin, wMax float64) *searchQueue {
	inv := 1 / (wMin * (1 - bucketSlack))
	// The largest distance is below n edges of wMax: under 2^40 buckets, for the slack.
	if !(wMin > 0) || math.IsInf(wMax, 0) || math.IsNaN(wMax) || !(float64(n)*wMax*inv < 1<<40) {
		return &searchQueue{radix: &radixQueue{}}
	}
	ring := min(1<<bits.Len(uint(int(wMax*inv)+2)), maxBuckets)
	return &searchQueue{buckets: bucketQueue{inv: inv, ring: make([][]int32, ring), mask: ring - 1,
		overMin: math.MaxInt}}
}

// push queues node n at distance d, lowered from old (+Inf when n was not reached); d is not
// below the distance of the last node popped.
func (q *searchQueue) push(d, old float64, n int32) {
	if q.radix != nil {
		q.radix.push(d, n)
		return
	}
	q.buckets.push(d, old, n)
}

// pop removes a node of least distance; false when the queue is empty.
func (q *searchQueue) pop() (int32, bool) {
	if q.radix != nil {
		return q.radix.pop()
	}
	return q.buckets.pop()
}

// bucketQueue is a ring of buckets, bucket b holding the nodes at distances in [b, b+1)/inv.
// The ring reaches len(ring) buckets from the current one; an entry farther ahead waits in
// over until the ring reaches it.
type bucketQueue struct {
	inv     float64
	ring    [][]int32
	mask    int
	cur     int // the lowest bucket that may hold entries
	inRing  int
	over    []overEntry
	overMin int // the least bucket in over (MaxInt when empty)
}

type overEntry struct {
	b int
	n int32
}

func (q *bucketQueue) push(d, old float64, n int32) {
	b := int(d * q.inv)
	if old < math.Inf(1) && int(old*q.inv) == b {
		return // already in that bucket
	}
	q.add(b, n)
}

func (q *bucketQueue) add(b int, n int32) {
	if b-q.cur >= len(q.ring) {
		q.over = append(q.over, overEntry{b, n})
		q.overMin = min(q.overMin, b)
		return
	}
	r := &q.ring[b&q.mask]
	*r = append(*r, n)
	q.inRing++
}

func (q *bucketQueue) pop() (int32, bool) {
	for {
		r := &q.ring[q.cur&q.mask]
		if k := len(*r); k > 0 {
			n := (*r)[k-1]
			*r = (*r)[:k-1]
			q.inRing--
			return n, true
		}
		switch {
		case q.inRing > 0:
			q.cur++
			if q.overMin < q.cur+len(q.ring) {
				q.refill()
			}
		case len(q.over) > 0:
			q.cur = q.overMin
			q.refill()
		default:
			return -1, false
		}
	}
}

// refill moves the entries of over that the ring now reaches into it.
func (q *bucketQueue) refill() {
	over := q.over
	q.over, q.overMin = q.over[:0], math.MaxInt
	for _, e := range over {
		q.add(e.b, e.n) // back into over when still beyond the ring (over's array is reused in order)
	}
}

// radixQueue is a radix heap: Dijkstra pops keys in nondecreasing order, so a key only needs
// sorting against the last one popped, by its highest bit that differs from it. The keys are
// the bits of non-negative float64s, which order as the numbers do. Bucket b holds the keys
// whose highest bit differing from last is bit b-1 (bucket 0: equal to last); a pop refills
// bucket 0 from the lowest non-empty bucket, each of its keys moving to a lower bucket.
type radixQueue struct {
	last    uint64
	full    uint64 // bit b set: bucket b is not empty
	buckets [64][]radixEntry
}

type radixEntry struct {
	key uint64
	n   int32
}

func (q *radixQueue) push(d float64, n int32) {
	k := math.Float64bits(d)
	b := bits.Len64(k ^ q.last)
	q.buckets[b] = append(q.buckets[b], radixEntry{k, n})
	q.full |= 1 << b
}

func (q *radixQueue) pop() (int32, bool) {
	if q.full == 0 {
		return -1, false
	}
	if q.full&1 == 0 {
		i := bits.TrailingZeros64(q.full)
		b := q.buckets[i]
		m := b[0].key
		for _, it := range b[1:] {
			m = min(m, it.key)
		}
		q.last = m
		for _, it := range b {
			j := bits.Len64(it.key ^ m)
			q.buckets[j] = append(q.buckets[j], it)
			q.full |= 1 << j
		}
		q.buckets[i] = b[:0]
		q.full &^= 1 << i
	}
	b := q.buckets[0]
	it := b[len(b)-1]
	q.buckets[0] = b[:len(b)-1]
	if len(b) == 1 {
		q.full &^= 1
	}
	return it.n, true
}
