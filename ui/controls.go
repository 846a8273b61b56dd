package ui

import (
	"fmt"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"tapersweep/models"
	"tapersweep/ui/scene"
)

// viewControls are the settings above the viewport: named view, fit, wall opacity, the
// lengthwise cut and its position, before or after the step, and the insertion slider.
type viewControls struct {
	w   *mainWindow
	box fyne.CanvasObject

	views      *widget.Select
	opacity    *widget.Slider
	clip       *widget.Check
	clipOffset *widget.Slider
	when       *widget.Select
	centerline *widget.Check
	insertion  *widget.Slider
	depthLabel *widget.Label
	syncing    bool // set while the slider follows the step, so it does not edit it back
}

const (
	whenAfter  = "after the step"
	whenBefore = "as the step meets it"
)

func newViewControls(w *mainWindow) *viewControls {
	vc := &viewControls{w: w}
	vc.views = widget.NewSelect(scene.ViewNames(), func(name string) { w.view.aim(name) })
	vc.views.SetSelected(scene.DefaultView)
	fit := widget.NewButton("Fit", w.view.fit)

	vc.opacity = widget.NewSlider(0.1, 1)
	vc.opacity.Step = 0.05
	vc.opacity.Value = scene.DefaultWallOpacity
	vc.opacity.OnChanged = func(float64) { w.showScene(false) }

	vc.clip = widget.NewCheck("Cut open", func(bool) { w.showScene(false) })
	vc.clipOffset = widget.NewSlider(-1, 1)
	vc.clipOffset.Step = 0.02
	vc.clipOffset.OnChanged = func(float64) {
		if vc.clip.Checked {
			w.showScene(false)
		}
	}
	vc.when = widget.NewSelect([]string{whenAfter, whenBefore}, func(string) { w.showScene(false) })
	vc.when.SetSelected(whenAfter)
	vc.centerline = widget.NewCheck("Centerline", func(bool) { w.showScene(false) })

	vc.insertion = widget.NewSlider(0.5, 20)
	vc.insertion.Step = 0.05
	vc.insertion.OnChanged = vc.inserted
	vc.depthLabel = widget.NewLabel("")

	sized := func(o fyne.CanvasObject, wd float32) fyne.CanvasObject {
		return container.NewGridWrap(fyne.NewSize(wd, o.MinSize().Height), o)
	}
	row1 := container.NewHBox(
		sized(vc.views, 110), fit,
		widget.NewLabel("Wall opacity"), sized(vc.opacity, 80),
		vc.clip, sized(vc.clipOffset, 80), vc.centerline,
	)
	row2 := container.NewBorder(nil, nil, container.NewHBox(sized(vc.when, 180), widget.NewLabel("Tip")), vc.depthLabel, vc.insertion)
	vc.box = container.NewVBox(row1, row2)
	vc.stepChanged()
	return vc
}

// sceneOptions reads the settings (the step is the window's to fill in).
func (vc *viewControls) sceneOptions() scene.Options {
	opt := sceneOptionsDefault()
	if vc == nil {
		return opt
	}
	opt.WallOpacity = vc.opacity.Value
	opt.Clip = vc.clip.Checked
	opt.ClipOffset = vc.clipOffset.Value
	opt.Before = vc.when.Selected == whenBefore
	opt.Centerline = vc.centerline.Checked
	return opt
}

// canalChanged fits the slider ranges to a new canal.
func (vc *viewControls) canalChanged() {
	c := vc.w.canal
	if c == nil {
		return
	}
	vc.syncing = true
	vc.insertion.Max = math.Floor(c.Line.Length()*100) / 100
	vc.insertion.Refresh()
	r := 0.0
	for i := 0; i < c.Line.Len(); i++ {
		r = math.Max(r, c.MeanRadius(i))
	}
	r = math.Max(0.2, math.Ceil(r*20)/20)
	vc.clipOffset.Min, vc.clipOffset.Max = -r, r
	vc.clipOffset.Refresh()
	vc.syncing = false
}

// stepChanged puts the insertion slider at the shown step's depth.
func (vc *viewControls) stepChanged() {
	w := vc.w
	vc.syncing = true
	defer func() { vc.syncing = false }()
	if w.seq == nil || w.selected == 0 || w.selected > len(w.seq.Steps) || w.canal == nil {
		vc.insertion.Disable()
		vc.depthLabel.SetText("no file shown")
		return
	}
	vc.insertion.Enable()
	d := w.seq.Steps[w.selected-1].Depth.Resolve(w.canal.WorkingLength)
	vc.insertion.SetValue(d)
	vc.depthLabel.SetText(depthText(d, w.canal.Line.Length()))
}

func depthText(d, length float64) string {
	return fmt.Sprintf("%.2f mm, %.2f to the end", d, length-d)
}

// inserted moves the shown file to the slider's depth and re-runs the analysis live.
func (vc *viewControls) inserted(v float64) {
	w := vc.w
	if vc.syncing || w.seq == nil || w.selected == 0 || w.selected > len(w.seq.Steps) || w.canal == nil {
		return
	}
	v = math.Round(v*100) / 100
	w.view.brieflyMoving()
	cand := copySequence(w.seq)
	cand.Steps[w.selected-1].Depth = models.DepthMM(v)
	vc.depthLabel.SetText(depthText(v, w.canal.Line.Length()))
	if err := w.trySequence(cand); err != nil {
		w.setStatus(err.Error())
		return
	}
	w.editor.setDepthText(cand.Steps[w.selected-1].Depth.String())
}
