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
// under the field and the last valid analysis stays on screen.
type stepEditor struct {
	w   *mainWindow
	box fyne.CanvasObject

	title                   *widget.Label
	detail                  *widget.Label // how the shown step moved the canal
	size, alloy             *widget.Select
	taper, depth, rpm, peck *widget.Entry
	errs                    map[string]*widget.Label
	general                 *widget.Label
	add, remove, up, down   *widget.Button
	loading                 bool
	fields                  *fyne.Container
}

func newStepEditor(w *mainWindow) *stepEditor {
	e := &stepEditor{w: w, errs: map[string]*widget.Label{}}
	e.title = sectionTitle("Shown file")
	sizes := make([]string, 0, 24)
	for _, s := range models.ISOSizes() {
		sizes = append(sizes, strconv.Itoa(s))
	}
	e.size = widget.NewSelect(sizes, func(string) { e.edited() })
	e.alloy = widget.NewSelect(nil, func(string) { e.edited() })
	entry := func(placeholder string) *widget.Entry {
		en := widget.NewEntry()
		en.SetPlaceHolder(placeholder)
		en.OnChanged = func(string) { e.edited() }
		return en
	}
	e.taper = entry("0.04")
	e.depth = entry("mm from the orifice, or WL, WL-1.5")
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

	row := func(label string, field string, o fyne.CanvasObject) fyne.CanvasObject {
		return container.NewVBox(container.NewBorder(nil, nil,
			container.NewGridWrap(fyne.NewSize(210, o.MinSize().Height), widget.NewLabel(label)), nil, o), e.errs[field])
	}
	e.fields = container.NewVBox(
		row("ISO size", fieldSize, e.size),
		row("Taper (mm/mm)", fieldTaper, e.taper),
		row("Depth", fieldDepth, e.depth),
		row("Speed (rpm)", fieldRPM, e.rpm),
		row("Advance per insertion (mm)", fieldPeck, e.peck),
		row("Alloy", fieldAlloy, e.alloy),
	)
	e.add = widget.NewButtonWithIcon("Add a file", theme.ContentAddIcon(), e.addStep)
	e.remove = widget.NewButtonWithIcon("Remove", theme.DeleteIcon(), e.removeStep)
	e.up = widget.NewButtonWithIcon("Earlier", theme.MoveUpIcon(), func() { e.moveStep(-1) })
	e.down = widget.NewButtonWithIcon("Later", theme.MoveDownIcon(), func() { e.moveStep(1) })
	e.detail = widget.NewLabel("")
	e.detail.Wrapping = fyne.TextWrapWord
	e.detail.Hide()
	e.box = container.NewVBox(widget.NewSeparator(), container.NewHBox(e.title, e.add, e.remove, e.up, e.down), e.detail, e.fields, e.general)
	e.load()
	return e
}

// load fills the fields from the shown step of the last valid sequence.
func (e *stepEditor) load() {
	w := e.w
	e.loading = true
	defer func() { e.loading = false }()
	e.clearErrors()
	if w.seq == nil || w.selected == 0 || w.selected > len(w.seq.Steps) {
		e.title.SetText("Shown file: none")
		e.detail.Hide()
		e.fields.Hide()
		e.setButtons()
		return
	}
	e.fields.Show()
	st := w.seq.Steps[w.selected-1]
	e.title.SetText(fmt.Sprintf("Step %d", w.selected))
	e.showDetail()
	sizes := e.size.Options
	cur := strconv.Itoa(st.Instrument.Size)
	if !models.IsISOSize(st.Instrument.Size) && !contains(sizes, cur) {
		e.size.Options = append(sizes, cur)
	}
	e.size.SetSelected(cur)
	t := st.Instrument.Taper
	if len(st.Instrument.Tapers) > 0 {
		t = st.Instrument.Tapers[0].Taper
	}
	e.taper.SetText(strconv.FormatFloat(t, 'f', -1, 64))
	e.depth.SetText(st.Depth.String())
	e.rpm.SetText(strconv.FormatFloat(st.RPM, 'f', -1, 64))
	e.peck.SetText(strconv.FormatFloat(st.PeckMM, 'f', -1, 64))
	e.alloy.Options = alloyNames(w.seq)
	e.alloy.SetSelected(st.AlloyName)
	e.setButtons()
}

// showDetail states how the shown step moved the canal, from the last valid run.
func (e *stepEditor) showDetail() {
	w := e.w
	if w.res == nil || w.selected > len(w.res.Steps) {
		e.detail.Hide()
		return
	}
	e.detail.SetText("This step, " + transportText(w.res.Steps[w.selected-1].Metrics.Transport))
	e.detail.Show()
}

func (e *stepEditor) setButtons() {
	w := e.w
	n := 0
	if w.seq != nil {
		n = len(w.seq.Steps)
	}
	enable := func(b *widget.Button, ok bool) {
		if ok {
			b.Enable()
		} else {
			b.Disable()
		}
	}
	enable(e.add, n > 0)
	enable(e.remove, n > 1 && w.selected > 0)
	enable(e.up, w.selected > 1)
	enable(e.down, w.selected > 0 && w.selected < n)
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

// setDepthText shows a depth the insertion slider set, without editing again.
func (e *stepEditor) setDepthText(s string) {
	e.loading = true
	e.depth.SetText(s)
	e.loading = false
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

// showError puts an error at its field (or under the form when it belongs to none).
func (e *stepEditor) showError(field string, err error) {
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

// fieldError is an error at one field of the editor.
func (e *stepEditor) fieldError(err error) {
	var se *models.SequenceError
	if errors.As(err, &se) && (se.Step == 0 || se.Step == e.w.selected) {
		field := se.Field
		if _, ok := e.errs[field]; !ok && strings.HasPrefix(field, "tapers") {
			field = fieldTaper
		}
		e.showError(field, errors.New(se.Msg))
		return
	}
	e.showError("", err)
}

// showRunError shows an analysis that could not run (the last valid one stays).
func (e *stepEditor) showRunError(err error) { e.fieldError(err) }

// edited reads the fields as the user types; a valid step re-runs the analysis.
func (e *stepEditor) edited() {
	w := e.w
	if e.loading || w.seq == nil || w.selected == 0 || w.selected > len(w.seq.Steps) {
		return
	}
	e.clearErrors()
	st, bad := e.readStep(w.seq.Steps[w.selected-1])
	if bad {
		return
	}
	cand := copySequence(w.seq)
	cand.Steps[w.selected-1] = st
	if err := w.trySequence(cand); err != nil {
		e.fieldError(err)
		return
	}
	e.w.controls.stepChanged()
}

// readStep applies the fields to a copy of st; bad is set when a field did not parse (its
// error is shown).
func (e *stepEditor) readStep(st models.Step) (models.Step, bool) {
	bad := false
	fail := func(field string, err error) {
		e.showError(field, err)
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
	if a, ok := e.w.seq.Alloy(name); ok {
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
	w := e.w
	if w.seq == nil || len(w.seq.Steps) == 0 {
		return
	}
	at := w.selected
	if at == 0 {
		at = len(w.seq.Steps)
	}
	cand := copySequence(w.seq)
	st := cand.Steps[at-1]
	cand.Steps = append(cand.Steps[:at], append([]models.Step{st}, cand.Steps[at:]...)...)
	e.changeSteps(cand, at+1)
}

func (e *stepEditor) removeStep() {
	w := e.w
	if w.seq == nil || len(w.seq.Steps) < 2 || w.selected == 0 {
		return
	}
	cand := copySequence(w.seq)
	i := w.selected - 1
	cand.Steps = append(cand.Steps[:i], cand.Steps[i+1:]...)
	e.changeSteps(cand, min(w.selected, len(cand.Steps)))
}

// moveStep moves the shown step earlier (-1) or later (+1).
func (e *stepEditor) moveStep(by int) {
	w := e.w
	i, j := w.selected-1, w.selected-1+by
	if w.seq == nil || i < 0 || j < 0 || j >= len(w.seq.Steps) {
		return
	}
	cand := copySequence(w.seq)
	cand.Steps[i], cand.Steps[j] = cand.Steps[j], cand.Steps[i]
	e.changeSteps(cand, j+1)
}

// changeSteps takes a sequence with steps added, removed or moved and shows step sel.
func (e *stepEditor) changeSteps(cand *models.Sequence, sel int) {
	w := e.w
	if err := w.trySequence(cand); err != nil {
		e.fieldError(err)
		return
	}
	w.selected = sel
	e.load()
	w.controls.stepChanged()
}
