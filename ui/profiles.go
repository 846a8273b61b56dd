package ui

import (
	"image"
	"image/color"
	"math"
	"sync"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"

	"tapersweep/analysis"
	"tapersweep/ui/scene"
)

// profileHeight is the height of the profile strip under the viewport, logical units.
const profileHeight = 170

// profilePanel draws three profiles of the shown step along the canal, with the distance from
// the apical end on the x axis: depth of cut, curvature, and the file's diameter against the
// canal's narrowest and widest width, with the engaged zone shaded.
type profilePanel struct {
	raster *canvas.Raster
	mu     sync.Mutex
	charts []chart
}

func newProfilePanel() *profilePanel {
	p := &profilePanel{}
	p.raster = canvas.NewRaster(p.generate)
	p.raster.SetMinSize(fyne.NewSize(300, profileHeight))
	return p
}

// set recomputes the profiles for step n (from 1) of res; n = 0 or res = nil shows the canal alone.
func (p *profilePanel) set(c *analysis.Canal, res *analysis.Result, n int) {
	var charts []chart
	if c != nil {
		var st *analysis.StepResult
		if res != nil && n > 0 && n <= len(res.Steps) {
			st = res.Steps[n-1]
		}
		charts = profileCharts(c, st)
	}
	p.mu.Lock()
	p.charts = charts
	p.mu.Unlock()
	p.raster.Refresh()
}

func (p *profilePanel) generate(w, h int) image.Image {
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	fill(img, scene.Background)
	p.mu.Lock()
	charts := p.charts
	p.mu.Unlock()
	if len(charts) == 0 || w < 60 || h < 40 {
		return img
	}
	cw := w / len(charts)
	for i, ch := range charts {
		r := image.Rect(i*cw+3, 3, (i+1)*cw-3, h-3)
		ch.draw(img, r)
	}
	return img
}

// profileCharts builds the three charts; st may be nil (the canal alone).
func profileCharts(c *analysis.Canal, st *analysis.StepResult) []chart {
	L := c.Line.Length()
	n := c.Line.Len()
	x := make([]float64, n)
	for i := range x {
		x[i] = L - c.Line.S[i]
	}
	marks := []float64{L - c.Measures.MaxCurvatureS}
	const xLabel = "mm from the apical end"
	curv := chart{title: "curvature, 1/mm", xmin: 0, xmax: L, marks: marks, xLabel: xLabel,
		series: []series{{xs: x, ys: append([]float64(nil), c.Line.K...), col: color.RGBA{40, 90, 160, 255}}}}

	before := c.Rho
	if st != nil {
		before = st.Before
	}
	narrow, wide := widths(c, before)
	dia := chart{title: "diameter, mm", xmin: 0, xmax: L, marks: marks, xLabel: xLabel, series: []series{
		{xs: x, ys: wide, col: color.RGBA{170, 170, 160, 255}, label: "canal, widest"},
		{xs: x, ys: narrow, col: color.RGBA{90, 90, 84, 255}, label: "narrowest"},
	}}
	cut := chart{title: "depth of cut, mm", xmin: 0, xmax: L, marks: marks, xLabel: xLabel, ymin: 0, ymax: 0.05}
	if st == nil {
		cut.title = "depth of cut, mm (no file shown)"
		return []chart{cut, curv, dia}
	}
	file := make([]float64, n)
	deepest := make([]float64, n)
	for i := 0; i < n; i++ {
		file[i] = math.NaN()
		if r := st.FileRadius[i]; r > 0 {
			file[i] = 2 * float64(r)
		}
		m := 0.0
		for _, e := range st.Cut[i*c.Angles : (i+1)*c.Angles] {
			m = math.Max(m, float64(e))
		}
		deepest[i] = m
	}
	col := scene.FileColor(st.Step.Instrument.Size)
	if lightness(col) > 0.8 {
		col = color.RGBA{150, 150, 140, 255} // a white or yellow file would vanish on paper
	}
	dia.series = append(dia.series, series{xs: x, ys: file, col: col, label: "file " + st.Metrics.Label})
	// Ink outside the depth-of-cut scale, so only the wall carries its colours.
	cut.series = []series{{xs: x, ys: deepest, col: color.RGBA{70, 70, 90, 255}, fill: true}}
	if mx := st.Metrics.MaxDepthOfCutMM; mx > 0 {
		cut.ymax = math.Max(0.02, mx*1.1)
	}
	if m := st.Metrics; m.EngagedLengthMM > 0 {
		// The engaged zone runs from EngagedFromTipMM[0] to [1] above the tip.
		tipFromApex := L - st.TipDepth
		band := [2]float64{tipFromApex + m.EngagedFromTipMM[0], tipFromApex + m.EngagedFromTipMM[1]}
		cut.band, dia.band, curv.band = band, band, band
	}
	return []chart{cut, curv, dia}
}

// widths is the canal's narrowest and widest width across the centerline at each station.
func widths(c *analysis.Canal, rho []float32) (narrow, wide []float64) {
	n := c.Line.Len()
	narrow, wide = make([]float64, n), make([]float64, n)
	half := c.Angles / 2
	for i := 0; i < n; i++ {
		row := rho[i*c.Angles : (i+1)*c.Angles]
		lo, hi := math.Inf(1), 0.0
		for j := 0; j < half; j++ {
			d := float64(row[j]) + float64(row[j+half])
			lo, hi = math.Min(lo, d), math.Max(hi, d)
		}
		narrow[i], wide[i] = lo, hi
	}
	return narrow, wide
}

func lightness(c color.RGBA) float64 {
	return (0.2126*float64(c.R) + 0.7152*float64(c.G) + 0.0722*float64(c.B)) / 255
}
