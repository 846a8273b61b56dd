package mesh

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// NearTree is a BVH laid out again for closest-point queries from many points that lie far
// from the surface compared with its triangles (inside a tube: the wall to a root's outer
// surface), where a query visits a few hundred nodes: each node's box and slab (AddSlabs) in
// single precision, rounded outward so they still bound, in one record of 52 bytes instead of
// two of 56 and 40; and a query that keeps each pushed node's bound on its stack instead of
// computing it again when it pops. It shares the BVH's triangles and gives the same answers as
// BVH.ClosestWithin (the same distances, bit for bit; among triangles exactly as near, possibly
// another). Immutable; any number of goroutines may query it.
type NearTree struct {
	nodes []nearNode
	tris  []bvhTri
}

// nearNode is a node's box, and its slab where it has one (n zero where not): its triangles
// lie between the planes n.x = slo and n.x = shi, n of length within 1e-6 of 1.
type nearNode struct {
	lo, hi   [3]float32
	n        [3]float32
	slo, shi float32
	first    int32
	count    int32
}

// nearSlabSlack: a slab's distance is scaled down by this, for a normal rounded to single
// precision whose length is 1 only to within about 1e-7.
const nearSlabSlack = 1 - 1e-6

// NewNearTree lays out b for closest-point queries (with the slabs of AddSlabs where b has them).
func (b *BVH) NewNearTree() *NearTree {
	t := &NearTree{nodes: make([]nearNode, len(b.nodes)), tris: b.tris}
	for i := range b.nodes {
		nd := &b.nodes[i]
		out := &t.nodes[i]
		out.first, out.count = nd.first, nd.count
		for k := 0; k < 3; k++ {
			out.lo[k], out.hi[k] = Down32(nd.lo[k]), Up32(nd.hi[k])
		}
		if b.slabs == nil || b.slabs[i].n == (mgl64.Vec3{}) {
			continue
		}
		// The planes along the rounded normal: n32.v differs from n.v by at most
		// sum |n32_k - n_k| max |v_k| over the node's box.
		sl := &b.slabs[i]
		n32 := [3]float32{float32(sl.n[0]), float32(sl.n[1]), float32(sl.n[2])}
		nr := mgl64.Vec3{float64(n32[0]), float64(n32[1]), float64(n32[2])}
		if math.Abs(nr.Len()-1) > 1e-6 {
			continue
		}
		e := 0.0
		for k := 0; k < 3; k++ {
			e += math.Abs(nr[k]-sl.n[k]) * max(math.Abs(nd.lo[k]), math.Abs(nd.hi[k]))
		}
		lo, hi := sl.lo-e, sl.hi+e
		pad := 1e-12*(math.Abs(lo)+math.Abs(hi)) + 1e-12
		out.n, out.slo, out.shi = n32, Down32(lo-pad), Up32(hi+pad)
	}
	return t
}

// Down32 and Up32 round a bound to float32 outward, so it stays a bound.
func Down32(x float64) float32 {
	f := float32(x)
	if float64(f) > x {
		f = math.Nextafter32(f, float32(math.Inf(-1)))
	}
	return f
}

func Up32(x float64) float32 {
	f := float32(x)
	if float64(f) < x {
		f = math.Nextafter32(f, float32(math.Inf(1)))
	}
	return f
}

// lowerDist2 is a lower bound of the squared distance from p to the node's triangles: its
// box's, or its slab's where that is larger.
func (nd *nearNode) lowerDist2(p mgl64.Vec3) float64 {
	d2 := 0.0
	for k := 0; k < 3; k++ {
		if lo := float64(nd.lo[k]); p[k] < lo {
			d2 += (lo - p[k]) * (lo - p[k])
		} else if hi := float64(nd.hi[k]); p[k] > hi {
			d2 += (p[k] - hi) * (p[k] - hi)
		}
	}
	if nd.n == [3]float32{} {
		return d2
	}
	x := float64(nd.n[0])*p[0] + float64(nd.n[1])*p[1] + float64(nd.n[2])*p[2]
	if d := max(float64(nd.slo)-x, x-float64(nd.shi)) * nearSlabSlack; d > 0 && d*d > d2 {
		return d * d
	}
	return d2
}

// ClosestWithin is BVH.ClosestWithin on the tree: the surface point nearest p among those
// nearer than limit, its triangle and distance; ok is false when none is that near.
func (t *NearTree) ClosestWithin(p mgl64.Vec3, limit float64) (q mgl64.Vec3, tri int32, dist float64, ok bool) {
	tri = -1
	if len(t.nodes) == 0 {
		return p, -1, math.Inf(1), false
	}
	best2 := limit * limit
	type entry struct {
		node int32
		d2   float64
	}
	var stack [bvhStackDepth]entry
	stack[0] = entry{0, t.nodes[0].lowerDist2(p)}
	for sp := 1; sp > 0; {
		sp--
		e := stack[sp]
		if e.d2 >= best2 {
			continue
		}
		n := &t.nodes[e.node]
		if n.count > 0 {
			for i := n.first; i < n.first+n.count; i++ {
				if d2, c := closestOnStored(&p, &t.tris[i]); d2 < best2 {
					best2, q, tri = d2, c, t.tris[i].id
				}
			}
			continue
		}
		l, r := n.first, n.first+1
		dl, dr := t.nodes[l].lowerDist2(p), t.nodes[r].lowerDist2(p)
		if dl > dr {
			l, r, dl, dr = r, l, dr, dl
		}
		// The nearer child on top; a child already out of reach is not pushed.
		if dr < best2 {
			stack[sp] = entry{r, dr}
			sp++
		}
		if dl < best2 {
			stack[sp] = entry{l, dl}
			sp++
		}
	}
	if tri < 0 {
		return p, -1, math.Inf(1), false
	}
	return q, tri, math.Sqrt(best2), true
}
