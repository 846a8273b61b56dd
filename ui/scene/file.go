package scene

import (
	"image/color"
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/mesh"
	"tapersweep/models"
	"tapersweep/ui/render"
)

// Drawing settings of the file: how much of it shows above the orifice, how its flutes are
// suggested (a shallow helical groove), and how finely it is tessellated.
const (
	fileAbove    = 4.0  // mm of file drawn above the orifice
	fluteDepth   = 0.05 // groove depth as a share of the radius
	flutePitch   = 1.2  // mm per turn of the helix
	fileAround   = 48
	fileTipMark  = 0.15 // mm of tip drawn dark
	fileStepMM   = 0.05
	fluteBladeNo = 3
)

// FileMesh is the file as a tube along the centerline with its tip at depth tip (mm from the
// orifice), its tapered radius d(u)/2, and shallow helical grooves; above the orifice it goes
// on straight along the canal's coronal axis.
func FileMesh(c *analysis.Canal, in models.Instrument, tip float64) *mesh.Mesh {
	length := math.Min(in.CuttingLength+fileAbove, tip+fileAbove)
	n := max(2, int(math.Ceil(length/fileStepMM))+1)
	centers := make([]mgl64.Vec3, n)
	n1s := make([]mgl64.Vec3, n)
	n2s := make([]mgl64.Vec3, n)
	us := make([]float64, n)
	_, t0, a0, b0 := c.Line.At(0)
	for k := 0; k < n; k++ {
		u := math.Min(length, float64(k)*length/float64(n-1)) // from the tip
		us[k] = u
		s := tip - u
		if s >= 0 {
			centers[k], _, n1s[k], n2s[k] = c.Line.At(s)
		} else {
			centers[k] = c.Line.Points[0].Add(t0.Mul(s)) // straight on above the orifice
			n1s[k], n2s[k] = a0, b0
		}
	}
	radius := func(k int, th float64) float64 {
		u := us[k]
		r := in.Diameter(u) / 2
		if u > 0 && u < in.CuttingLength {
			groove := 0.5 + 0.5*math.Cos(fluteBladeNo*th-2*math.Pi*u/flutePitch)
			r *= 1 - fluteDepth*groove*groove
		}
		return r
	}
	return mesh.SweepTube(centers, n1s, n2s, radius, fileAround, true, true)
}

// FileColors colours the file in its size colour with a dark tip, vertex by vertex in the
// order FileMesh makes them.
func FileColors(m *mesh.Mesh, c color.RGBA, in models.Instrument, tip float64) []color.RGBA {
	cols := make([]color.RGBA, len(m.Vertices))
	dark := color.RGBA{40, 40, 44, 255}
	length := math.Min(in.CuttingLength+fileAbove, tip+fileAbove)
	rings := (len(m.Vertices) - 2) / fileAround
	for v := range cols {
		ring := v / fileAround
		u := length * float64(ring) / float64(max(1, rings-1))
		if ring >= rings {
			u = 0 // cap centres: the tip's one is first of the two
			if v == len(cols)-1 {
				u = length
			}
		}
		cols[v] = c
		if u <= fileTipMark {
			cols[v] = dark
		}
	}
	return cols
}

// centerlineMesh is a thin tube along the centerline coloured by curvature (pale straight,
// dark at the tightest bend).
func centerlineMesh(c *analysis.Canal) (*mesh.Mesh, []color.RGBA) {
	line := c.Line
	kmax := 0.0
	for _, k := range line.K {
		kmax = math.Max(kmax, k)
	}
	const around = 8
	r := 0.03
	m := mesh.SweepTube(line.Points, line.N1, line.N2, func(int, float64) float64 { return r }, around, true, true)
	scale := render.DivergingScale()
	cols := make([]color.RGBA, len(m.Vertices))
	for v := range cols {
		i := min(v/around, line.Len()-1)
		t := 0.5
		if kmax > 0 {
			t = 0.5 + 0.5*line.K[i]/kmax
		}
		cols[v] = scale.At(t)
	}
	return m, cols
}
