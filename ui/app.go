// Package ui is the tapersweep window: a canal, a sequence and its numbers explored together.
// It builds on analysis for the numbers and ui/scene + ui/render for the picture; only
// cmd/tapersweep creates the fyne application.
package ui

import (
	"context"
	"fmt"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/models"
)

// Options say what the window opens with. Empty paths mean the built-in demo.
type Options struct {
	CanalPath    string
	SequencePath string
}

// Open builds the main window on app a and shows it.
func Open(a fyne.App, opt Options) fyne.Window {
	w := a.NewWindow("tapersweep")
	w.Resize(fyne.NewSize(1280, 800))
	status := widget.NewLabel("Measuring the canal…")
	w.SetContent(container.NewBorder(nil, status, nil, nil, widget.NewLabel("")))
	go func() {
		c, res, err := loadStart(opt)
		fyne.Do(func() {
			if err != nil {
				status.SetText(err.Error())
				return
			}
			w.SetContent(summaryView(c, res))
		})
	}()
	w.Show()
	return w
}

// loadStart measures the canal and runs the sequence the window opens with.
func loadStart(opt Options) (*analysis.Canal, *analysis.Result, error) {
	ctx := context.Background()
	var c *analysis.Canal
	var err error
	if opt.CanalPath == "" {
		c, err = analysis.CanalFromSpec(ctx, "demo", models.DemoCanal(), analysis.CanalOptions{})
	} else {
		c, err = analysis.LoadCanal(ctx, opt.CanalPath, analysis.LoadOptions{})
	}
	if err != nil {
		return nil, nil, err
	}
	var seq *models.Sequence
	if opt.SequencePath == "" {
		seq, err = models.ParseSequence("demo sequence", models.DemoSequenceJSON())
	} else {
		seq, err = models.LoadSequence(opt.SequencePath)
	}
	if err != nil {
		return c, nil, err
	}
	res, err := analysis.Run(ctx, c, seq, analysis.RunOptions{})
	return c, res, err
}

// summaryView lists the canal's measures and one line per step.
func summaryView(c *analysis.Canal, res *analysis.Result) fyne.CanvasObject {
	s := c.Summary(false)
	lines := []string{
		s.Name,
		fmt.Sprintf("Length %.2f mm, working length %.2f mm", s.LengthMM, s.WorkingLengthMM),
		fmt.Sprintf("Schneider angle %.1f°", s.SchneiderDeg),
	}
	if r := s.MaxCurvature.RadiusMM; r != nil {
		lines = append(lines, fmt.Sprintf("Tightest bend: radius %.2f mm, %.2f mm from the apical end", *r, s.MaxCurvature.FromApexMM))
	}
	box := container.NewVBox()
	for _, l := range lines {
		box.Add(widget.NewLabel(l))
	}
	if res != nil {
		for _, st := range res.Steps {
			m := st.Metrics
			box.Add(widget.NewLabel(fmt.Sprintf("Step %d  %s to %.2f mm: engaged %.2f mm, %.2f mm²", m.Step, m.Label, m.TipDepthMM, m.EngagedLengthMM, m.EngagedAreaMM2)))
		}
	}
	caution := widget.NewLabel(analysis.Caution)
	caution.Wrapping = fyne.TextWrapWord
	return container.NewBorder(nil, caution, nil, nil, container.NewVScroll(box))
}
