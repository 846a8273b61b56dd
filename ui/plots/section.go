package plots

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"tapersweep/analysis"
	"tapersweep/ui/scene"
)

// SectionOptions say how cross-sections are drawn.
type SectionOptions struct {
	// LegendTop is the depth of cut, mm, drawn in the darkest colour of the scale (the 3D
	// view's legend top, so the two read alike).
	LegendTop float64
	// ContactMM is the depth below which wall counts as untouched (the run's contact threshold).
	ContactMM float64
	DPI       float64 // 96 on a screen; higher for print
	// TextPt is the size of the text, points (0 = 8).
	TextPt float64
	// Key adds a line under the sections saying what each line and fill means.
	Key bool
	// Selected marks one of the sections (by index) with a frame; -1 for none.
	Selected int
	// Columns is how many sections stand side by side; 0 chooses the number that draws them
	// largest in the space given.
	Columns int
	// Compact states each level's figures on the title line and puts the scale bar in the
	// corner (for the window's narrow column).
	Compact bool
}

// Section geometry on the page: the sections are seen from the orifice looking toward the apex,
// x along N1 (the inner side of the main curve to the right) and y along -N2, so the picture is
// not mirrored.
func toScreen(x, y float64) (float64, float64) { return x, -y }

// SectionsImage draws sections side by side in a w x h image, all at one scale so their sizes
// compare: each with its level, the removed area, the outlines, the file's section, the
// transportation arrow and a scale bar.
func SectionsImage(secs []*analysis.Section, w, h int, opt SectionOptions) *image.RGBA {
	if opt.DPI <= 0 {
		opt.DPI = 96
	}
	if opt.TextPt <= 0 {
		opt.TextPt = 8
	}
	c := canvas(w, h, opt.DPI)
	dc := draw.New(c)
	if len(secs) == 0 {
		return toRGBA(c)
	}
	pt := vg.Points(opt.TextPt)
	ink := func(size float64, col color.Color) draw.TextStyle {
		return text.Style{Color: col, Font: fontOf(size), Handler: plot.DefaultTextHandler}
	}
	body := ink(opt.TextPt, scene.Ink)
	small := ink(0.9*opt.TextPt, scene.ScannedInk)
	lineH := body.FontExtents().Height
	W, H := dc.Max.X-dc.Min.X, dc.Max.Y-dc.Min.Y
	items := keyItems
	for _, sec := range secs {
		if sec.Root != nil {
			items = withRootKey
			break
		}
	}
	keyH := vg.Length(0)
	if opt.Key {
		keyH = keyHeight(W, lineH, small, items)
	}
	extent := 0.0
	for _, s := range secs {
		extent = math.Max(extent, sectionExtent(s))
	}
	if !(extent > 0) {
		extent = 1
	}
	// Above each section its level (and figures), below it the scale bar.
	textH := 2.4 * lineH
	barH := 1.8 * lineH
	if opt.Compact {
		textH, barH = 2.2*lineH, 1.0*lineH // the bar in the corner, under the outline
	}
	// In the window's narrow column a level's figures that do not fit the cell's width take
	// a line each.
	compactLines := func(s *analysis.Section, cellW vg.Length) []string {
		lines := []string{trim(s.FromApexMM) + " mm from the apical end"}
		// The thinnest wall is labelled on its line; the narrow title leaves it out.
		brief := *s
		brief.Wall = nil
		fig := sectionFigures(&brief)
		if small.Width(fig) > cellW-pt {
			return append(lines, strings.Split(fig, " · ")...)
		}
		return append(lines, fig)
	}
	layout := func(cols int) (cellW, cellH, picW, picH vg.Length, scale float64) {
		rows := (len(secs) + cols - 1) / cols
		cellW, cellH = W/vg.Length(cols), (H-keyH)/vg.Length(rows)
		textH := textH
		if opt.Compact {
			n := 0
			for _, s := range secs {
				n = max(n, len(compactLines(s, cellW)))
			}
			textH = vg.Length(float64(n)+0.2) * lineH
		}
		picW, picH = cellW-2*pt, cellH-textH-barH
		return cellW, cellH, picW, picH, math.Min(float64(picW), float64(picH)) / (2 * extent * 1.05)
	}
	cols := opt.Columns
	if cols <= 0 || cols > len(secs) {
		cols = len(secs)
		if opt.Columns <= 0 {
			best := 0.0
			for k := 1; k <= len(secs); k++ {
				if _, _, _, _, sc := layout(k); sc > best {
					best, cols = sc, k
				}
			}
		}
	}
	cellW, cellH, picW, picH, scale := layout(cols) // scale: points per mm
	if picH <= 0 || picW <= 0 {
		return toRGBA(c)
	}
	for i, s := range secs {
		x0 := dc.Min.X + vg.Length(i%cols)*cellW
		y0 := dc.Max.Y - vg.Length(i/cols+1)*cellH // the cell's bottom
		cx := x0 + cellW/2
		cy := y0 + barH + picH/2
		if i == opt.Selected {
			frame := []vg.Point{{X: x0 + 1, Y: y0 + 1}, {X: x0 + cellW - 1, Y: y0 + 1},
				{X: x0 + cellW - 1, Y: y0 + cellH - 1}, {X: x0 + 1, Y: y0 + cellH - 1}, {X: x0 + 1, Y: y0 + 1}}
			dc.StrokeLines(draw.LineStyle{Color: scene.TransportInk, Width: vg.Points(1)}, frame)
		}
		at := func(x, y float64) vg.Point {
			sx, sy := toScreen(x, y)
			return vg.Point{X: cx + vg.Length(sx*scale), Y: cy + vg.Length(sy*scale)}
		}
		// The root and the wall's line are clipped a little inside the cell, so a line running
		// out of one section never meets its neighbour's and reads as one.
		gap := 0.06 * cellW
		cell := draw.Canvas{Canvas: dc.Canvas, Rectangle: vg.Rectangle{Min: vg.Point{X: x0 + gap, Y: y0 + barH}, Max: vg.Point{X: x0 + cellW - gap, Y: y0 + barH + picH}}}
		drawSection(dc, s, at, scale, opt)
		drawRoot(dc, cell, s, at, small)
		// Level and figures above.
		top := y0 + cellH - 0.3*lineH
		title := body
		title.XAlign, title.YAlign = draw.XCenter, draw.YTop
		sub := small
		sub.XAlign, sub.YAlign = draw.XCenter, draw.YTop
		if opt.Compact {
			for k, line := range compactLines(s, cellW) {
				dc.FillText(sub, vg.Point{X: cx, Y: top - vg.Length(k)*lineH}, line)
			}
		} else {
			dc.FillText(title, vg.Point{X: cx, Y: top}, fmt.Sprintf("%s mm from the apical end", trim(s.FromApexMM)))
			dc.FillText(sub, vg.Point{X: cx, Y: top - 1.15*lineH}, sectionFigures(s))
		}
		// The scale bar below, or in the lower left corner.
		bar := niceLength(extent * 0.8)
		bw := vg.Length(bar * scale)
		by, bx := y0+0.6*lineH, cx-bw/2
		if opt.Compact {
			bar = niceLength(extent * 0.5)
			bw = vg.Length(bar * scale)
			by, bx = y0+0.5*lineH, x0+pt
		}
		dc.StrokeLines(draw.LineStyle{Color: scene.Ink, Width: vg.Points(1.2)},
			[]vg.Point{{X: bx, Y: by + 2}, {X: bx, Y: by}, {X: bx + bw, Y: by}, {X: bx + bw, Y: by + 2}})
		lab := small
		lab.XAlign, lab.YAlign = draw.XLeft, draw.YCenter
		dc.FillText(lab, vg.Point{X: bx + bw + 0.4*pt, Y: by}, trim(bar)+" mm")
	}
	if opt.Key {
		drawKey(dc, opt, lineH, small, items)
	}
	return toRGBA(c)
}

// sectionExtent is how far from the centerline anything of the section reaches, mm.
func sectionExtent(s *analysis.Section) float64 {
	e := 0.0
	for _, o := range append([]analysis.Outline{s.Scanned, s.Before, s.After}, s.Earlier...) {
		for _, r := range o.R {
			e = math.Max(e, r)
		}
	}
	if f := s.File; f != nil {
		e = math.Max(e, math.Hypot(f.X, f.Y)+f.RadiusMM)
	}
	// The root's outline is drawn as far as the picture reaches; the picture widens to show the
	// thinnest wall whole where it is close (within the canal's own reach again), and otherwise
	// keeps the canal large, the wall's line running out of the picture.
	if w := s.Wall; w != nil {
		if r := math.Hypot(w.ToX, w.ToY); r <= 2*e {
			e = math.Max(e, r)
		}
	}
	return e
}

// drawRoot draws the root's outer surface in this plane (clipped to the section's cell: a root
// is many times wider than its canal) and the thinnest wall at this level, from the canal's
// outline to the nearest point of the root, with its thickness.
func drawRoot(dc, cell draw.Canvas, s *analysis.Section, at func(x, y float64) vg.Point, sty draw.TextStyle) {
	if s.Root == nil {
		return
	}
	pts := make([]vg.Point, 0, len(s.Root.R)+1)
	for j := 0; j <= len(s.Root.R); j++ {
		pts = append(pts, at(s.Root.Point(j)))
	}
	rootLine := draw.LineStyle{Color: scene.RootInk, Width: vg.Points(1.3)}
	dc.StrokeLines(rootLine, cell.ClipLinesXY(pts)...)
	if w := s.Wall; w != nil {
		a, b := at(w.FromX, w.FromY), at(w.ToX, w.ToY)
		seg := cell.ClipLinesXY([]vg.Point{a, b})
		if len(seg) == 0 || len(seg[0]) < 2 {
			return
		}
		dc.StrokeLines(draw.LineStyle{Color: scene.LimitInk, Width: vg.Points(1.2)}, seg...)
		end := seg[0][len(seg[0])-1]
		if end == b {
			r := vg.Points(1.4)
			dc.FillPolygon(scene.LimitInk, []vg.Point{{X: b.X - r, Y: b.Y}, {X: b.X, Y: b.Y - r}, {X: b.X + r, Y: b.Y}, {X: b.X, Y: b.Y + r}})
		}
		// The thickness above the line's middle, kept inside the cell.
		mid := vg.Point{X: (a.X + end.X) / 2, Y: (a.Y+end.Y)/2 + vg.Points(2)}
		lab := sty
		lab.Color = scene.LimitInk
		lab.XAlign, lab.YAlign = draw.XCenter, draw.YBottom
		text := fmt.Sprintf("%.2f mm", w.MM)
		half := lab.Width(text) / 2
		mid.X = max(cell.Min.X+half, min(cell.Max.X-half, mid.X))
		// On paper, so an outline under it does not hide it.
		h := lab.FontExtents().Height
		pad := vg.Points(1)
		dc.FillPolygon(scene.Background, []vg.Point{{X: mid.X - half - pad, Y: mid.Y}, {X: mid.X + half + pad, Y: mid.Y},
			{X: mid.X + half + pad, Y: mid.Y + h}, {X: mid.X - half - pad, Y: mid.Y + h}})
		dc.FillText(lab, mid, text)
	}
}

// sectionFigures states the level's figures in one line.
func sectionFigures(s *analysis.Section) string {
	if s.Step == 0 {
		if s.Wall != nil {
			return fmt.Sprintf("area %.3f mm² · wall %.2f mm", s.ScannedAreaMM2, s.Wall.MM)
		}
		return fmt.Sprintf("area %.3f mm²", s.ScannedAreaMM2)
	}
	t := fmt.Sprintf("removed %.3f mm²", s.RemovedMM2)
	if s.TransportationMM >= 0.0005 {
		t += fmt.Sprintf(" · moved %.3f mm", s.TransportationMM)
	} else {
		t += " · not moved"
	}
	if s.Wall != nil {
		t += fmt.Sprintf(" · wall %.2f mm", s.Wall.MM)
	}
	return t
}

func drawSection(dc draw.Canvas, s *analysis.Section, at func(x, y float64) vg.Point, scale float64, opt SectionOptions) {
	outline := func(o analysis.Outline) []vg.Point {
		pts := make([]vg.Point, 0, len(o.R)+1)
		for j := 0; j <= len(o.R); j++ {
			pts = append(pts, at(o.Point(j)))
		}
		return pts
	}
	ring := func(inner, outer analysis.Outline, col func(j int) (color.Color, bool)) {
		for j := range inner.R {
			c, ok := col(j)
			if !ok {
				continue
			}
			// Each wedge reaches a little into its neighbours, so no seam of background shows
			// between wedges where their antialiased edges meet.
			f0, f1 := float64(j)-0.2, float64(j)+1.2
			a, b := at(inner.PointAt(f0)), at(inner.PointAt(f1))
			d, e := at(outer.PointAt(f1)), at(outer.PointAt(f0))
			dc.FillPolygon(c, []vg.Point{a, b, d, e})
		}
	}
	contact := math.Max(opt.ContactMM, 1e-4)
	// Wall removed by earlier steps: a pale grey; by this step: coloured by its depth.
	if s.Step > 0 {
		ring(s.Scanned, s.Before, func(j int) (color.Color, bool) {
			return color.RGBA{226, 224, 218, 255}, s.Before.R[j]-s.Scanned.R[j] > contact || s.Before.R[(j+1)%len(s.Before.R)]-s.Scanned.R[(j+1)%len(s.Scanned.R)] > contact
		})
		top := math.Max(opt.LegendTop, contact)
		ring(s.Before, s.After, func(j int) (color.Color, bool) {
			k := (j + 1) % len(s.After.R)
			d := (s.After.R[j] - s.Before.R[j] + s.After.R[k] - s.Before.R[k]) / 2
			return scene.DepthColor(d, top), d > contact
		})
	}
	for _, o := range s.Earlier {
		dc.StrokeLines(draw.LineStyle{Color: scene.EarlierInk, Width: vg.Points(0.6)}, outline(o))
	}
	// The file's section: its outline in the file's steel grey and a dot on its axis, unfilled,
	// so the wall it removed keeps its colour and the canal inside stays paper.
	if f := s.File; f != nil {
		var pts []vg.Point
		for k := 0; k <= 72; k++ {
			th := 2 * math.Pi * float64(k) / 72
			pts = append(pts, at(f.X+f.RadiusMM*math.Cos(th), f.Y+f.RadiusMM*math.Sin(th)))
		}
		dc.StrokeLines(draw.LineStyle{Color: scene.FileInk, Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(5), vg.Points(1.5)}}, pts)
		c := at(f.X, f.Y)
		r := vg.Points(1.3)
		dc.FillPolygon(scene.FileInk, []vg.Point{{X: c.X - r, Y: c.Y}, {X: c.X, Y: c.Y - r}, {X: c.X + r, Y: c.Y}, {X: c.X, Y: c.Y + r}})
	}
	dc.StrokeLines(draw.LineStyle{Color: scene.ScannedInk, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(1), vg.Points(1.6)}}, outline(s.Scanned))
	if s.Step > 0 {
		dc.StrokeLines(draw.LineStyle{Color: scene.Ink, Width: vg.Points(1.1)}, outline(s.After))
	}
	// The centerline's point.
	o := at(0, 0)
	cross := vg.Points(2.5)
	ls := draw.LineStyle{Color: scene.Ink, Width: vg.Points(0.6)}
	dc.StrokeLine2(ls, o.X-cross, o.Y, o.X+cross, o.Y)
	dc.StrokeLine2(ls, o.X, o.Y-cross, o.X, o.Y+cross)
	// Gambill's transportation at this level, drawn to scale from the centre of the canal as
	// the step met it, toward the side the canal moved.
	if s.Step > 0 && s.TransportationMM >= 0.0005 {
		bx, by := s.Before.Centroid()
		th := s.TowardDeg * math.Pi / 180
		ex, ey := bx+s.TransportationMM*math.Cos(th), by+s.TransportationMM*math.Sin(th)
		// Shorter than a few points it would read as a speck: the figure above says it.
		if a, b := at(bx, by), at(ex, ey); math.Hypot(float64(b.X-a.X), float64(b.Y-a.Y)) >= float64(vg.Points(4)) {
			arrow(dc, a, b, scene.TransportInk)
		}
	}
}

// arrow draws a line from a to b with a head at b; a head no longer than the line.
func arrow(dc draw.Canvas, a, b vg.Point, col color.Color) {
	dx, dy := float64(b.X-a.X), float64(b.Y-a.Y)
	l := math.Hypot(dx, dy)
	if l == 0 {
		return
	}
	ux, uy := dx/l, dy/l
	head := math.Min(float64(vg.Points(5)), 0.6*l+float64(vg.Points(2)))
	dc.StrokeLine2(draw.LineStyle{Color: col, Width: vg.Points(1.4)}, a.X, a.Y, b.X, b.Y)
	p := func(along, across float64) vg.Point {
		return vg.Point{X: b.X + vg.Length(-ux*along-uy*across), Y: b.Y + vg.Length(-uy*along+ux*across)}
	}
	dc.FillPolygon(col, []vg.Point{b, p(head, head*0.45), p(head, -head*0.45)})
}

// keyItems are what the lines and fills of a section mean, in the order the key lists them.
var keyItems = []string{"as scanned", "after earlier steps", "after this step", "removed by this step (shade: depth of cut)",
	"the file's section", "transportation (to scale)", "seen from the orifice, inner side of the main curve to the right"}

// withRootKey is the key when the root is known: its outline and the thinnest wall join it.
var withRootKey = append(append(append([]string{}, keyItems[:len(keyItems)-1]...),
	"the root's outer surface", "thinnest wall at the level (estimate)"), keyItems[len(keyItems)-1])

// keySwatch is the width of a key's sample line.
var keySwatch = vg.Points(14)

// keyLines lays the key's items out in lines no wider than w.
func keyLines(w vg.Length, sty draw.TextStyle, items []string) [][]int {
	var lines [][]int
	x := w // start a new line at once
	for i, label := range items {
		iw := keySwatch + vg.Points(11) + sty.Width(label)
		if i == len(items)-1 {
			iw = sty.Width(label) + vg.Points(8) // the last is a note, without a swatch
		}
		if x+iw > w && (len(lines) == 0 || len(lines[len(lines)-1]) > 0) {
			lines = append(lines, nil)
			x = vg.Points(4)
		}
		lines[len(lines)-1] = append(lines[len(lines)-1], i)
		x += iw
	}
	return lines
}

func keyHeight(w, lineH vg.Length, sty draw.TextStyle, items []string) vg.Length {
	return vg.Length(len(keyLines(w, sty, items)))*1.2*lineH + 0.4*lineH
}

// drawKey says what the lines mean, under the sections.
func drawKey(dc draw.Canvas, opt SectionOptions, lineH vg.Length, sty draw.TextStyle, items []string) {
	sty.XAlign, sty.YAlign = draw.XLeft, draw.YCenter
	line := func(ls draw.LineStyle) func(x, y vg.Length) {
		return func(x, y vg.Length) { dc.StrokeLine2(ls, x, y, x+keySwatch, y) }
	}
	box := func(c color.Color) func(x, y vg.Length) {
		return func(x, y vg.Length) {
			h := vg.Points(3)
			dc.FillPolygon(c, []vg.Point{{X: x, Y: y - h}, {X: x + keySwatch, Y: y - h}, {X: x + keySwatch, Y: y + h}, {X: x, Y: y + h}})
		}
	}
	swatches := []func(x, y vg.Length){
		line(draw.LineStyle{Color: scene.ScannedInk, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(1), vg.Points(1.6)}}),
		line(draw.LineStyle{Color: scene.EarlierInk, Width: vg.Points(0.8)}),
		line(draw.LineStyle{Color: scene.Ink, Width: vg.Points(1.1)}),
		box(scene.DepthColor(0.6, 1)),
		line(draw.LineStyle{Color: scene.FileInk, Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(5), vg.Points(1.5)}}),
		func(x, y vg.Length) {
			arrow(dc, vg.Point{X: x, Y: y}, vg.Point{X: x + keySwatch, Y: y}, scene.TransportInk)
		},
	}
	if len(items) > len(keyItems) {
		swatches = append(swatches, line(draw.LineStyle{Color: scene.RootInk, Width: vg.Points(1.3)}),
			line(draw.LineStyle{Color: scene.LimitInk, Width: vg.Points(1.2)}))
	}
	swatches = append(swatches, nil)
	lines := keyLines(dc.Max.X-dc.Min.X, sty, items)
	for k, line := range lines {
		y := dc.Min.Y + 0.4*lineH + (vg.Length(len(lines)-1-k)+0.5)*1.2*lineH
		x := dc.Min.X + vg.Points(4)
		for _, i := range line {
			if swatches[i] != nil {
				swatches[i](x, y)
				x += keySwatch + vg.Points(3)
			}
			dc.FillText(sty, vg.Point{X: x, Y: y}, items[i])
			x += sty.Width(items[i]) + vg.Points(8)
		}
	}
}

// niceLength is a round length (1, 2, 2.5 or 5 times a power of ten) no longer than v.
func niceLength(v float64) float64 {
	if !(v > 0) {
		return 0.1
	}
	p := math.Pow(10, math.Floor(math.Log10(v)))
	for _, m := range []float64{5, 2.5, 2, 1} {
		if m*p <= v {
			return m * p
		}
	}
	return p
}

// trim writes a level or a length without trailing zeros ("3", "0.25").
func trim(v float64) string {
	s := fmt.Sprintf("%.2f", v)
	for s[len(s)-1] == '0' {
		s = s[:len(s)-1]
	}
	if s[len(s)-1] == '.' {
		s = s[:len(s)-1]
	}
	return s
}
