package ui

import (
	"fmt"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/ui/scene"
)

// viewControls are the settings above the viewport: named view, fit, wall opacity, the
// lengthwise cut and where it runs, the colour scale, before or after the step, and the Tip
// slider. It holds no window state: show... sets it, On... report the user's changes.
type viewControls struct {
	box fyne.CanvasObject

	views      *selectList
	opacity    *widget.Slider
	clip       *widget.Check
	clipLabel  *widget.Label
	clipOffset *widget.Slider
	when       *selectList
	centerline *widget.Check
	fixed      *widget.Check // shown under the cross-sections, whose colours it sets too
	wall       *widget.Check // colour the wall by the wall left to the root (when the root is known)
	insertion  *widget.Slider
	depthLabel *widget.Label
	length     float64 // the canal's length, for the Tip label

	OnChanged func()              // a setting of the picture changed
	OnView    func(name string)   // a named view was chosen
	OnFit     func()              // fit the canal into the view
	OnTip     func(depth float64) // the Tip slider moved the shown file to depth mm
}

const (
	whenAfter  = "after the step"
	whenBefore = "as the step meets it"
)

func newViewControls() *viewControls {
	vc := &viewControls{}
	changed := func() {
		if vc.OnChanged != nil {
			vc.OnChanged()
		}
	}
	vc.views = newSelectList(scene.ViewNames(), func(name string) {
		if vc.OnView != nil {
			vc.OnView(name)
		}
	})
	vc.views.SetSelected(scene.DefaultView)
	fit := widget.NewButton("Fit", func() {
		if vc.OnFit != nil {
			vc.OnFit()
		}
	})

	vc.opacity = widget.NewSlider(0.1, 1)
	vc.opacity.Step = 0.05
	vc.opacity.Value = scene.DefaultWallOpacity
	vc.opacity.OnChanged = func(float64) { changed() }

	// The cut's position across the canal only means something while the canal is cut open.
	vc.clipLabel = widget.NewLabel("across")
	vc.clipOffset = widget.NewSlider(-1, 1)
	vc.clipOffset.Step = 0.02
	vc.clipOffset.OnChanged = func(float64) { changed() }
	vc.clip = widget.NewCheck("Cut open", func(on bool) {
		vc.enableCut(on)
		changed()
	})
	vc.enableCut(false)
	vc.when = newSelectList([]string{whenAfter, whenBefore}, func(string) { changed() })
	vc.when.SetSelected(whenAfter)
	vc.centerline = widget.NewCheck("Centerline", func(bool) { changed() })
	vc.fixed = widget.NewCheck("One colour scale for all steps", func(bool) { changed() })
	vc.wall = widget.NewCheck("Wall to root", func(bool) { changed() })
	vc.wall.Disable()

	vc.insertion = widget.NewSlider(0.5, 20)
	vc.insertion.Step = 0.05
	vc.insertion.OnChanged = func(v float64) {
		v = math.Round(v*100) / 100
		vc.depthLabel.SetText(depthText(v, vc.length))
		if vc.OnTip != nil {
			vc.OnTip(v)
		}
	}
	vc.depthLabel = widget.NewLabel("")

	sized := func(o fyne.CanvasObject, wd float32) fyne.CanvasObject {
		return container.NewGridWrap(fyne.NewSize(wd, o.MinSize().Height), o)
	}
	row1 := container.NewHBox(
		sized(vc.views, 96), fit,
		widget.NewLabel("Wall"), sized(vc.opacity, 70),
		vc.clip, vc.clipLabel, sized(vc.clipOffset, 70), vc.centerline,
	)
	row2 := container.NewBorder(nil, nil, container.NewHBox(sized(vc.when, 180), vc.wall, widget.NewLabel("Tip")), vc.depthLabel, vc.insertion)
	vc.box = container.NewVBox(row1, row2)
	vc.showStep(0, false)
	return vc
}

// enableCut makes the cut's position usable only while the canal is cut open.
func (vc *viewControls) enableCut(on bool) {
	if on {
		vc.clipOffset.Enable()
		vc.clipLabel.Importance = widget.MediumImportance
	} else {
		vc.clipOffset.Disable()
		vc.clipLabel.Importance = widget.LowImportance
	}
	vc.clipLabel.Refresh()
}

// sceneOptions reads the settings (the step is the window's to fill in).
func (vc *viewControls) sceneOptions() scene.Options {
	opt := sceneOptionsDefault()
	opt.WallOpacity = vc.opacity.Value
	opt.Clip = vc.clip.Checked
	opt.ClipOffset = vc.clipOffset.Value
	opt.Before = vc.when.Selected == whenBefore
	opt.Centerline = vc.centerline.Checked
	opt.FixedScale = vc.fixed.Checked
	opt.WallThickness = vc.wall.Checked && !vc.wall.Disabled()
	return opt
}

// fixedScale says whether colours compare across steps.
func (vc *viewControls) fixedScale() bool { return vc.fixed.Checked }

// showCanal fits the slider ranges to a canal.
func (vc *viewControls) showCanal(c *analysis.Canal) {
	vc.length = c.Line.Length()
	if c.Root != nil {
		vc.wall.Enable()
	} else {
		vc.wall.Disable()
	}
	vc.insertion.Max = math.Floor(vc.length*100) / 100
	vc.insertion.Refresh()
	r := 0.0
	for i := 0; i < c.Line.Len(); i++ {
		r = math.Max(r, c.MeanRadius(i))
	}
	r = math.Max(0.2, math.Ceil(r*20)/20)
	vc.clipOffset.Min, vc.clipOffset.Max = -r, r
	vc.clipOffset.Refresh()
}

// showStep puts the Tip slider at the shown file's depth (mm); ok false: no file is shown.
func (vc *viewControls) showStep(depth float64, ok bool) {
	if !ok {
		vc.insertion.Disable()
		vc.depthLabel.SetText("no file shown")
		return
	}
	vc.insertion.Enable()
	quietly(vc.insertion, depth)
	vc.depthLabel.SetText(depthText(depth, vc.length))
}

// quietly moves a slider without calling its OnChanged: a value shown, not one the user chose.
func quietly(s *widget.Slider, v float64) {
	f := s.OnChanged
	s.OnChanged = nil
	s.SetValue(v)
	s.OnChanged = f
}

func depthText(d, length float64) string {
	return fmt.Sprintf("%.2f mm, %.2f to the end", d, length-d)
}
