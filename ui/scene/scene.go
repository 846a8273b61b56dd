// Package scene turns a measured canal and a sequence run into something to draw: the wall
// coloured by depth of cut at each vertex's own (s, theta), the file as a tapered tube in its
// ISO size colour, the canal before or after a step, and named views taken from the canal
// itself. The window, the CLI and the report share it.
package scene

import (
	"fmt"
	"image/color"
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/mesh"
	"tapersweep/models"
	"tapersweep/ui/render"
)

// Options say what to show.
type Options struct {
	Step int // from 1; 0 draws the canal alone
	// Before draws the canal as the step meets it (the file as a ghost around the cut wall)
	// instead of as the step leaves it (the cut wall just outside the file).
	Before      bool
	HideFile    bool    // leave the file out
	WallOpacity float64 // 0 = default see-through; 1 = opaque wall
	// Clip opens the canal lengthwise with the plane of its main curve; ClipOffset moves the
	// plane across the canal in mm.
	Clip       bool
	ClipOffset float64
	Centerline bool // draw the centerline coloured by curvature
}

// DefaultWallOpacity lets the file show through the wall.
const DefaultWallOpacity = 0.35

// fileGhostOpacity draws the file around the cut wall as the step meets the canal.
const fileGhostOpacity = 0.25

// fileOnPathOpacity lets the centerline show through a file that runs off it.
const fileOnPathOpacity = 0.7

// contactLift puts the cut wall just outside the file after the step, so patch and file do
// not fight for the same pixels: a share of the radius plus a few micrometres.
const contactLift = 0.03

// Built is a scene ready for the renderer, with what a legend needs.
type Built struct {
	Scene  *render.Scene
	Lo, Hi mgl64.Vec3 // bounds of the canal
	// Legend: the depth-of-cut scale, from 0 to LegendMax mm.
	Scale      *render.Scale
	LegendMax  float64
	Title      string
	WallIndex  int // index of the wall among Scene.Objects
	FileIndex  int // -1 when no file is drawn
	Wall, File *mesh.Mesh
	// OwnPath: the file is drawn on its own (elastic) path, off the centerline.
	OwnPath bool
	// CenterlineIndex is the centerline among Scene.Objects, -1 when not drawn.
	CenterlineIndex int
}

// Background of every view: a light warm paper tone.
var Background = color.RGBA{246, 245, 241, 255}

// Build makes the scene for one step of a run (res may be nil for the canal alone).
func Build(c *analysis.Canal, res *analysis.Result, opt Options) (*Built, error) {
	if opt.Step < 0 || (opt.Step > 0 && (res == nil || opt.Step > len(res.Steps))) {
		n := 0
		if res != nil {
			n = len(res.Steps)
		}
		return nil, fmt.Errorf("step %d does not exist (the sequence has %d steps, numbered from 1)", opt.Step, n)
	}
	b := &Built{Scale: render.DepthScale(), FileIndex: -1, CenterlineIndex: -1}
	b.Lo, b.Hi = c.Mesh.Bounds()
	b.LegendMax = legendMax(res)
	var st *analysis.StepResult
	if opt.Step > 0 {
		st = res.Steps[opt.Step-1]
	}
	cut := vertexCut(c, st)
	b.Wall, b.Title = wallMesh(c, st, cut, !opt.Before), "canal"
	colors := wallColors(c, cut, b.Scale, b.LegendMax, res)
	if st != nil {
		when := "after the step"
		if opt.Before {
			when = "as the step meets it"
		}
		b.Title = fmt.Sprintf("step %d, %s to %.2f mm: canal %s", st.Number, st.Metrics.Label, st.TipDepth, when)
	}
	opacity := opt.WallOpacity
	if opacity <= 0 {
		opacity = DefaultWallOpacity
	}
	s := &render.Scene{Background: Background}
	// The wall is drawn in two parts: where the file cuts, solid patches in the colour of the
	// depth of cut; elsewhere see-through, so the file shows inside. As the step meets the
	// canal, the cut wall lies inside the file, so the file is drawn as a ghost around it;
	// after the step, the cut wall is drawn just outside the file.
	contact, free := splitWall(b.Wall, cut, res)
	if len(free.Triangles) > 0 {
		s.Objects = append(s.Objects, render.Object{Mesh: free, Colors: colors, Opacity: opacity, Outline: true, Clip: true})
	}
	b.WallIndex = len(s.Objects)
	if contact != nil && len(contact.Triangles) > 0 {
		s.Objects = append(s.Objects, render.Object{Mesh: contact, Colors: colors, Clip: true})
	}
	// On the elastic path the file runs off the centerline: it is drawn on its own axis and
	// the centerline as a thin line, so the difference shows.
	ownPath := st != nil && len(st.Offset1) > 0 && len(st.Offset1) == len(st.Offset2)
	if st != nil && !opt.HideFile {
		in := st.Step.Instrument
		ghost := opt.Before && contact != nil && len(contact.Triangles) > 0
		var o1, o2 []float64
		if ownPath {
			o1, o2 = st.Offset1, st.Offset2
			b.OwnPath = true
		}
		b.File = fileTube(c, in, st.TipDepth, o1, o2, !ghost)
		cols := FileColors(b.File, FileColor(in.Size), in, st.TipDepth)
		obj := render.Object{Mesh: b.File, Colors: cols, Outline: true}
		if ghost {
			obj.Opacity = fileGhostOpacity
		} else if ownPath {
			obj.Opacity = fileOnPathOpacity
		}
		s.Objects = append(s.Objects, obj)
		b.FileIndex = len(s.Objects) - 1
		flo, fhi := b.File.Bounds()
		for k := 0; k < 3; k++ {
			b.Lo[k], b.Hi[k] = math.Min(b.Lo[k], flo[k]), math.Max(b.Hi[k], fhi[k])
		}
	}
	switch {
	case opt.Centerline:
		line, cols := centerlineMesh(c)
		s.Objects = append(s.Objects, render.Object{Mesh: line, Colors: cols})
		b.CenterlineIndex = len(s.Objects) - 1
	case ownPath && !opt.HideFile:
		s.Objects = append(s.Objects, render.Object{Mesh: thinCenterline(c), Color: centerlineInk})
		b.CenterlineIndex = len(s.Objects) - 1
	}
	if opt.Clip {
		star := c.Line.Station(c.Measures.MaxCurvatureS)
		n := c.Line.N2[star]
		s.ClipPlane = &render.Plane{Point: c.Line.Points[star].Add(n.Mul(opt.ClipOffset)), Normal: n}
	}
	b.Scene = s
	return b, nil
}

// legendMax is a round upper end for the depth-of-cut scale shared by every step of a run, so
// colours compare across steps.
func legendMax(res *analysis.Result) float64 {
	m := 0.0
	if res != nil {
		for _, s := range res.Steps {
			m = math.Max(m, s.Metrics.MaxDepthOfCutMM)
		}
	}
	for _, v := range []float64{0.02, 0.05, 0.1, 0.15, 0.2, 0.3, 0.4, 0.5, 0.75, 1, 1.5, 2} {
		if m <= v {
			return v
		}
	}
	return math.Ceil(m)
}

// FileColor is the ISO 3630-1 size colour, with white drawn as a light grey so it shows
// against a light background.
func FileColor(size int) color.RGBA {
	name, c, ok := models.ISOColor(size)
	if !ok {
		return color.RGBA{150, 150, 150, 255}
	}
	if name == "white" {
		return color.RGBA{228, 228, 224, 255}
	}
	return c
}

// vertexCut is the step's depth of cut at each wall vertex's own (s, theta); nil without a step.
// Colours, the split into cut and free wall and the lifted wall all read it.
func vertexCut(c *analysis.Canal, st *analysis.StepResult) []float64 {
	if st == nil {
		return nil
	}
	cut := make([]float64, len(c.Mesh.Vertices))
	for v := range cut {
		cut[v] = c.MapAt(st.Cut, float64(c.VertexS[v]), float64(c.VertexTheta[v]))
	}
	return cut
}

// wallMesh is the canal's own mesh, or with each vertex moved out to the prepared wall (and
// where this step cut, just outside its file).
func wallMesh(c *analysis.Canal, st *analysis.StepResult, cut []float64, after bool) *mesh.Mesh {
	if st == nil || !after {
		return c.Mesh
	}
	m := &mesh.Mesh{Triangles: c.Mesh.Triangles, Vertices: make([]mgl64.Vec3, len(c.Mesh.Vertices))}
	for v, p := range c.Mesh.Vertices {
		s, th := float64(c.VertexS[v]), float64(c.VertexTheta[v])
		q, _, n1, n2 := c.Line.At(s)
		d := p.Sub(q)
		prep := c.MapAt(st.Prepared, s, th)
		if cut[v] > 0 {
			prep = prep*(1+contactLift) + 0.003
		}
		if r := d.Len(); prep > r {
			dir := n1.Mul(math.Cos(th)).Add(n2.Mul(math.Sin(th)))
			p = q.Add(dir.Mul(prep))
		}
		m.Vertices[v] = p
	}
	return m
}

// splitWall separates the triangles the step cuts (mean cut of their corners above the
// contact threshold) from the rest. Without a step everything is free wall.
func splitWall(wall *mesh.Mesh, cut []float64, res *analysis.Result) (contact, free *mesh.Mesh) {
	if cut == nil {
		return nil, wall
	}
	thr := res.Options.ContactThreshold
	var in, out []int32
	for t, tri := range wall.Triangles {
		if (cut[tri[0]]+cut[tri[1]]+cut[tri[2]])/3 > thr {
			in = append(in, int32(t))
		} else {
			out = append(out, int32(t))
		}
	}
	return subsetKeepIndex(wall, in), subsetKeepIndex(wall, out)
}

// subsetKeepIndex keeps the chosen triangles and all vertices, so per-vertex colours of the
// whole wall still apply.
func subsetKeepIndex(m *mesh.Mesh, tris []int32) *mesh.Mesh {
	out := &mesh.Mesh{Vertices: m.Vertices, Triangles: make([][3]int32, len(tris))}
	for i, t := range tris {
		out.Triangles[i] = m.Triangles[t]
	}
	return out
}

// wallColors gives each wall vertex the depth of cut at its own (s, theta): the scale where
// the cut passes the contact threshold, neutral elsewhere.
func wallColors(c *analysis.Canal, cut []float64, scale *render.Scale, max float64, res *analysis.Result) []color.RGBA {
	cols := make([]color.RGBA, len(c.Mesh.Vertices))
	if cut == nil {
		for i := range cols {
			cols[i] = scale.Neutral
		}
		return cols
	}
	thr := res.Options.ContactThreshold
	for v, e := range cut {
		if e <= thr {
			cols[v] = scale.Neutral
			continue
		}
		cols[v] = scale.At(math.Min(1, e/max))
	}
	return cols
}
