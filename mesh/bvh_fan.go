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
		dir := u.Mul(cos[j]).Add(v.Mul(sin[j]))
		if dir == (mgl64.Vec3{}) {
			t[j] = -1
			continue
		}
		sec := f.sector(pseudoAngle(cos[j], sin[j]))
		best, leaf := tMax, int32(-1)
		for _, c := range f.bins[f.start[sec]:f.start[sec+1]] {
			if hit, _, _, _, ok := rayTri(&b.tris[c.tri], orig, dir); ok && hit > 0 && hit < best {
				best, leaf = hit, c.leaf
			}
		}
		if leaf < 0 {
			t[j] = -1
			continue
		}
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

// fanCandidate is a triangle (index in leaf order) and the leaf that holds it.
type fanCandidate struct{ tri, leaf int32 }

// fanScratch holds one fan's triangles by sector; reused across calls through fanPool.
type fanScratch struct {
	stack  []int32
	found  []fanCandidate
	lo, hi []int32 // each found triangle's sectors, lo..hi (hi may pass the last: it wraps)
	count  []int32
	start  []int32
	bins   []fanCandidate
	nSec   int
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
	pad := 1e-9 * scale
	f.stack = append(f.stack[:0], 0)
	for len(f.stack) > 0 {
		i := f.stack[len(f.stack)-1]
		f.stack = f.stack[:len(f.stack)-1]
		nd := &b.nodes[i]
		c := nd.lo.Add(nd.hi).Mul(0.5).Sub(orig)
		e := nd.hi.Sub(nd.lo).Mul(0.5)
		r := math.Abs(w[0])*e[0] + math.Abs(w[1])*e[1] + math.Abs(w[2])*e[2]
		if !(math.Abs(c.Dot(w)) <= r+pad) {
			continue
		}
		if nd.count == 0 {
			f.stack = append(f.stack, nd.first, nd.first+1)
			continue
		}
		for k := nd.first; k < nd.first+nd.count; k++ {
			f.file(&b.tris[k], k, i, orig, u, v, w, pad)
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
	if cap(f.bins) < int(sum) {
		f.bins = make([]fanCandidate, sum)
	}
	f.bins = f.bins[:sum]
	for k, c := range f.found {
		for s := f.lo[k]; s <= f.hi[k]; s++ {
			sec := int(s) % f.nSec
			f.bins[f.count[sec]] = c
			f.count[sec]++
		}
	}
}

// file adds triangle k (of leaf) when it reaches the plane, with the sectors it covers.
func (f *fanScratch) file(tr *bvhTri, k, leaf int32, orig, u, v, w mgl64.Vec3, pad float64) {
	a := tr.a.Sub(orig)
	corners := [3]mgl64.Vec3{a, a.Add(tr.e1), a.Add(tr.e2)}
	d0, d1, d2 := corners[0].Dot(w), corners[1].Dot(w), corners[2].Dot(w)
	if !(min(d0, d1, d2) <= pad && max(d0, d1, d2) >= -pad) {
		return // off the plane (or not a number: such a triangle is never hit)
	}
	var x, y [3]float64
	for c, p := range corners {
		x[c], y[c] = p.Dot(u), p.Dot(v)
	}
	whole := func() {
		f.found = append(f.found, fanCandidate{k, leaf})
		f.lo = append(f.lo, 0)
		f.hi = append(f.hi, int32(f.nSec-1))
	}
	// orig inside the projected triangle, on its edge or on a corner: every direction.
	c0 := x[0]*y[1] - y[0]*x[1]
	c1 := x[1]*y[2] - y[1]*x[2]
	c2 := x[2]*y[0] - y[2]*x[0]
	if (c0 >= 0 && c1 >= 0 && c2 >= 0) || (c0 <= 0 && c1 <= 0 && c2 <= 0) {
		whole()
		return
	}
	// Outside: the triangle covers less than half a turn; its angles relative to the first
	// corner's give the span.
	a0 := pseudoAngle(x[0], y[0])
	lo, hi := 0.0, 0.0
	for c := 1; c < 3; c++ {
		d := pseudoAngle(x[c], y[c]) - a0
		if d > 2 {
			d -= 4
		} else if d < -2 {
			d += 4
		}
		lo, hi = min(lo, d), max(hi, d)
	}
	if !(hi-lo < fanWholeSpan) {
		whole()
		return
	}
	// Sectors as sector counts them, without the clamp: the span may run past 0 or 4.
	at := func(a float64) int { return int(math.Floor(a * (float64(f.nSec) / 4))) }
	from, to := at(a0+lo-fanAngleMargin), at(a0+hi+fanAngleMargin)
	if to-from+1 >= f.nSec {
		whole()
		return
	}
	shift := ((from%f.nSec)+f.nSec)%f.nSec - from
	from, to = from+shift, to+shift
	f.found = append(f.found, fanCandidate{k, leaf})
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
