package ui

import (
	"fmt"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/models"
)

// canalPanel states the canal's measures and holds the working length.
type canalPanel struct {
	w       *mainWindow
	box     fyne.CanvasObject
	title   *widget.Label
	text    *widget.Label
	wl      *widget.Entry
	wlErr   *widget.Label
	loading bool
}

func newCanalPanel(w *mainWindow) *canalPanel {
	p := &canalPanel{w: w}
	p.title = sectionTitle("Canal")
	p.title.Truncation = fyne.TextTruncateEllipsis
	p.text = widget.NewLabel("measuring…")
	p.text.Wrapping = fyne.TextWrapWord
	p.wl = widget.NewEntry()
	p.wl.OnChanged = p.edited
	p.wlErr = widget.NewLabel("")
	p.wlErr.Importance = widget.DangerImportance
	p.wlErr.Wrapping = fyne.TextWrapWord
	p.wlErr.Hide()
	wlRow := container.NewBorder(nil, nil, widget.NewLabel("Working length (mm)"), nil, p.wl)
	p.box = container.NewVBox(p.title, p.text, wlRow, p.wlErr)
	return p
}

// canalText is the summary in plain words.
func canalText(c *analysis.Canal) string {
	s := c.Summary(false)
	var lines []string
	lines = append(lines, fmt.Sprintf("Length %.2f mm along the centerline · Schneider angle %.1f°", s.LengthMM, s.SchneiderDeg))
	if r := s.MaxCurvature.RadiusMM; r != nil {
		lines = append(lines, fmt.Sprintf("Tightest bend: radius %.2f mm, %.2f mm from the apical end (s* = %.2f mm from the orifice)",
			*r, s.MaxCurvature.FromApexMM, s.MaxCurvature.SMM))
	} else {
		lines = append(lines, "Straight: no bend found")
	}
	if r := s.Arc.RadiusMM; r != nil {
		lines = append(lines, fmt.Sprintf("Fitted arc: radius %.2f mm over %.1f°", *r, s.Arc.AngleDeg))
	}
	if len(s.Warnings) == 0 {
		lines = append(lines, "Mesh: no warnings")
	}
	for _, wn := range s.Warnings {
		lines = append(lines, "⚠ "+models.Printable(wn, models.MaxMessageRunes))
	}
	return strings.Join(lines, "\n")
}

func (p *canalPanel) refresh() {
	c := p.w.canal
	if c == nil {
		return
	}
	p.title.SetText("Canal: " + models.Printable(c.Name, models.MaxNameRunes))
	p.text.SetText(canalText(c))
	p.loading = true
	p.wl.SetText(strconv.FormatFloat(round2(c.WorkingLength), 'f', -1, 64))
	p.loading = false
	p.wlErr.Hide()
	p.wl.SetValidationError(nil)
}

func round2(v float64) float64 {
	return float64(int64(v*100+0.5)) / 100
}

// edited takes a new working length as the user types.
func (p *canalPanel) edited(s string) {
	if p.loading || p.w.canal == nil {
		return
	}
	v, err := parseNumber(s)
	if err == nil {
		err = p.w.setWorkingLength(v)
	}
	if err != nil {
		p.wlErr.SetText(err.Error())
		p.wlErr.Show()
		p.wl.SetValidationError(err)
		return
	}
	p.wlErr.Hide()
	p.wl.SetValidationError(nil)
	p.w.controls.stepChanged()
}
