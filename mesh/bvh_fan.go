package mesh

import (
	"math"
	"sync"

	"github.com/go-gl/mathgl/mgl64"
)

// RayFan casts a fan of rays from orig in one plane, ray j along u*cos[j] + v*sin[j]
// (u and v orthonormal, the direction made as u.Mul(cos[j]).Add(v.Mul(sin[j]))), and writes
// into t[j] the T that Ray(orig, that direction, tMax) returns, bit for bit, or -1 where Ray
// finds no hit. It is for the many rays a cross-section casts from one station: instead of
// walking the tree once per ray it gathers, in one walk, the triangles that reach the fan's
// plane, sorts them into sectors by the angles they cover as seen from orig, and tests each
// ray against its sector's triangles only, with the same triangle test as Ray.
//
// Why the answer is Ray's: a triangle a ray hits contains a point of the plane in the ray's
// direction, so it is among the gathered triangles (with margins far above rounding), and
// the fan finds the least T over every triangle that could be hit. Ray finds the same
// triangle unless rounding keeps its leaf's box from the ray; so the fan checks that box
// exactly as Ray would (a parent's box holds its child's, so its test passes too) and casts
// Ray itself for the rare ray where the box test fails.
//
// It pays where the plane meets a few triangles per ray (a scan's surface around a canal);
// on a surface far finer than that, casting each ray costs less: see FanCaster.
func (b *BVH) RayFan(orig, u, v mgl64.Vec3, cos, sin []float64, tMax float64, t []float64) {
	b.rayFan(orig, u, v, cos, sin, tMax, t)
}

// FanCaster casts fans of rays for one goroutine, the whole fan at once (RayFan) or ray by
// ray (Ray), whichever the last fan says is cheaper: where a fan's plane met more than
// fanMaxPerRay triangles per ray, the next fanRecheck fans go ray by ray before a fan is
// tried again. The answers are the same either way.
type FanCaster struct {
	BVH  *BVH
	skip int
}

// Sizes of FanCaster's choice: past about six triangles per ray (a plane across a tube of
// 512 facets around) the fan costs more than the rays; nearby stations meet alike.
const (
	fanMaxPerRay = 4
	fanRecheck   = 15
)

// Cast is RayFan, or Ray for each ray, with the same answers.
func (fc *FanCaster) Cast(orig, u, v mgl64.Vec3, cos, sin []float64, tMax float64, t []float64) {
	if fc.skip > 0 {
		fc.skip--
		for j := range cos {
			t[j] = -1
			if h, ok := fc.BVH.Ray(orig, u.Mul(cos[j]).Add(v.Mul(sin[j])), tMax); ok {
				t[j] = h.T
			}
		}
		return
	}
	if met := fc.BVH.rayFan(orig, u, v, cos, sin, tMax, t); met > fanMaxPerRay*len(cos) {
		fc.skip = fanRecheck
	}
}

// rayFan is RayFan; it returns how many triangles the fan's plane met.
func (b *BVH) rayFan(orig, u, v mgl64.Vec3, cos, sin []float64, tMax float64, t []float64) int {
	n := len(cos)
	if len(b.nodes) == 0 || !(tMax > 0) {
		for j := range n {
			t[j] = -1
		}
		return 0
	}
	f := fanPool.Get().(*fanScratch)
	defer fanPool.Put(f)
	f.gather(b, orig, u, v, n)
	for j := range n {
		// dir is u.Mul(cos[j]).Add(v.Mul(sin[j])), written out: the same operations in the
		// same order, so the same numbers.
		cj, sj := cos[j], sin[j]
		d0, d1, d2 := u[0]*cj+v[0]*sj, u[1]*cj+v[1]*sj, u[2]*cj+v[2]*sj
		if d0 == 0 && d1 == 0 && d2 == 0 {
			t[j] = -1
			continue
		}
		sec := f.sector(pseudoAngle(cj, sj))
		best, leaf := tMax, int32(-1)
		for _, c := range f.bins[f.start[sec]:f.start[sec+1]] {
			ft := &f.found[c]
			if hit, ok := ft.ray(d0, d1, d2); ok && hit > 0 && hit < best {
				best, leaf = hit, ft.leaf
			}
		}
		if leaf < 0 {
			t[j] = -1
			continue
		}
		dir := mgl64.Vec3{d0, d1, d2}
		if _, ok := rayBoxEnter(b.nodes[leaf].lo, b.nodes[leaf].hi, orig, inverse(dir), best); ok {
			t[j] = best
			continue
		}
		t[j] = -1
		if h, ok := b.Ray(orig, dir, tMax); ok {
			t[j] = h.T
		}
	}
	return len(f.found)
}

// fanTri is a triangle the fan's plane meets, with what rayTri works out from the origin
// alone worked out once for the whole fan: s = orig - a, q = s x e1 and e2 . q.
type fanTri struct {
	e1, e2, s, q [3]float64
	tq           float64
	leaf         int32 // the leaf that holds it
}

// newFanTri is the fanTri of triangle tr for rays from o; the products as rayTri makes them
// (mgl64's Sub, Cross and Dot written out, the same operations in the same order).
func newFanTri(tr *bvhTri, leaf int32, o mgl64.Vec3) fanTri {
	ft := fanTri{e1: tr.e1, e2: tr.e2, leaf: leaf}
	s := &ft.s
	s[0], s[1], s[2] = o[0]-tr.a[0], o[1]-tr.a[1], o[2]-tr.a[2]
	e1, e2 := &ft.e1, &ft.e2
	q := &ft.q
	q[0], q[1], q[2] = s[1]*e1[2]-s[2]*e1[1], s[2]*e1[0]-s[0]*e1[2], s[0]*e1[1]-s[1]*e1[0]
	ft.tq = e2[0]*q[0] + e2[1]*q[1] + e2[2]*q[2]
	return ft
}

// ray is rayTri's T and ok for the ray from the fan's origin along (d0, d1, d2), bit for bit:
// the same operations in the same order, those that depend on the origin alone done before.
func (ft *fanTri) ray(d0, d1, d2 float64) (float64, bool) {
	e1, e2, s, q := &ft.e1, &ft.e2, &ft.s, &ft.q
	p0, p1, p2 := d1*e2[2]-d2*e2[1], d2*e2[0]-d0*e2[2], d0*e2[1]-d1*e2[0]
	det := e1[0]*p0 + e1[1]*p1 + e1[2]*p2
	if det == 0 {
		return 0, false
	}
	inv := 1 / det
	u := (s[0]*p0 + s[1]*p1 + s[2]*p2) * inv
	if u < 0 || u > 1 {
		return 0, false
	}
	v := (d0*q[0] + d1*q[1] + d2*q[2]) * inv
	if v < 0 || u+v > 1 {
		return 0, false
	}
	return ft.tq * inv, true
}

// fanScratch holds one fan's triangles by sector; reused across calls through fanPool.
type fanScratch struct {
	stack  []int32
	found  []fanTri
	lo, hi []int32 // each found triangle's sectors, lo..hi (hi may pass the last: it wraps)
	count  []int32
	start  []int32
	bins   []int32 // found triangles by sector
	nSec   int
	// The fan: origin, the plane's axes and normal, the plane's slack.
	o, u, v, w mgl64.Vec3
	pad        float64
}

var fanPool = sync.Pool{New: func() any { return &fanScratch{} }}

// Angles are pseudo-angles (pseudoAngle): a quarter turn is 1, half a turn 2.

// fanAngleMargin widens each triangle's angles: rounding moves them by far less.
const fanAngleMargin = 1e-7

// fanWholeSpan: a triangle whose projection comes this close to covering half the turn around
// orig (orig lies on or next to it, seen along the normal) goes into every sector.
const fanWholeSpan = 2 - 1e-3

// pseudoAngle is a cheap stand-in for the angle of (x, y), in [0, 4): it grows with the angle
// (by 1/2 to 1 per radian, so margins stay margins), is 1 at each quarter turn, and adds 2 for
// half a turn (at (-x, -y)), so spans of less than half a turn stay under 2. Not (0, 0).
func pseudoAngle(x, y float64) float64 {
	switch {
	case y >= 0 && x >= 0:
		return y / (x + y)
	case y >= 0:
		return 1 - x/(y-x)
	case x < 0:
		return 2 - y/(-x-y)
	default:
		return 3 + x/(x-y)
	}
}

// sector is the sector of a pseudo-angle in [0, 4).
func (f *fanScratch) sector(a float64) int {
	k := int(math.Floor(a * (float64(f.nSec) / 4)))
	return min(max(k, 0), f.nSec-1)
}

// gather collects the triangles that reach the plane through orig spanned by u and v and
// files them by the sectors of angle they cover, nSec sectors around the turn.
func (f *fanScratch) gather(b *BVH, orig, u, v mgl64.Vec3, nSec int) {
	f.nSec = max(nSec, 1)
	f.found, f.lo, f.hi = f.found[:0], f.lo[:0], f.hi[:0]
	w := u.Cross(v)
	if l := w.Len(); l > 0 {
		w = w.Mul(1 / l)
	}
	root := &b.nodes[0]
	scale := 1.0
	for k := range 3 {
		scale = max(scale, math.Abs(orig[k]), math.Abs(root.lo[k]), math.Abs(root.hi[k]))
	}
	// The plane's slack: far above what rounding moves a hit point off it.
	f.o, f.u, f.v, f.w, f.pad = orig, u, v, w, 1e-9*scale
	// Each box's centre and half extent against the plane, as the Vec3 arithmetic
	// (lo.Add(hi).Mul(0.5).Sub(orig), hi.Sub(lo).Mul(0.5), Dot) gives them, written out.
	aw0, aw1, aw2 := math.Abs(w[0]), math.Abs(w[1]), math.Abs(w[2])
	f.stack = append(f.stack[:0], 0)
	for len(f.stack) > 0 {
		i := f.stack[len(f.stack)-1]
		f.stack = f.stack[:len(f.stack)-1]
		nd := &b.nodes[i]
		lo, hi := &nd.lo, &nd.hi
		c0, c1, c2 := (lo[0]+hi[0])*0.5-orig[0], (lo[1]+hi[1])*0.5-orig[1], (lo[2]+hi[2])*0.5-orig[2]
		r := aw0*((hi[0]-lo[0])*0.5) + aw1*((hi[1]-lo[1])*0.5) + aw2*((hi[2]-lo[2])*0.5)
		if !(math.Abs(c0*w[0]+c1*w[1]+c2*w[2]) <= r+f.pad) {
			continue
		}
		if nd.count == 0 {
			f.stack = append(f.stack, nd.first, nd.first+1)
			continue
		}
		for k := nd.first; k < nd.first+nd.count; k++ {
			f.file(&b.tris[k], i)
		}
	}
	// Counting sort into sectors.
	f.count = resize(f.count, f.nSec+1)
	for k := range f.count {
		f.count[k] = 0
	}
	for k := range f.found {
		for s := f.lo[k]; s <= f.hi[k]; s++ {
			f.count[int(s)%f.nSec]++
		}
	}
	f.start = resize(f.start, f.nSec+1)
	sum := int32(0)
	for s := range f.nSec {
		f.start[s] = sum
		sum += f.count[s]
		f.count[s] = f.start[s]
	}
	f.start[f.nSec] = sum
	f.bins = resize(f.bins, int(sum))
	for k := range f.found {
		for s := f.lo[k]; s <= f.hi[k]; s++ {
			sec := int(s) % f.nSec
			f.bins[f.count[sec]] = int32(k)
			f.count[sec]++
		}
	}
}

// file adds triangle tr (of leaf) when it reaches the fan's plane, with the sectors it covers.
// The corners relative to the origin and their products with the plane's axes are the Vec3
// arithmetic (a := tr.a.Sub(o); a, a.Add(e1), a.Add(e2); Dot) written out, the same numbers.
func (f *fanScratch) file(tr *bvhTri, leaf int32) {
	o, w := &f.o, &f.w
	a0, a1, a2 := tr.a[0]-o[0], tr.a[1]-o[1], tr.a[2]-o[2]
	b0, b1, b2 := a0+tr.e1[0], a1+tr.e1[1], a2+tr.e1[2]
	c0, c1, c2 := a0+tr.e2[0], a1+tr.e2[1], a2+tr.e2[2]
	d0 := a0*w[0] + a1*w[1] + a2*w[2]
	d1 := b0*w[0] + b1*w[1] + b2*w[2]
	d2 := c0*w[0] + c1*w[1] + c2*w[2]
	if !(min(d0, d1, d2) <= f.pad && max(d0, d1, d2) >= -f.pad) {
		return // off the plane (or not a number: such a triangle is never hit)
	}
	u, v := &f.u, &f.v
	x := [3]float64{a0*u[0] + a1*u[1] + a2*u[2], b0*u[0] + b1*u[1] + b2*u[2], c0*u[0] + c1*u[1] + c2*u[2]}
	y := [3]float64{a0*v[0] + a1*v[1] + a2*v[2], b0*v[0] + b1*v[1] + b2*v[2], c0*v[0] + c1*v[1] + c2*v[2]}
	// orig inside the projected triangle, on its edge or on a corner: every direction.
	k0 := x[0]*y[1] - y[0]*x[1]
	k1 := x[1]*y[2] - y[1]*x[2]
	k2 := x[2]*y[0] - y[2]*x[0]
	if (k0 >= 0 && k1 >= 0 && k2 >= 0) || (k0 <= 0 && k1 <= 0 && k2 <= 0) {
		f.add(tr, leaf, 0, f.nSec-1)
		return
	}
	// Outside: the triangle covers less than half a turn; its angles relative to the first
	// corner's give the span.
	first := pseudoAngle(x[0], y[0])
	lo, hi := 0.0, 0.0
	for c := 1; c < 3; c++ {
		d := pseudoAngle(x[c], y[c]) - first
		if d > 2 {
			d -= 4
		} else if d < -2 {
			d += 4
		}
		lo, hi = min(lo, d), max(hi, d)
	}
	if !(hi-lo < fanWholeSpan) {
		f.add(tr, leaf, 0, f.nSec-1)
		return
	}
	// Sectors as sector counts them, without the clamp: the span may run past 0 or 4.
	per := float64(f.nSec) / 4
	from, to := int(math.Floor((first+lo-fanAngleMargin)*per)), int(math.Floor((first+hi+fanAngleMargin)*per))
	if to-from+1 >= f.nSec {
		f.add(tr, leaf, 0, f.nSec-1)
		return
	}
	shift := ((from%f.nSec)+f.nSec)%f.nSec - from
	f.add(tr, leaf, from+shift, to+shift)
}

// add files triangle tr (of leaf) under sectors from..to.
func (f *fanScratch) add(tr *bvhTri, leaf int32, from, to int) {
	f.found = append(f.found, newFanTri(tr, leaf, f.o))
	f.lo = append(f.lo, int32(from))
	f.hi = append(f.hi, int32(to))
}

// resize returns s with length n, reusing its array when it is large enough.
func resize(s []int32, n int) []int32 {
	if cap(s) < n {
		return make([]int32, n)
	}
	return s[:n]
}
