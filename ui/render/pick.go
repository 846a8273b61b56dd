package render

import (
	"image"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// pickState remembers what Pick needs from the last frame.
type pickState struct {
	valid   bool
	rect    image.Rectangle
	eye     mgl64.Vec3
	right   mgl64.Vec3 // world direction of +x on screen, scaled by 1/p00
	up      mgl64.Vec3 // world direction of +y on screen, scaled by 1/p11
	forward mgl64.Vec3
	meshes  []*mesh.Mesh
}

func (r *Renderer) savePick(dst *image.RGBA) {
	ps := &r.picking
	ps.rect = dst.Rect
	ps.meshes = ps.meshes[:0]
	for _, o := range r.objs {
		if o.substitute {
			ps.meshes = append(ps.meshes, nil) // its triangles are not the scene's
			continue
		}
		ps.meshes = append(ps.meshes, o.mesh)
	}
	inv := r.rot.Transpose() // view to world
	ps.right = inv.Mul3x1(mgl64.Vec3{1 / r.p00, 0, 0})
	ps.up = inv.Mul3x1(mgl64.Vec3{0, 1 / r.p11, 0})
	ps.forward = inv.Mul3x1(mgl64.Vec3{0, 0, -1})
	ps.eye = r.eye
	ps.valid = true
}

// Pick reports the nearest surface (opaque or see-through) under pixel (x, y) of the
// last frame, in the image's coordinates: the object's index in Scene.Objects, the
// triangle, and the barycentric weights of the triangle's corners at that point.
func (r *Renderer) Pick(x, y int) (obj int, tri int32, bary [3]float32, ok bool) {
	ps := &r.picking
	if !ps.valid || !(image.Point{x, y}).In(ps.rect) {
		return 0, 0, bary, false
	}
	// The sample at the centre of the output pixel.
	ix := (x-ps.rect.Min.X)*r.ss + r.ss/2
	iy := (y-ps.rect.Min.Y)*r.ss + r.ss/2
	i := iy*r.w + ix
	id := r.oObj[i]
	if r.tObj[i] != 0 && r.tz[i] > r.z[i] {
		id = r.tObj[i]
	}
	if id == 0 || int(id) > len(ps.meshes) || ps.meshes[id-1] == nil {
		return 0, 0, bary, false
	}
	m := ps.meshes[id-1]
	tri = r.triID[i]
	if tri < 0 || int(tri) >= len(m.Triangles) {
		return 0, 0, bary, false
	}
	t := m.Triangles[tri]
	nv := int32(len(m.Vertices))
	if t[0] < 0 || t[1] < 0 || t[2] < 0 || t[0] >= nv || t[1] >= nv || t[2] >= nv {
		return 0, 0, bary, false
	}
	// Ray through the pixel centre; its crossing with the triangle's plane gives the weights.
	sx := (float64(x-ps.rect.Min.X)+0.5)/float64(ps.rect.Dx())*2 - 1
	sy := 1 - (float64(y-ps.rect.Min.Y)+0.5)/float64(ps.rect.Dy())*2
	dir := ps.forward.Add(ps.right.Mul(sx)).Add(ps.up.Mul(sy))
	a, b, c := m.Vertices[t[0]], m.Vertices[t[1]], m.Vertices[t[2]]
	e1, e2 := b.Sub(a), c.Sub(a)
	p := dir.Cross(e2)
	det := e1.Dot(p)
	if det == 0 {
		return int(id - 1), tri, [3]float32{1.0 / 3, 1.0 / 3, 1.0 / 3}, true
	}
	s := ps.eye.Sub(a)
	u := s.Dot(p) / det
	v := dir.Dot(s.Cross(e1)) / det
	return int(id - 1), tri, [3]float32{float32(1 - u - v), float32(u), float32(v)}, true
}
