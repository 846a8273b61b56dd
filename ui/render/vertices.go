package render

import (
	"math"
	"math/bits"

	"github.com/go-gl/mathgl/mgl32"
	"github.com/go-gl/mathgl/mgl64"
)

// screenPos is where a vertex lands: fixed-point pixel position, 1/w and outcode, the 16 bytes
// per corner the culling loop reads (kept apart from the rest, so that loop touches less memory).
type screenPos struct {
	x, y int32   // pixels with subBits fraction bits
	iw   float32 // 1/w
	code uint32  // outcode; 0 on the corners of a piece of a clipped triangle
}

// screenVert is a projected vertex with its colour divided by w, so position, depth and colour
// interpolate linearly across the screen (perspective-correct).
type screenVert struct {
	screenPos
	c [3]float32 // shaded colour (0..255) times 1/w
}

// Outcode bits: which clip planes a vertex is outside of.
const (
	outNear  = 1 << iota // closer than the near plane (or behind the eye)
	outPlane             // on the removed side of the clipping plane
	outGuardR
	outGuardL
	outGuardT
	outGuardB
	outRight // outside the viewport: a triangle with all three outside one side is invisible
	outLeft
	outTop
	outBottom
	outBad // NaN or Inf coordinates

	outClip   = outNear | outPlane | outGuardR | outGuardL | outGuardT | outGuardB
	outReject = outNear | outPlane | outRight | outLeft | outTop | outBottom
)

// Lighting: a key light above and to the left of the viewer, a weak fill from the viewer
// (so walls seen edge-on inside a canal do not go black), soft ambient, a small highlight.
// Directions are in view space (x right, y up, +z toward the viewer).
var (
	keyLight  = mgl32.Vec3{-0.35, 0.55, 0.76}.Normalize()
	halfway   = keyLight.Add(mgl32.Vec3{0, 0, 1}).Normalize()
	ambient   = float32(0.32)
	diffuse   = float32(0.53)
	fill      = float32(0.15)
	highlight = float32(0.22) * 255
)

// vertexPhase transforms, projects and classifies vertices, one job of 8192 at a time; they are
// lit later, and only those of triangles that survive culling (shadePhase).
func (r *Renderer) vertexPhase(int) {
	for {
		j, ok := r.nextItem(len(r.vjobs))
		if !ok {
			return
		}
		job := r.vjobs[j]
		r.transformVertices(&r.objs[job.obj], job.v0, job.v1)
	}
}

func (r *Renderer) transformVertices(o *frameObject, v0, v1 int) {
	verts := o.mesh.Vertices
	pos := r.pos[o.vertBase : o.vertBase+len(verts)]
	near := float64(r.near)
	fw, fh := float64(r.w), float64(r.h)
	var cc [clipBlock][3]float64
	for b0 := v0; b0 < v1; b0 += clipBlock {
		b1 := min(v1, b0+clipBlock)
		r.clipCoords(verts[b0:b1], cc[:b1-b0])
		block := pos[b0:b1]
		// Outcodes first, then the projection in a loop of its own: apart, each loop is short
		// enough for the processor to overlap many vertices (together they ran at half the speed).
		for k := range block {
			c := &cc[k]
			cx, cy, cw := c[0], c[1], c[2]
			// Most vertices lie in the view: one test for all the outcode's bits.
			var code uint32
			// (|x| <= w is -w <= x <= w, NaN failing both; a finite w keeps x and y finite.)
			if !(near <= cw && cw <= math.MaxFloat64 && math.Abs(cx) <= cw && math.Abs(cy) <= cw) {
				code = outcode(cx, cy, cw, near)
			}
			block[k].code = code
		}
		if o.clip {
			for k := range block {
				if sp := &block[k]; sp.code != outBad && r.clipDistance(o, b0+k, verts[b0+k]) < 0 {
					sp.code |= outPlane
				}
			}
		}
		for k := range block {
			sp := &block[k]
			if sp.code&(outNear|outGuardR|outGuardL|outGuardT|outGuardB|outBad) == 0 {
				c := &cc[k]
				p := projectPosition(float32(c[0]), float32(c[1]), float32(c[2]), fw, fh)
				sp.x, sp.y, sp.iw = p.x, p.y, p.iw
			}
		}
	}
}

// clipBlock is how many vertices transformVertices hands clipCoords at a time.
const clipBlock = 256

// clipCoords writes world points ps in clip space to out (as long): x and y scaled by the
// projection, w the distance in front of the eye. Clipping finds a vertex's coordinates again
// here, so they are the ones its outcode came from.
func (r *Renderer) clipCoords(ps []mgl64.Vec3, out [][3]float64) {
	m, p00, p11 := r.view, r.p00, r.p11
	out = out[:len(ps)]
	for k, p := range ps {
		vx := m[0]*p[0] + m[4]*p[1] + m[8]*p[2] + m[12]
		vy := m[1]*p[0] + m[5]*p[1] + m[9]*p[2] + m[13]
		vz := m[2]*p[0] + m[6]*p[1] + m[10]*p[2] + m[14]
		out[k] = [3]float64{vx * p00, vy * p11, -vz}
	}
}

// clipDistance is the signed distance of o's vertex i (at p) to its cut (>= 0 is kept).
func (r *Renderer) clipDistance(o *frameObject, i int, p mgl64.Vec3) float64 {
	if o.clipDist != nil {
		return float64(o.clipDist[i])
	}
	return r.plane[0]*p[0] + r.plane[1]*p[1] + r.plane[2]*p[2] + r.plane[3]
}

// outcode classifies a vertex in clip space against the near plane, the guard band and the
// viewport (not the clipping plane); outBad alone when a coordinate is NaN or infinite.
func outcode(cx, cy, cw, near float64) uint32 {
	if sum := cx + cy + cw; sum-sum != 0 { // NaN or Inf
		return outBad
	}
	var code uint32
	if cw < near {
		code |= outNear
	}
	g := guard * cw
	if cx > g {
		code |= outGuardR
	}
	if cx < -g {
		code |= outGuardL
	}
	if cy > g {
		code |= outGuardT
	}
	if cy < -g {
		code |= outGuardB
	}
	if cx > cw {
		code |= outRight
	}
	if cx < -cw {
		code |= outLeft
	}
	if cy > cw {
		code |= outTop
	}
	if cy < -cw {
		code |= outBottom
	}
	return code
}

// shadePhase lights the vertices marked by cullPhase, one job of 8192 at a time.
func (r *Renderer) shadePhase(int) {
	for {
		j, ok := r.nextItem(len(r.vjobs))
		if !ok {
			return
		}
		job := r.vjobs[j]
		r.shadeVertices(&r.objs[job.obj], job.v0, job.v1)
	}
}

func (r *Renderer) shadeVertices(o *frameObject, v0, v1 int) {
	rot := r.rot
	src := o.src
	out := r.col[o.vertBase : o.vertBase+len(o.mesh.Vertices)]
	pos := r.pos[o.vertBase : o.vertBase+len(o.mesh.Vertices)]
	wcol := r.wcol[o.vertBase : o.vertBase+len(o.mesh.Vertices)]
	normals := o.normals[:len(out)]
	ownNormals := len(src.Normals) == len(out)
	base := mgl32.Vec3{float32(src.Color.R), float32(src.Color.G), float32(src.Color.B)}
	r00, r01, r02 := float32(rot[0]), float32(rot[3]), float32(rot[6])
	r10, r11, r12 := float32(rot[1]), float32(rot[4]), float32(rot[7])
	r20, r21, r22 := float32(rot[2]), float32(rot[5]), float32(rot[8])
	unlit := ambient + 0.5*(diffuse+fill) // a normal of length 0
	// The marked vertices of v0..v1, 64 at a time, by their numbers in the frame (g).
	g0, g1 := o.vertBase+v0, o.vertBase+v1
	for word := g0 >> 6; word <= (g1-1)>>6; word++ {
		var m uint64
		for _, mk := range r.marks {
			m |= mk[word]
		}
		if word == g0>>6 {
			m &= ^uint64(0) << (g0 & 63)
		}
		if word == (g1-1)>>6 {
			m &= ^uint64(0) >> (63 - (g1-1)&63)
		}
		for ; m != 0; m &= m - 1 {
			i := word<<6 + bits.TrailingZeros64(m) - o.vertBase
			// Two-sided shading: |n.l| lights the inside of a tube as well as the outside.
			var nx, ny, nz float32
			if ownNormals {
				q := rot.Mul3x1(src.Normals[i])
				nx, ny, nz = float32(q[0]), float32(q[1]), float32(q[2])
			} else {
				q := &normals[i]
				nx, ny, nz = r00*q[0]+r01*q[1]+r02*q[2], r10*q[0]+r11*q[1]+r12*q[2], r20*q[0]+r21*q[1]+r22*q[2]
			}
			cr, cg, cb := base[0], base[1], base[2]
			if o.colors {
				k := src.Colors[i]
				cr, cg, cb = float32(k.R), float32(k.G), float32(k.B)
			}
			// The light, written out here: a call would spill every value the loop keeps.
			// A colour c (0..255) is lit to c*k + h.
			k, h := unlit, float32(0)
			if l := float32(math.Sqrt(float64(nx*nx + ny*ny + nz*nz))); l > 1e-12 {
				inv := 1 / l
				nx, ny, nz = nx*inv, ny*inv, nz*inv
				d := abs32(nx*keyLight[0] + ny*keyLight[1] + nz*keyLight[2])
				s := abs32(nx*halfway[0] + ny*halfway[1] + nz*halfway[2])
				s *= s // s^32 by squaring
				s *= s
				s *= s
				s *= s
				s *= s
				k, h = ambient+diffuse*d+fill*abs32(nz), highlight*s
			}
			col := mgl32.Vec3{cr*k + h, cg*k + h, cb*k + h}
			out[i] = col
			if sp := &pos[i]; sp.code&(outNear|outGuardR|outGuardL|outGuardT|outGuardB|outBad) == 0 {
				iw := sp.iw
				wcol[i] = [3]float32{col[0] * iw, col[1] * iw, col[2] * iw}
			}
		}
	}
}

func abs32(x float32) float32 {
	if x < 0 {
		return -x
	}
	return x
}

// project maps clip coordinates (w >= near, inside the guard band) to the screen.
// The same float64 arithmetic serves all callers, so a vertex shared by a clipped
// and an unclipped triangle lands on the same fixed-point position.
func (r *Renderer) project(cx, cy, cw float32, col mgl32.Vec3) screenVert {
	p := projectPosition(cx, cy, cw, float64(r.w), float64(r.h))
	return screenVert{screenPos: p, c: [3]float32{col[0] * p.iw, col[1] * p.iw, col[2] * p.iw}}
}

// projectPosition is project without the colour (filled in when the vertex is lit), onto a
// screen of fw x fh pixels.
func projectPosition(cx, cy, cw float32, fw, fh float64) screenPos {
	iw := 1 / float64(cw)
	sx := (float64(cx)*iw*0.5 + 0.5) * fw
	sy := (0.5 - float64(cy)*iw*0.5) * fh
	return screenPos{
		x:  int32(math.Floor(sx*subOne + 0.5)),
		y:  int32(math.Floor(sy*subOne + 0.5)),
		iw: float32(iw),
	}
}
