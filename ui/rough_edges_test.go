package ui

import (
	"context"
	"errors"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/theme"

	"tapersweep/analysis"
	"tapersweep/models"
)

// Each test here keeps one rough edge a tester saw in the window from coming back.

// The step table: no heading overlaps the next column (each column is at least as wide as its
// widest heading line and its widest cell), and the colour, number and file stay put while the
// figures scroll.
func TestStepTableColumnsFitTheirHeadings(t *testing.T) {
	w := openDemo(t)
	if got := w.table.table.StickyColumnCount; got != frozenColumns {
		t.Errorf("%d columns frozen, want %d", got, frozenColumns)
	}
	for i, c := range stepColumns {
		if c.text == nil {
			continue
		}
		widest := float32(0)
		for _, line := range strings.Split(c.head, "\n") {
			widest = max(widest, fyne.MeasureText(line, theme.TextSize(), fyne.TextStyle{Bold: true}).Width)
		}
		for _, st := range w.res.Steps {
			widest = max(widest, fyne.MeasureText(c.text(st), theme.TextSize(), fyne.TextStyle{}).Width)
		}
		// The label's own padding on both sides must fit too.
		if got := columnWidth(w.table, i); got < widest+2*theme.InnerPadding() {
			t.Errorf("column %q is %.0f wide, its text needs %.0f", strings.ReplaceAll(c.head, "\n", " "), got, widest+2*theme.InnerPadding())
		}
	}
}

// columnWidth is the width the table was given for column col.
func columnWidth(t *stepTable, col int) float32 { return t.widths[col] }

// The cut's position slider is labelled and usable only while the canal is cut open.
func TestCutSliderFollowsCutOpen(t *testing.T) {
	w := openDemo(t)
	c := w.controls
	if !c.clipOffset.Disabled() {
		t.Error("the cut's slider is active with the cut off")
	}
	test.Tap(c.clip)
	w.wait()
	if c.clipOffset.Disabled() || !w.view.input().opt.Clip {
		t.Error("cutting open did not enable the slider or reach the view")
	}
	test.Tap(c.clip)
	if !c.clipOffset.Disabled() {
		t.Error("the cut's slider stayed active after the cut was closed")
	}
	if c.clipLabel.Text == "" {
		t.Error("the cut's slider has no label")
	}
}

// A tap on a list that is not on a window is ignored instead of opening a pop-up without a
// canvas (which crashed in the toolkit's pop-up menu).
func TestListIgnoresTapsOffCanvas(t *testing.T) {
	test.NewApp()
	s := newSelectList([]string{"side", "edge"}, nil)
	s.Tapped(&fyne.PointEvent{})
	s.TypedKey(&fyne.KeyEvent{Name: fyne.KeyDown})
}

// After a load that fails the canal panel says so and shows the canal still open; it never
// stays on "measuring".
func TestFailedLoadIsStatedInTheCanalPanel(t *testing.T) {
	w := openDemo(t)
	w.loadCanal("broken.stl", false, func(ctx context.Context, progress func(string, int64, int64)) (*analysis.Canal, error) {
		return nil, errors.New("broken.stl: 3 bytes is not an STL")
	})
	w.wait()
	for _, o := range w.win.Canvas().Overlays().List() {
		w.win.Canvas().Overlays().Remove(o)
	}
	text := w.summary.text.Text
	if strings.Contains(text, "measuring") || !strings.Contains(text, "broken.stl could not be opened") || w.canal != demoCanal {
		t.Errorf("after a failed load the canal panel says %q", text)
	}
}

// The editor's fields are seen whole: it asks for no more height than a short window gives it.
func TestEditorFitsWithoutScrolling(t *testing.T) {
	w := openDemo(t)
	if h := w.editor.box.MinSize().Height; h > 300 {
		t.Errorf("the editor needs %.0f units of height", h)
	}
}

// The plan form names each weight beside its own field and counts files in words.
func TestPlanFormWordsItsFields(t *testing.T) {
	w := openDemo(t)
	openPlanForm(t, w)
	for _, name := range []string{"engaged length", "torque", "fatigue use"} {
		if top := w.win.Canvas().Overlays().Top(); top == nil || !containsText(top, name) {
			t.Errorf("the form has no label %q", name)
		}
	}
	if files(1) != "1 file" || files(3) != "3 files" {
		t.Errorf("files(1) = %q, files(3) = %q", files(1), files(3))
	}
}

// A click on the wall adds the cross-section at that level.
func TestClickOnTheCanalPicksASection(t *testing.T) {
	w := openDemo(t)
	frame := w.view.snapshot()
	for y := frame.Rect.Dy() / 3; y < frame.Rect.Dy()*2/3; y += 5 {
		for x := legendMargin; x < frame.Rect.Dx(); x += 3 {
			if !isDepthColour(frame, x, y) {
				continue
			}
			w.view.Tapped(&fyne.PointEvent{Position: fyne.NewPos(float32(x), float32(y))})
			w.wait()
			if w.sections.picked < 0 || w.sections.picked > w.canal.Line.Length() {
				t.Fatalf("a click on the wall at (%d, %d) picked level %v", x, y, w.sections.picked)
			}
			return
		}
	}
	t.Fatal("no wall pixel to click")
}

// At the two usual screen sizes the 3D view is clearly the largest part of the window (half
// as large again as any other), and the table shows every step of the demo without scrolling.
func TestLayoutGivesTheViewTheRoomAndTheTableEveryStep(t *testing.T) {
	w := openDemo(t)
	for _, size := range []fyne.Size{fyne.NewSize(1280, 800), fyne.NewSize(1440, 900)} {
		// A size of its own first: the test driver lays the window out again only on a change.
		w.win.Resize(fyne.NewSize(1000, 700))
		w.win.Resize(size)
		w.wait()
		area := func(o fyne.CanvasObject) float32 { s := o.Size(); return s.Width * s.Height }
		view := area(w.view)
		// The table counts with the rows it fills (the space under them is free).
		table := w.table.table.Size().Width * min(w.table.table.Size().Height, w.table.fullHeight())
		for name, a := range map[string]float32{"cross-sections": area(w.sections.raster),
			"profiles": area(w.profiles.raster), "table": table, "editor": area(w.editor.box)} {
			if a*1.5 > view {
				t.Errorf("%v: the %s take %.0f units², the 3D view %.0f", size, name, a, view)
			}
		}
		need := headerHeight() + float32(len(w.res.Steps))*rowHeight()
		if h := w.table.table.Size().Height; h < need {
			t.Errorf("%v: the table is %.0f high, its %d steps need %.0f", size, h, len(w.res.Steps), need)
		}
		t.Logf("%v: view %v, sections %v, table %v", size, w.view.Size(), w.sections.raster.Size(), w.table.table.Size())
	}
}

// The canal panel states the tightest bend's radius, place and the Schneider angle with their
// bands. A canal whose bend is long and gentle (r 25 mm over 12 degrees: the line cannot say
// where on the arc it bends most) gets a warning, and the table marks the figures that rest on
// the bend; the demo's narrow bands get neither.
func TestCanalPanelStatesBandsAndTableMarksWhatInheritsAWideOne(t *testing.T) {
	w := openDemo(t)
	s := w.canal.Summary(false)
	text := w.summary.text.Text
	for _, want := range []string{s.RadiusText(), s.PlaceText(), s.SchneiderText()} {
		if !strings.Contains(text, want) {
			t.Errorf("the canal panel %q lacks %q", text, want)
		}
	}
	strain := tableColumn("strain_at_max_curvature_pct")
	if strings.Contains(text, "inherit") || strings.HasSuffix(w.table.rowText(2)[strain], bendMark) {
		t.Errorf("the demo's narrow bands are marked as wide: %q / %v", text, w.table.rowText(2))
	}

	spec, err := models.ParseCanalSpec("gentle", []byte(`{"name": "gentle (invented)",
		"segments": [{"kind": "straight", "length": 6}, {"kind": "arc", "radius": 25, "angle": 12},
		{"kind": "straight", "length": 4}], "orifice_d": 1.0, "apical_d": 0.3, "working_length": 15}`))
	if err != nil {
		t.Fatal(err)
	}
	c, err := analysis.CanalFromSpec(context.Background(), "gentle", spec, analysis.CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	w.setCanal(c)
	w.wait()
	text = w.summary.text.Text
	if !strings.Contains(text, "⚠ The file's diameter, strain and fatigue use at the bend inherit") ||
		!strings.Contains(text, "does not pin the place of the tightest bend") {
		t.Errorf("a wide band of the bend's place is not warned of: %q", text)
	}
	for row := range w.res.Steps {
		if got := w.table.rowText(row)[strain]; got != "–" && !strings.HasSuffix(got, bendMark) {
			t.Errorf("row %d: strain at the bend %q is not marked", row+1, got)
		}
	}
}
