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
	"tapersweep/ui/render"
)

// Options say what to show.
type Options struct {
	Step int // from 1; 0 draws the canal alone
	// Before draws the canal as the step meets it (the file see-through where it reaches into the wall)
	// instead of as the step leaves it (the cut wall just outside the file).
	Before      bool
	HideFile    bool    // leave the file out
	WallOpacity float64 // 0 = default see-through; 1 = opaque wall
	// Clip opens the canal lengthwise along its own centerline, removing the half that faces
	// the default (side) view, so the file shows inside all the way to the apical end;
	// ClipOffset moves the cut across the canal in mm.
	Clip       bool
	ClipOffset float64
	Centerline bool // draw the centerline coloured by curvature
	// FixedScale tops the depth-of-cut legend at the run's deepest cut (rounded up), so colours
	// compare across steps; otherwise at the shown step's own deepest cut.
	FixedScale bool
	// WallThickness colours the canal's wall by the wall left to the root's outer surface (the
	// canal as the step leaves it, or as scanned without a step), drawn solid inside the root
	// drawn see-through; without a known root it changes nothing.
	WallThickness bool
	// Others are the other canals of the same tooth (found in the same scan), drawn around
	// the shown one (neighbours.go).
	Others []*mesh.Mesh
}

// WallLegendTop is the wall thickness, mm, at the pale end of the wall scale.
const WallLegendTop = 2.0

// rootOpacity draws the root's outer surface see-through around the canal.
const rootOpacity = 0.12

// DefaultWallOpacity lets the file show through the wall.
const DefaultWallOpacity = 0.35

// fileInWallOpacity draws the part of the file that lies inside the wall (beyond the canal as
// the step meets it) see-through, so the cut wall shows through it.
const fileInWallOpacity = 0.3

// fileCutOpenOpacity lets the far wall's cut show through the file when the canal is cut open.
const fileCutOpenOpacity = 0.45

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
	Scale     *render.Scale
	LegendMax float64
	Title     string
	WallIndex int // index of the wall among Scene.Objects
	FileIndex int // -1 when no file is drawn
	// FileInWallIndex is the see-through part of the file inside the wall, -1 when none.
	FileInWallIndex int
	Wall, File      *mesh.Mesh
	// OwnPath: the file is drawn on its own (elastic) path, off the centerline.
	OwnPath bool
	// PatchMM is the size of the patch the depth of cut is averaged over for the colours of a
	// scanned wall (0: each vertex's own depth).
	PatchMM float64
	// CenterlineIndex is the centerline among Scene.Objects, -1 when not drawn.
	CenterlineIndex int
	// WallMode: the wall is coloured by the wall left to the root (Scale is the wall scale, from
	// 0 to LegendMax mm) and RootIndex is the root among Scene.Objects (-1 when not drawn).
	WallMode  bool
	RootIndex int
}

// Build makes the scene for one step of a run (res may be nil for the canal alone).
func Build(c *analysis.Canal, res *analysis.Result, opt Options) (*Built, error) {
	if opt.Step < 0 || (opt.Step > 0 && (res == nil || opt.Step > len(res.Steps))) {
		n := 0
		if res != nil {
			n = len(res.Steps)
		}
		return nil, fmt.Errorf("step %d does not exist (the sequence has %d steps, numbered from 1)", opt.Step, n)
	}
	b := &Built{Scale: DepthScale(), FileIndex: -1, FileInWallIndex: -1, CenterlineIndex: -1, RootIndex: -1}
	b.Lo, b.Hi = c.Mesh.Bounds()
	b.LegendMax = LegendTop(res, opt.Step, opt.FixedScale)
	var st *analysis.StepResult
	if opt.Step > 0 {
		st = res.Steps[opt.Step-1]
	}
	cut, patch := vertexCut(c, st)
	b.PatchMM = patch
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
	if opt.WallThickness && c.Root != nil {
		return buildWallMode(b, c, res, st, opt, s)
	}
	// The wall is drawn in two parts: where the file cuts, solid patches in the colour of the
	// depth of cut; elsewhere see-through, so the file shows inside. As the step meets the
	// canal, the cut wall lies inside the file, so the part of the file in the wall is drawn
	// see-through around it; after the step, the cut wall is drawn just outside the file.
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
		var o1, o2 []float64
		if ownPath {
			o1, o2 = st.Offset1, st.Offset2
			b.OwnPath = true
		}
		// As the step meets the canal the file reaches into the wall: that part is drawn
		// see-through and smooth, so the cut wall inside it shows.
		b.File = fileTube(c, in, st.TipDepth, o1, o2, !opt.Before)
		cols := FileColors(b.File, FileColor(in.Size), in, st.TipDepth)
		inside, inWall := b.File, (*mesh.Mesh)(nil)
		if opt.Before {
			inside, inWall = splitFileAtWall(c, b.File, in, st.TipDepth, st.Before)
		}
		body := render.Object{Mesh: inside, Colors: cols, Outline: true}
		switch {
		case opt.Clip:
			// Cut open, the far wall lies behind the file: the file is drawn see-through so
			// the cut on the far wall shows through it.
			body.Opacity = fileCutOpenOpacity
		case ownPath:
			body.Opacity = fileOnPathOpacity
		}
		s.Objects = append(s.Objects, body)
		b.FileIndex = len(s.Objects) - 1
		if inWall != nil && len(inWall.Triangles) > 0 {
			s.Objects = append(s.Objects, render.Object{Mesh: inWall, Colors: cols, Opacity: fileInWallOpacity, Outline: true})
			b.FileInWallIndex = len(s.Objects) - 1
		}
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
		s.Objects = append(s.Objects, render.Object{Mesh: thinCenterline(c), Color: CenterlineInk})
		b.CenterlineIndex = len(s.Objects) - 1
	}
	if opt.Clip {
		d := cutDistances(c, b.Wall, opt.ClipOffset)
		for i := range s.Objects {
			if s.Objects[i].Clip && s.Objects[i].Mesh != nil && len(s.Objects[i].Mesh.Vertices) == len(d) {
				s.Objects[i].ClipDistance = d
			}
		}
	}
	b.Scene = s
	addNeighbours(b, opt.Others)
	return b, nil
}

// vertexCut is the step's depth of cut at each wall vertex's own (s, theta); nil without a step.
// Colours, the split into cut and free wall and the lifted wall all read it. On a scanned wall
// the depth is averaged over a small patch first (patch, mm), so the stair steps of a scan do
// not break a contact band into specks.
func vertexCut(c *analysis.Canal, st *analysis.StepResult) (cut []float64, patch float64) {
	if st == nil {
		return nil, 0
	}
	m, patch := patchAveraged(c, st.Cut)
	cut = make([]float64, len(c.Mesh.Vertices))
	for v := range cut {
		cut[v] = c.MapAt(m, float64(c.VertexS[v]), float64(c.VertexTheta[v]))
	}
	return cut, patch
}

// patchAveraged is a station-major map averaged over a patch about twice the scan's detail
// across (at least 0.1 mm) in arc length and around the wall; a parametric canal, whose wall
// is smooth, keeps its map.
func patchAveraged(c *analysis.Canal, m []float32) ([]float32, float64) {
	if c.SurfaceDetail <= 0 {
		return m, 0
	}
	patch := math.Max(0.1, 2*c.SurfaceDetail)
	n, na := c.Line.Len(), c.Angles
	hs := int(math.Round(patch / 2 / c.Line.DS))
	meanR := 0.0
	for i := 0; i < n; i++ {
		meanR += c.MeanRadius(i)
	}
	meanR /= float64(n)
	ha := min(na/4, int(math.Round(patch/2/(meanR*2*math.Pi/float64(na)))))
	if hs < 1 && ha < 1 {
		return m, 0
	}
	around := make([]float32, len(m))
	for i := 0; i < n; i++ {
		row := m[i*na : (i+1)*na]
		for j := 0; j < na; j++ {
			sum := float32(0)
			for k := -ha; k <= ha; k++ {
				sum += row[((j+k)%na+na)%na]
			}
			around[i*na+j] = sum / float32(2*ha+1)
		}
	}
	out := make([]float32, len(m))
	for i := 0; i < n; i++ {
		lo, hi := max(0, i-hs), min(n-1, i+hs)
		for j := 0; j < na; j++ {
			sum := float32(0)
			for k := lo; k <= hi; k++ {
				sum += around[k*na+j]
			}
			out[i*na+j] = sum / float32(hi-lo+1)
		}
	}
	return out, patch
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

// cutDistances is each wall vertex's signed distance to a cut along the canal: the surface
// through the centerline at every station, square to N2 there, moved offset mm toward -N2. A
// single plane would leave the canal where it bends out of the plane of its main curve (and
// hide the apical end of a scan whose frame turns a little); this cut follows the canal.
func cutDistances(c *analysis.Canal, wall *mesh.Mesh, offset float64) []float32 {
	d := make([]float32, len(wall.Vertices))
	for v, p := range wall.Vertices {
		q, _, _, n2 := c.Line.At(float64(c.VertexS[v]))
		d[v] = float32(offset - p.Sub(q).Dot(n2))
	}
	return d
}

// buildWallMode draws the canal (as the step leaves it) solid in the colour of the wall left
// to the root at each vertex's own (s, theta), the root see-through around it, and the file as
// usual inside (seen where the canal is cut open).
func buildWallMode(b *Built, c *analysis.Canal, res *analysis.Result, st *analysis.StepResult, opt Options, s *render.Scene) (*Built, error) {
	b.WallMode, b.Scale, b.LegendMax = true, WallScale(), WallLegendTop
	th := c.Thickness
	b.Title = "canal as scanned: wall to the root's surface"
	if st != nil {
		th = res.WallMap(st.Number)
		b.Title = fmt.Sprintf("step %d, %s to %.2f mm: wall to the root's surface after the step", st.Number, st.Metrics.Label, st.TipDepth)
		b.Wall = wallMesh(c, st, make([]float64, len(c.Mesh.Vertices)), true)
	}
	cols := make([]color.RGBA, len(c.Mesh.Vertices))
	for v := range cols {
		w := c.MapAt(th, float64(c.VertexS[v]), float64(c.VertexTheta[v]))
		cols[v] = b.Scale.At(math.Max(0, math.Min(1, w/b.LegendMax)))
	}
	s.Objects = append(s.Objects, render.Object{Mesh: b.Wall, Colors: cols, Clip: true})
	b.WallIndex = 0
	if st != nil && !opt.HideFile {
		in := st.Step.Instrument
		b.File = fileTube(c, in, st.TipDepth, st.Offset1, st.Offset2, true)
		s.Objects = append(s.Objects, render.Object{Mesh: b.File, Colors: FileColors(b.File, FileColor(in.Size), in, st.TipDepth), Outline: true})
		b.FileIndex = len(s.Objects) - 1
	}
	s.Objects = append(s.Objects, render.Object{Mesh: c.Root.Mesh, Color: RootInk, Opacity: rootOpacity, Outline: true})
	b.RootIndex = len(s.Objects) - 1
	if opt.Clip {
		d := cutDistances(c, b.Wall, opt.ClipOffset)
		s.Objects[0].ClipDistance = d
	}
	b.Scene = s
	return b, nil
}
