package ui

import (
	"fmt"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
)

// canalPanel states the canal's measures and holds the working length. show gives it a
// canal; OnWorkingLength hands a typed working length to the window, which answers with the
// error to show (nil when it took it).
type canalPanel struct {
	box   fyne.CanvasObject
	title *widget.Label
	text  *widget.Label
	wl    *widget.Entry
	wlErr *widget.Label

	OnWorkingLength func(mm float64) error
}

func newCanalPanel() *canalPanel {
	p := &canalPanel{}
	p.title = sectionTitle("Canal")
	p.title.Truncation = fyne.TextTruncateEllipsis
	p.text = widget.NewLabel("measuring…")
	p.text.Wrapping = fyne.TextWrapWord
	p.wl = widget.NewEntry()
	p.wl.OnChanged = p.edited
	p.wl.Disable()
	p.wlErr = widget.NewLabel("")
	p.wlErr.Importance = widget.DangerImportance
	p.wlErr.Wrapping = fyne.TextWrapWord
	p.wlErr.Hide()
	wlRow := container.NewBorder(nil, nil, widget.NewLabel("Working length (mm)"), nil, p.wl)
	p.box = container.NewVBox(p.title, p.text, wlRow, p.wlErr)
	return p
}

// canalText is the summary in plain words, three short lines.
func canalText(c *analysis.Canal) string {
	s := c.Summary(false)
	var lines []string
	first := fmt.Sprintf("Length %.2f mm · Schneider angle %.1f°", s.LengthMM, s.SchneiderDeg)
	if r := s.Arc.RadiusMM; r != nil {
		first += fmt.Sprintf(" · arc r %.2f mm over %.1f°", *r, s.Arc.AngleDeg)
	}
	lines = append(lines, first)
	if r := s.MaxCurvature.RadiusMM; r != nil {
		lines = append(lines, fmt.Sprintf("Tightest bend r %.2f mm, %.2f mm from the apical end (s* %.2f mm)",
			*r, s.MaxCurvature.FromApexMM, s.MaxCurvature.SMM))
	} else {
		lines = append(lines, "Straight: no bend found")
	}
	if len(s.Warnings) == 0 {
		lines = append(lines, "Surface: no warnings")
	}
	for _, wn := range s.Warnings {
		lines = append(lines, "⚠ "+wn)
	}
	return strings.Join(lines, "\n")
}

// show states a measured canal and its working length.
func (p *canalPanel) show(c *analysis.Canal) {
	p.showMeasures(c)
	quietText(p.wl, strconv.FormatFloat(round2(c.WorkingLength), 'f', -1, 64))
	p.wl.Enable()
	p.wlErr.Hide()
	p.wl.SetValidationError(nil)
}

// showMeasures states the canal's measures, leaving the working length as typed.
func (p *canalPanel) showMeasures(c *analysis.Canal) {
	p.title.SetText("Canal: " + c.Name)
	p.text.SetText(canalText(c))
}

// showLoading says a canal is being read and measured.
func (p *canalPanel) showLoading(name string) {
	p.title.SetText("Canal: " + name)
	p.text.SetText("measuring…")
}

// showFailure says a canal could not be opened; the canal shown before (nil: none) stays.
func (p *canalPanel) showFailure(name string, err error, previous *analysis.Canal) {
	if previous != nil {
		p.showMeasures(previous)
		p.text.SetText(canalText(previous) + "\n⚠ " + name + " could not be opened: " + err.Error())
		return
	}
	p.title.SetText("Canal: none open")
	p.text.SetText(name + " could not be opened: " + err.Error() + "\nOpen a canal from the File menu.")
}

func round2(v float64) float64 {
	return float64(int64(v*100+0.5)) / 100
}

// edited takes a new working length as the user types.
func (p *canalPanel) edited(s string) {
	if p.OnWorkingLength == nil {
		return
	}
	v, err := parseNumber(s)
	if err == nil {
		err = p.OnWorkingLength(v)
	}
	if err != nil {
		p.wlErr.SetText(err.Error())
		p.wlErr.Show()
		p.wl.SetValidationError(err)
		return
	}
	p.wlErr.Hide()
	p.wl.SetValidationError(nil)
}
