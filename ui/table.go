package ui

import (
	"fmt"
	"image/color"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/ui/scene"
)

// stepColumn is one column of the step table: a heading, a width and the cell's text.
type stepColumn struct {
	head  string
	width float32
	text  func(st *analysis.StepResult) string
}

// adviceColumn is the column of the advice marker: a tap on it opens the step's advice.
const adviceColumn = 3

var stepColumns = []stepColumn{
	{"", 18, nil}, // ISO colour swatch
	{"#", 28, func(st *analysis.StepResult) string { return fmt.Sprint(st.Number) }},
	{"file", 64, func(st *analysis.StepResult) string { return st.Metrics.Label }},
	// Advice sits beside the file's name, where it is seen without scrolling the table.
	{"advice", 52, func(st *analysis.StepResult) string {
		if n := len(st.Metrics.Advice); n > 0 {
			return fmt.Sprintf("⚠ %d", n)
		}
		return ""
	}},
	metricColumn("tip_depth_mm", 50),
	metricColumn("engaged_length_mm", 66),
	metricColumn("engaged_area_mm2", 50),
	metricColumn("diameter_at_max_curvature_mm", 68),
	metricColumn("strain_at_max_curvature_pct", 66),
	metricColumn("fatigue_damage", 58),
	metricColumn("torsion_margin", 58),
	// Gambill's measures 1 mm from the apical end, where transportation matters for the seal.
	metricColumn("transportation_1_mm", 72),
	metricColumn("centering_ratio_1", 62),
}

// metricColumn shows one of the step figures analysis describes, as every output shows it.
func metricColumn(key string, width float32) stepColumn {
	c := analysis.PickColumns(key)[0]
	return stepColumn{c.Heading, width, func(st *analysis.StepResult) string {
		if v := c.Format(st.Metrics); v != "" {
			return v
		}
		return "–"
	}}
}

func optional(v *float64, format string) string {
	if v == nil {
		return "–"
	}
	return fmt.Sprintf(format, *v)
}

// stepTable lists the steps of the last valid analysis, one row per step.
type stepTable struct {
	w       *mainWindow
	table   *widget.Table
	syncing bool
}

func newStepTable(w *mainWindow) *stepTable {
	t := &stepTable{w: w}
	t.table = widget.NewTable(t.size, t.create, t.update)
	t.table.ShowHeaderRow = true
	t.table.CreateHeader = func() fyne.CanvasObject { return widget.NewLabel("two\nlines") }
	t.table.UpdateHeader = func(id widget.TableCellID, o fyne.CanvasObject) {
		if id.Col >= 0 && id.Col < len(stepColumns) {
			l := o.(*widget.Label)
			l.TextStyle = fyne.TextStyle{Bold: true}
			l.SetText(stepColumns[id.Col].head)
		}
	}
	for i, c := range stepColumns {
		t.table.SetColumnWidth(i, c.width)
	}
	t.table.OnSelected = t.selected
	return t
}

func (t *stepTable) size() (int, int) {
	if t.w.res == nil {
		return 0, len(stepColumns)
	}
	return len(t.w.res.Steps), len(stepColumns)
}

func (t *stepTable) create() fyne.CanvasObject {
	sw := canvas.NewRectangle(color.Transparent)
	sw.StrokeColor = color.RGBA{90, 90, 90, 255}
	sw.StrokeWidth = 1
	sw.CornerRadius = 3
	return container.NewStack(container.NewPadded(sw), widget.NewLabel(""))
}

func (t *stepTable) update(id widget.TableCellID, o fyne.CanvasObject) {
	stack := o.(*fyne.Container)
	sw := stack.Objects[0].(*fyne.Container).Objects[0].(*canvas.Rectangle)
	label := stack.Objects[1].(*widget.Label)
	res := t.w.res
	if res == nil || id.Row >= len(res.Steps) {
		return
	}
	st := res.Steps[id.Row]
	if id.Col == 0 {
		sw.FillColor = scene.FileColor(st.Step.Instrument.Size)
		sw.Show()
		label.SetText("")
		sw.Refresh()
		return
	}
	sw.Hide()
	label.SetText(stepColumns[id.Col].text(st))
}

// selected shows the step of the row; a tap on the advice marker also opens its text.
func (t *stepTable) selected(id widget.TableCellID) {
	if t.syncing {
		return
	}
	t.w.selectStep(id.Row + 1)
	res := t.w.res
	if id.Col == adviceColumn && res != nil && id.Row < len(res.Steps) {
		t.w.showAdvice(res.Steps[id.Row])
	}
}

// refresh redraws after a new analysis and keeps the shown step selected.
func (t *stepTable) refresh() {
	// Rows as tall as one line; the table would otherwise give them the two-line header's height.
	h := widget.NewLabel("0").MinSize().Height
	rows, _ := t.size()
	for i := 0; i < rows; i++ {
		t.table.SetRowHeight(i, h)
	}
	t.table.Refresh()
	if t.w.selected > 0 {
		t.syncing = true
		t.table.Select(widget.TableCellID{Row: t.w.selected - 1, Col: 1})
		t.syncing = false
	}
}

// rowText is a row as the table shows it (for tests and the status line).
func (t *stepTable) rowText(row int) []string {
	res := t.w.res
	if res == nil || row < 0 || row >= len(res.Steps) {
		return nil
	}
	out := make([]string, 0, len(stepColumns)-1)
	for _, c := range stepColumns[1:] {
		out = append(out, c.text(res.Steps[row]))
	}
	return out
}

// showAdvice opens the advice of a step: common practice, worded as advice.
func (w *mainWindow) showAdvice(st *analysis.StepResult) {
	if len(st.Metrics.Advice) == 0 {
		return
	}
	var b strings.Builder
	for _, a := range st.Metrics.Advice {
		b.WriteString("• ")
		b.WriteString(a.Text)
		b.WriteString("\n")
	}
	b.WriteString("\nAdvice from common practice, not a verdict.")
	l := widget.NewLabel(b.String())
	l.Wrapping = fyne.TextWrapWord
	d := dialog.NewCustom(fmt.Sprintf("Advice for step %d, %s", st.Number, st.Metrics.Label), "Close",
		container.NewGridWrap(fyne.NewSize(460, 180), container.NewVScroll(l)), w.win)
	d.Show()
}
