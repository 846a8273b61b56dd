// Package render is a CPU rasteriser for triangle meshes: a turntable camera, a z-buffer
// with per-vertex colours and smooth shading, see-through surfaces blended back to front
// over the opaque ones, a clipping plane, outlines, supersampling, colour scales and legends.
// It knows meshes and colours, not canals.
package render

import (
	"cmp"
	"image"
	"math"
	"runtime"
	"slices"
	"sync/atomic"

	"github.com/go-gl/mathgl/mgl32"
	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// Renderer draws scenes into images. It keeps its buffers between frames, so drawing
// the same size again allocates nothing. One Renderer serves one goroutine at a time.
type Renderer struct {
	pool *pool

	// Internal frame size (output size times the supersampling factor).
	w, h, ss      int
	bandH, nBands int
	rowBand       []int32 // [y] the band of row y
	workers       int

	// Camera for this frame.
	view          mgl64.Mat4
	rot           mgl64.Mat3 // world to view rotation, for normals
	p00, p11      float64    // projection scale in x and y
	near          float32
	eye           mgl64.Vec3
	plane         [4]float64 // world clipping plane: n.p + d >= 0 is kept
	hasPlane      bool
	outlineThresh float32

	objs   []frameObject
	meshes map[*mesh.Mesh]*meshCache
	// simpler holds the simplified copies of huge meshes drawn while turning.
	simpler map[*mesh.Mesh]*simplified
	turning bool
	pos     []screenPos
	col     []mgl32.Vec3 // lit colour of the vertices shadePhase lit
	wcol    [][3]float32 // the same times 1/w
	vjobs   []vertexJob
	// marks[w] has bit v set when worker w kept a triangle with corner v this frame (one bit
	// set per worker, so marking takes no atomic operation and no lock).
	marks [][]uint64

	chunks  []triChunk
	nChunks int
	// objChunks[o] is the range of chunks holding object o's triangles; opaqueOrder lists the
	// objects nearest first, the order the opaque pass draws them in (see opaquePhase).
	objChunks   [][2]int
	opaqueOrder []int
	tiles       [][]float32 // [worker] the band's farthest depth per tile of tileCols columns
	// bins[chunk*nBands+band] lists the triangles of the chunk (opaque or see-through, as its
	// object is drawn) that touch the band, by their indices in the chunk's list.
	bins [][]int32
	// sortBufs[worker] are the worker's two buffers for ordering a band's see-through triangles.
	sortBufs [][2][]sortItem
	// opaqueSpan and clearSpan are the columns each band's opaque and see-through triangles
	// reach, so the outline passes skip the empty rest of the row.
	opaqueSpan, clearSpan [][2]int32
	// spansValid: the spans above are the last frame's at this size, and the depth and object
	// buffers are empty outside them, so clearRows clears only there.
	spansValid bool

	// Colour target: dst.Pix directly, or own when supersampling.
	pix    []byte
	stride int
	base   int
	own    []byte
	dst    *image.RGBA
	bgRow  []byte

	z     []float32 // 1/w of the nearest opaque surface, 0 = nothing
	tz    []float32 // 1/w of the nearest see-through surface in front of it
	oObj  []uint16  // object+1 of the nearest opaque surface
	tObj  []uint16  // object+1 of the nearest see-through surface
	triID []int32   // triangle of the nearest surface of either kind

	next atomic.Int64

	fnVerts, fnCull, fnShade, fnColour, fnOpaque, fnSeeThrough, fnFinish func(worker int)

	picking pickState
}

// frameObject is an Object prepared for this frame.
type frameObject struct {
	mesh       *mesh.Mesh
	src        *Object
	vertBase   int
	cull       bool // back faces cannot be seen: closed, opaque, camera outside, not clipped
	clip       bool
	clipDist   []float32 // per-vertex distances to the cut; nil: the scene's plane
	substitute bool      // drawn from a simplified copy: Pick does not answer on it
	seeThrough bool
	alpha      int32 // 0..256
	outline    bool
	normals    []mgl32.Vec3
	colors     bool
	clusters   []coneCluster // when cull is set
	eyeGap     float64       // distance from the eye to the mesh's bounding box
}

type meshCache struct {
	nv, nt   int
	clusters []coneCluster // built the first time the mesh is drawn with back faces culled
	v0       *mgl64.Vec3
	t0       *[3]int32
	normals  []mgl32.Vec3
	lo, hi   mgl64.Vec3
	used     bool
}

type vertexJob struct{ obj, v0, v1 int }

type triChunk struct {
	obj, t0, t1 int
	opaque      []triSetup
	clear       []triSetup
	clipped     []int32 // triangles to clip once their corners are lit
}

// NewRenderer returns a renderer with no buffers yet; the first frame sizes them.
func NewRenderer() *Renderer {
	r := &Renderer{pool: newPool(), meshes: map[*mesh.Mesh]*meshCache{}, simpler: map[*mesh.Mesh]*simplified{}}
	r.fnVerts = r.vertexPhase
	r.fnCull = r.cullPhase
	r.fnShade = r.shadePhase
	r.fnColour = r.colourPhase
	r.fnOpaque = r.opaquePhase
	r.fnSeeThrough = r.seeThroughPhase
	r.fnFinish = r.finishPhase
	runtime.AddCleanup(r, func(p *pool) { p.close() }, r.pool)
	return r
}

// Close stops the worker goroutines; the renderer still works, on one goroutine.
func (r *Renderer) Close() { r.pool.close() }

// Forget drops cached normals and bounds of m; call it after changing m in place.
func (r *Renderer) Forget(m *mesh.Mesh) { delete(r.meshes, m) }

const (
	subBits  = 8 // sub-pixel bits of the fixed-point screen coordinates
	subOne   = 1 << subBits
	subHalf  = subOne / 2
	guard    = 4 // guard band in NDC units: vertices farther out are clipped
	maxSS    = 4
	maxObjs  = math.MaxUint16 - 1
	bandRows = 16
)

// Render draws s as seen by cam into dst (any size, any origin).
func (r *Renderer) Render(dst *image.RGBA, s *Scene, cam *Camera, opt Options) {
	if dst == nil || dst.Rect.Empty() {
		return
	}
	ss := opt.Supersample
	if ss < 1 {
		ss = 1
	}
	if ss > maxSS {
		ss = maxSS
	}
	r.workers = opt.Workers
	if r.workers <= 0 {
		r.workers = runtime.GOMAXPROCS(0)
	}
	r.turning = opt.Turning
	r.resize(dst, ss)
	if s != nil {
		r.setBackground(s)
	}
	r.prepareCamera(cam, s)
	r.prepareObjects(s)

	r.runPhase(len(r.vjobs), r.fnVerts)
	r.prepareChunks()
	r.runPhase(r.nChunks, r.fnCull)
	r.runPhase(len(r.vjobs), r.fnShade)
	r.runPhase(r.nChunks, r.fnColour)
	r.runPhase(r.nBands, r.fnOpaque)
	r.runPhase(r.nBands, r.fnSeeThrough)
	r.runPhase(r.nBands, r.fnFinish)
	r.spansValid = true
	r.savePick(dst)
	r.evictMeshes()
	r.evictSimpler(s)
}

// runPhase hands items 0..n-1 to the workers through the shared counter.
func (r *Renderer) runPhase(n int, fn func(worker int)) {
	if n == 0 {
		return
	}
	r.next.Store(0)
	workers := min(r.workers, n)
	r.pool.run(workers, fn)
}

// nextItem returns the next work item of the running phase, or false when all are taken.
func (r *Renderer) nextItem(n int) (int, bool) {
	i := int(r.next.Add(1) - 1)
	return i, i < n
}

// resize sizes the internal buffers for dst at supersampling ss; they only grow.
func (r *Renderer) resize(dst *image.RGBA, ss int) {
	if w, h := dst.Rect.Dx()*ss, dst.Rect.Dy()*ss; w != r.w || h != r.h || ss != r.ss {
		r.spansValid = false
	}
	r.ss = ss
	r.w, r.h = dst.Rect.Dx()*ss, dst.Rect.Dy()*ss
	r.bandH = ss * max(1, bandRows/ss)
	r.nBands = (r.h + r.bandH - 1) / r.bandH
	// Binning asks every triangle for the bands of its top and bottom rows: a table, not
	// two integer divisions (slow on x86) per triangle.
	r.rowBand = grow(r.rowBand, r.h)
	for y := range r.rowBand {
		r.rowBand[y] = int32(y / r.bandH)
	}
	n := r.w * r.h
	r.z = grow(r.z, n)
	r.tz = grow(r.tz, n)
	r.oObj = grow(r.oObj, n)
	r.tObj = grow(r.tObj, n)
	r.triID = grow(r.triID, n)
	r.bgRow = grow(r.bgRow, r.w*4)
	r.dst = dst
	if ss == 1 {
		r.pix, r.stride, r.base = dst.Pix, dst.Stride, dst.PixOffset(dst.Rect.Min.X, dst.Rect.Min.Y)
	} else {
		r.own = grow(r.own, n*4)
		r.pix, r.stride, r.base = r.own, r.w*4, 0
	}
	r.opaqueSpan = grow(r.opaqueSpan, r.nBands)
	r.clearSpan = grow(r.clearSpan, r.nBands)
}

// grow returns s with length n, reusing its storage when it is big enough.
func grow[T any](s []T, n int) []T {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]T, n, n+n/8)
}

func (r *Renderer) setBackground(s *Scene) {
	bg := s.Background
	for i := 0; i < len(r.bgRow); i += 4 {
		r.bgRow[i], r.bgRow[i+1], r.bgRow[i+2], r.bgRow[i+3] = bg.R, bg.G, bg.B, 255
	}
}

func (r *Renderer) prepareCamera(cam *Camera, s *Scene) {
	c := Camera{Distance: 10, FovY: 35 * math.Pi / 180}
	if cam != nil {
		c = *cam
	}
	if !(c.FovY > 1e-6 && c.FovY < math.Pi-1e-6) {
		c.FovY = 35 * math.Pi / 180
	}
	r.view = c.View()
	r.rot = r.view.Mat3()
	r.eye = c.Eye()
	t := math.Tan(c.FovY / 2)
	r.p11 = 1 / t
	r.p00 = r.p11 * float64(r.h) / float64(r.w)
	r.near = float32(c.nearDistance())
	r.hasPlane = false
	if s != nil && s.ClipPlane != nil && s.ClipPlane.Normal.Len() > 0 {
		n := s.ClipPlane.Normal.Normalize()
		r.plane = [4]float64{n[0], n[1], n[2], -n.Dot(s.ClipPlane.Point)}
		r.hasPlane = true
	}
	// A depth jump of this fraction marks an outline; it scales with the pixel's angular size
	// so outlines look alike at any resolution (the neighbour compared is ss samples away).
	r.outlineThresh = float32(12 * 2 * t / float64(r.h/r.ss))
}

// prepareObjects resolves each object's normals, culling and colours for this frame.
func (r *Renderer) prepareObjects(s *Scene) {
	r.objs = r.objs[:0]
	r.vjobs = r.vjobs[:0]
	if s == nil {
		return
	}
	nv := 0
	for i := range s.Objects {
		o := &s.Objects[i]
		if r.turning && o.Mesh != nil && len(o.Mesh.Triangles) > TurningTriangles {
			o = r.turningObject(o)
		}
		if o.Mesh == nil || len(o.Mesh.Triangles) == 0 || len(o.Mesh.Vertices) == 0 || len(r.objs) >= maxObjs {
			r.objs = append(r.objs, frameObject{src: o}) // keeps object numbering; draws nothing
			continue
		}
		mc := r.cacheFor(o.Mesh)
		fo := frameObject{
			substitute: o != &s.Objects[i],
			mesh:       o.Mesh,
			src:        o,
			vertBase:   nv,
			clip:       o.Clip && r.hasPlane || len(o.ClipDistance) == len(o.Mesh.Vertices),
			seeThrough: o.seeThrough(),
			outline:    o.Outline,
			normals:    mc.normals,
			colors:     len(o.Colors) == len(o.Mesh.Vertices),
		}
		if len(o.ClipDistance) == len(o.Mesh.Vertices) {
			fo.clipDist = o.ClipDistance
		}
		fo.alpha = 256
		if fo.seeThrough {
			fo.alpha = int32(math.Round(o.Opacity * 256))
		}
		// Back faces of an opaque closed surface are hidden unless the eye is inside it
		// or the clipping plane opens it.
		pad := mc.hi.Sub(mc.lo).Len() * 0.01
		inside := true
		for k := 0; k < 3; k++ {
			if r.eye[k] < mc.lo[k]-pad || r.eye[k] > mc.hi[k]+pad {
				inside = false
			}
		}
		fo.cull = !fo.seeThrough && !fo.clip && !inside
		var gap mgl64.Vec3
		for k := range 3 {
			gap[k] = max(mc.lo[k]-r.eye[k], 0, r.eye[k]-mc.hi[k])
		}
		fo.eyeGap = gap.Len()
		if fo.cull {
			if mc.clusters == nil {
				mc.clusters = buildClusters(o.Mesh)
			}
			fo.clusters = mc.clusters
		}
		r.objs = append(r.objs, fo)
		n := len(o.Mesh.Vertices)
		const step = 8192
		for v := 0; v < n; v += step {
			r.vjobs = append(r.vjobs, vertexJob{obj: len(r.objs) - 1, v0: v, v1: min(n, v+step)})
		}
		nv += n
	}
	r.col = grow(r.col, nv)
	r.pos = grow(r.pos, nv)
	r.wcol = grow(r.wcol, nv)
	r.marks = grow(r.marks, r.workers)
	for w := range r.marks {
		r.marks[w] = grow(r.marks[w], (nv+63)/64)
		clear(r.marks[w])
	}
}

// cacheFor returns cached normals and bounds of m, computing them when m is new or resized.
func (r *Renderer) cacheFor(m *mesh.Mesh) *meshCache {
	mc := r.meshes[m]
	if mc == nil || mc.nv != len(m.Vertices) || mc.nt != len(m.Triangles) ||
		mc.v0 != &m.Vertices[0] || mc.t0 != &m.Triangles[0] {
		mc = &meshCache{nv: len(m.Vertices), nt: len(m.Triangles), v0: &m.Vertices[0], t0: &m.Triangles[0]}
		mc.normals = vertexNormals(m)
		mc.lo, mc.hi = m.Bounds()
		r.meshes[m] = mc
	}
	mc.used = true
	return mc
}

// evictMeshes forgets meshes not drawn in this frame.
func (r *Renderer) evictMeshes() {
	for m, mc := range r.meshes {
		if !mc.used {
			delete(r.meshes, m)
		}
		mc.used = false
	}
}

// vertexNormals returns area-weighted vertex normals; triangles with bad indices are skipped.
func vertexNormals(m *mesh.Mesh) []mgl32.Vec3 {
	acc := make([]mgl64.Vec3, len(m.Vertices))
	nv := uint32(len(m.Vertices))
	for _, t := range m.Triangles {
		if uint32(t[0]) >= nv || uint32(t[1]) >= nv || uint32(t[2]) >= nv {
			continue
		}
		a, b, c := m.Vertices[t[0]], m.Vertices[t[1]], m.Vertices[t[2]]
		n := b.Sub(a).Cross(c.Sub(a))
		acc[t[0]] = acc[t[0]].Add(n)
		acc[t[1]] = acc[t[1]].Add(n)
		acc[t[2]] = acc[t[2]].Add(n)
	}
	out := make([]mgl32.Vec3, len(acc))
	for i, n := range acc {
		if l := n.Len(); l > 0 && !math.IsInf(l, 0) {
			n = n.Mul(1 / l)
			out[i] = mgl32.Vec3{float32(n[0]), float32(n[1]), float32(n[2])}
		}
	}
	return out
}

// prepareChunks splits every object's triangles into chunks of work; each chunk keeps its
// own output lists, so the frame does not depend on how many workers ran.
func (r *Renderer) prepareChunks() {
	total := 0
	for _, o := range r.objs {
		if o.mesh != nil {
			total += len(o.mesh.Triangles)
		}
	}
	// Whole blocks of culling (so its clusters of triangles line up with the chunks).
	size := max(4096, (total+255)/256+cullBlock-1) &^ (cullBlock - 1)
	n := 0
	r.objChunks = grow(r.objChunks, len(r.objs))
	r.opaqueOrder = r.opaqueOrder[:0]
	for oi, o := range r.objs {
		r.objChunks[oi] = [2]int{n, n}
		if o.mesh == nil {
			continue
		}
		if !o.seeThrough {
			r.opaqueOrder = append(r.opaqueOrder, oi)
		}
		nt := len(o.mesh.Triangles)
		for t := 0; t < nt; t += size {
			if n == len(r.chunks) {
				r.chunks = append(r.chunks, triChunk{})
			}
			ch := &r.chunks[n]
			ch.obj, ch.t0, ch.t1 = oi, t, min(nt, t+size)
			ch.opaque = ch.opaque[:0]
			ch.clear = ch.clear[:0]
			ch.clipped = ch.clipped[:0]
			n++
		}
		r.objChunks[oi][1] = n
	}
	r.nChunks = n
	// Nearest first (stable: objects at the same distance keep their order), so a surface hidden
	// inside another is mostly found hidden before it is drawn.
	slices.SortStableFunc(r.opaqueOrder, func(a, b int) int { return cmp.Compare(r.objs[a].eyeGap, r.objs[b].eyeGap) })
	r.tiles = grow(r.tiles, r.workers)
	for w := range r.tiles {
		r.tiles[w] = grow(r.tiles[w], (r.w+tileCols-1)/tileCols)
	}
	nb := n * r.nBands
	if len(r.bins) < nb {
		r.bins = append(r.bins, make([][]int32, nb-len(r.bins))...)
	}
	for i := 0; i < nb; i++ {
		r.bins[i] = r.bins[i][:0]
	}
	r.sortBufs = grow(r.sortBufs, r.workers)
}
