package report

import (
	"bytes"
	"image/color"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// Plot sizes on the page (mm) and their resolution: sharp in print, small in the file.
const (
	plotWMM = 59.0
	plotHMM = 66.0
	plotDPI = 220
)

var (
	inkCut    = color.RGBA{200, 80, 30, 255}
	inkFile   = color.RGBA{30, 90, 190, 255}
	inkCanal  = color.RGBA{60, 60, 60, 255}
	inkCanal2 = color.RGBA{150, 150, 150, 255}
	inkLimit  = color.RGBA{190, 30, 30, 255}
)

// newPlot sets a small plot's fonts to read at the size printed.
func newPlot(title, x, y string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = vg.Points(8.5)
	p.Title.TextStyle.Font.Variant = "Sans"
	p.X.Label.Text = x
	p.Y.Label.Text = y
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font.Size = vg.Points(7.5)
		a.Tick.Label.Font.Size = vg.Points(7)
		a.Label.TextStyle.Font.Variant = "Sans"
		a.Tick.Label.Font.Variant = "Sans"
	}
	p.Legend.TextStyle.Font.Size = vg.Points(6.5)
	p.Legend.TextStyle.Font.Variant = "Sans"
	p.Legend.Top = true
	p.Legend.ThumbnailWidth = vg.Points(12)
	p.Add(plotter.NewGrid())
	return p
}

func addLine(p *plot.Plot, name string, xs, ys []float64, ink color.Color, width float64, dashed bool) error {
	pts := make(plotter.XYs, len(xs))
	for i := range xs {
		pts[i].X, pts[i].Y = xs[i], ys[i]
	}
	l, err := plotter.NewLine(pts)
	if err != nil {
		return err
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
	return nil
}

// depthOfCutPlot: the deepest cut around the wall along the canal, apical end at 0.
func depthOfCutPlot(pr Profile) (*plot.Plot, error) {
	p := newPlot("depth of cut along the canal", "distance from the apical end (mm)", "deepest cut (mm)")
	if err := addLine(p, "", pr.FromApexMM, pr.DeepestCutMM, inkCut, 1.2, false); err != nil {
		return nil, err
	}
	// A step that cuts nothing still gets a readable scale from 0.
	top := 0.0
	for _, v := range pr.DeepestCutMM {
		top = max(top, v)
	}
	p.Y.Min, p.Y.Max = 0, max(1.1*top, 0.02)
	return p, nil
}

// diameterPlot: the file's diameter where it reaches against the canal's narrowest and widest
// diameter as the step meets it.
func diameterPlot(pr Profile) (*plot.Plot, error) {
	p := newPlot("file against canal diameter", "distance from the apical end (mm)", "diameter (mm)")
	if err := addLine(p, "canal, widest", pr.FromApexMM, pr.CanalWideDMM, inkCanal2, 1, false); err != nil {
		return nil, err
	}
	if err := addLine(p, "canal, narrowest", pr.FromApexMM, pr.CanalNarrowDMM, inkCanal, 1, false); err != nil {
		return nil, err
	}
	var xs, ys []float64
	for i, d := range pr.FileDMM {
		if d > 0 {
			xs, ys = append(xs, pr.FromApexMM[i]), append(ys, d)
		}
	}
	if len(xs) > 1 {
		if err := addLine(p, "file", xs, ys, inkFile, 1.4, false); err != nil {
			return nil, err
		}
	}
	p.Y.Min = 0
	p.Legend.Left = true // the lines rise toward the orifice, on the right
	return p, nil
}

// strainPlot: outer-fibre bending strain along the file with the alloy's recoverable strain.
func strainPlot(pr Profile, recoverablePct float64) (*plot.Plot, error) {
	p := newPlot("bending strain along the file", "distance from the tip (mm)", "strain (%)")
	if len(pr.FromTipMM) > 1 {
		if err := addLine(p, "file", pr.FromTipMM, pr.StrainPct, inkFile, 1.2, false); err != nil {
			return nil, err
		}
		last := pr.FromTipMM[len(pr.FromTipMM)-1]
		// Headroom above the recoverable strain keeps the legend clear of the lines.
		top := recoverablePct
		for _, v := range pr.StrainPct {
			top = max(top, v)
		}
		p.Y.Max = 1.3 * top
		if err := addLine(p, "recoverable", []float64{0, last}, []float64{recoverablePct, recoverablePct}, inkLimit, 0.8, true); err != nil {
			return nil, err
		}
	}
	p.Y.Min = 0
	return p, nil
}

// plotPNG renders a plot at its printed size.
func plotPNG(p *plot.Plot) ([]byte, error) {
	c := vgimg.NewWith(vgimg.UseWH(vg.Length(plotWMM)*vg.Millimeter, vg.Length(plotHMM)*vg.Millimeter), vgimg.UseDPI(plotDPI))
	p.Draw(draw.New(c))
	var buf bytes.Buffer
	if _, err := (vgimg.PngCanvas{Canvas: c}).WriteTo(&buf); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}
