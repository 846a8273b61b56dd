package ui

import (
	"fmt"

	"tapersweep/analysis"
	"tapersweep/ui/render"
	"tapersweep/ui/scene"
)

// pickWall finds the wall place under pixel (x, y) of the last frame; ok is false when the
// pointer is over the file, the centerline or the background.
func pickWall(b *scene.Built, r *render.Renderer, c *analysis.Canal, x, y int) (p analysis.WallPlace, onFile bool, ok bool) {
	obj, tri, bary, hit := r.Pick(x, y)
	if !hit || obj < 0 || obj >= len(b.Scene.Objects) {
		return p, false, false
	}
	if obj == b.FileIndex || obj == b.FileInWallIndex {
		return p, true, false
	}
	m := b.Scene.Objects[obj].Mesh
	if len(m.Vertices) != len(c.VertexS) || len(m.Vertices) == 0 || b.Wall == nil ||
		len(b.Wall.Vertices) == 0 || &m.Vertices[0] != &b.Wall.Vertices[0] {
		return p, false, false // not the wall (the centerline tube)
	}
	return c.WallPlaceAt(m.Triangles[tri], bary), false, true
}

// hoverText states what lies under pixel (x, y): on the wall the depth of cut of the shown step,
// the distance from the apical end and the local canal radius as drawn.
func hoverText(in sceneInput, b *scene.Built, r *render.Renderer, x, y int) string {
	c := in.canal
	p, onFile, ok := pickWall(b, r, c, x, y)
	var st *analysis.StepResult
	if in.res != nil && in.opt.Step > 0 && in.opt.Step <= len(in.res.Steps) {
		st = in.res.Steps[in.opt.Step-1]
	}
	if onFile && st != nil {
		return fmt.Sprintf("file %s, tip at %.2f mm from the orifice", st.Metrics.Label, st.TipDepth)
	}
	if !ok {
		return ""
	}
	fromApex := c.Line.Length() - p.S
	rhoMap := c.Rho
	if st != nil {
		rhoMap = st.Prepared
		if in.opt.Before {
			rhoMap = st.Before
		}
	}
	radius := c.MapAt(rhoMap, p.S, p.Theta)
	if st == nil {
		return fmt.Sprintf("wall %.2f mm from the apical end · canal radius %.3f mm", fromApex, radius) + rootWallText(in, c, nil, p)
	}
	cut := c.MapAt(st.Cut, p.S, p.Theta)
	cutText := "no contact"
	if cut > in.res.Options.ContactThreshold {
		cutText = fmt.Sprintf("depth of cut %.3f mm", cut)
	}
	return fmt.Sprintf("%s · %.2f mm from the apical end · canal radius %.3f mm", cutText, fromApex, radius) + rootWallText(in, c, st, p)
}

// rootWallText adds the wall left to the root at the place ("" without a root), measured there
// exactly: as scanned, or before or after the shown step as the view shows it.
func rootWallText(in sceneInput, c *analysis.Canal, st *analysis.StepResult, p analysis.WallPlace) string {
	if c.Root == nil {
		return ""
	}
	m, when := c.Rho, "as scanned"
	switch {
	case st != nil && in.opt.Before:
		m, when = st.Before, "before this step"
	case st != nil:
		m, when = st.Prepared, "after this step"
	}
	return fmt.Sprintf(" · wall to the root %.2f mm %s", c.WallAt(m, p.S, p.Theta), when)
}
