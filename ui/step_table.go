package ui

import (
	"fmt"
	"image/color"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/ui/scene"
)

// stepColumn is one column of the step table: a heading of one or two lines and the cell's
// text. Widths come from the heading and the widest cell, so no heading overlaps the next.
type stepColumn struct {
	head string
	text func(st *analysis.StepResult) string
}

// adviceColumn is the column of the advice marker: a tap on it opens the step's advice.
const adviceColumn = 3

// frozenColumns stay in place while the others scroll: the colour, the number and the file.
const frozenColumns = 3

// The figures with the headings and decimals of analysis's step columns, as every output.
var stepColumns = []stepColumn{
	{"", nil}, // ISO colour swatch
	{"#", func(st *analysis.StepResult) string { return fmt.Sprint(st.Number) }},
	{"file", func(st *analysis.StepResult) string { return st.Metrics.Label }},
	// Advice sits beside the file's name, where it is seen without scrolling the table.
	{"advice", func(st *analysis.StepResult) string {
		if n := len(st.Metrics.Advice); n > 0 {
			return fmt.Sprintf("⚠ %d", n)
		}
		return ""
	}},
	metricColumn("tip_depth_mm"),
	metricColumn("engaged_length_mm"),
	metricColumn("engaged_area_mm2"),
	metricColumn("diameter_at_max_curvature_mm"),
	metricColumn("strain_at_max_curvature_pct"),
	// Fatigue use as every output states it: Miner's sum, 1 = fracture.
	metricColumn("fatigue_damage"),
	metricColumn("torsion_margin"),
	// The wall left to the root's surface ("–" when no root is known).
	metricColumn("thinnest_wall_mm"),
	metricColumn("wall_under_limit_pct"),
	// Gambill's measures 1 mm from the apical end, where transportation matters for the seal.
	metricColumn("transportation_1_mm"),
	metricColumn("centering_ratio_1"),
}

// metricColumn shows one of the step figures analysis describes, as every output shows it.
func metricColumn(key string) stepColumn {
	c := analysis.PickColumns(key)[0]
	return stepColumn{c.Heading, func(st *analysis.StepResult) string {
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

// stepTable lists the steps of a run, one row per step. show gives it the run and the shown
// step; OnSelect and OnAdvice report the user's choice.
type stepTable struct {
	table  *widget.Table
	res    *analysis.Result
	widths []float32 // as set on the table, per column

	OnSelect func(step int)                // a row was chosen (step from 1)
	OnAdvice func(st *analysis.StepResult) // the advice marker was tapped
}

func newStepTable() *stepTable {
	t := &stepTable{}
	t.table = widget.NewTable(t.size, t.create, t.update)
	t.table.ShowHeaderRow = true
	t.table.StickyColumnCount = frozenColumns
	t.table.CreateHeader = func() fyne.CanvasObject { return widget.NewLabel("two\nlines") }
	t.table.UpdateHeader = func(id widget.TableCellID, o fyne.CanvasObject) {
		if id.Col >= 0 && id.Col < len(stepColumns) {
			l := o.(*widget.Label)
			l.TextStyle = fyne.TextStyle{Bold: true}
			l.SetText(stepColumns[id.Col].head)
		}
	}
	t.table.OnSelected = t.selected
	t.fitColumns()
	return t
}

// fitColumns sizes each column to its heading and its widest cell.
func (t *stepTable) fitColumns() {
	pad := 2*theme.InnerPadding() + 2
	textW := func(s string, bold bool) float32 {
		w := float32(0)
		for _, line := range strings.Split(s, "\n") {
			w = max(w, fyne.MeasureText(line, theme.TextSize(), fyne.TextStyle{Bold: bold}).Width)
		}
		return w
	}
	for i, c := range stepColumns {
		w := textW(c.head, true)
		if c.text != nil && t.res != nil {
			for _, st := range t.res.Steps {
				w = max(w, textW(c.text(st), false))
			}
		}
		if i == 0 {
			w = 8 // the colour swatch
		}
		t.widths = append(t.widths[:i], w+pad)
		t.table.SetColumnWidth(i, w+pad)
	}
}

func (t *stepTable) size() (int, int) {
	if t.res == nil {
		return 0, len(stepColumns)
	}
	return len(t.res.Steps), len(stepColumns)
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
	if t.res == nil || id.Row >= len(t.res.Steps) {
		return
	}
	st := t.res.Steps[id.Row]
	if id.Col == 0 {
		// The file's ISO size colour: here and as a band at its handle end, nowhere else.
		sw.FillColor = scene.FileColor(st.Step.Instrument.Size)
		sw.Show()
		label.SetText("")
		sw.Refresh()
		return
	}
	sw.Hide()
	label.SetText(stepColumns[id.Col].text(st))
}

// selected reports the row chosen; a tap on the advice marker also opens its text.
func (t *stepTable) selected(id widget.TableCellID) {
	if t.OnSelect != nil {
		t.OnSelect(id.Row + 1)
	}
	if id.Col == adviceColumn && t.res != nil && id.Row < len(t.res.Steps) && t.OnAdvice != nil {
		t.OnAdvice(t.res.Steps[id.Row])
	}
}

// show lists the steps of res (nil: none yet) with step n (from 1) selected.
func (t *stepTable) show(res *analysis.Result, n int) {
	if res != t.res {
		t.res = res
		t.fitColumns()
		// Rows as tall as one line; the table would otherwise give them the two-line header's height.
		h := widget.NewLabel("0").MinSize().Height
		rows, _ := t.size()
		for i := 0; i < rows; i++ {
			t.table.SetRowHeight(i, h)
		}
		t.table.Refresh()
	}
	if n > 0 && res != nil && n <= len(res.Steps) {
		// Selecting reports back through OnSelect, which finds the step already shown.
		t.table.Select(widget.TableCellID{Row: n - 1, Col: 1})
	}
}

// rowText is a row as the table shows it (for tests and the status line).
func (t *stepTable) rowText(row int) []string {
	if t.res == nil || row < 0 || row >= len(t.res.Steps) {
		return nil
	}
	out := make([]string, 0, len(stepColumns)-1)
	for _, c := range stepColumns[1:] {
		out = append(out, c.text(t.res.Steps[row]))
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
