package render

import (
	"image/color"
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// TurningTriangles is the size from which an object is drawn from a simplified copy while the
// view turns (Options.Turning): a scan of millions of triangles then turns as smoothly as a
// canal of a few hundred thousand, and stills, PNGs and reports still draw every triangle.
const TurningTriangles = 600_000

// turningTarget is about how many triangles the simplified copy keeps.
const turningTarget = 120_000

// simplified is a copy of a mesh with its vertices merged on a grid (vertex clustering): each
// new vertex stands for the original vertices of one cell, at their mean, and carries the
// colour and cut distance of the first of them (rep).
type simplified struct {
	mesh *mesh.Mesh
	rep  []int32
	// the last per-vertex colours and cut distances carried over, by the source slice
	colorsOf *color.RGBA
	colors   []color.RGBA
	distOf   *float32
	dist     []float32
	used     bool
	obj      Object // the object drawn in the source's place (kept here: no allocation per frame)
}

// simplify merges the vertices of m on a grid whose cells are sized from the surface's area so
// that about target triangles remain; triangles whose corners fall in fewer than three cells
// are dropped. Triangles keep their winding, so culling still works.
func simplify(m *mesh.Mesh, target int) *simplified {
	area := 0.0
	for t := range m.Triangles {
		a, b, c := m.Corners(t)
		area += b.Sub(a).Cross(c.Sub(a)).Len() / 2
	}
	// A closed surface of V vertices has about 2V triangles; a cell of side h holds about
	// h² of surface.
	h := math.Sqrt(area / float64(max(1, target/2)))
	lo, _ := m.Bounds()
	if !(h > 0) || math.IsInf(h, 0) {
		return &simplified{mesh: m, rep: identity(len(m.Vertices))}
	}
	cells := make(map[[3]int32]int32, target/2)
	cluster := make([]int32, len(m.Vertices))
	var sum []mgl64.Vec3
	var count []float64
	s := &simplified{}
	for v, p := range m.Vertices {
		d := p.Sub(lo).Mul(1 / h)
		key := [3]int32{int32(d[0]), int32(d[1]), int32(d[2])}
		id, ok := cells[key]
		if !ok {
			id = int32(len(s.rep))
			cells[key] = id
			s.rep = append(s.rep, int32(v))
			sum = append(sum, mgl64.Vec3{})
			count = append(count, 0)
		}
		cluster[v] = id
		sum[id] = sum[id].Add(p)
		count[id]++
	}
	out := &mesh.Mesh{Vertices: make([]mgl64.Vec3, len(sum))}
	for i := range sum {
		out.Vertices[i] = sum[i].Mul(1 / count[i])
	}
	for _, t := range m.Triangles {
		a, b, c := cluster[t[0]], cluster[t[1]], cluster[t[2]]
		if a != b && b != c && a != c {
			out.Triangles = append(out.Triangles, [3]int32{a, b, c})
		}
	}
	s.mesh = out
	return s
}

func identity(n int) []int32 {
	out := make([]int32, n)
	for i := range out {
		out[i] = int32(i)
	}
	return out
}

// turningObject is o drawn from its simplified copy (made once per mesh and kept while used).
func (r *Renderer) turningObject(o *Object) *Object {
	s := r.simpler[o.Mesh]
	if s == nil {
		s = simplify(o.Mesh, turningTarget)
		r.simpler[o.Mesh] = s
	}
	s.used = true
	s.obj = *o
	sub := &s.obj
	sub.Mesh = s.mesh
	sub.Normals = nil
	sub.Colors, sub.ClipDistance = nil, nil
	if len(o.Colors) == len(o.Mesh.Vertices) {
		if s.colorsOf != &o.Colors[0] {
			s.colors = make([]color.RGBA, len(s.rep))
			for i, v := range s.rep {
				s.colors[i] = o.Colors[v]
			}
			s.colorsOf = &o.Colors[0]
		}
		sub.Colors = s.colors
	}
	if len(o.ClipDistance) == len(o.Mesh.Vertices) {
		if s.distOf != &o.ClipDistance[0] {
			s.dist = make([]float32, len(s.rep))
			for i, v := range s.rep {
				s.dist[i] = o.ClipDistance[v]
			}
			s.distOf = &o.ClipDistance[0]
		}
		sub.ClipDistance = s.dist
	}
	return sub
}

// evictSimpler forgets the simplified copies of meshes that are no longer in the scene; a copy
// stays while its mesh is drawn whole between turns, so turning again does not rebuild it.
func (r *Renderer) evictSimpler(s *Scene) {
	if len(r.simpler) == 0 {
		return
	}
	inScene := func(m *mesh.Mesh) bool {
		if s != nil {
			for i := range s.Objects {
				if s.Objects[i].Mesh == m {
					return true
				}
			}
		}
		return false
	}
	for m, c := range r.simpler {
		if !c.used && !inScene(m) {
			delete(r.simpler, m)
		}
		c.used = false
	}
}
