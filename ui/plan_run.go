package ui

import (
	"context"
	"errors"
	"fmt"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/analysis/plan"
	"tapersweep/models"
)

// planRun is one "Propose a sequence" from the form through the search to the answer: the
// plan shown beside the current sequence, to adopt or to leave.
type planRun struct {
	w     *mainWindow
	canal *analysis.Canal // the canal the plan is for
	mine  *models.Sequence

	// the form
	form                            dialog.Dialog
	size, steps                     *selectList
	taper, maxEngaged, maxFatigue   *widget.Entry
	keepWall                        *widget.Entry    // shown only when the canal's root is known
	weights                         [3]*widget.Entry // engaged length, torque, fatigue use
	sameTaper                       *widget.Check
	objective, formErr              *widget.Label
	proposeButton, formCancelButton *widget.Button
	target                          plan.Target

	// the search
	progress     dialog.Dialog
	cancelButton *widget.Button
	cancel       context.CancelFunc

	// the answer
	plan                *plan.Plan
	mineRes, proposed   *analysis.Result // both run with the window's path model
	answer              dialog.Dialog
	answerText          string // the infeasible or error message, when no plan came
	adopt, keep         *widget.Button
	finished, cancelled bool
}

// proposeDialog asks for the target and the limits of a plan for the open canal.
func (w *mainWindow) proposeDialog() {
	if w.canal == nil || w.seq == nil || len(w.seq.Steps) == 0 {
		w.setStatus("A sequence can be proposed once a canal is open.")
		return
	}
	if w.planning != nil && w.planning.cancel != nil && !w.planning.finished {
		w.planning.progress.Show() // one search at a time
		return
	}
	pr := &planRun{w: w, canal: w.canal, mine: w.seq}
	w.planning = pr
	last := w.seq.Steps[len(w.seq.Steps)-1].Instrument
	sizes := make([]string, 0, 24)
	for _, s := range models.ISOSizes() {
		sizes = append(sizes, strconv.Itoa(s))
	}
	pr.size = newSelectList(sizes, func(string) { pr.targetChanged() })
	pr.taper = widget.NewEntry()
	pr.taper.OnChanged = func(string) { pr.targetChanged() }
	var counts []string
	for n := 1; n <= 12; n++ {
		counts = append(counts, strconv.Itoa(n))
	}
	pr.steps = newSelectList(counts, nil)
	pr.steps.SetSelected(strconv.Itoa(plan.DefaultMaxSteps))
	pr.maxEngaged = widget.NewEntry()
	pr.maxEngaged.SetPlaceHolder("no limit")
	pr.maxFatigue = widget.NewEntry()
	pr.maxFatigue.SetPlaceHolder("what the last file alone uses")
	pr.keepWall = widget.NewEntry()
	pr.keepWall.SetPlaceHolder("no limit")
	pr.sameTaper = widget.NewCheck("Allow two files of the same taper in a row", nil)
	for k, v := range []float64{plan.DefaultWeights.Engaged, plan.DefaultWeights.Torque, plan.DefaultWeights.Fatigue} {
		e := widget.NewEntry()
		e.SetText(strconv.FormatFloat(v, 'f', -1, 64))
		e.OnChanged = func(string) { pr.targetChanged() }
		pr.weights[k] = e
	}
	pr.objective = widget.NewLabel("")
	pr.objective.Wrapping = fyne.TextWrapWord
	pr.formErr = widget.NewLabel("")
	pr.formErr.Importance = widget.DangerImportance
	pr.formErr.Wrapping = fyne.TextWrapWord
	pr.formErr.Hide()
	if !contains(sizes, strconv.Itoa(last.Size)) {
		pr.size.Options = append(pr.size.Options, strconv.Itoa(last.Size))
	}
	pr.size.SetSelected(strconv.Itoa(last.Size))
	pr.taper.SetText(strconv.FormatFloat(last.TaperAt(0), 'f', -1, 64))

	row := func(label string, o fyne.CanvasObject) fyne.CanvasObject {
		return container.NewBorder(nil, nil, container.NewGridWrap(fyne.NewSize(320, o.MinSize().Height), widget.NewLabel(label)), nil, o)
	}
	// A wall to keep needs the root's outer surface; without one the row is not offered.
	wallRow := fyne.CanvasObject(layout.NewSpacer())
	if pr.canal.Root != nil {
		wallRow = row("Least wall to the root's surface to keep (mm)", pr.keepWall)
	}
	pr.proposeButton = widget.NewButton("Propose", pr.start)
	pr.proposeButton.Importance = widget.HighImportance
	pr.formCancelButton = widget.NewButton("Cancel", func() { pr.form.Hide() })
	body := container.NewVBox(
		widget.NewLabel("The last file reaches working length; the rest come from the generic catalogue, up to its size."),
		row("Last file: ISO size", pr.size),
		row("Last file: taper (mm/mm)", pr.taper),
		row("At most this many files", pr.steps),
		row("Longest engaged length per file (mm)", pr.maxEngaged),
		row("Highest fatigue use per file (1 = fracture)", pr.maxFatigue),
		wallRow,
		pr.sameTaper,
		// The three weights under their own names, the question above them.
		widget.NewLabel("How much each counts in the choice (0 = not at all):"),
		container.NewGridWithColumns(3,
			container.NewBorder(nil, nil, widget.NewLabel("engaged length"), nil, pr.weights[0]),
			container.NewBorder(nil, nil, widget.NewLabel("torque"), nil, pr.weights[1]),
			container.NewBorder(nil, nil, widget.NewLabel("fatigue use"), nil, pr.weights[2])),
		pr.objective,
		pr.formErr,
		container.NewHBox(layout.NewSpacer(), pr.formCancelButton, pr.proposeButton),
	)
	pr.form = dialog.NewCustomWithoutButtons("Propose a sequence for this canal", body, w.win)
	pr.form.Resize(fyne.NewSize(720, 540))
	pr.targetChanged()
	pr.form.Show()
}

// targetChanged restates the objective for the target being typed.
func (pr *planRun) targetChanged() {
	if pr.objective == nil {
		return
	}
	t, err := pr.readTarget()
	label := "last file"
	if err == nil {
		label = t.Label()
	}
	wts, err := pr.readWeights()
	if err != nil {
		pr.objective.SetText(err.Error())
		return
	}
	pr.objective.SetText("The plan sought has " + wts.ObjectiveText(label) + ".")
}

// readWeights reads the three weights of the objective; blank counts as 0.
func (pr *planRun) readWeights() (plan.Weights, error) {
	var v [3]float64
	for k, e := range pr.weights {
		if e == nil || strings.TrimSpace(e.Text) == "" {
			continue
		}
		x, err := parseNumber(e.Text)
		if err != nil || x < 0 {
			return plan.Weights{}, fmt.Errorf("weights: %q is not a number of 0 or more", e.Text)
		}
		v[k] = x
	}
	if v == [3]float64{} {
		return plan.Weights{}, errors.New("weights: at least one measure must count")
	}
	return plan.Weights{Engaged: v[0], Torque: v[1], Fatigue: v[2]}, nil
}

func (pr *planRun) readTarget() (plan.Target, error) {
	size, err := strconv.Atoi(pr.size.Selected)
	if err != nil {
		return plan.Target{}, errors.New("choose the last file's size")
	}
	taper, err := parseNumber(pr.taper.Text)
	if err != nil {
		return plan.Target{}, fmt.Errorf("taper: %w", err)
	}
	if !(taper > 0) || taper > 0.2 {
		return plan.Target{}, fmt.Errorf("taper: %g is not a file's taper (0.02 to 0.12 are usual)", taper)
	}
	return plan.Target{Size: size, Taper: taper}, nil
}

// options reads the form; a blank limit is none (or the planner's default for fatigue).
func (pr *planRun) options() (plan.Options, error) {
	t, err := pr.readTarget()
	if err != nil {
		return plan.Options{}, err
	}
	opt := plan.Options{Target: t, AllowSameTaper: pr.sameTaper.Checked}
	if opt.MaxSteps, err = strconv.Atoi(pr.steps.Selected); err != nil {
		return opt, errors.New("choose the number of files")
	}
	limit := func(e *widget.Entry, name string) (float64, error) {
		if strings.TrimSpace(e.Text) == "" {
			return 0, nil
		}
		v, err := parseNumber(e.Text)
		if err == nil && !(v > 0) {
			err = errors.New("must be above 0, or blank for no limit")
		}
		if err != nil {
			return 0, fmt.Errorf("%s: %w", name, err)
		}
		return v, nil
	}
	if opt.MaxEngagedMM, err = limit(pr.maxEngaged, "engaged length"); err != nil {
		return opt, err
	}
	if opt.MaxFatigue, err = limit(pr.maxFatigue, "fatigue use"); err != nil {
		return opt, err
	}
	if pr.canal.Root != nil {
		if opt.KeepWallMM, err = limit(pr.keepWall, "wall to keep"); err != nil {
			return opt, err
		}
	}
	if opt.Weights, err = pr.readWeights(); err != nil {
		return opt, err
	}
	return opt, nil
}

// start runs the search off the UI goroutine with a progress dialog that can cancel it.
func (pr *planRun) start() {
	w := pr.w
	opt, err := pr.options()
	if err != nil {
		pr.formErr.SetText(err.Error())
		pr.formErr.Show()
		return
	}
	pr.formErr.Hide()
	pr.form.Hide()
	pr.target = opt.Target
	ctx, cancel := context.WithCancel(context.Background())
	pr.cancel = cancel
	busy := widget.NewProgressBarInfinite()
	pr.cancelButton = widget.NewButton("Cancel", func() {
		cancel()
		pr.cancelled = true
	})
	pr.progress = dialog.NewCustomWithoutButtons("Proposing a sequence",
		container.NewVBox(widget.NewLabel("Searching files, order and depths that reach the "+opt.Target.Label()+
			" at working length…"), busy, pr.cancelButton), w.win)
	pr.progress.Resize(fyne.NewSize(460, 150))
	pr.progress.Show()
	w.setStatus("Proposing a sequence for the " + opt.Target.Label() + "…")
	c, mine := pr.canal, pr.mine
	w.ui.spawn(func() {
		p, mineRes, proposed, err := proposeAndCompare(ctx, c, mine, opt)
		w.ui.postAndWait(func() {
			busy.Stop()
			pr.done(p, mineRes, proposed, err)
		})
	})
}

// proposeAndCompare finds a plan and runs it and the current sequence with the same path
// model, so the comparison holds whichever model the window shows.
func proposeAndCompare(ctx context.Context, c *analysis.Canal, mine *models.Sequence, opt plan.Options) (*plan.Plan, *analysis.Result, *analysis.Result, error) {
	p, err := plan.Propose(ctx, c, opt)
	if err != nil {
		return nil, nil, nil, err
	}
	mineRes, err := analysis.Run(ctx, c, mine, analysis.RunOptions{})
	if err != nil {
		return nil, nil, nil, fmt.Errorf("your sequence: %w", err)
	}
	proposed := p.Result
	if mine.PathModel != p.Result.Options.PathModel {
		seq := *p.Sequence
		seq.PathModel = mine.PathModel
		if proposed, err = analysis.Run(ctx, c, &seq, analysis.RunOptions{}); err != nil {
			return nil, nil, nil, fmt.Errorf("the proposed sequence: %w", err)
		}
	}
	return p, mineRes, proposed, nil
}

// done takes the outcome of the search.
func (pr *planRun) done(p *plan.Plan, mineRes, proposed *analysis.Result, err error) {
	w := pr.w
	pr.finished = true
	pr.progress.Hide()
	var inf *plan.InfeasibleError
	switch {
	case pr.cancelled || errors.Is(err, context.Canceled):
		pr.cancelled = true
		w.setStatus("Proposing a sequence cancelled; your sequence stays.")
		return
	case errors.As(err, &inf):
		pr.answerText = "No sequence meets the limits: " + inf.Error() + "."
		w.setStatus("No sequence meets the limits set.")
		pr.showMessage("No sequence found")
		return
	case err != nil:
		pr.answerText = "Could not propose a sequence: " + err.Error()
		w.setStatus(pr.answerText)
		pr.showMessage("No sequence found")
		return
	case w.canal != pr.canal:
		w.setStatus("The canal or its working length changed while the plan was sought; propose again.")
		return
	}
	pr.plan, pr.mineRes, pr.proposed = p, mineRes, proposed
	w.setStatus(fmt.Sprintf("A sequence of %s is proposed for the %s.", files(len(p.Sequence.Steps)), pr.target.Label()))
	pr.showPlan()
}

func (pr *planRun) showMessage(title string) {
	l := widget.NewLabel(pr.answerText)
	l.Wrapping = fyne.TextWrapWord
	pr.keep = widget.NewButton("Close", func() { pr.answer.Hide() })
	pr.answer = dialog.NewCustomWithoutButtons(title,
		container.NewBorder(nil, container.NewHBox(layout.NewSpacer(), pr.keep), nil, nil,
			container.NewGridWrap(fyne.NewSize(520, 160), container.NewVScroll(l))), pr.w.win)
	pr.answer.Show()
}

// showPlan shows the plan beside the current sequence, its reasons, and the choice.
func (pr *planRun) showPlan() {
	w := pr.w
	model := pathCentredText
	if pr.mine.PathModel == models.PathElastic {
		model = pathElasticText
	}
	side := func(title string, res *analysis.Result) fyne.CanvasObject {
		return container.NewVBox(sectionTitle(title), comparisonGrid(comparisonRows(res)))
	}
	tables := container.NewGridWithColumns(2,
		side("Your sequence", pr.mineRes),
		side("Proposed for the "+pr.target.Label(), pr.proposed))
	why := widget.NewLabel(strings.Join(pr.plan.Explanation, "\n\n"))
	why.Wrapping = fyne.TextWrapWord
	note := widget.NewLabel("Tip depth and engaged length in mm, peak torque in N·cm, fatigue use with 1 = fracture; " +
		"both run here with the file path that " + model + ". Model estimates: compare them, do not take them as measurements.")
	note.Wrapping = fyne.TextWrapWord
	pr.adopt = widget.NewButton("Use this sequence", pr.adoptPlan)
	pr.adopt.Importance = widget.HighImportance
	pr.keep = widget.NewButton("Keep mine", func() { pr.answer.Hide() })
	// The figures above, the reasons below; the split between them can be moved.
	parts := container.NewVSplit(container.NewVScroll(container.NewVBox(tables, note)),
		container.NewBorder(sectionTitle("Why this sequence"), nil, nil, nil, container.NewVScroll(why)))
	parts.Offset = 0.62
	buttons := container.NewHBox(layout.NewSpacer(), pr.keep, pr.adopt)
	body := container.NewBorder(nil, buttons, nil, nil, parts)
	pr.answer = dialog.NewCustomWithoutButtons("A proposed sequence", body, w.win)
	pr.answer.Resize(fyne.NewSize(900, 680))
	pr.answer.Show()
}

// adoptPlan replaces the sequence with the plan (keeping the window's path model) and runs it.
func (pr *planRun) adoptPlan() {
	w := pr.w
	pr.answer.Hide()
	seq := copySequence(pr.plan.Sequence)
	seq.PathModel = pr.mine.PathModel
	seq.Name = "proposed for the " + pr.target.Label()
	err := seq.Validate()
	if err == nil {
		err = seq.CheckDepths(w.canal.Line.Length(), w.canal.WorkingLength)
	}
	if err != nil {
		dialog.ShowError(fmt.Errorf("the proposed sequence cannot be used: %w", err), w.win)
		return
	}
	w.takeSequence(seq)
	w.setStatus(fmt.Sprintf("Using the proposed sequence of %s; save it from the File menu to keep it.", files(len(seq.Steps))))
}

// comparisonRows are the per-step figures the plan is judged by and, last, the largest of
// each over the files.
func comparisonRows(res *analysis.Result) [][]string {
	cols := append(analysis.PickColumns("step", "label", "tip_depth_mm"), plan.ComparedColumns()...)
	head := make([]string, len(cols))
	largest := make([]string, len(cols))
	for i, c := range cols {
		head[i] = c.Heading
		if v, ok := c.Largest(res); ok {
			largest[i] = strconv.FormatFloat(v, 'f', c.Shown, 64)
		}
	}
	largest[1], largest[2] = "largest", ""
	rows := [][]string{head}
	for _, st := range res.Steps {
		row := make([]string, len(cols))
		for i, c := range cols {
			row[i] = c.Format(st.Metrics)
		}
		rows = append(rows, row)
	}
	return append(rows, largest)
}

// comparisonGrid lays rows out as a small table; the first and last rows are bold.
func comparisonGrid(rows [][]string) fyne.CanvasObject {
	g := container.NewGridWithColumns(len(rows[0]))
	for i, r := range rows {
		for _, v := range r {
			l := widget.NewLabel(v)
			if i == 0 || i == len(rows)-1 {
				l.TextStyle = fyne.TextStyle{Bold: true}
			}
			g.Add(l)
		}
	}
	return g
}

// files counts files in words: "1 file", "4 files".
func files(n int) string {
	if n == 1 {
		return "1 file"
	}
	return fmt.Sprintf("%d files", n)
}
