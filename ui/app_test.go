package ui

import (
	"context"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"
	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/models"
)

var (
	demoCanalOnce sync.Once
	demoCanal     *analysis.Canal
)

// openDemo opens the window on the demo canal and sequence and waits until it is drawn. The
// first call measures the canal the way start-up does; later ones reuse it (a canal is
// immutable) to keep the tests quick.
func openDemo(t *testing.T) *mainWindow {
	t.Helper()
	a := test.NewApp()
	t.Cleanup(a.Quit)
	w := newMainWindow(a, queuedHandOver())
	w.win.Resize(fyne.NewSize(1280, 800))
	fresh := false
	demoCanalOnce.Do(func() {
		w.start(Options{})
		w.wait()
		demoCanal, fresh = w.canal, true
	})
	if !fresh && demoCanal != nil {
		seq, err := models.ParseSequence("demo", models.DemoSequenceJSON())
		if err != nil {
			t.Fatal(err)
		}
		w.seq = seq
		w.setCanal(demoCanal)
	}
	w.wait()
	t.Cleanup(w.view.close)
	if w.canal == nil || w.res == nil {
		t.Fatalf("the demo did not load: %s", w.status.Text)
	}
	return w
}

// demoRun is the demo sequence run outside the window, to compare the table against.
func demoRun(t *testing.T, w *mainWindow, edit func(seq *models.Sequence)) *analysis.Result {
	t.Helper()
	seq, err := models.ParseSequence("demo", models.DemoSequenceJSON())
	if err != nil {
		t.Fatal(err)
	}
	if edit != nil {
		edit(seq)
	}
	res, err := analysis.Run(context.Background(), w.canal, seq, analysis.RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func selectRow(w *mainWindow, row int) {
	w.table.table.Select(widget.TableCellID{Row: row, Col: 1})
	w.wait()
}

func TestDemoFillsOneRowPerStep(t *testing.T) {
	w := openDemo(t)
	want := demoRun(t, w, nil)
	rows, cols := w.table.table.Length()
	if rows != len(want.Steps) || cols != len(stepColumns) {
		t.Fatalf("table is %d x %d, want %d rows (one per demo step) x %d columns", rows, cols, len(want.Steps), len(stepColumns))
	}
	for i, st := range want.Steps {
		row := w.table.rowText(i)
		// The label is the trade's size/taper notation of the demo file.
		if row[1] != st.Step.Instrument.Label() {
			t.Errorf("row %d shows file %q, want %q", i+1, row[1], st.Step.Instrument.Label())
		}
		if got, wantArea := row[5], strings.TrimSpace(stepColumns[6].text(st)); got != wantArea {
			t.Errorf("row %d shows engaged area %q, the same run outside the window gives %q", i+1, got, wantArea)
		}
	}
	if w.selected < 1 || w.res.Steps[w.selected-1].Metrics.EngagedAreaMM2 <= 0 {
		t.Errorf("the window opens on step %d, which shows no contact", w.selected)
	}
	if !strings.Contains(aboutText(), analysis.Caution) {
		t.Error("the About box lacks the safety wording")
	}
}

func TestEditingATaperRerunsAndChangesThatRow(t *testing.T) {
	w := openDemo(t)
	selectRow(w, 1) // step 2, 20/.04
	before := w.res
	oldRow := w.table.rowText(1)
	test.Type(w.editor.taper, "") // focus like a user would; the text is set below
	w.editor.taper.SetText("0.06")
	w.wait()
	if w.res == before {
		t.Fatal("changing the taper did not re-run the analysis")
	}
	row := w.table.rowText(1)
	if row[1] != "20/.06" {
		t.Fatalf("row 2 shows %q after the taper became 0.06, want 20/.06", row[1])
	}
	want := demoRun(t, w, func(seq *models.Sequence) { seq.Steps[1].Instrument.Taper = 0.06 })
	if got, exp := w.res.Steps[1].Metrics.EngagedAreaMM2, want.Steps[1].Metrics.EngagedAreaMM2; got != exp {
		t.Errorf("engaged area of the edited step %v, the same edit run outside the window gives %v", got, exp)
	}
	// A wider file at the same depth reaches more wall: its engaged length cannot shrink.
	if w.res.Steps[1].Metrics.EngagedLengthMM < before.Steps[1].Metrics.EngagedLengthMM {
		t.Errorf("engaged length fell from %v to %v with a larger taper", before.Steps[1].Metrics.EngagedLengthMM, w.res.Steps[1].Metrics.EngagedLengthMM)
	}
	if strings.Join(row, "|") == strings.Join(oldRow, "|") {
		t.Error("the row did not change")
	}
	if w.table.rowText(0)[1] != "15/.02" {
		t.Errorf("row 1 changed too: %v", w.table.rowText(0))
	}
}

func TestInvalidEntryShowsErrorAtFieldAndKeepsLastAnalysis(t *testing.T) {
	w := openDemo(t)
	selectRow(w, 2)
	kept := w.res
	keptRow := strings.Join(w.table.rowText(2), "|")
	cases := []struct {
		entry *widget.Entry
		field string
		text  string
		says  string
	}{
		{w.editor.taper, fieldTaper, "abc", "not a number"},
		{w.editor.taper, fieldTaper, "5", "at most"},        // taper beyond the sequence file's range
		{w.editor.depth, fieldDepth, "WL+30", "apical end"}, // past the canal's end
		{w.editor.depth, fieldDepth, "WL*2", "after WL"},    // not a depth
		{w.editor.rpm, fieldRPM, "-300", ""},                // negative speed
		{w.editor.peck, fieldPeck, "", "enter a number"},    // empty
	}
	for _, c := range cases {
		old := c.entry.Text
		c.entry.SetText(c.text)
		w.wait()
		l := w.editor.errs[c.field]
		if !l.Visible() || l.Text == "" || !strings.Contains(l.Text, c.says) {
			t.Errorf("%s = %q: error at the field %q (shown %v), want one saying %q", c.field, c.text, l.Text, l.Visible(), c.says)
		}
		if w.res != kept || strings.Join(w.table.rowText(2), "|") != keptRow {
			t.Errorf("%s = %q replaced the last valid analysis", c.field, c.text)
		}
		for f, other := range w.editor.errs {
			if f != c.field && other.Visible() {
				t.Errorf("%s = %q also shows an error at %s: %q", c.field, c.text, f, other.Text)
			}
		}
		c.entry.SetText(old)
		w.wait()
		if l.Visible() {
			t.Errorf("putting %s back to %q left the error %q", c.field, old, l.Text)
		}
		if strings.Join(w.table.rowText(2), "|") != keptRow {
			t.Errorf("putting %s back to %q gives row %v, want %v", c.field, old, w.table.rowText(2), keptRow)
		}
		kept = w.res
	}
	// The working length is checked too.
	w.summary.wl.SetText("0")
	w.wait()
	if !w.summary.wlErr.Visible() || w.canal.WorkingLength != 17.5 {
		t.Errorf("a working length of 0 was taken (%v) or not flagged", w.canal.WorkingLength)
	}
}

func TestSelectingARowChangesTheViewport(t *testing.T) {
	w := openDemo(t)
	selectRow(w, 0)
	a := w.view.snapshot()
	selectRow(w, 2)
	b := w.view.snapshot()
	if a == nil || b == nil || a.Rect != b.Rect || a.Rect.Dx() < 200 {
		t.Fatalf("no frames of the viewport size: %v %v", a, b)
	}
	diff := 0
	for i := 0; i < len(a.Pix); i += 4 {
		if a.Pix[i] != b.Pix[i] || a.Pix[i+1] != b.Pix[i+1] || a.Pix[i+2] != b.Pix[i+2] {
			diff++
		}
	}
	if total := a.Rect.Dx() * a.Rect.Dy(); diff < total/100 {
		t.Errorf("selecting step 3 after step 1 changed %d of %d pixels", diff, total)
	}
	// Step 3 of the demo cuts a long band: its colours are on the wall, away from the legend.
	if n := depthColourPixels(b, legendMargin); n < 200 {
		t.Errorf("step 3's frame has %d wall pixels in depth-of-cut colours", n)
	}
	if w.view.input().opt.Step != 3 {
		t.Errorf("the viewport shows step %d", w.view.input().opt.Step)
	}
}

func TestInsertionSliderMovesTheFileAndRerunsLive(t *testing.T) {
	w := openDemo(t)
	selectRow(w, 2)
	w.controls.insertion.SetValue(12.0)
	w.wait()
	st := w.res.Steps[2]
	if math.Abs(st.TipDepth-12) > 1e-9 {
		t.Fatalf("tip at %v mm after moving the slider to 12 mm", st.TipDepth)
	}
	if w.editor.depth.Text != "12" {
		t.Errorf("depth field shows %q", w.editor.depth.Text)
	}
	// The file's radius at the station of its tip is its tip radius, d0/2 (ISO 3630-1: size/100 mm).
	i := w.canal.Line.Station(12)
	if r := float64(st.FileRadius[i-1]); math.Abs(r-0.125) > 0.01 {
		t.Errorf("file radius just above the tip %v mm, want about 0.125 for a size 25", r)
	}
}

func TestStepsCanBeAddedRemovedAndMoved(t *testing.T) {
	w := openDemo(t)
	selectRow(w, 1)
	w.editor.add.OnTapped()
	w.wait()
	if n := len(w.res.Steps); n != 5 || w.selected != 3 || w.table.rowText(2)[1] != "20/.04" {
		t.Fatalf("after adding: %d steps, shown %d, row 3 %v", n, w.selected, w.table.rowText(2))
	}
	w.editor.size.SetSelected("30")
	w.wait()
	if got := w.table.rowText(2)[1]; got != "30/.04" {
		t.Errorf("size change gives row %q", got)
	}
	w.editor.up.OnTapped()
	w.wait()
	if w.selected != 2 || w.table.rowText(1)[1] != "30/.04" || w.table.rowText(2)[1] != "20/.04" {
		t.Errorf("moving earlier: shown %d, rows %v / %v", w.selected, w.table.rowText(1), w.table.rowText(2))
	}
	w.editor.remove.OnTapped()
	w.wait()
	if n := len(w.res.Steps); n != 4 || w.table.rowText(1)[1] != "20/.04" {
		t.Errorf("after removing: %d steps, row 2 %v", n, w.table.rowText(1))
	}
}

func TestHoverReadsTheWallUnderThePointer(t *testing.T) {
	w := openDemo(t)
	selectRow(w, 2)
	frame := w.view.snapshot()
	spec := models.DemoCanal()
	found := 0
	for y := frame.Rect.Dy() / 4; y < frame.Rect.Dy()*3/4 && found < 5; y += 7 {
		for x := legendMargin; x < frame.Rect.Dx(); x += 5 {
			if !isDepthColour(frame, x, y) {
				continue
			}
			in := w.view.input()
			p, onFile, ok := pickWall(w.view.built, w.view.renderer, w.canal, x, y)
			if !ok || onFile {
				continue
			}
			text := hoverText(in, w.view.built, w.view.renderer, x, y)
			if !strings.Contains(text, "depth of cut") || !strings.Contains(text, "from the apical end") {
				t.Errorf("hover at a contact pixel says %q", text)
			}
			// The demo has a root: the readout adds the wall to it after the shown step at that
			// place, measured there; it lies within the pictures' map of that step.
			st := w.res.Steps[in.opt.Step-1]
			exact := w.canal.WallAt(st.Prepared, p.S, p.Theta)
			if want := fmt.Sprintf("wall to the root %.2f mm after this step", exact); !strings.Contains(text, want) {
				t.Errorf("hover says %q, want %q", text, want)
			}
			if mapped := w.canal.MapAt(w.res.WallMap(st.Number), p.S, p.Theta); math.Abs(mapped-exact) > 0.05+0.1*exact {
				t.Errorf("wall %.3f mm measured at the place, %.3f in the step's map", exact, mapped)
			}
			// The wall as the step leaves it lies at least as far out as the spec's short
			// semi-axis: D(s)/2 / sqrt(oval) for an area-equivalent ellipse (analytic geometry).
			r := w.canal.MapAt(w.res.Steps[2].Prepared, p.S, p.Theta)
			short := spec.Diameter(p.S) / 2 / math.Sqrt(spec.Oval)
			if r < short*0.9 {
				t.Errorf("radius %v at s=%.2f is inside the canal's short semi-axis %v", r, p.S, short)
			}
			found++
			break
		}
	}
	if found == 0 {
		t.Fatal("no contact pixel could be picked")
	}
}

func TestStaleAnalysisIsDropped(t *testing.T) {
	w := openDemo(t)
	selectRow(w, 2)
	shown := w.res
	stale := w.gen
	w.controls.insertion.SetValue(10) // asks for a newer analysis
	w.wait()
	newer := w.res
	if newer == shown {
		t.Fatal("moving the file did not re-run the analysis")
	}
	// The result of the older request arrives late: it must not replace the newer one.
	if w.deliver(stale, shown, nil) || w.res != newer {
		t.Error("a stale analysis replaced the newer one")
	}
	if !w.deliver(w.gen, newer, nil) {
		t.Error("the current analysis was refused")
	}
}

func TestViewportMouse(t *testing.T) {
	w := openDemo(t)
	v := w.view
	start, _ := v.camera()

	v.MouseDown(&desktop.MouseEvent{Button: desktop.MouseButtonPrimary})
	v.Dragged(&fyne.DragEvent{Dragged: fyne.NewDelta(50, 0)})
	v.DragEnd()
	orbited, _ := v.camera()
	if orbited.Yaw == start.Yaw || orbited.Target != start.Target {
		t.Errorf("a plain drag should orbit: yaw %v -> %v, target %v -> %v", start.Yaw, orbited.Yaw, start.Target, orbited.Target)
	}

	// Right-drag: fyne starts no drag for the secondary button; moves with it held pan.
	v.MouseDown(&desktop.MouseEvent{Button: desktop.MouseButtonSecondary, PointEvent: fyne.PointEvent{Position: fyne.NewPos(100, 100)}})
	v.MouseMoved(&desktop.MouseEvent{Button: desktop.MouseButtonSecondary, PointEvent: fyne.PointEvent{Position: fyne.NewPos(140, 100)}})
	v.MouseUp(&desktop.MouseEvent{Button: desktop.MouseButtonSecondary})
	panned, _ := v.camera()
	if panned.Target == orbited.Target || panned.Yaw != orbited.Yaw {
		t.Errorf("a right-drag should pan: target %v -> %v", orbited.Target, panned.Target)
	}

	// Shift-drag pans as well.
	v.MouseDown(&desktop.MouseEvent{Button: desktop.MouseButtonPrimary, Modifier: fyne.KeyModifierShift})
	v.Dragged(&fyne.DragEvent{Dragged: fyne.NewDelta(0, 30)})
	v.DragEnd()
	shifted, _ := v.camera()
	if shifted.Target == panned.Target || shifted.Yaw != panned.Yaw {
		t.Errorf("a shift-drag should pan: target %v -> %v", panned.Target, shifted.Target)
	}

	v.Scrolled(&fyne.ScrollEvent{Scrolled: fyne.NewDelta(0, 100)})
	zoomed, _ := v.camera()
	if !(zoomed.Distance < shifted.Distance) {
		t.Errorf("scrolling up should come closer: %v -> %v", shifted.Distance, zoomed.Distance)
	}

	v.DoubleTapped(&fyne.PointEvent{})
	w.wait()
	fitted, _ := v.camera()
	if fitted.Distance <= zoomed.Distance {
		t.Errorf("double-click should fit the canal back in: distance %v -> %v", zoomed.Distance, fitted.Distance)
	}
	// Fitted, the whole canal lies in front of the camera within the view's half-height
	// (pinhole projection: |up offset| <= depth * tan(fov/2)).
	lo, hi := w.canal.Mesh.Bounds()
	for _, p := range []mgl64.Vec3{lo, hi} {
		m := fitted.View().Mul4x1(p.Vec4(1))
		if -m[2] <= 0 || math.Abs(m[1]) > -m[2]*math.Tan(fitted.FovY/2)*1.001 {
			t.Errorf("corner %v falls outside the fitted view (camera coordinates %v)", p, m)
		}
	}
}

func TestOpeningFilesByPath(t *testing.T) {
	w := openDemo(t)
	// A canal surface: 8 mm straight, 20 degrees on a 5 mm radius, 2 mm straight; its centerline
	// is 8 + 5*pi/9 + 2 = 11.745 mm long (arc length of a circle).
	stl, err := filepath.Abs("../testdata/curve_20deg_r5.stl")
	if err != nil {
		t.Fatal(err)
	}
	w.openPath(stl)
	w.wait()
	want := 8 + 5*math.Pi/9 + 2
	if w.canal == demoCanal || math.Abs(w.canal.Line.Length()-want) > 0.15 {
		t.Fatalf("after opening %s the canal is %.3f mm long, want about %.3f (status: %s)", stl, w.canal.Line.Length(), want, w.status.Text)
	}
	if w.res == nil || len(w.res.Steps) != 4 || math.Abs(w.res.Steps[0].TipDepth-w.canal.WorkingLength) > 1e-9 {
		t.Fatalf("the demo sequence did not run through the new canal: %s", w.status.Text)
	}
	if r := w.recent(); len(r) == 0 || r[0] != stl {
		t.Errorf("recent files %v do not start with %s", r, stl)
	}

	dir := t.TempDir()
	good := filepath.Join(dir, "two.json")
	writeFile(t, good, `{"steps": [{"size": 15, "taper": 0.02, "depth": "WL"}, {"size": 20, "taper": 0.06, "depth": "WL-1"}]}`)
	w.openPath(good)
	w.wait()
	if rows, _ := w.table.table.Length(); rows != 2 || w.table.rowText(1)[1] != "20/.06" {
		t.Fatalf("after opening a two-step sequence the table has %d rows", rows)
	}
	bad := filepath.Join(dir, "bad.json")
	writeFile(t, bad, `{"steps": [{"size": 15, "taper": 0.02, "depth": "WL", "speed": 3}]}`)
	kept := w.seq
	w.openPath(bad)
	w.wait()
	if w.seq != kept || !strings.Contains(w.status.Text, "bad.json") || !strings.Contains(w.status.Text, "speed") {
		t.Errorf("a sequence with an unknown field: status %q, sequence replaced %v", w.status.Text, w.seq != kept)
	}
}

func writeFile(t *testing.T, path, text string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

func TestCancelledLoadKeepsTheCanal(t *testing.T) {
	w := openDemo(t)
	started := make(chan struct{})
	w.loadCanal("slow.stl", true, func(ctx context.Context, progress func(string, int64, int64)) (*analysis.Canal, error) {
		progress("reading", 50, 100)
		close(started)
		<-ctx.Done() // a long centerline that honours cancel
		return nil, ctx.Err()
	})
	<-started
	if w.loader == nil {
		t.Fatal("no progress dialog while loading")
	}
	w.loader.cancel()
	w.wait()
	if w.canal != demoCanal || w.res == nil {
		t.Error("cancelling a load lost the canal shown before")
	}
	if w.loader != nil {
		t.Error("the progress dialog stayed after cancel")
	}
}

func TestAboutAndAdviceShowTheirText(t *testing.T) {
	w := openDemo(t)
	w.showAbout()
	if top := w.win.Canvas().Overlays().Top(); top == nil || !containsText(top, "not a guarantee against file separation") {
		t.Error("the About box does not carry the safety wording")
	}
	w.win.Canvas().Overlays().Remove(w.win.Canvas().Overlays().Top())
	row := -1
	for i, st := range w.res.Steps {
		if len(st.Metrics.Advice) > 0 {
			row = i
			break
		}
	}
	if row < 0 {
		t.Skip("no demo step draws advice")
	}
	w.table.table.Select(widget.TableCellID{Row: row, Col: adviceColumn})
	w.wait()
	text := w.res.Steps[row].Metrics.Advice[0].Text
	if top := w.win.Canvas().Overlays().Top(); top == nil || !containsText(top, text) {
		t.Errorf("tapping the advice marker of step %d does not show %q", row+1, text)
	}
}

// containsText looks for s in the labels under o.
func containsText(o fyne.CanvasObject, s string) bool {
	switch x := o.(type) {
	case *widget.Label:
		return strings.Contains(x.Text, s)
	case *fyne.Container:
		for _, c := range x.Objects {
			if containsText(c, s) {
				return true
			}
		}
	case fyne.Widget:
		r := test.WidgetRenderer(x)
		for _, c := range r.Objects() {
			if containsText(c, s) {
				return true
			}
		}
	}
	return false
}
