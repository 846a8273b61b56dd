package render

import (
	"github.com/go-gl/mathgl/mgl32"
)

// triSetup is a triangle ready to rasterise: fixed-point corners ordered so the edge
// functions are positive inside, a pixel bounding box clamped to the viewport, and
// attribute planes a(x, y) = a + adx*(x-minX) + ady*(y-minY) at pixel centres.
type triSetup struct {
	x0, y0, x1, y1, x2, y2 int32
	minX, minY, maxX, maxY int32
	z, zdx, zdy            float32 // 1/w
	r, rdx, rdy            float32 // colour/w
	g, gdx, gdy            float32
	b, bdx, bdy            float32
	id                     float32 // 1 / twice the signed area in pixels, shared by the planes
	tri                    int32
	obj                    uint16 // object+1
	// cover, for a box of at most smallBox pixels, has a bit for each pixel centre the
	// triangle covers, bit 4*(y-minY) + (x-minX); 0 for a bigger box.
	cover uint16
	// v holds the corners' indices into the frame's vertices in the order above, for the
	// colour planes filled once the vertices are shaded; -1 for a piece of a clipped triangle
	// (its colours are set with its geometry).
	v [3]int32
}

// Triangles are handled in two passes around the shading of vertices, so only the vertices of
// triangles that survive culling are shaded: cullPhase culls each chunk's triangles, sets up the
// survivors' geometry, bins them and marks their corners; shadePhase lights the marked
// vertices; colourPhase fills the survivors' colour planes and clips the triangles that cross a
// clipping plane or the guard band.

// cullPhase culls and sets up the geometry of triangles chunk by chunk.
func (r *Renderer) cullPhase(worker int) {
	for {
		c, ok := r.nextItem(r.nChunks)
		if !ok {
			return
		}
		r.cullChunk(c, r.marks[worker])
	}
}

func (r *Renderer) cullChunk(c int, marks []uint64) {
	ch := &r.chunks[c]
	o := &r.objs[ch.obj]
	nv := len(o.mesh.Vertices)
	base := int32(o.vertBase)
	pos := r.pos[o.vertBase : o.vertBase+nv]
	bins := r.bins[c*r.nBands : (c+1)*r.nBands]
	objID := uint16(ch.obj + 1)
	mark := func(i int32) {
		v := base + i
		marks[v>>6] |= 1 << (v & 63)
	}
	cull, w, h := o.cull, int32(r.w), int32(r.h)
	var kept [cullBlock]keptTri
	for t0 := ch.t0; t0 < ch.t1; t0 += cullBlock {
		tris := o.mesh.Triangles[t0:min(ch.t1, t0+cullBlock)]
		// Clusters whose triangles all face away (one bit each; chunks start on a block).
		var away uint64
		if cull {
			c0 := t0 / clusterSize
			away = awayMask(o.clusters[c0:c0+(len(tris)+clusterSize-1)/clusterSize], r.eye)
		}
		n := keptTriangles(tris, pos, cull, away, w, h, &kept)
		for i := range kept[:n] {
			kt := &kept[i]
			tri := &tris[kt.k&(cullBlock-1)]
			mark(tri[0])
			mark(tri[1])
			mark(tri[2])
			if kt.k&keptClip != 0 { // crosses a clip plane or the guard band: clipped once its corners are lit
				ch.clipped = append(ch.clipped, int32(t0)+kt.k&(cullBlock-1))
				continue
			}
			a, b, cc := &pos[tri[0]], &pos[tri[1]], &pos[tri[2]]
			v := [3]int32{base + tri[0], base + tri[1], base + tri[2]}
			if kt.k&keptSwap != 0 { // front face: reorder
				b, cc = cc, b
				v[1], v[2] = v[2], v[1]
			}
			ts := r.newTriangle(ch, o)
			setupPlanes(ts, a, b, cc, kt.x0, kt.y0, kt.x1, kt.y1, uint16(kt.k>>keptShift))
			ts.v = v
			ts.tri, ts.obj = int32(t0)+kt.k&(cullBlock-1), objID
			r.bin(ch, bins, o, ts)
		}
	}
}

// cullBlock is how many triangles keptTriangles looks at in one call.
const cullBlock = 1024

// A keptTri's k holds the triangle's index in the block, its cover mask (triSetup.cover) <<
// keptShift and two flags: keptSwap, corners b and c exchange to make the edge functions
// positive inside; keptClip, it crosses a clip plane or the guard band (nothing else is set).
const (
	keptShift = 10 // log2(cullBlock)
	keptSwap  = 1 << 26
	keptClip  = 1 << 27
)

// keptTri is a triangle that keptTriangles lets through, with the pixel box it found.
type keptTri struct {
	k              int32
	x0, y0, x1, y1 int32
}

// keptTriangles writes to kept the triangles of tris (at most cullBlock) that draw and returns
// how many: corners valid, not wholly outside the view or cut away, facing the eye when cull
// is set, and covering a pixel centre of the w x h viewport (tested one by one in a box of at
// most smallBox pixels, else only the box). This loop sees every triangle of a frame and
// rejects most, so it does the cheap tests alone, where the compiler keeps its values in
// registers.
func keptTriangles(tris [][3]int32, pos []screenPos, cull bool, away uint64, w, h int32, kept *[cullBlock]keptTri) int {
	n := 0
	for j := 0; j < len(tris); j += clusterSize {
		if away>>(j/clusterSize)&1 != 0 {
			continue
		}
		cluster := tris[j:min(j+clusterSize, len(tris))]
		for k := range cluster {
			tri := &cluster[k]
			i0, i1, i2 := int(tri[0]), int(tri[1]), int(tri[2])
			if uint(i0) >= uint(len(pos)) || uint(i1) >= uint(len(pos)) || uint(i2) >= uint(len(pos)) {
				continue // a bad index draws nothing rather than panicking
			}
			a, b, c := &pos[i0], &pos[i1], &pos[i2]
			if codes := a.code | b.code | c.code; codes != 0 {
				if codes&outBad != 0 || (a.code&b.code&c.code)&outReject != 0 {
					continue
				}
				if codes&outClip != 0 {
					kept[n&(cullBlock-1)].k = int32(j+k) | keptClip
					n++
					continue
				}
			}
			// No pixel centre in the box (tested first: it rejects most).
			x0, x1 := pixelRange(min3(a.x, b.x, c.x), max3(a.x, b.x, c.x), w) // pixelBox, inlined
			y0, y1 := pixelRange(min3(a.y, b.y, c.y), max3(a.y, b.y, c.y), h)
			if x0 > x1 || y0 > y1 {
				continue
			}
			// Facing away or edge-on (y points down on screen, so a front face has negative area).
			area := int64(b.x-a.x)*int64(c.y-a.y) - int64(b.y-a.y)*int64(c.x-a.x)
			if area == 0 || cull && area > 0 {
				continue
			}
			kt := int32(j + k)
			if area < 0 {
				b, c = c, b
				kt |= keptSwap
			}
			if (x1-x0+1)*(y1-y0+1) <= smallBox {
				cover := coverMask(a, b, c, x0, y0, x1, y1)
				if cover == 0 {
					continue
				}
				kt |= int32(cover) << keptShift
			}
			kept[n&(cullBlock-1)] = keptTri{kt, x0, y0, x1, y1}
			n++
		}
	}
	return n
}

// colourPhase fills the colour planes of the chunks' triangles and clips the crossing ones.
func (r *Renderer) colourPhase(int) {
	for {
		c, ok := r.nextItem(r.nChunks)
		if !ok {
			return
		}
		ch := &r.chunks[c]
		r.setupColours(ch.opaque)
		r.setupColours(ch.clear)
		o := &r.objs[ch.obj]
		bins := r.bins[c*r.nBands : (c+1)*r.nBands]
		objID := uint16(ch.obj + 1)
		for _, t := range ch.clipped {
			r.clipTriangle(ch, bins, o, t, objID)
		}
	}
}

// newTriangle returns a slot for a triangle of ch, among the opaque or the see-through ones as o
// is drawn; the caller fills it (setting up in place saves copying it).
func (r *Renderer) newTriangle(ch *triChunk, o *frameObject) *triSetup {
	list := &ch.opaque
	if o.seeThrough {
		list = &ch.clear
	}
	if len(*list) == cap(*list) {
		*list = append(*list, triSetup{})[:len(*list)]
	}
	*list = (*list)[:len(*list)+1]
	return &(*list)[len(*list)-1]
}

// bin files ts, the last triangle newTriangle gave out for ch, under the bands it touches.
func (r *Renderer) bin(ch *triChunk, bins [][]int32, o *frameObject, ts *triSetup) {
	idx := int32(len(ch.opaque) - 1)
	if o.seeThrough {
		idx = int32(len(ch.clear) - 1)
	}
	for band := r.rowBand[ts.minY]; band <= r.rowBand[ts.maxY]; band++ {
		bins[band] = append(bins[band], idx)
	}
}

// setupColours fills the colour planes of triangles set up by cullChunk from their shaded
// corners (pieces of clipped triangles have theirs already).
func (r *Renderer) setupColours(tris []triSetup) {
	wcol := r.wcol
	for i := range tris {
		if ts := &tris[i]; ts.v[0] >= 0 {
			colourPlanes(ts, &wcol[ts.v[0]], &wcol[ts.v[1]], &wcol[ts.v[2]])
		}
	}
}

// colourPlanes fills the colour planes of ts from its corners' colours divided by w, a, b and c
// in the order of ts's corners.
func colourPlanes(ts *triSetup, a, b, c *[3]float32) {
	const inv = 1.0 / subOne
	dx1, dy1 := float32(ts.x1-ts.x0)*inv, float32(ts.y1-ts.y0)*inv
	dx2, dy2 := float32(ts.x2-ts.x0)*inv, float32(ts.y2-ts.y0)*inv
	id := ts.id // the same 1/area setupGeometry found, without a second division
	ox := float32(ts.minX) + 0.5 - float32(ts.x0)*inv
	oy := float32(ts.minY) + 0.5 - float32(ts.y0)*inv
	plane := func(va, vb, vc float32) (base, gx, gy float32) {
		d1, d2 := vb-va, vc-va
		gx = (d1*dy2 - d2*dy1) * id
		gy = (d2*dx1 - d1*dx2) * id
		return va + gx*ox + gy*oy, gx, gy
	}
	ts.r, ts.rdx, ts.rdy = plane(a[0], b[0], c[0])
	ts.g, ts.gdx, ts.gdy = plane(a[1], b[1], c[1])
	ts.b, ts.bdx, ts.bdy = plane(a[2], b[2], c[2])
}

// setup prepares triangle (a, b, c) whose corners carry their colours; false when it covers no
// pixel centre or faces away and cull is set.
func (r *Renderer) setup(a, b, c *screenVert, cull bool, ts *triSetup) bool {
	swapped, ok := r.setupGeometry(&a.screenPos, &b.screenPos, &c.screenPos, cull, ts)
	if !ok {
		return false
	}
	if swapped {
		b, c = c, b
	}
	colourPlanes(ts, &a.c, &b.c, &c.c)
	ts.v = [3]int32{-1, -1, -1}
	return true
}

// setupGeometry prepares the corners, the pixel box and the depth plane of triangle (a, b, c);
// false when it covers no pixel centre or faces away and cull is set. Counter-clockwise
// triangles (seen from outside) face the viewer; swapped says b and c were exchanged to make
// the edge functions positive inside.
func (r *Renderer) setupGeometry(a, b, c *screenPos, cull bool, ts *triSetup) (swapped, ok bool) {
	area := int64(b.x-a.x)*int64(c.y-a.y) - int64(b.y-a.y)*int64(c.x-a.x)
	return r.setupGeometryArea(a, b, c, area, cull, ts)
}

// setupGeometryArea is setupGeometry given the triangle's doubled signed area in fixed point.
func (r *Renderer) setupGeometryArea(a, b, c *screenPos, area int64, cull bool, ts *triSetup) (swapped, ok bool) {
	if area == 0 || cull && area > 0 {
		return false, false
	}
	// On screen y points down, so a front face has negative area; reorder to positive.
	if area < 0 {
		b, c = c, b
		swapped = true
	}
	x0, y0, x1, y1 := pixelBox(a, b, c, int32(r.w), int32(r.h))
	if x0 > x1 || y0 > y1 {
		return false, false
	}
	var cover uint16
	if (x1-x0+1)*(y1-y0+1) <= smallBox {
		if cover = coverMask(a, b, c, x0, y0, x1, y1); cover == 0 {
			return false, false
		}
	}
	setupPlanes(ts, a, b, c, x0, y0, x1, y1, cover)
	return swapped, true
}

// pixelBox returns the pixels whose centres (k + 1/2) lie within the bounding box of a, b and
// c, clamped to a w x h viewport; empty when x0 > x1 or y0 > y1.
func pixelBox(a, b, c *screenPos, w, h int32) (x0, y0, x1, y1 int32) {
	x0, x1 = pixelRange(min3(a.x, b.x, c.x), max3(a.x, b.x, c.x), w)
	y0, y1 = pixelRange(min3(a.y, b.y, c.y), max3(a.y, b.y, c.y), h)
	return
}

// pixelRange returns the pixels k0..k1 of 0..n-1 whose centres lie in lo..hi (fixed point).
func pixelRange(lo, hi, n int32) (k0, k1 int32) {
	return max((lo-subHalf+subOne-1)>>subBits, 0), min((hi-subHalf)>>subBits, n-1)
}

// setupPlanes fills ts for triangle (a, b, c), ordered so its edge functions are positive
// inside, with pixel box x0..x1, y0..y1: corners, box, cover and the depth plane.
func setupPlanes(ts *triSetup, a, b, c *screenPos, x0, y0, x1, y1 int32, cover uint16) {
	ts.x0, ts.y0, ts.x1, ts.y1, ts.x2, ts.y2 = a.x, a.y, b.x, b.y, c.x, c.y
	ts.minX, ts.minY, ts.maxX, ts.maxY = x0, y0, x1, y1
	ts.cover = cover

	const inv = 1.0 / subOne
	dx1, dy1 := float32(b.x-a.x)*inv, float32(b.y-a.y)*inv
	dx2, dy2 := float32(c.x-a.x)*inv, float32(c.y-a.y)*inv
	id := 1 / (dx1*dy2 - dy1*dx2)
	ts.id = id
	// Offset from corner a to the centre of the box's first pixel.
	ox := float32(x0) + 0.5 - float32(a.x)*inv
	oy := float32(y0) + 0.5 - float32(a.y)*inv
	d1, d2 := b.iw-a.iw, c.iw-a.iw
	ts.zdx = (d1*dy2 - d2*dy1) * id
	ts.zdy = (d2*dx1 - d1*dx2) * id
	ts.z = a.iw + ts.zdx*ox + ts.zdy*oy
}

// smallBox is the largest pixel box (in pixels) whose centres culling tests one by one: most
// triangles of a fine mesh are about a pixel, many cover no pixel centre and would draw
// nothing, and those are dropped before the rest of the setup, the colours and the binning.
// At most 4, so a box is at most 4 pixels wide or high (triSetup.cover).
const smallBox = 4

// coverMask returns which pixel centres of the box x0..x1, y0..y1 (at most smallBox pixels)
// triangle (a, b, c) covers, ordered so its edge functions are positive inside: bit
// 4*(y-y0) + (x-x0), by the same edge functions and fill rule that draw a bigger triangle.
func coverMask(a, b, c *screenPos, x0, y0, x1, y1 int32) uint16 {
	px := int64(x0)<<subBits + subHalf
	if x0 == x1 && y0 == y1 { // one centre, the most common box: stop at the first edge it is outside
		py := int64(y0)<<subBits + subHalf
		if e, _ := edgeFunction(b.x, b.y, c.x, c.y, px, py); e < 0 {
			return 0
		}
		if e, _ := edgeFunction(c.x, c.y, a.x, a.y, px, py); e < 0 {
			return 0
		}
		if e, _ := edgeFunction(a.x, a.y, b.x, b.y, px, py); e < 0 {
			return 0
		}
		return 1
	}
	var m uint16
	for y := y0; y <= y1; y++ {
		py := int64(y)<<subBits + subHalf
		e0, s0 := edgeFunction(b.x, b.y, c.x, c.y, px, py)
		e1, s1 := edgeFunction(c.x, c.y, a.x, a.y, px, py)
		e2, s2 := edgeFunction(a.x, a.y, b.x, b.y, px, py)
		bit := uint16(1) << (4 * (y - y0))
		for x := x0; x <= x1; x++ {
			if e0|e1|e2 >= 0 {
				m |= bit
			}
			bit <<= 1
			e0 += s0
			e1 += s1
			e2 += s2
		}
	}
	return m
}

func min3(a, b, c int32) int32 { return min(a, min(b, c)) }
func max3(a, b, c int32) int32 { return max(a, max(b, c)) }

// clipVert is a vertex in clip space with what clipping must interpolate.
type clipVert struct {
	x, y, w, d float32
	col        mgl32.Vec3
}

// distance returns the signed distance of v to clip plane bit (>= 0 is kept). All are
// linear in homogeneous coordinates, so interpolating along an edge is exact.
func (r *Renderer) distance(v *clipVert, bit uint32) float32 {
	switch bit {
	case outNear:
		return v.w - r.near
	case outPlane:
		return v.d
	case outGuardR:
		return guard*v.w - v.x
	case outGuardL:
		return guard*v.w + v.x
	case outGuardT:
		return guard*v.w - v.y
	default: // outGuardB
		return guard*v.w + v.y
	}
}

// clipTriangle clips against the near plane, the clipping plane and the guard band
// (Sutherland-Hodgman), then sets up the resulting fan.
func (r *Renderer) clipTriangle(ch *triChunk, bins [][]int32, o *frameObject, tri int32, objID uint16) {
	var bufA, bufB [12]clipVert
	in, out := bufA[:0], bufB[:0]
	var codes uint32
	var cc [1][3]float64
	for _, v := range o.mesh.Triangles[tri] {
		i := o.vertBase + int(v)
		codes |= r.pos[i].code
		p := o.mesh.Vertices[v]
		r.clipCoords(o.mesh.Vertices[v:v+1], cc[:])
		cv := clipVert{x: float32(cc[0][0]), y: float32(cc[0][1]), w: float32(cc[0][2]), col: r.col[i]}
		if o.clip {
			cv.d = float32(r.clipDistance(o, int(v), p))
		}
		in = append(in, cv)
	}
	for bit := uint32(outNear); bit <= outGuardB; bit <<= 1 {
		if codes&bit == 0 {
			continue
		}
		out = out[:0]
		for i := range in {
			p, q := &in[i], &in[(i+1)%len(in)]
			dp, dq := r.distance(p, bit), r.distance(q, bit)
			if dp >= 0 {
				out = append(out, *p)
			}
			if (dp >= 0) != (dq >= 0) {
				// Interpolate from the kept end, so both triangles sharing the edge agree.
				if dp >= 0 {
					out = append(out, lerpClip(p, q, dp/(dp-dq)))
				} else {
					out = append(out, lerpClip(q, p, dq/(dq-dp)))
				}
			}
		}
		if len(out) < 3 {
			return
		}
		in, out = out, in
	}
	var sv [12]screenVert
	for i := range in {
		v := &in[i]
		if !(v.w > 0) {
			return // numerically degenerate
		}
		sv[i] = r.project(v.x, v.y, v.w, v.col)
	}
	var ts triSetup
	for i := 1; i+1 < len(in); i++ {
		if r.setup(&sv[0], &sv[i], &sv[i+1], o.cull, &ts) {
			ts.tri, ts.obj = tri, objID
			*r.newTriangle(ch, o) = ts
			r.bin(ch, bins, o, &ts)
		}
	}
}

func lerpClip(p, q *clipVert, t float32) clipVert {
	return clipVert{
		x:   p.x + (q.x-p.x)*t,
		y:   p.y + (q.y-p.y)*t,
		w:   p.w + (q.w-p.w)*t,
		d:   p.d + (q.d-p.d)*t,
		col: p.col.Add(q.col.Sub(p.col).Mul(t)),
	}
}
