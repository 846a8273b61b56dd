package ui

import (
	"fmt"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/models"
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
	// The working length sits on the title's row, so the measures get the lines below.
	wlBox := container.NewBorder(nil, nil, widget.NewLabel("Working length (mm)"), nil,
		container.NewGridWrap(fyne.NewSize(76, p.wl.MinSize().Height), p.wl))
	// Many warnings (a hard scan) scroll inside the panel rather than push the table and the
	// editor out of the window.
	lineH := widget.NewLabel("0").MinSize().Height - 2*theme.InnerPadding()
	text := container.New(&atMost{height: canalTextLines*lineH + 2*theme.InnerPadding()}, container.NewVScroll(p.text))
	p.box = container.NewVBox(container.NewBorder(nil, nil, nil, wlBox, p.title), text, p.wlErr)
	return p
}

// canalTextLines is how many lines of measures and warnings show before they scroll.
const canalTextLines = 6

// bendMark marks, in the step table, the figures that inherit a wide band of the tightest bend.
const bendMark = "*"

// canalText is the summary in plain words, a few short lines: each measure of the bend with
// its band, and a warning where a band is wide.
func canalText(c *analysis.Canal) string {
	s := c.Summary(false)
	var lines []string
	lines = append(lines, fmt.Sprintf("Length %.2f mm · Schneider angle %s", s.LengthMM, s.SchneiderText()))
	if s.MaxCurvature.RadiusMM != nil {
		lines = append(lines, fmt.Sprintf("Tightest bend r %s, %s", s.RadiusText(), s.PlaceText()))
	} else {
		lines = append(lines, "Straight: no bend found")
	}
	// Warnings before the fitted arc: with many of them the last lines scroll.
	for _, wn := range s.Warnings {
		lines = append(lines, "⚠ "+models.Printable(wn, models.MaxMessageRunes))
	}
	if c.BendUncertain() {
		lines = append(lines, "⚠ "+upperFirst(analysis.BendInheritNote(bendMark)))
	}
	var last []string
	if r := s.Arc.RadiusMM; r != nil {
		last = append(last, fmt.Sprintf("Arc r %.2f mm over %.1f°", *r, s.Arc.AngleDeg))
	}
	if len(s.Warnings) == 0 {
		last = append(last, "surface: no warnings")
	}
	if len(last) > 0 {
		lines = append(lines, upperFirst(strings.Join(last, " · ")))
	}
	return strings.Join(lines, "\n")
}

// upperFirst starts a sentence with a capital.
func upperFirst(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
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
	p.title.SetText("Canal: " + models.Printable(c.Name, models.MaxNameRunes))
	p.text.SetText(canalText(c))
}

// showLoading says a canal is being read and measured.
func (p *canalPanel) showLoading(name string) {
	p.title.SetText("Canal: " + models.Printable(name, models.MaxNameRunes))
	p.text.SetText("measuring…")
}

// showFailure says a canal could not be opened; the canal shown before (nil: none) stays.
func (p *canalPanel) showFailure(name string, err error, previous *analysis.Canal) {
	if previous != nil {
		p.showMeasures(previous)
		p.text.SetText(canalText(previous) + "\n⚠ " + models.Printable(name, models.MaxNameRunes) + " could not be opened: " + models.Printable(err.Error(), models.MaxMessageRunes))
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
