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
	return FileMeshOnPath(c, in, tip, nil, nil)
}

// FileMeshOnPath is FileMesh with the file's axis moved off the centerline by o1*N1 + o2*N2
// (mm, per station from the orifice, as analysis.StepResult.Offset1/Offset2 hold them) and
// interpolated between stations; nil offsets draw the file centred.
func FileMeshOnPath(c *analysis.Canal, in models.Instrument, tip float64, o1, o2 []float64) *mesh.Mesh {
	return fileTube(c, in, tip, o1, o2, true)
}

// fileTube sweeps the file; without grooves it is a smooth taper, which reads better where the
// file is drawn see-through.
func fileTube(c *analysis.Canal, in models.Instrument, tip float64, o1, o2 []float64, grooves bool) *mesh.Mesh {
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
			if len(o1) > 0 && len(o1) == len(o2) {
				a, b := offsetAt(c.Line, o1, s), offsetAt(c.Line, o2, s)
				centers[k] = centers[k].Add(n1s[k].Mul(a)).Add(n2s[k].Mul(b))
			}
		} else {
			centers[k] = c.Line.Points[0].Add(t0.Mul(s)) // straight on above the orifice
			n1s[k], n2s[k] = a0, b0
		}
	}
	radius := func(k int, th float64) float64 {
		u := us[k]
		r := in.Diameter(u) / 2
		if grooves && u > 0 && u < in.CuttingLength {
			groove := 0.5 + 0.5*math.Cos(fluteBladeNo*th-2*math.Pi*u/flutePitch)
			r *= 1 - fluteDepth*groove*groove
		}
		return r
	}
	return mesh.SweepTube(centers, n1s, n2s, radius, fileAround, true, true)
}

// offsetAt interpolates a per-station offset at arc length s; past the last station it keeps
// the last value (the tip lies less than one station beyond it).
func offsetAt(line *analysis.Centerline, o []float64, s float64) float64 {
	x := s / line.DS
	i := int(math.Floor(x))
	switch {
	case i < 0:
		return o[0]
	case i >= len(o)-1:
		return o[len(o)-1]
	}
	f := x - float64(i)
	return o[i]*(1-f) + o[i+1]*f
}

// Handle band: the file's size colour shows only at the top of the drawn file, where a
// handle's colour ring would be, and never on the cutting part.
const handleBandMM = 1.5

// FileColors colours the file vertex by vertex in the order FileMesh makes them: a neutral metal
// body, a dark tip, and a band of its ISO size colour (size) at the handle end.
func FileColors(m *mesh.Mesh, size color.RGBA, in models.Instrument, tip float64) []color.RGBA {
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
		switch {
		case u <= fileTipMark:
			cols[v] = dark
		case u >= length-handleBandMM:
			cols[v] = size
		default:
			cols[v] = FileMetal
		}
	}
	return cols
}

// splitFileAtWall separates the file's triangles that lie inside the canal as it was (wall
// distances before, a station-major map) from those that reach into the wall; both keep all
// vertices so the file's colours still apply. A vertex's place comes from its ring (the
// station tip - u) and its direction from the centerline there.
func splitFileAtWall(c *analysis.Canal, file *mesh.Mesh, in models.Instrument, tip float64, before []float32) (inside, inWall *mesh.Mesh) {
	rings := (len(file.Vertices) - 2) / fileAround
	length := math.Min(in.CuttingLength+fileAbove, tip+fileAbove)
	out := make([]bool, len(file.Vertices))
	for v := 0; v < rings*fileAround; v++ {
		ring := v / fileAround
		u := length * float64(ring) / float64(max(1, rings-1))
		s := tip - u
		if s < 0 {
			continue // above the orifice
		}
		q, _, n1, n2 := c.Line.At(s)
		d := file.Vertices[v].Sub(q)
		th := math.Atan2(d.Dot(n2), d.Dot(n1))
		out[v] = d.Len() > c.MapAt(before, s, th)+0.002
	}
	var keep, wall []int32
	for t, tri := range file.Triangles {
		n := 0
		for _, k := range tri {
			if out[k] {
				n++
			}
		}
		if n >= 2 {
			wall = append(wall, int32(t))
		} else {
			keep = append(keep, int32(t))
		}
	}
	return subsetKeepIndex(file, keep), subsetKeepIndex(file, wall)
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

// thinCenterline is the centerline as a thin tube of one colour.
func thinCenterline(c *analysis.Canal) *mesh.Mesh {
	const around, r = 6, 0.018
	line := c.Line
	return mesh.SweepTube(line.Points, line.N1, line.N2, func(int, float64) float64 { return r }, around, true, true)
}
