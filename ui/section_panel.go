package ui

import (
	"fmt"
	"image"
	"math"
	"sort"
	"sync"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/ui/plots"
	"tapersweep/ui/scene"
)

// sectionPanel shows the canal's cross-sections beside the 3D view: at 5, 3 and 1 mm from the
// apical end, one above the other as along the upright canal, and at a level the user picks by
// clicking the canal or with the slider (framed). show gives it the canal and the step.
type sectionPanel struct {
	box    fyne.CanvasObject
	raster *canvas.Raster
	level  *widget.Slider
	label  *widget.Label

	mu      sync.Mutex
	canal   *analysis.Canal
	res     *analysis.Result
	step    int
	fixed   bool
	picked  float64 // mm from the apical end; < 0: none picked
	version int
	cached  *image.RGBA
	cachedV int
}

func newSectionPanel() *sectionPanel {
	p := &sectionPanel{picked: -1}
	p.raster = canvas.NewRaster(p.generate)
	p.raster.SetMinSize(fyne.NewSize(160, 200))
	p.label = widget.NewLabel("+ level")
	p.level = widget.NewSlider(0, 1)
	p.level.Step = 0.1
	p.level.OnChanged = func(v float64) { p.pick(v) }
	p.level.Disable()
	p.box = container.NewBorder(nil, container.NewBorder(nil, nil, p.label, nil, p.level), nil, nil, p.raster)
	return p
}

// withBelow puts o (the colour-scale choice) under the level slider.
func (p *sectionPanel) withBelow(o fyne.CanvasObject) {
	p.box = container.NewBorder(nil, container.NewVBox(container.NewBorder(nil, nil, p.label, nil, p.level), o), nil, nil, p.raster)
}

// show draws the sections of step (from 1; 0: the canal alone) of res in canal c.
func (p *sectionPanel) show(c *analysis.Canal, res *analysis.Result, step int, fixed bool) {
	p.mu.Lock()
	if c != p.canal && c != nil {
		p.level.Max = math.Floor(c.Line.Length()*10) / 10
		p.level.Enable()
		p.level.Refresh()
		if p.picked > p.level.Max {
			p.picked = -1
		}
	}
	p.canal, p.res, p.step, p.fixed = c, res, step, fixed
	if res == nil || step > len(res.Steps) {
		p.step = 0
	}
	p.version++
	p.mu.Unlock()
	p.raster.Refresh()
}

// setFixedScale follows the view's choice of one colour scale for all steps.
func (p *sectionPanel) setFixedScale(fixed bool) {
	p.mu.Lock()
	changed := p.fixed != fixed
	p.fixed = fixed
	p.version++
	p.mu.Unlock()
	if changed {
		p.raster.Refresh()
	}
}

// pick adds the section fromApex mm from the apical end (the slider or a click on the canal).
func (p *sectionPanel) pick(fromApex float64) {
	p.mu.Lock()
	if p.canal == nil {
		p.mu.Unlock()
		return
	}
	fromApex = math.Max(0, math.Min(p.level.Max, math.Round(fromApex*10)/10))
	p.picked = fromApex
	p.version++
	p.mu.Unlock()
	quietly(p.level, fromApex)
	p.label.SetText(fmt.Sprintf("+ %.1f mm", fromApex))
	p.raster.Refresh()
}

// levels are the standard levels and the picked one, from the orifice side down.
func (p *sectionPanel) levels() (levels []float64, picked int) {
	L := p.canal.Line.Length()
	for _, x := range analysis.SectionLevels {
		if x < L && x != p.picked {
			levels = append(levels, x)
		}
	}
	if p.picked >= 0 {
		levels = append(levels, p.picked)
	}
	sort.Sort(sort.Reverse(sort.Float64Slice(levels)))
	picked = -1
	for i, x := range levels {
		if x == p.picked {
			picked = i
		}
	}
	return levels, picked
}

func (p *sectionPanel) generate(w, h int) image.Image {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.cached != nil && p.cachedV == p.version && p.cached.Rect.Dx() == w && p.cached.Rect.Dy() == h {
		return p.cached
	}
	var img *image.RGBA
	if p.canal != nil && w > 40 && h > 40 {
		levels, picked := p.levels()
		var secs []*analysis.Section
		for _, x := range levels {
			if s, err := analysis.SectionAt(p.canal, p.res, p.step, x); err == nil {
				secs = append(secs, s)
			}
		}
		opt := plots.SectionOptions{LegendTop: scene.LegendTop(p.res, p.step, p.fixed), DPI: 96, TextPt: 7.5,
			Key: true, Selected: picked, Compact: true}
		if p.res != nil {
			opt.ContactMM = p.res.Options.ContactThreshold
		}
		img = plots.SectionsImage(secs, w, h, opt)
	} else {
		img = image.NewRGBA(image.Rect(0, 0, w, h))
		fill(img, scene.Background)
	}
	p.cached, p.cachedV = img, p.version
	return img
}
