package ui

import (
	"fmt"
	"image/color"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/ui/scene"
)

// stepColumn is one column of the step table: a heading of one or two lines and the cell's
// text. Widths come from the heading and the widest cell, so no heading overlaps the next.
type stepColumn struct {
	head string
	key  string // the figure's key in analysis's columns ("" for the swatch, number, file, advice)
	text func(st *analysis.StepResult) string
}

// adviceColumn is the column of the advice marker: a tap on it opens the step's advice.
const adviceColumn = 3

// frozenColumns stay in place while the others scroll: the colour, the number and the file.
const frozenColumns = 3

// The figures with the headings and decimals of analysis's step columns, as every output.
var stepColumns = []stepColumn{
	{"", "", nil}, // ISO colour swatch
	{"#", "", func(st *analysis.StepResult) string { return fmt.Sprint(st.Number) }},
	{"file", "", func(st *analysis.StepResult) string { return st.Metrics.Label }},
	// Advice sits beside the file's name, where it is seen without scrolling the table.
	{"advice", "", func(st *analysis.StepResult) string {
		if n := len(st.Metrics.Advice); n > 0 {
			return fmt.Sprintf("⚠ %d", n)
		}
		return ""
	}},
	metricColumn("tip_depth_mm"),
	metricColumn("engaged_length_mm"),
	metricColumn("engaged_area_mm2"),
	// Where the shank (past the flutes) rubs the wall: it cuts nothing, but it is contact.
	metricColumn("shank_contact_mm"),
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
	// Signed: toward the inner (+) or outer (-) side of the main curve.
	metricColumn("transportation_in_plane_1_mm"),
	metricColumn("centering_ratio_1"),
}

// metricColumn shows one of the step figures analysis describes, as every output shows it.
func metricColumn(key string) stepColumn {
	c := analysis.PickColumns(key)[0]
	return stepColumn{c.Heading, key, func(st *analysis.StepResult) string {
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
	// markBend marks the figures that rest on the tightest bend, when the canal's band there
	// is wide (bendMark).
	markBend bool

	OnSelect func(step int)                // a row was chosen (step from 1)
	OnAdvice func(st *analysis.StepResult) // the advice marker was tapped
}

// shownRows is how many steps the table shows without scrolling: the demo's and a usual
// sequence's.
const shownRows = 6

// cellPad is the padding above and below a cell's text: less than a label's, so the rows of a
// usual sequence are seen at once in a short window.
const cellPad = 4

func newStepTable() *stepTable {
	t := &stepTable{}
	t.table = widget.NewTable(t.size, t.create, t.update)
	t.table.ShowHeaderRow = true
	t.table.StickyColumnCount = frozenColumns
	t.table.CreateHeader = func() fyne.CanvasObject {
		line := func() *canvas.Text {
			l := canvas.NewText("", theme.Color(theme.ColorNameForeground))
			l.TextStyle = fyne.TextStyle{Bold: true}
			return l
		}
		return container.New(layout.NewCustomPaddedLayout(cellPad, cellPad, theme.InnerPadding(), theme.InnerPadding()),
			container.New(layout.NewCustomPaddedVBoxLayout(0), line(), line()))
	}
	t.table.UpdateHeader = func(id widget.TableCellID, o fyne.CanvasObject) {
		if id.Col < 0 || id.Col >= len(stepColumns) {
			return
		}
		lines := o.(*fyne.Container).Objects[0].(*fyne.Container).Objects
		head := strings.SplitN(stepColumns[id.Col].head, "\n", 2)
		for k, l := range lines {
			txt := l.(*canvas.Text)
			txt.Text = ""
			if k < len(head) {
				txt.Text = head[k]
			}
			txt.Color = theme.Color(theme.ColorNameForeground)
			txt.Refresh()
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
				w = max(w, textW(t.cellText(i, st), false))
			}
		}
		if i == 0 {
			w = 8 // the colour swatch
		}
		t.widths = append(t.widths[:i], w+pad)
		t.table.SetColumnWidth(i, w+pad)
	}
}

// rowHeight and headerHeight are the heights of a row of figures and of the two-line header.
func rowHeight() float32 {
	return fyne.MeasureText("0", theme.TextSize(), fyne.TextStyle{}).Height + 2*cellPad
}

func headerHeight() float32 {
	return 2*fyne.MeasureText("0", theme.TextSize(), fyne.TextStyle{Bold: true}).Height + 2*cellPad
}

// fullHeight is the height the table needs to show every row without scrolling (up to
// shownRows; a longer sequence scrolls), with room for the horizontal scroll bar, which the
// toolkit draws in the padding under the last row.
func (t *stepTable) fullHeight() float32 {
	rows, _ := t.size()
	rows = max(2, min(rows, shownRows))
	return headerHeight() + float32(rows)*(rowHeight()+theme.Padding()) + 2*theme.Padding()
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
	txt := canvas.NewText("", theme.Color(theme.ColorNameForeground))
	return container.NewStack(container.NewPadded(sw),
		container.New(layout.NewCustomPaddedLayout(cellPad, cellPad, theme.InnerPadding(), theme.InnerPadding()), txt))
}

func (t *stepTable) update(id widget.TableCellID, o fyne.CanvasObject) {
	stack := o.(*fyne.Container)
	sw := stack.Objects[0].(*fyne.Container).Objects[0].(*canvas.Rectangle)
	txt := stack.Objects[1].(*fyne.Container).Objects[0].(*canvas.Text)
	if t.res == nil || id.Row >= len(t.res.Steps) {
		return
	}
	st := t.res.Steps[id.Row]
	if id.Col == 0 {
		// The file's ISO size colour: here and as a band at its handle end, nowhere else.
		sw.FillColor = scene.FileColor(st.Step.Instrument.Size)
		sw.Show()
		txt.Text = ""
		txt.Refresh()
		sw.Refresh()
		return
	}
	sw.Hide()
	txt.Text = t.cellText(id.Col, st)
	txt.Color = theme.Color(theme.ColorNameForeground)
	txt.Refresh()
}

// cellText is column col of step st as the table shows it: a figure that rests on a tightest
// bend the scan does not pin down carries bendMark.
func (t *stepTable) cellText(col int, st *analysis.StepResult) string {
	c := stepColumns[col]
	s := c.text(st)
	if t.markBend && c.key != "" && s != "–" && analysis.RestsOnTightestBend(c.key) {
		s += bendMark
	}
	return s
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
		t.markBend = res != nil && res.Canal != nil && res.Canal.BendUncertain()
		t.fitColumns()
		rows, _ := t.size()
		for i := 0; i < rows; i++ {
			t.table.SetRowHeight(i, rowHeight())
		}
		t.table.SetRowHeight(-1, headerHeight())
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
	for i := 1; i < len(stepColumns); i++ {
		out = append(out, t.cellText(i, t.res.Steps[row]))
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
