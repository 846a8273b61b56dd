package ui

import (
	"errors"
	"fmt"
	"sort"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/models"
)

// Field names as the sequence file spells them, so a file's error lands at its field.
const (
	fieldSize  = "size"
	fieldTaper = "taper"
	fieldDepth = "depth"
	fieldRPM   = "rpm"
	fieldPeck  = "peck_mm"
	fieldAlloy = "alloy"
)

// stepEditor edits the shown step, checking as the user types: a bad value shows its error
// under the field and the last valid analysis stays on screen. show gives it the sequence and
// the shown step; OnEdit and OnSteps hand the user's changes to the window, which answers with
// the error to show (nil when it took them).
type stepEditor struct {
	box fyne.CanvasObject

	seq                     *models.Sequence
	n                       int // step shown, from 1; 0: none
	title                   *widget.Label
	detail                  *widget.Label // how the shown step moved the canal
	size, alloy             *selectList
	taper, depth, rpm, peck *widget.Entry
	errs                    map[string]*widget.Label
	general                 *widget.Label
	add, remove, up, down   *widget.Button
	fields                  *fyne.Container

	OnEdit  func(st models.Step) error                  // the shown step as edited
	OnSteps func(cand *models.Sequence, show int) error // steps added, removed or moved
}

func newStepEditor() *stepEditor {
	e := &stepEditor{errs: map[string]*widget.Label{}}
	e.title = sectionTitle("Shown file")
	sizes := make([]string, 0, 24)
	for _, s := range models.ISOSizes() {
		sizes = append(sizes, strconv.Itoa(s))
	}
	e.size = newSelectList(sizes, func(string) { e.edited() })
	e.alloy = newSelectList(nil, func(string) { e.edited() })
	entry := func(placeholder string) *widget.Entry {
		en := widget.NewEntry()
		en.SetPlaceHolder(placeholder)
		en.OnChanged = func(string) { e.edited() }
		return en
	}
	e.taper = entry("0.04")
	e.depth = entry("mm, WL or WL-1.5")
	e.rpm = entry("400")
	e.peck = entry("1.0")
	for _, f := range []string{fieldSize, fieldTaper, fieldDepth, fieldRPM, fieldPeck, fieldAlloy} {
		l := widget.NewLabel("")
		l.Importance = widget.DangerImportance
		l.Wrapping = fyne.TextWrapWord
		l.Hide()
		e.errs[f] = l
	}
	e.general = widget.NewLabel("")
	e.general.Importance = widget.DangerImportance
	e.general.Wrapping = fyne.TextWrapWord
	e.general.Hide()

	// Two fields a row, each with its label on the left and its error under it, so the whole
	// editor is seen without scrolling.
	field := func(label string, name string, o fyne.CanvasObject) fyne.CanvasObject {
		return container.NewVBox(container.NewBorder(nil, nil,
			container.NewGridWrap(fyne.NewSize(96, o.MinSize().Height), widget.NewLabel(label)), nil, o), e.errs[name])
	}
	e.fields = container.NewGridWithColumns(2,
		field("ISO size", fieldSize, e.size),
		field("Taper", fieldTaper, e.taper),
		field("Depth", fieldDepth, e.depth),
		field("Speed, rpm", fieldRPM, e.rpm),
		field("Advance, mm", fieldPeck, e.peck),
		field("Alloy", fieldAlloy, e.alloy),
	)
	e.add = widget.NewButtonWithIcon("Add a file", theme.ContentAddIcon(), e.addStep)
	e.remove = widget.NewButtonWithIcon("Remove", theme.DeleteIcon(), e.removeStep)
	e.up = widget.NewButtonWithIcon("Earlier", theme.MoveUpIcon(), func() { e.moveStep(-1) })
	e.down = widget.NewButtonWithIcon("Later", theme.MoveDownIcon(), func() { e.moveStep(1) })
	e.detail = widget.NewLabel("")
	e.detail.Wrapping = fyne.TextWrapWord
	e.detail.Hide()
	e.box = container.NewVBox(widget.NewSeparator(), container.NewHBox(e.title, e.add, e.remove, e.up, e.down), e.fields, e.general, e.detail)
	e.show(nil, 0, nil)
	return e
}

// show fills the fields from step n (from 1) of seq, the last valid sequence, and states how
// the step moved the canal in the last run (st, nil while none is in).
func (e *stepEditor) show(seq *models.Sequence, n int, st *analysis.StepResult) {
	e.seq, e.n = seq, n
	e.clearErrors()
	if seq == nil || n < 1 || n > len(seq.Steps) {
		e.n = 0
		e.title.SetText("Shown file: none")
		e.detail.Hide()
		e.fields.Hide()
		e.setButtons()
		return
	}
	e.fields.Show()
	step := seq.Steps[n-1]
	e.title.SetText(fmt.Sprintf("Step %d", n))
	if st != nil {
		e.detail.SetText("This step: " + transportText(st.Metrics.Transport, false))
		e.detail.Show()
	} else {
		e.detail.Hide()
	}
	sizes := e.size.Options
	cur := strconv.Itoa(step.Instrument.Size)
	if !models.IsISOSize(step.Instrument.Size) && !contains(sizes, cur) {
		e.size.Options = append(sizes, cur)
	}
	quietSelect(e.size, cur)
	t := step.Instrument.Taper
	if len(step.Instrument.Tapers) > 0 {
		t = step.Instrument.Tapers[0].Taper
	}
	quietText(e.taper, strconv.FormatFloat(t, 'f', -1, 64))
	quietText(e.depth, step.Depth.String())
	quietText(e.rpm, strconv.FormatFloat(step.RPM, 'f', -1, 64))
	quietText(e.peck, strconv.FormatFloat(step.PeckMM, 'f', -1, 64))
	e.alloy.Options = alloyNames(seq)
	quietSelect(e.alloy, step.AlloyName)
	e.setButtons()
}

// quietText and quietSelect show a value without calling OnChanged: a value shown, not typed.
func quietText(en *widget.Entry, s string) {
	f := en.OnChanged
	en.OnChanged = nil
	en.SetText(s)
	en.OnChanged = f
}

func quietSelect(s *selectList, v string) {
	f := s.OnChanged
	s.OnChanged = nil
	s.SetSelected(v)
	s.OnChanged = f
}

func (e *stepEditor) setButtons() {
	n := 0
	if e.seq != nil {
		n = len(e.seq.Steps)
	}
	enable := func(b *widget.Button, ok bool) {
		if ok {
			b.Enable()
		} else {
			b.Disable()
		}
	}
	enable(e.add, n > 0)
	enable(e.remove, n > 1 && e.n > 0)
	enable(e.up, e.n > 1)
	enable(e.down, e.n > 0 && e.n < n)
}

func contains(list []string, s string) bool {
	for _, v := range list {
		if v == s {
			return true
		}
	}
	return false
}

// alloyNames lists the built-in alloys and the sequence's own.
func alloyNames(seq *models.Sequence) []string {
	var out []string
	for _, a := range models.BuiltinAlloys() {
		out = append(out, a.Name)
	}
	var own []string
	for name := range seq.Alloys {
		if !contains(out, name) {
			own = append(own, name)
		}
	}
	sort.Strings(own)
	return append(out, own...)
}

// showDepth shows a depth the Tip slider set, without editing again.
func (e *stepEditor) showDepth(d models.Depth) {
	quietText(e.depth, d.String())
	e.clearErrors()
}

func (e *stepEditor) clearErrors() {
	for _, l := range e.errs {
		l.SetText("")
		l.Hide()
	}
	for _, en := range []*widget.Entry{e.taper, e.depth, e.rpm, e.peck} {
		en.SetValidationError(nil)
	}
	e.general.Hide()
}

// showFieldError puts an error at a field (or under the form when field is none of them).
func (e *stepEditor) showFieldError(field string, err error) {
	if l, ok := e.errs[field]; ok {
		l.SetText(err.Error())
		l.Show()
		switch field {
		case fieldTaper:
			e.taper.SetValidationError(err)
		case fieldDepth:
			e.depth.SetValidationError(err)
		case fieldRPM:
			e.rpm.SetValidationError(err)
		case fieldPeck:
			e.peck.SetValidationError(err)
		}
		return
	}
	e.general.SetText(err.Error())
	e.general.Show()
}

// showError puts an error of step n (a SequenceError names its field) at its field of the
// editor, or under the form when it belongs to none.
func (e *stepEditor) showError(err error, n int) {
	var se *models.SequenceError
	if errors.As(err, &se) && (se.Step == 0 || se.Step == n) {
		field := se.Field
		if _, ok := e.errs[field]; !ok && strings.HasPrefix(field, "tapers") {
			field = fieldTaper
		}
		e.showFieldError(field, errors.New(se.Msg))
		return
	}
	e.showFieldError("", err)
}

// edited reads the fields as the user types; a valid step goes to the window.
func (e *stepEditor) edited() {
	if e.seq == nil || e.n == 0 || e.OnEdit == nil {
		return
	}
	e.clearErrors()
	st, bad := e.readStep(e.seq.Steps[e.n-1])
	if bad {
		return
	}
	if err := e.OnEdit(st); err != nil {
		e.showError(err, e.n)
	}
}

// readStep applies the fields to a copy of st; bad is set when a field did not parse (its
// error is shown).
func (e *stepEditor) readStep(st models.Step) (models.Step, bool) {
	bad := false
	fail := func(field string, err error) {
		e.showFieldError(field, err)
		bad = true
	}
	in := st.Instrument
	size, err := strconv.Atoi(strings.TrimSpace(e.size.Selected))
	if err != nil {
		fail(fieldSize, fmt.Errorf("choose a size"))
	} else if size != in.Size {
		if in.MaxFluteD == models.DefaultMaxFluteFor(in.Size) {
			in.MaxFluteD = models.DefaultMaxFluteFor(size)
		}
		in.Size = size
	}
	oldTaper := in.Taper
	if len(in.Tapers) > 0 {
		oldTaper = in.Tapers[0].Taper
	}
	taper, err := parseNumber(e.taper.Text)
	switch {
	case err != nil:
		fail(fieldTaper, err)
	case taper != oldTaper:
		in.Taper, in.Tapers = taper, nil // a changed taper makes a constant-taper file
	}
	depth, err := models.ParseDepth(e.depth.Text)
	if err != nil {
		fail(fieldDepth, err)
	}
	rpm, err := parseNumber(e.rpm.Text)
	if err != nil {
		fail(fieldRPM, err)
	}
	peck, err := parseNumber(e.peck.Text)
	if err != nil {
		fail(fieldPeck, err)
	}
	if bad {
		return st, true
	}
	name := e.alloy.Selected
	if a, ok := e.seq.Alloy(name); ok {
		in.Alloy = a
	}
	st.Instrument, st.Depth, st.RPM, st.PeckMM, st.AlloyName = in, depth, rpm, peck, name
	return st, false
}

// parseNumber reads a plain decimal number (a comma is taken as the decimal mark).
func parseNumber(s string) (float64, error) {
	t := strings.ReplaceAll(strings.TrimSpace(s), ",", ".")
	if t == "" {
		return 0, errors.New("enter a number")
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || strings.ContainsAny(t, "xXpPnNiI_") {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	return v, nil
}

// addStep puts a copy of the shown step after it.
func (e *stepEditor) addStep() {
	if e.seq == nil || len(e.seq.Steps) == 0 {
		return
	}
	at := e.n
	if at == 0 {
		at = len(e.seq.Steps)
	}
	cand := copySequence(e.seq)
	st := cand.Steps[at-1]
	cand.Steps = append(cand.Steps[:at], append([]models.Step{st}, cand.Steps[at:]...)...)
	e.changeSteps(cand, at+1)
}

func (e *stepEditor) removeStep() {
	if e.seq == nil || len(e.seq.Steps) < 2 || e.n == 0 {
		return
	}
	cand := copySequence(e.seq)
	i := e.n - 1
	cand.Steps = append(cand.Steps[:i], cand.Steps[i+1:]...)
	e.changeSteps(cand, min(e.n, len(cand.Steps)))
}

// moveStep moves the shown step earlier (-1) or later (+1).
func (e *stepEditor) moveStep(by int) {
	i, j := e.n-1, e.n-1+by
	if e.seq == nil || i < 0 || j < 0 || j >= len(e.seq.Steps) {
		return
	}
	cand := copySequence(e.seq)
	cand.Steps[i], cand.Steps[j] = cand.Steps[j], cand.Steps[i]
	e.changeSteps(cand, j+1)
}

// changeSteps hands steps added, removed or moved to the window, showing step sel after.
func (e *stepEditor) changeSteps(cand *models.Sequence, sel int) {
	if e.OnSteps == nil {
		return
	}
	if err := e.OnSteps(cand, sel); err != nil {
		e.showError(err, e.n)
	}
}
