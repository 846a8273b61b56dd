// Package ui is the tapersweep window: a canal, a sequence and its numbers explored together.
// It builds on analysis for the numbers and ui/scene + ui/render for the picture; only
// cmd/tapersweep creates the fyne application.
//
// Threading: the window's state lives on the UI goroutine. Long work (measuring a canal,
// running a sequence, drawing frames) runs in goroutines that hand results back through
// fyne.Do; each analysis carries a generation number and results of an older one are dropped.
package ui

import (
	"context"
	"errors"
	"fmt"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/mesh"
	"tapersweep/models"
	"tapersweep/ui/scene"
)

// Options say what the window opens with. Empty paths mean the built-in demo.
type Options struct {
	CanalPath    string
	SequencePath string
	Scale        float64      // multiplies STL coordinates (0.001 for micrometres); 0 = 1
	Scan         *ScanOptions // a scan to open in its own window (scan_window.go)
}

// Open builds the main window on app a and shows it. The canal and sequence are measured and
// run in the background; the window is usable at once.
func Open(a fyne.App, opt Options) fyne.Window {
	useSafeFileWriter()
	w := newMainWindow(a, &handOver{})
	w.win.Show()
	w.start(opt)
	if opt.Scan != nil {
		w.openScanPath(*opt.Scan)
	}
	return w.win
}

// mainWindow is the window and what it shows. It owns the state (canal, sequence, run, shown
// step); each panel shows what it is given (show...) and reports what the user did through
// its On... callbacks, in the manner of fyne's own widgets.
type mainWindow struct {
	app fyne.App
	win fyne.Window

	canal    *analysis.Canal
	seq      *models.Sequence // the last valid sequence
	res      *analysis.Result // seq run through canal; nil until a run succeeds
	selected int              // step shown, from 1; 0 shows the canal alone
	// others are the other canals found in the same scan, drawn around the shown one.
	others []*mesh.Mesh
	scale  float64 // STL units to mm for canals opened from the command line

	gen       uint64 // generation of the latest analysis asked for
	cancelRun context.CancelFunc
	ui        *handOver // hands results from goroutines to the UI goroutine

	view     *viewport
	table    *stepTable
	editor   *stepEditor
	summary  *canalPanel
	profiles *profilePanel
	sections *sectionPanel
	path     *pathPanel
	planning *planRun // the plan being proposed or shown; nil when none
	controls *viewControls
	status   *widget.Label
	hover    *widget.Label
	// tableTitle names the table and the contact threshold its engaged figures count from.
	tableTitle *widget.Label
	loader     *loadProgress
	// scanPatient names the patient on saved reports, set only while a scan window's switch
	// asks for it (by default nothing names the patient).
	scanPatient string
}

func newMainWindow(a fyne.App, ui *handOver) *mainWindow {
	w := &mainWindow{app: a, win: a.NewWindow("tapersweep"), ui: ui}
	w.win.Resize(fyne.NewSize(1280, 800))
	w.status = widget.NewLabel("Measuring the canal…")
	w.status.Truncation = fyne.TextTruncateEllipsis
	w.hover = widget.NewLabel("")
	w.hover.Truncation = fyne.TextTruncateEllipsis

	w.view = newViewport(w.ui)
	w.view.onHover = func(text string) {
		if text == "" {
			text = "Point at the wall to read the depth of cut, the distance from the apical end and the canal radius; click it to show its cross-section."
		}
		w.hover.SetText(text)
	}
	w.view.onError = func(err error) { w.setStatus("Cannot draw: " + err.Error()) }
	w.view.onPick = func(fromApex float64) { w.sections.pick(fromApex) }
	w.view.onHover("")

	w.table = newStepTable()
	w.table.OnSelect = w.selectStep
	w.table.OnAdvice = w.showAdvice
	w.editor = newStepEditor()
	w.editor.OnEdit = w.editStep
	w.editor.OnSteps = w.changeSteps
	w.summary = newCanalPanel()
	w.summary.OnWorkingLength = w.setWorkingLength
	w.profiles = newProfilePanel()
	w.sections = newSectionPanel()
	w.controls = newViewControls()
	w.controls.OnChanged = func() { w.showScene(false) }
	w.controls.OnView = w.view.aim
	w.controls.OnFit = w.view.fit
	w.controls.OnTip = w.moveTip
	w.path = newPathPanel()
	w.path.OnModel = w.setPathModel
	w.sections.withBelow(w.controls.fixed)

	// Left: the controls, the 3D view with the cross-sections beside it (the canal stands
	// upright, so the view needs height more than width), the profiles under both. The 3D
	// view is the largest part of the window.
	pictures := container.NewHSplit(w.view, w.sections.box)
	pictures.Offset = 0.64
	left := container.NewBorder(w.controls.box, container.NewVBox(w.profiles.raster, w.hover), nil, nil, pictures)
	// Right: the canal and the path model on top, the editor under the table at its full
	// height; the table takes the rest, at least the height of every step of a usual
	// sequence, and scrolls sideways with its first columns frozen.
	w.tableTitle = sectionTitle("Files in the sequence")
	w.tableTitle.Truncation = fyne.TextTruncateEllipsis
	top := container.NewVBox(w.summary.box, widget.NewSeparator(), w.path.box,
		container.NewBorder(nil, nil, nil, widget.NewButton("Propose a sequence…", w.proposeDialog), w.tableTitle))
	right := container.NewBorder(top, w.editor.box, nil, nil, container.New(&atLeast{height: w.table.fullHeight}, w.table.table))
	split := container.NewHSplit(left, right)
	split.Offset = 0.58
	w.win.SetContent(container.NewBorder(nil, w.status, nil, nil, split))
	w.win.SetMainMenu(w.menu())
	w.win.SetOnDropped(w.dropped)
	w.win.SetCloseIntercept(func() {
		w.view.close()
		w.win.Close()
	})
	return w
}

// fillArea lays each object over the whole area (as fyne's stack layout does); the layouts below
// embed it and differ only in the size they ask for.
type fillArea struct{}

func (fillArea) Layout(objs []fyne.CanvasObject, size fyne.Size) {
	for _, o := range objs {
		o.Move(fyne.NewPos(0, 0))
		o.Resize(size)
	}
}

// atLeast lays its one object over its whole area and asks for at least height() of it.
type atLeast struct {
	fillArea
	height func() float32
}

func (l *atLeast) MinSize(objs []fyne.CanvasObject) fyne.Size {
	var s fyne.Size
	for _, o := range objs {
		s = s.Max(o.MinSize())
	}
	s.Height = max(s.Height, l.height())
	return s
}

// atMost lays its one object (a scroll) over its whole area and asks for the height of the
// scroll's content, up to height.
type atMost struct {
	fillArea
	height float32
}

func (l *atMost) MinSize(objs []fyne.CanvasObject) fyne.Size {
	var s fyne.Size
	for _, o := range objs {
		m := o.MinSize()
		if sc, ok := o.(*container.Scroll); ok && sc.Content != nil {
			m.Height = max(m.Height, sc.Content.MinSize().Height)
		}
		s = s.Max(m)
	}
	s.Height = min(s.Height, l.height)
	return s
}

func sectionTitle(s string) *widget.Label {
	l := widget.NewLabel(s)
	l.TextStyle = fyne.TextStyle{Bold: true}
	return l
}

// shownStep is the step shown: its number (from 1; 0 when none), its definition in the last
// valid sequence (nil when none) and its result in the last run (nil while none is in).
func (w *mainWindow) shownStep() (int, *models.Step, *analysis.StepResult) {
	if w.seq == nil || w.selected < 1 || w.selected > len(w.seq.Steps) {
		return 0, nil, nil
	}
	var st *analysis.StepResult
	if w.res != nil && w.selected <= len(w.res.Steps) {
		st = w.res.Steps[w.selected-1]
	}
	return w.selected, &w.seq.Steps[w.selected-1], st
}

// showStepState hands every panel that follows the shown step what it shows.
func (w *mainWindow) showStepState() {
	n, step, st := w.shownStep()
	w.table.show(w.res, n)
	w.editor.show(w.seq, n, st)
	depth, ok := 0.0, false
	if step != nil && w.canal != nil {
		depth, ok = step.Depth.Resolve(w.canal.WorkingLength), true
	}
	w.controls.showStep(depth, ok)
	w.profiles.show(w.canal, st)
	w.sections.show(w.canal, w.res, n, w.controls.fixedScale())
}

// start measures the canal and runs the sequence the window opens with.
func (w *mainWindow) start(opt Options) {
	seq, err := startSequence(opt.SequencePath)
	if err != nil {
		// The demo sequence stands in; the error stays on screen until dismissed.
		dialog.ShowError(fmt.Errorf("%w\n\nThe demo sequence is shown instead.", err), w.win)
		seq, _ = models.ParseSequence("demo sequence (invented)", models.DemoSequenceJSON())
	}
	w.seq = seq
	w.path.show(seq.PathModel, nil)
	w.showStepState()
	if opt.CanalPath == "" {
		w.loadCanal("demo canal (invented)", false, func(ctx context.Context, progress func(string, int64, int64)) (*analysis.Canal, error) {
			c, err := analysis.CanalFromSpec(ctx, "demo", models.DemoCanal(), analysis.CanalOptions{})
			if err == nil && c.Name == "" {
				c.Name = "demo canal (invented)"
			}
			return c, err
		})
		return
	}
	w.scale = opt.Scale
	w.loadCanalPath(opt.CanalPath)
}

func startSequence(path string) (*models.Sequence, error) {
	if path == "" {
		return models.ParseSequence("demo sequence (invented)", models.DemoSequenceJSON())
	}
	return models.LoadSequence(path)
}

func (w *mainWindow) setStatus(s string) { w.status.SetText(s) }

// setCanal takes a newly measured canal: the sequence is run through it.
func (w *mainWindow) setCanal(c *analysis.Canal) {
	w.canal = c
	w.res = nil
	w.summary.show(c)
	w.controls.showCanal(c)
	w.showStepState()
	w.showScene(true)
	w.rerun()
}

// rerun starts an analysis of the current sequence; an older one still running is cancelled
// and its result, should it arrive, dropped.
func (w *mainWindow) rerun() {
	if w.canal == nil || w.seq == nil {
		return
	}
	if w.cancelRun != nil {
		w.cancelRun()
	}
	w.gen++
	gen := w.gen
	ctx, cancel := context.WithCancel(context.Background())
	w.cancelRun = cancel
	c, seq := w.canal, w.seq
	w.ui.spawn(func() {
		res, err := analysis.Run(ctx, c, seq, analysis.RunOptions{})
		w.ui.postAndWait(func() { w.deliver(gen, res, err) })
	})
}

// deliver takes the result of analysis number gen, unless a newer one has been asked for.
func (w *mainWindow) deliver(gen uint64, res *analysis.Result, err error) bool {
	if gen != w.gen || errors.Is(err, context.Canceled) {
		return false
	}
	w.runDone(res, err)
	return true
}

// runDone takes a finished analysis.
func (w *mainWindow) runDone(res *analysis.Result, err error) {
	if err != nil {
		w.setStatus("The sequence cannot run in this canal: " + err.Error())
		w.editor.showError(err, w.selected)
		return
	}
	first := w.res == nil
	w.res = res
	if w.selected > len(res.Steps) {
		w.selected = len(res.Steps)
	}
	if first && w.selected == 0 {
		w.selected = mostEngagedStep(res)
	}
	w.path.show(w.seq.PathModel, res)
	w.tableTitle.SetText(fmt.Sprintf("Files in the sequence · engaged: cut past %g mm", res.Options.ContactThreshold))
	w.showStepState()
	w.showScene(first) // the first run brings the file: fit it in
	w.setStatus(runStatus(res))
}

// mostEngagedStep is the step that engages the most wall: the one to open with, so a
// first-time user sees contact at once.
func mostEngagedStep(res *analysis.Result) int {
	best, area := 0, -1.0
	for _, st := range res.Steps {
		if st.Metrics.EngagedAreaMM2 > area {
			best, area = st.Number, st.Metrics.EngagedAreaMM2
		}
	}
	return best
}

func runStatus(res *analysis.Result) string {
	s := fmt.Sprintf("%d steps analysed in %s.", len(res.Steps), models.Printable(res.Canal.Name, models.MaxNameRunes))
	if len(res.Warnings) > 0 {
		s += " " + models.Printable(res.Warnings[0], models.MaxMessageRunes)
	}
	return s
}

// selectStep shows step n (from 1; 0 = the canal alone).
func (w *mainWindow) selectStep(n int) {
	if n < 0 || w.seq == nil || n > len(w.seq.Steps) || n == w.selected {
		return
	}
	w.selected = n
	w.showStepState()
	w.showScene(false)
}

// showScene hands the viewport what to draw now.
func (w *mainWindow) showScene(aim bool) {
	if w.canal == nil {
		return
	}
	opt := w.controls.sceneOptions()
	opt.Others = w.others
	w.sections.setFixedScale(opt.FixedScale)
	res := w.res
	if res == nil || w.selected > len(res.Steps) {
		opt.Step = 0
		res = nil
	} else {
		opt.Step = w.selected
	}
	w.view.setScene(sceneInput{canal: w.canal, res: res, opt: opt}, aim)
}

// trySequence takes an edited sequence if it is valid for the canal and re-runs the analysis;
// otherwise it returns the error and keeps the last valid one. The sequence is checked as it
// stands (no trip through its file format on every keystroke).
func (w *mainWindow) trySequence(cand *models.Sequence) error {
	if err := cand.Validate(); err != nil {
		return err
	}
	if w.canal != nil {
		if err := cand.CheckDepths(w.canal.Line.Length(), w.canal.WorkingLength); err != nil {
			return err
		}
	}
	w.seq = cand
	w.rerun()
	return nil
}

// editStep takes the shown step as the editor has it.
func (w *mainWindow) editStep(st models.Step) error {
	n, _, _ := w.shownStep()
	if n == 0 {
		return nil
	}
	cand := copySequence(w.seq)
	cand.Steps[n-1] = st
	if err := w.trySequence(cand); err != nil {
		return err
	}
	w.controls.showStep(st.Depth.Resolve(w.canal.WorkingLength), true)
	return nil
}

// changeSteps takes a sequence with steps added, removed or moved and shows step sel.
func (w *mainWindow) changeSteps(cand *models.Sequence, sel int) error {
	if err := w.trySequence(cand); err != nil {
		return err
	}
	w.selected = sel
	w.showStepState()
	return nil
}

// moveTip moves the shown file to depth mm and re-runs the analysis live.
func (w *mainWindow) moveTip(mm float64) {
	n, _, _ := w.shownStep()
	if n == 0 || w.canal == nil {
		return
	}
	w.view.brieflyMoving()
	cand := copySequence(w.seq)
	cand.Steps[n-1].Depth = models.DepthMM(mm)
	if err := w.trySequence(cand); err != nil {
		w.setStatus(err.Error())
		return
	}
	w.editor.showDepth(cand.Steps[n-1].Depth)
}

// copySequence is a sequence whose steps can be changed without touching s.
func copySequence(s *models.Sequence) *models.Sequence {
	c := *s
	c.Steps = append([]models.Step(nil), s.Steps...)
	return &c
}

// setWorkingLength measures depths against a new working length (mm).
func (w *mainWindow) setWorkingLength(wl float64) error {
	if w.canal == nil {
		return errors.New("no canal yet")
	}
	L := w.canal.Line.Length()
	if !(wl > 0) || math.IsInf(wl, 0) || wl > L+1e-9 {
		return fmt.Errorf("must be above 0 and at most the canal's length, %.2f mm", L)
	}
	c := *w.canal // a canal is immutable; the copy shares its maps
	c.WorkingLength = wl
	if w.seq != nil {
		if err := w.seq.CheckDepths(L, wl); err != nil {
			return err
		}
	}
	w.canal = &c
	w.summary.showMeasures(w.canal) // the entry keeps what the user is typing
	w.showStepState()
	w.rerun()
	return nil
}

// wait runs hand-overs until background work has reported and the viewport is drawn (tests,
// after handOver.queued).
func (w *mainWindow) wait() {
	w.ui.drain(w.view.idle)
}

// sceneOptionsDefault are what a fresh window shows.
func sceneOptionsDefault() scene.Options {
	return scene.Options{WallOpacity: scene.DefaultWallOpacity}
}
