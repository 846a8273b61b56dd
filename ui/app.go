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
	"tapersweep/models"
	"tapersweep/ui/scene"
)

// Options say what the window opens with. Empty paths mean the built-in demo.
type Options struct {
	CanalPath    string
	SequencePath string
	Scale        float64 // multiplies STL coordinates (0.001 for micrometres); 0 = 1
}

// Open builds the main window on app a and shows it. The canal and sequence are measured and
// run in the background; the window is usable at once.
func Open(a fyne.App, opt Options) fyne.Window {
	useSafeFileWriter()
	w := newMainWindow(a, &handOver{})
	w.win.Show()
	w.start(opt)
	return w.win
}

// mainWindow is the window and what it shows.
type mainWindow struct {
	app fyne.App
	win fyne.Window

	canal    *analysis.Canal
	seq      *models.Sequence // the last valid sequence
	res      *analysis.Result // seq run through canal; nil until a run succeeds
	selected int              // step shown, from 1; 0 shows the canal alone
	scale    float64          // STL units to mm for canals opened from the command line

	gen       uint64 // generation of the latest analysis asked for
	cancelRun context.CancelFunc
	ui        *handOver // hands results from goroutines to the UI goroutine

	view     *viewport
	table    *stepTable
	editor   *stepEditor
	summary  *canalPanel
	profiles *profilePanel
	path     *pathPanel
	planning *planRun // the plan being proposed or shown; nil when none
	controls *viewControls
	status   *widget.Label
	hover    *widget.Label
	loader   *loadProgress
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
			text = "Point at the wall to read the depth of cut, the distance from the apical end and the canal radius."
		}
		w.hover.SetText(text)
	}
	w.view.onError = func(err error) { w.setStatus("Cannot draw: " + err.Error()) }
	w.view.onHover("")

	w.table = newStepTable(w)
	w.editor = newStepEditor(w)
	w.summary = newCanalPanel(w)
	w.profiles = newProfilePanel()
	w.controls = newViewControls(w)
	w.path = newPathPanel(w)

	left := container.NewBorder(w.controls.box, container.NewVBox(w.profiles.raster, w.hover), nil, nil, w.view)
	// The canal, the steps and the editor share the height in splits the user can move; the
	// table and the editor scroll when the window is short.
	steps := container.NewBorder(
		container.NewVBox(w.path.box,
			container.NewBorder(nil, nil, nil, widget.NewButton("Propose a sequence…", w.proposeDialog),
				sectionTitle("Files in the sequence (select one to show it)"))),
		nil, nil, nil, w.table.table)
	lower := container.NewVSplit(steps, container.NewVScroll(w.editor.box))
	lower.Offset = 0.72
	right := container.NewVSplit(w.summary.box, lower)
	right.Offset = 0 // the canal's summary as small as it fits; the steps take the rest
	split := container.NewHSplit(left, right)
	split.Offset = 0.52
	w.win.SetContent(container.NewBorder(nil, w.status, nil, nil, split))
	w.win.SetMainMenu(w.menu())
	w.win.SetOnDropped(w.dropped)
	w.win.SetCloseIntercept(func() {
		w.view.close()
		w.win.Close()
	})
	return w
}

func sectionTitle(s string) *widget.Label {
	l := widget.NewLabel(s)
	l.TextStyle = fyne.TextStyle{Bold: true}
	return l
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
	w.path.sync()
	w.table.refresh()
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
	w.summary.refresh()
	w.controls.canalChanged()
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
		w.editor.showRunError(err)
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
	w.table.refresh()
	w.editor.load()
	w.path.refresh()
	w.controls.stepChanged()
	w.profiles.set(w.canal, res, w.selected)
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
	s := fmt.Sprintf("%d steps analysed in %s.", len(res.Steps), res.Canal.Name)
	if len(res.Warnings) > 0 {
		s += " " + res.Warnings[0]
	}
	return s
}

// selectStep shows step n (from 1; 0 = the canal alone).
func (w *mainWindow) selectStep(n int) {
	if n < 0 || w.seq == nil || n > len(w.seq.Steps) || n == w.selected {
		return
	}
	w.selected = n
	w.editor.load()
	w.controls.stepChanged()
	w.profiles.set(w.canal, w.res, n)
	w.showScene(false)
}

// showScene hands the viewport what to draw now.
func (w *mainWindow) showScene(aim bool) {
	if w.canal == nil {
		return
	}
	opt := w.controls.sceneOptions()
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
// otherwise it returns the error and keeps the last valid one.
func (w *mainWindow) trySequence(cand *models.Sequence) error {
	data, err := cand.MarshalJSON()
	if err != nil {
		return err
	}
	name := "sequence"
	if w.seq != nil && w.seq.Name != "" {
		name = w.seq.Name
	}
	parsed, err := models.ParseSequence(name, data)
	if err != nil {
		return err
	}
	if w.canal != nil {
		if err := parsed.CheckDepths(w.canal.Line.Length(), w.canal.WorkingLength); err != nil {
			return err
		}
	}
	w.seq = parsed
	w.rerun()
	return nil
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
	w.summary.text.SetText(canalText(w.canal)) // the entry keeps what the user is typing
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
