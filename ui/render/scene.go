package render

import (
	"image/color"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// Object is one mesh to draw.
type Object struct {
	Mesh *mesh.Mesh
	// Colors gives one colour per vertex; when nil (or of the wrong length) Color is used.
	// Alpha is ignored: see-through objects use Opacity.
	Colors []color.RGBA
	Color  color.RGBA
	// Opacity in (0, 1) draws a see-through surface blended over the opaque ones.
	// 0 (the zero value) and >= 1 draw opaque; leave an object out of the scene to hide it.
	Opacity float64
	// Normals gives one normal per vertex; when nil, area-weighted vertex normals are
	// computed once per mesh and cached (a mesh changed in place needs Renderer.Forget).
	Normals []mgl64.Vec3
	Outline bool // dark outline at silhouettes and depth jumps
	Clip    bool // obeys the scene's clipping plane
	// ClipDistance, when it gives one value per vertex, cuts the object by its own signed
	// distances instead of the scene's plane (>= 0 is kept, interpolated along edges): a cut
	// that follows a curved canal.
	ClipDistance []float32
}

// Plane is a clipping plane through Point; it keeps the side Normal points to.
type Plane struct {
	Point, Normal mgl64.Vec3
}

// Scene is what Render draws.
type Scene struct {
	Objects    []Object
	ClipPlane  *Plane // nil: no clipping
	Background color.RGBA
}

// Options tune one frame.
type Options struct {
	// Supersample renders at this many times the size in each direction and box-filters
	// down (2 for a still view); 0 or 1 renders directly. At most 4.
	Supersample int
	// Workers is the number of goroutines; 0 uses GOMAXPROCS. The image does not depend on it.
	Workers int
	// Turning draws objects of more than TurningTriangles triangles from a simplified copy,
	// for the frames of a view being turned; Pick answers nothing on them.
	Turning bool
}

func (o Object) seeThrough() bool { return o.Opacity > 0 && o.Opacity < 1 }
