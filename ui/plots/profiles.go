// Package plots draws the profiles along the canal and its cross-sections with gonum/plot, for
// the window (rendered to an image with vg/vgimg) and the report alike, in the colours of
// ui/scene. What is drawn is computed in analysis (Profile, Section); this package only draws.
package plots

import (
	"image"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"tapersweep/analysis"
	"tapersweep/ui/scene"
)

// Style is the size of a plot's text, in points at the plot's own resolution.
type Style struct {
	Title, Label, Tick, Legend float64
}

// Screen suits a small plot in the window; Print a plot printed about 6 cm wide.
var (
	Screen = Style{Title: 9, Label: 8, Tick: 7.5, Legend: 7.5}
	Print  = Style{Title: 8.5, Label: 7.5, Tick: 7, Legend: 6.5}
)

const xFromApex = "mm from the apical end"

// sans is the plots' typeface: the sans-serif of the fonts gonum/plot embeds.
var sans = font.Font{Typeface: "Liberation", Variant: "Sans"}

func fontOf(size float64) font.Font { return font.From(sans, vg.Points(size)) }

// newPlot is a plot on the paper tone with the style's fonts.
func newPlot(st Style, title, x, y string) *plot.Plot {
	p := plot.New()
	p.BackgroundColor = scene.Background
	p.Title.Text = title
	p.Title.TextStyle.Font = fontOf(st.Title)
	p.Title.TextStyle.Color = scene.Ink
	p.X.Label.Text = x
	p.Y.Label.Text = y
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = fontOf(st.Label)
		a.Label.TextStyle.Color = scene.Ink
		a.Tick.Label.Font = fontOf(st.Tick)
		a.Tick.Label.Color = scene.Ink
		a.Color = scene.Ink
		a.Tick.Color = scene.Ink
		a.Padding = vg.Points(2)
	}
	p.Legend.TextStyle.Font = fontOf(st.Legend)
	p.Legend.TextStyle.Color = scene.Ink
	p.Legend.Top = true
	p.Legend.ThumbnailWidth = vg.Points(12)
	p.Legend.Padding = vg.Points(1)
	grid := plotter.NewGrid()
	grid.Vertical.Color = color.RGBA{222, 220, 212, 255}
	grid.Horizontal.Color = grid.Vertical.Color
	p.Add(grid)
	return p
}

func addLine(p *plot.Plot, name string, xs, ys []float64, ink color.Color, width float64, dashed bool) {
	pts := make(plotter.XYs, 0, len(xs))
	for i := range xs {
		if i < len(ys) && !math.IsNaN(ys[i]) && !math.IsInf(ys[i], 0) {
			pts = append(pts, plotter.XY{X: xs[i], Y: ys[i]})
		}
	}
	if len(pts) < 2 {
		return
	}
	l, err := plotter.NewLine(pts)
	if err != nil {
		return
	}
	l.LineStyle.Color = ink
	l.LineStyle.Width = vg.Points(width)
	if dashed {
		l.LineStyle.Dashes = []vg.Length{vg.Points(3), vg.Points(2)}
	}
	p.Add(l)
	if name != "" {
		p.Legend.Add(name, l)
	}
}

// marks shades the engaged zone and draws the tightest bend as a dashed line over y0..y1.
func marks(p *plot.Plot, pr analysis.Profile, y0, y1 float64) {
	if z := pr.EngagedFromApexMM; z[1] > z[0] {
		band, err := plotter.NewPolygon(plotter.XYs{{X: z[0], Y: y0}, {X: z[1], Y: y0}, {X: z[1], Y: y1}, {X: z[0], Y: y1}})
		if err == nil {
			band.Color = scene.EngagedBand()
			band.LineStyle.Width = 0
			p.Add(band)
		}
	}
	addLine(p, "", []float64{pr.MaxCurvatureFromApexMM, pr.MaxCurvatureFromApexMM}, []float64{y0, y1}, scene.ScannedInk, 0.7, true)
}

func top(vs ...[]float64) float64 {
	m := 0.0
	for _, v := range vs {
		for _, x := range v {
			if !math.IsNaN(x) && !math.IsInf(x, 0) {
				m = math.Max(m, x)
			}
		}
	}
	return m
}

func xRange(p *plot.Plot, pr analysis.Profile) {
	p.X.Min = 0
	if len(pr.FromApexMM) > 0 {
		p.X.Max = pr.FromApexMM[0]
	}
}

// CutPlot is the deepest cut around the wall along the canal (the engaged zone shaded, the
// tightest bend dashed).
func CutPlot(pr analysis.Profile, st Style) *plot.Plot {
	p := newPlot(st, "depth of cut", xFromApex, "deepest cut, mm")
	if pr.Step == 0 {
		p.Title.Text = "depth of cut (no file shown)"
	}
	y1 := math.Max(0.02, 1.12*top(pr.DeepestCutMM))
	marks(p, pr, 0, y1)
	addLine(p, "", pr.FromApexMM, pr.DeepestCutMM, scene.DepthColor(1, 1), 1.2, false)
	xRange(p, pr)
	p.Y.Min, p.Y.Max = 0, y1
	return p
}

// CurvaturePlot is the centerline's curvature along the canal.
func CurvaturePlot(pr analysis.Profile, st Style) *plot.Plot {
	p := newPlot(st, "curvature of the canal", xFromApex, "curvature, 1/mm")
	y1 := math.Max(0.05, 1.12*top(pr.CurvaturePerMM))
	marks(p, pr, 0, y1)
	addLine(p, "", pr.FromApexMM, pr.CurvaturePerMM, scene.Ink, 1.1, false)
	xRange(p, pr)
	p.Y.Min, p.Y.Max = 0, y1
	return p
}

// DiameterPlot is the file's diameter against the canal's narrowest and widest as the step
// meets it.
func DiameterPlot(pr analysis.Profile, st Style) *plot.Plot {
	p := newPlot(st, "file against canal diameter", xFromApex, "diameter, mm")
	var file []float64
	for _, d := range pr.FileDMM {
		if d > 0 {
			file = append(file, d)
		} else {
			file = append(file, math.NaN())
		}
	}
	y1 := 1.25 * top(pr.CanalWideDMM, file)
	if !(y1 > 0) {
		y1 = 1
	}
	marks(p, pr, 0, y1)
	addLine(p, "canal, widest", pr.FromApexMM, pr.CanalWideDMM, scene.ScannedInk, 1, false)
	addLine(p, "canal, narrowest", pr.FromApexMM, pr.CanalNarrowDMM, scene.Ink, 1, false)
	if file != nil {
		addLine(p, "file", pr.FromApexMM, file, scene.FileInk, 1.6, false)
	}
	// The lines rise toward the orifice on the right: the upper left is free for the legend.
	p.Legend.Left = true
	xRange(p, pr)
	p.Y.Min, p.Y.Max = 0, y1
	return p
}

// StrainPlot is the outer-fibre bending strain along the file with the alloy's recoverable
// strain.
func StrainPlot(pr analysis.Profile, st Style) *plot.Plot {
	p := newPlot(st, "bending strain along the file", "mm from the tip", "strain, %")
	y1 := 1.35 * math.Max(pr.RecoverableStrainPct, top(pr.StrainPct))
	if !(y1 > 0) {
		y1 = 1
	}
	addLine(p, "file", pr.FromTipMM, pr.StrainPct, scene.FileInk, 1.3, false)
	if n := len(pr.FromTipMM); n > 1 && pr.RecoverableStrainPct > 0 {
		last := pr.FromTipMM[n-1]
		addLine(p, "recoverable", []float64{0, last}, []float64{pr.RecoverableStrainPct, pr.RecoverableStrainPct}, scene.LimitInk, 0.8, true)
	}
	p.X.Min = 0
	p.Y.Min, p.Y.Max = 0, y1
	return p
}

// Image draws a plot into a new w x h image at dpi dots per inch (96 on a screen).
func Image(p *plot.Plot, w, h int, dpi float64) *image.RGBA {
	c := canvas(w, h, dpi)
	p.Draw(draw.New(c))
	return toRGBA(c)
}

// canvas is a vgimg canvas of w x h pixels on the paper tone.
func canvas(w, h int, dpi float64) *vgimg.Canvas {
	d := max(1, int(math.Round(dpi)))
	return vgimg.NewWith(vgimg.UseWH(vg.Length(float64(w)/float64(d))*vg.Inch, vg.Length(float64(h)/float64(d))*vg.Inch),
		vgimg.UseDPI(d), vgimg.UseBackgroundColor(scene.Background))
}

func toRGBA(c *vgimg.Canvas) *image.RGBA {
	if img, ok := c.Image().(*image.RGBA); ok {
		return img
	}
	src := c.Image()
	out := image.NewRGBA(src.Bounds())
	for y := src.Bounds().Min.Y; y < src.Bounds().Max.Y; y++ {
		for x := src.Bounds().Min.X; x < src.Bounds().Max.X; x++ {
			out.Set(x, y, src.At(x, y))
		}
	}
	return out
}
