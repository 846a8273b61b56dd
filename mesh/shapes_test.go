package mesh

import (
	"bytes"
	"math"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// Test shapes: closed tubes swept along a centre curve with a right-handed frame (n x b = t),
// capped at both ends by fans, oriented so normals face out.

type shapeFrame struct{ c, n, b mgl64.Vec3 }

// shapeTube sweeps a ring of seg points at each of the rings+1 stations s = 0..1.
func shapeTube(frame func(s float64) shapeFrame, radius func(s float64) float64, seg, rings int, capped bool) *Mesh {
	m := &Mesh{}
	for i := 0; i <= rings; i++ {
		s := float64(i) / float64(rings)
		f := frame(s)
		r := radius(s)
		for j := 0; j < seg; j++ {
			phi := 2 * math.Pi * float64(j) / float64(seg)
			m.Vertices = append(m.Vertices, f.c.Add(f.n.Mul(r*math.Cos(phi))).Add(f.b.Mul(r*math.Sin(phi))))
		}
	}
	at := func(i, j int) int32 { return int32(i*seg + (j % seg)) }
	for i := 0; i < rings; i++ {
		for j := 0; j < seg; j++ {
			m.Triangles = append(m.Triangles,
				[3]int32{at(i, j), at(i, j+1), at(i+1, j+1)},
				[3]int32{at(i, j), at(i+1, j+1), at(i+1, j)})
		}
	}
	if capped {
		c0 := int32(len(m.Vertices))
		m.Vertices = append(m.Vertices, frame(0).c, frame(1).c)
		for j := 0; j < seg; j++ {
			m.Triangles = append(m.Triangles,
				[3]int32{c0, at(0, j+1), at(0, j)},
				[3]int32{c0 + 1, at(rings, j), at(rings, j+1)})
		}
	}
	return m
}

func straightFrame(h float64) func(float64) shapeFrame {
	return func(s float64) shapeFrame {
		return shapeFrame{c: mgl64.Vec3{0, 0, h * s}, n: mgl64.Vec3{1, 0, 0}, b: mgl64.Vec3{0, 1, 0}}
	}
}

// arcFrame follows a circle of radius big in the xy plane through angle alpha.
func arcFrame(big, alpha float64) func(float64) shapeFrame {
	return func(s float64) shapeFrame {
		a := alpha * s
		n := mgl64.Vec3{math.Cos(a), math.Sin(a), 0}
		return shapeFrame{c: n.Mul(big), n: n, b: mgl64.Vec3{0, 0, -1}}
	}
}

func constRadius(r float64) func(float64) float64 { return func(float64) float64 { return r } }

func shapeCylinder(r, h float64, seg, rings int) *Mesh {
	return shapeTube(straightFrame(h), constRadius(r), seg, rings, true)
}

func shapeFrustum(r1, r2, h float64, seg, rings int) *Mesh {
	return shapeTube(straightFrame(h), func(s float64) float64 { return r1 + (r2-r1)*s }, seg, rings, true)
}

func shapeTorusSection(big, r, alpha float64, seg, rings int) *Mesh {
	return shapeTube(arcFrame(big, alpha), constRadius(r), seg, rings, true)
}

// shapeCanalLike is a tapered curved tube about 20 mm long, 2*seg*rings + 2*seg triangles.
func shapeCanalLike(seg, rings int) *Mesh {
	return shapeTube(arcFrame(12, 1.4), func(s float64) float64 { return 0.6 - 0.45*s }, seg, rings, true)
}

// shapeUVSphere has poles at +-z; normals face out.
func shapeUVSphere(r float64, seg, rings int) *Mesh {
	m := &Mesh{Vertices: []mgl64.Vec3{{0, 0, r}, {0, 0, -r}}}
	for i := 1; i < rings; i++ {
		th := math.Pi * float64(i) / float64(rings)
		for j := 0; j < seg; j++ {
			ph := 2 * math.Pi * float64(j) / float64(seg)
			m.Vertices = append(m.Vertices, mgl64.Vec3{r * math.Sin(th) * math.Cos(ph), r * math.Sin(th) * math.Sin(ph), r * math.Cos(th)})
		}
	}
	at := func(i, j int) int32 { return int32(2 + (i-1)*seg + j%seg) }
	for j := 0; j < seg; j++ {
		m.Triangles = append(m.Triangles, [3]int32{0, at(1, j), at(1, j+1)})
		m.Triangles = append(m.Triangles, [3]int32{1, at(rings-1, j+1), at(rings-1, j)})
	}
	for i := 1; i < rings-1; i++ {
		for j := 0; j < seg; j++ {
			m.Triangles = append(m.Triangles,
				[3]int32{at(i, j), at(i+1, j), at(i+1, j+1)},
				[3]int32{at(i, j), at(i+1, j+1), at(i, j+1)})
		}
	}
	return m
}

// shapeSoup lists the corners of every triangle, as an STL file holds them.
func shapeSoup(m *Mesh) []mgl64.Vec3 {
	out := make([]mgl64.Vec3, 0, 3*len(m.Triangles))
	for t := range m.Triangles {
		a, b, c := m.Corners(t)
		out = append(out, a, b, c)
	}
	return out
}

// shapeMerge puts several meshes into one without joining them.
func shapeMerge(ms ...*Mesh) *Mesh {
	out := &Mesh{}
	for _, m := range ms {
		off := int32(len(out.Vertices))
		out.Vertices = append(out.Vertices, m.Vertices...)
		for _, t := range m.Triangles {
			out.Triangles = append(out.Triangles, [3]int32{t[0] + off, t[1] + off, t[2] + off})
		}
	}
	return out
}

func shapeMove(m *Mesh, by mgl64.Vec3) *Mesh {
	out := &Mesh{Triangles: m.Triangles}
	for _, v := range m.Vertices {
		out.Vertices = append(out.Vertices, v.Add(by))
	}
	return out
}

func shapeScale(m *Mesh, k float64) *Mesh {
	out := &Mesh{Triangles: m.Triangles}
	for _, v := range m.Vertices {
		out.Vertices = append(out.Vertices, v.Mul(k))
	}
	return out
}

func shapeBinarySTL(t testing.TB, m *Mesh) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteSTL(&buf, m, "demo shape"); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}
