package ui

import (
	"image"
	"sync"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"gonum.org/v1/plot"

	"tapersweep/analysis"
	"tapersweep/ui/plots"
)

// profileHeight is the height of the profile strip under the viewport, logical units.
const profileHeight = 170

// profilePanel draws three profiles of the shown step along the canal (depth of cut, the
// canal's curvature, the file's diameter against the canal's), drawn with gonum/plot like the
// report's. show gives it what to draw; the raster draws at the size it is given.
type profilePanel struct {
	raster *canvas.Raster

	mu      sync.Mutex
	profile *analysis.Profile // nil: no canal yet
	version int
	cached  *image.RGBA
	cachedV int
}

func newProfilePanel() *profilePanel {
	p := &profilePanel{}
	p.raster = canvas.NewRaster(p.generate)
	p.raster.SetMinSize(fyne.NewSize(300, profileHeight))
	return p
}

// show draws the profiles of step st of canal c (st nil: the canal alone; c nil: nothing).
func (p *profilePanel) show(c *analysis.Canal, st *analysis.StepResult) {
	var pr *analysis.Profile
	if c != nil {
		v := analysis.ProfileOf(c, st)
		pr = &v
	}
	p.mu.Lock()
	p.profile = pr
	p.version++
	p.mu.Unlock()
	p.raster.Refresh()
}

func (p *profilePanel) generate(w, h int) image.Image {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.cached != nil && p.cachedV == p.version && p.cached.Rect.Dx() == w && p.cached.Rect.Dy() == h {
		return p.cached
	}
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	if p.profile != nil && w >= 60 && h >= 40 {
		scale := float64(h) / profileHeight // the raster's pixels per logical unit
		cw := w / 3
		for k, pl := range []*plot.Plot{plots.CutPlot(*p.profile, plots.Screen), plots.CurvaturePlot(*p.profile, plots.Screen),
			plots.DiameterPlot(*p.profile, plots.Screen)} {
			part := plots.Image(pl, cw, h, 96*scale)
			for y := 0; y < h; y++ {
				copy(img.Pix[img.PixOffset(k*cw, y):img.PixOffset(k*cw+cw, y)], part.Pix[part.PixOffset(0, y):part.PixOffset(cw, y)])
			}
		}
	}
	p.cached, p.cachedV = img, p.version
	return img
}
