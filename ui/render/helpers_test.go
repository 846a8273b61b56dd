package render

import (
	"image"
	"image/color"
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// canalTube builds a closed tube shaped like a root canal: straight for 8 mm down -z, then
// an arc of radius 5 mm bending toward +x through 40 degrees, radius tapering linearly
// from r0 to r1, with flat end caps. rings*around*2 + 2*around triangles.
func canalTube(rings, around int, r0, r1 float64) *mesh.Mesh {
	const straight, bend, angle = 8.0, 5.0, 40 * math.Pi / 180
	total := straight + bend*angle
	m := &mesh.Mesh{}
	centre := func(s float64) (c, n1 mgl64.Vec3) {
		if s <= straight {
			return mgl64.Vec3{0, 0, -s}, mgl64.Vec3{1, 0, 0}
		}
		phi := (s - straight) / bend
		sp, cp := math.Sincos(phi)
		return mgl64.Vec3{bend * (1 - cp), 0, -straight - bend*sp}, mgl64.Vec3{cp, 0, sp}
	}
	n2 := mgl64.Vec3{0, 1, 0}
	for i := 0; i < rings; i++ {
		s := total * float64(i) / float64(rings-1)
		c, n1 := centre(s)
		r := r0 + (r1-r0)*s/total
		for j := 0; j < around; j++ {
			st, ct := math.Sincos(2 * math.Pi * float64(j) / float64(around))
			m.Vertices = append(m.Vertices, c.Add(n1.Mul(r*ct)).Add(n2.Mul(r*st)))
		}
	}
	at := func(i, j int) int32 { return int32(i*around + (j % around)) }
	for i := 0; i+1 < rings; i++ {
		for j := 0; j < around; j++ {
			m.Triangles = append(m.Triangles,
				[3]int32{at(i, j), at(i, j+1), at(i+1, j+1)},
				[3]int32{at(i, j), at(i+1, j+1), at(i+1, j)})
		}
	}
	top, _ := centre(0)
	bottom, _ := centre(total)
	ti, bi := int32(len(m.Vertices)), int32(len(m.Vertices)+1)
	m.Vertices = append(m.Vertices, top, bottom)
	for j := 0; j < around; j++ {
		m.Triangles = append(m.Triangles,
			[3]int32{ti, at(0, j+1), at(0, j)},
			[3]int32{bi, at(rings-1, j), at(rings-1, j+1)})
	}
	if signedVolume(m) < 0 { // make the triangles counter-clockwise seen from outside
		for i, t := range m.Triangles {
			m.Triangles[i] = [3]int32{t[0], t[2], t[1]}
		}
	}
	return m
}

// signedVolume by the divergence theorem: positive when triangles face outward.
func signedVolume(m *mesh.Mesh) float64 {
	v := 0.0
	for t := range m.Triangles {
		a, b, c := m.Corners(t)
		v += a.Dot(b.Cross(c)) / 6
	}
	return v
}

// quad is a rectangle as two triangles a-b-c, a-c-d (counter-clockwise from the front).
func quad(a, b, c, d mgl64.Vec3) *mesh.Mesh {
	return &mesh.Mesh{Vertices: []mgl64.Vec3{a, b, c, d}, Triangles: [][3]int32{{0, 1, 2}, {0, 2, 3}}}
}

// gradientColors colours vertices by height, a stand-in for a per-vertex measure.
func gradientColors(m *mesh.Mesh, s *Scale) []color.RGBA {
	lo, hi := m.Bounds()
	out := make([]color.RGBA, len(m.Vertices))
	for i, v := range m.Vertices {
		out[i] = s.At((hi[2] - v[2]) / (hi[2] - lo[2]))
	}
	return out
}

// canalScene is a see-through tapered canal wall with an opaque file inside it.
func canalScene(rings, around int) (*Scene, *Camera) {
	wall := canalTube(rings, around, 0.6, 0.2)
	file := canalTube(max(rings/10, 2), max(around/5, 8), 0.3, 0.12)
	s := &Scene{
		Background: color.RGBA{244, 244, 240, 255},
		Objects: []Object{
			{Mesh: file, Color: color.RGBA{200, 40, 40, 255}, Outline: true},
			{Mesh: wall, Colors: gradientColors(wall, DepthScale()), Opacity: 0.35, Outline: true, Clip: true},
		},
	}
	cam := NewCamera()
	lo, hi := wall.Bounds()
	cam.Fit(lo, hi, 1280.0/800)
	return s, cam
}

// coverage reports which pixels differ from the background.
func coverage(img *image.RGBA, bg color.RGBA) []bool {
	b := img.Bounds()
	out := make([]bool, b.Dx()*b.Dy())
	for y := 0; y < b.Dy(); y++ {
		for x := 0; x < b.Dx(); x++ {
			o := img.PixOffset(b.Min.X+x, b.Min.Y+y)
			p := img.Pix[o : o+3]
			out[y*b.Dx()+x] = p[0] != bg.R || p[1] != bg.G || p[2] != bg.B
		}
	}
	return out
}
