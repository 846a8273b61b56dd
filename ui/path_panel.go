package ui

import (
	"fmt"
	"math"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/models"
)

// The path model in plain words, as the control offers it.
const (
	pathCentredText = "follows the centerline"
	pathElasticText = "bends as a beam"
)

// pathPanel chooses how the file runs in the canal and states how the whole sequence moved
// the canal. The choice is the sequence's path_model, so a saved sequence keeps it. show gives
// it the model and the last run's transportation; OnModel reports a new choice.
type pathPanel struct {
	box    fyne.CanvasObject
	choice *widget.RadioGroup
	moved  *widget.Label

	OnModel func(model string)
}

func newPathPanel() *pathPanel {
	p := &pathPanel{}
	p.choice = widget.NewRadioGroup([]string{pathCentredText, pathElasticText}, p.chosen)
	p.choice.Horizontal = true
	p.choice.Required = true
	p.moved = widget.NewLabel("")
	p.moved.Wrapping = fyne.TextWrapWord
	p.box = container.NewVBox(container.NewHBox(widget.NewLabel("File path:"), p.choice), p.moved)
	p.show(models.PathCentred, nil)
	return p
}

// show selects the path model and states the whole sequence's transportation and, when the
// root is known, the wall it leaves (res nil: no run yet).
func (p *pathPanel) show(model string, res *analysis.Result) {
	text := pathCentredText
	if model == models.PathElastic {
		text = pathElasticText
	}
	f := p.choice.OnChanged
	p.choice.OnChanged = nil
	p.choice.SetSelected(text)
	p.choice.OnChanged = f
	if res == nil {
		p.moved.SetText("")
		return
	}
	text = "Whole sequence: " + transportText(res.Moved, true)
	if w := sequenceWallText(res); w != "" {
		text += "\n" + w
	}
	p.moved.SetText(text)
}

// sequenceWallText states the wall to the root as scanned and after the last step, with the
// share under the limit ("" without a root): the figure a thin root asks for first.
func sequenceWallText(res *analysis.Result) string {
	before := res.ScannedWall
	if before.ThinnestWallMM == nil || len(res.Steps) == 0 {
		return ""
	}
	after := res.Steps[len(res.Steps)-1].Metrics.Wall
	if after.ThinnestWallMM == nil {
		return ""
	}
	s := fmt.Sprintf("Root wall (estimate): thinnest %.2f mm as scanned, %.2f mm after the sequence", *before.ThinnestWallMM, *after.ThinnestWallMM)
	if at, dir := after.ThinnestWallFromApexMM, after.ThinnestWallTowardDeg; at != nil && dir != nil {
		s += fmt.Sprintf(", %.1f mm from the apical end, %s", *at, towardText(*dir))
	}
	if pct, lim := after.WallUnderLimitPct, after.WallLimitMM; pct != nil && lim != nil {
		s += fmt.Sprintf("; %.1f %% of the wall under %.2f mm", *pct, *lim)
	}
	return s + "."
}

func (p *pathPanel) chosen(text string) {
	if text == "" || p.OnModel == nil {
		return
	}
	model := models.PathCentred
	if text == pathElasticText {
		model = models.PathElastic
	}
	p.OnModel(model)
}

// setPathModel runs the sequence again with the file centred or bending as a beam.
func (w *mainWindow) setPathModel(model string) {
	if w.seq == nil || w.seq.PathModel == model {
		return
	}
	cand := copySequence(w.seq)
	cand.PathModel = model
	w.seq = cand
	w.rerun()
}

// transportText states Gambill's measures in one short sentence; withCentring adds the
// centring ratios (the step table shows a step's at 1 mm).
func transportText(tr analysis.Transport, withCentring bool) string {
	var lev, mm, cen []string
	for _, x := range analysis.TransportLevels() {
		k := levelKey(x)
		lev = append(lev, k)
		mm = append(mm, fmt.Sprintf("%.3f", tr.TransportationMM[k]))
		cen = append(cen, optional(tr.CenteringRatio[k], "%.2f"))
	}
	s := fmt.Sprintf("transportation %s mm at %s mm up", strings.Join(mm, " / "), strings.Join(lev, " / "))
	if withCentring {
		s += " (centring " + strings.Join(cen, " / ") + ")"
	}
	s += fmt.Sprintf(", foramen shift %.3f mm", tr.ForamenShiftMM)
	if tr.Largest.MM >= 0.0005 { // shown to the micrometre: below it there is no place to name
		s += fmt.Sprintf("; most %.3f mm, %.2f mm up, %s", tr.Largest.MM, tr.Largest.FromApexMM, towardText(tr.Largest.TowardDeg))
	}
	return s + "."
}

// levelKey is the key of a transportation level ("1" for 1 mm).
func levelKey(x float64) string { return fmt.Sprint(x) }

// towardText names a direction about the canal's axis: 0° is the inner side of the main
// curve, 180° the outer side, and the angle turns right-handed toward the apex.
func towardText(deg float64) string {
	d := math.Mod(deg, 360)
	if d < 0 {
		d += 360
	}
	side := "across the curve"
	switch {
	case d <= 45 || d >= 315:
		side = "inner side"
	case d >= 135 && d <= 225:
		side = "outer side"
	}
	return fmt.Sprintf("%s (%.0f°)", side, d)
}
