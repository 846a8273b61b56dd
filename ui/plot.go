package ui

import (
	"image"
	"image/color"
	"math"
	"strconv"

	"tapersweep/ui/render"
)

// A small line chart drawn straight into an image: enough for the profiles under the viewport.

// series is one line of a chart; points with NaN y are gaps.
type series struct {
	xs, ys []float64
	col    color.RGBA
	fill   bool // shade between the line and y = 0
	label  string
}

// chart is a titled plot with shared x range.
type chart struct {
	title      string
	xmin, xmax float64
	ymin, ymax float64 // ymax <= ymin: from the data
	series     []series
	band       [2]float64 // x range shaded (engaged zone); equal ends: none
	marks      []float64  // x of dashed vertical lines (the tightest bend)
	xLabel     string
}

var (
	plotInk   = color.RGBA{50, 52, 58, 255}
	plotGrid  = color.RGBA{225, 223, 216, 255}
	plotPaper = color.RGBA{252, 251, 248, 255}
	plotBand  = color.RGBA{255, 226, 190, 255}
	plotMark  = color.RGBA{120, 120, 130, 255}
)

const plotText = 11.0

// draw renders the chart inside r of dst.
func (ch chart) draw(dst *image.RGBA, r image.Rectangle) {
	fillRect(dst, r, plotPaper)
	_, th := render.MeasureText("0", plotText)
	render.DrawText(dst, r.Min.X+6, r.Min.Y+3, ch.title, plotInk, plotText)
	ymin, ymax := ch.ymin, ch.ymax
	if !(ymax > ymin) {
		ymin, ymax = 0, 0
		for _, s := range ch.series {
			for _, y := range s.ys {
				if !math.IsNaN(y) {
					ymax = math.Max(ymax, y)
					ymin = math.Min(ymin, y)
				}
			}
		}
		if !(ymax > ymin) {
			ymax = ymin + 1
		}
		ymax += 0.05 * (ymax - ymin)
	}
	top := r.Min.Y + th + 8
	hasLegend := false
	for _, s := range ch.series {
		hasLegend = hasLegend || s.label != ""
	}
	if hasLegend {
		top += th + 2
	}
	plot := image.Rect(r.Min.X+44, top, r.Max.X-8, r.Max.Y-th-8)
	if plot.Dx() < 20 || plot.Dy() < 20 || !(ch.xmax > ch.xmin) {
		return
	}
	px := func(x float64) int {
		return plot.Min.X + int(math.Round((x-ch.xmin)/(ch.xmax-ch.xmin)*float64(plot.Dx()-1)))
	}
	py := func(y float64) int {
		return plot.Max.Y - 1 - int(math.Round((y-ymin)/(ymax-ymin)*float64(plot.Dy()-1)))
	}
	if ch.band[1] > ch.band[0] {
		a, b := px(math.Max(ch.band[0], ch.xmin)), px(math.Min(ch.band[1], ch.xmax))
		fillRect(dst, image.Rect(a, plot.Min.Y, b+1, plot.Max.Y), plotBand)
	}
	for _, t := range render.LegendTicks(ymin, ymax, 4) {
		y := py(t)
		hline(dst, plot.Min.X, plot.Max.X, y, plotGrid)
		s := tickText(t)
		w, _ := render.MeasureText(s, plotText)
		render.DrawText(dst, plot.Min.X-w-4, y-th/2, s, plotInk, plotText)
	}
	labelX := plot.Max.X
	if ch.xLabel != "" {
		w, _ := render.MeasureText(ch.xLabel, plotText)
		labelX = plot.Max.X - w
		render.DrawText(dst, labelX, plot.Max.Y+4, ch.xLabel, plotMark, plotText)
	}
	for _, t := range render.LegendTicks(ch.xmin, ch.xmax, 8) {
		x := px(t)
		vline(dst, x, plot.Max.Y, plot.Max.Y+3, plotInk)
		s := tickText(t)
		w, _ := render.MeasureText(s, plotText)
		if x+w/2+6 < labelX || ch.xLabel == "" {
			render.DrawText(dst, x-w/2, plot.Max.Y+4, s, plotInk, plotText)
		}
	}
	for _, m := range ch.marks {
		if m >= ch.xmin && m <= ch.xmax {
			x := px(m)
			for y := plot.Min.Y; y < plot.Max.Y; y += 6 {
				vline(dst, x, y, min(y+3, plot.Max.Y), plotMark)
			}
		}
	}
	lx := plot.Max.X
	for i := len(ch.series) - 1; i >= 0; i-- {
		s := ch.series[i]
		if s.label == "" {
			continue
		}
		w, _ := render.MeasureText(s.label, plotText)
		lx -= w + 18
		ly := r.Min.Y + th + 5
		fillRect(dst, image.Rect(lx, ly+th/2-1, lx+10, ly+th/2+3), s.col)
		render.DrawText(dst, lx+13, ly, s.label, plotInk, plotText)
	}
	for _, s := range ch.series {
		prevOK := false
		var x0, y0 int
		for k := range s.xs {
			if k >= len(s.ys) || math.IsNaN(s.ys[k]) || s.xs[k] < ch.xmin || s.xs[k] > ch.xmax {
				prevOK = false
				continue
			}
			x, y := px(s.xs[k]), py(math.Max(ymin, math.Min(ymax, s.ys[k])))
			if s.fill {
				vline(dst, x, y, py(math.Max(0, ymin)), fade(s.col))
			}
			if prevOK {
				line(dst, x0, y0, x, y, s.col)
			}
			x0, y0, prevOK = x, y, true
		}
	}
	strokeRect(dst, plot, plotInk)
}

func tickText(v float64) string {
	return strconv.FormatFloat(math.Round(v*1e4)/1e4, 'f', -1, 64)
}

func fade(c color.RGBA) color.RGBA {
	mix := func(a uint8) uint8 { return uint8((int(a) + 3*255) / 4) }
	return color.RGBA{mix(c.R), mix(c.G), mix(c.B), 255}
}

func setPixel(dst *image.RGBA, x, y int, c color.RGBA) {
	if !(image.Point{x, y}).In(dst.Rect) {
		return
	}
	i := dst.PixOffset(x, y)
	dst.Pix[i], dst.Pix[i+1], dst.Pix[i+2], dst.Pix[i+3] = c.R, c.G, c.B, 255
}

func fillRect(dst *image.RGBA, r image.Rectangle, c color.RGBA) {
	r = r.Intersect(dst.Rect)
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			setPixel(dst, x, y, c)
		}
	}
}

func hline(dst *image.RGBA, x0, x1, y int, c color.RGBA) {
	for x := x0; x < x1; x++ {
		setPixel(dst, x, y, c)
	}
}

func vline(dst *image.RGBA, x, y0, y1 int, c color.RGBA) {
	if y0 > y1 {
		y0, y1 = y1, y0
	}
	for y := y0; y <= y1; y++ {
		setPixel(dst, x, y, c)
	}
}

func strokeRect(dst *image.RGBA, r image.Rectangle, c color.RGBA) {
	hline(dst, r.Min.X, r.Max.X, r.Min.Y, c)
	hline(dst, r.Min.X, r.Max.X, r.Max.Y-1, c)
	vline(dst, r.Min.X, r.Min.Y, r.Max.Y-1, c)
	vline(dst, r.Max.X-1, r.Min.Y, r.Max.Y-1, c)
}

// line draws a two-pixel-wide segment (Bresenham, doubled downward).
func line(dst *image.RGBA, x0, y0, x1, y1 int, c color.RGBA) {
	dx, dy := abs(x1-x0), -abs(y1-y0)
	sx, sy := 1, 1
	if x0 > x1 {
		sx = -1
	}
	if y0 > y1 {
		sy = -1
	}
	e := dx + dy
	for {
		setPixel(dst, x0, y0, c)
		setPixel(dst, x0, y0+1, c)
		if x0 == x1 && y0 == y1 {
			return
		}
		e2 := 2 * e
		if e2 >= dy {
			e += dy
			x0 += sx
		}
		if e2 <= dx {
			e += dx
			y0 += sy
		}
	}
}

func abs(v int) int {
	if v < 0 {
		return -v
	}
	return v
}
