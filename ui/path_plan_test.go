package ui

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"fyne.io/fyne/v2/test"

	"tapersweep/analysis"
	"tapersweep/models"
)

// transportCells are the table's transportation and centring cells, row by row.
func transportCells(w *mainWindow) []string {
	var out []string
	for i := range w.res.Steps {
		row := w.table.rowText(i)
		out = append(out, row[tableColumn("transportation_1_mm")]+" "+row[tableColumn("centering_ratio_1")])
	}
	return out
}

// tableColumn is where the figure with the given key stands in rowText's rows.
func tableColumn(key string) int {
	for i, c := range stepColumns {
		if c.key == key {
			return i - 1 // rowText leaves out the colour swatch
		}
	}
	panic("the step table has no column " + key)
}

// TestSwitchingThePathModelRerunsAndChangesTransportation: choosing "bends as a beam" re-runs
// the sequence with the elastic path; the table's transportation and centring at 1 mm then
// equal those of the same run outside the window and differ from the centred ones (a centred
// file moves the canal only where the wall is uneven; a stiff file straightening in the demo's
// curve takes more from one side, which is the subject of Gambill et al. 1996). Switching back
// restores the centred figures.
func TestSwitchingThePathModelRerunsAndChangesTransportation(t *testing.T) {
	w := openDemo(t)
	if w.seq.PathModel != models.PathCentred || w.path.choice.Selected != pathCentredText {
		t.Fatalf("the demo opens with path model %q shown as %q", w.seq.PathModel, w.path.choice.Selected)
	}
	centred := transportCells(w)
	before := w.res

	w.path.choice.SetSelected(pathElasticText)
	w.wait()
	if w.res == before || w.res.Options.PathModel != models.PathElastic {
		t.Fatalf("choosing the elastic path did not re-run with it (model %q)", w.res.Options.PathModel)
	}
	seq := *w.seq
	seq.PathModel = models.PathElastic
	want, err := analysis.Run(context.Background(), w.canal, &seq, analysis.RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	elastic := transportCells(w)
	changed := false
	for i, st := range want.Steps {
		exp := fmt.Sprintf("%.3f %s", st.Metrics.TransportationMM["1"], optional(st.Metrics.CenteringRatio["1"], "%.2f"))
		if elastic[i] != exp {
			t.Errorf("row %d shows %q, the elastic run outside the window gives %q", i+1, elastic[i], exp)
		}
		changed = changed || elastic[i] != centred[i]
	}
	if !changed {
		t.Errorf("transportation and centring at 1 mm did not change with the path model: %v", elastic)
	}
	if !strings.Contains(w.path.moved.Text, fmt.Sprintf("transportation %.3f /", want.Moved.TransportationMM["1"])) {
		t.Errorf("the sequence line %q lacks the whole sequence's transportation at 1 mm", w.path.moved.Text)
	}
	if w.selected > 0 && !strings.Contains(w.editor.detail.Text, "foramen shift") {
		t.Errorf("the shown step's detail %q lacks the foramen shift", w.editor.detail.Text)
	}
	// The viewport draws the file on its own path.
	if in := w.view.input(); in.res != w.res {
		t.Error("the viewport was not handed the elastic run")
	}

	w.path.choice.SetSelected(pathCentredText)
	w.wait()
	if w.res.Options.PathModel != models.PathCentred {
		t.Fatalf("switching back ran %q", w.res.Options.PathModel)
	}
	if got := transportCells(w); strings.Join(got, "|") != strings.Join(centred, "|") {
		t.Errorf("back on the centerline the table shows %v, first it showed %v", got, centred)
	}
}

// openPlanForm opens "Propose a sequence…" and returns its run.
func openPlanForm(t *testing.T, w *mainWindow) *planRun {
	t.Helper()
	w.proposeDialog()
	pr := w.planning
	if pr == nil || pr.form == nil {
		t.Fatal("no plan form opened")
	}
	return pr
}

// TestProposedSequenceCanBeAdopted: the form starts at the last step's size and taper; the
// plan found is shown beside the current sequence with its explanation; "Use this sequence"
// replaces the sequence, and the table then holds one row per planned file, in order.
func TestProposedSequenceCanBeAdopted(t *testing.T) {
	w := openDemo(t)
	last := w.seq.Steps[len(w.seq.Steps)-1].Instrument
	pr := openPlanForm(t, w)
	if pr.size.Selected != fmt.Sprint(last.Size) || pr.taper.Text != fmt.Sprint(last.TaperAt(0)) {
		t.Errorf("the form starts at %s/%s, the last step is %s", pr.size.Selected, pr.taper.Text, last.Label())
	}
	mine := w.seq
	test.Tap(pr.proposeButton)
	w.wait()
	if pr.plan == nil {
		t.Fatalf("no plan: %s", pr.answerText)
	}
	if w.seq != mine {
		t.Fatal("the sequence changed before the plan was adopted")
	}
	top := w.win.Canvas().Overlays().Top()
	if top == nil || !containsText(top, pr.plan.Explanation[0]) || !containsText(top, "Your sequence") {
		t.Error("the plan dialog does not show the comparison and the explanation")
	}
	// The comparison's last row is the largest of each figure over the files.
	rows := comparisonRows(pr.proposed)
	if len(rows) != len(pr.plan.Sequence.Steps)+2 {
		t.Fatalf("%d comparison rows for %d files", len(rows), len(pr.plan.Sequence.Steps))
	}
	largest := 0.0
	for _, st := range pr.proposed.Steps {
		largest = max(largest, st.Metrics.EngagedLengthMM)
	}
	if got := rows[len(rows)-1][3]; got != fmt.Sprintf("%.2f", largest) {
		t.Errorf("largest engaged length shown %s, the steps' largest is %.2f", got, largest)
	}

	test.Tap(pr.adopt)
	w.wait()
	if n, _ := w.table.table.Length(); n != len(pr.plan.Sequence.Steps) {
		t.Fatalf("the table has %d rows after adopting a plan of %d files", n, len(pr.plan.Sequence.Steps))
	}
	for i, st := range pr.plan.Sequence.Steps {
		if got := w.table.rowText(i)[1]; got != st.Instrument.Label() {
			t.Errorf("row %d shows %s, the plan's file %d is %s", i+1, got, i+1, st.Instrument.Label())
		}
		if w.res.Steps[i].TipDepth != pr.plan.Result.Steps[i].TipDepth {
			t.Errorf("step %d runs to %.2f mm, the plan to %.2f", i+1, w.res.Steps[i].TipDepth, pr.plan.Result.Steps[i].TipDepth)
		}
	}
}

// TestPlanLimitsAndCancel: a limit no plan can keep gives the planner's message naming the
// constraint; a bad entry is shown at the form; a cancelled search leaves the sequence alone.
func TestPlanLimitsAndCancel(t *testing.T) {
	w := openDemo(t)
	mine := w.seq

	pr := openPlanForm(t, w)
	pr.taper.SetText("four")
	test.Tap(pr.proposeButton)
	if !pr.formErr.Visible() || !strings.Contains(pr.formErr.Text, "taper") || pr.cancel != nil {
		t.Errorf("a taper of %q started a search or showed %q", pr.taper.Text, pr.formErr.Text)
	}
	pr.taper.SetText("0.04")
	pr.maxEngaged.SetText("0.5") // the last file alone engages far more in the demo's curve
	test.Tap(pr.proposeButton)
	w.wait()
	if pr.plan != nil || !strings.Contains(pr.answerText, "engaged length") {
		t.Errorf("a 0.5 mm engaged length cap gave plan %v, message %q", pr.plan != nil, pr.answerText)
	}
	if top := w.win.Canvas().Overlays().Top(); top == nil || !containsText(top, "No sequence meets the limits") {
		t.Error("the message is not shown")
	}

	// The demo canal has a root: a wall to keep thicker than the root leaves anywhere (0.33 mm
	// at its thinnest as scanned) cannot be kept by any file, and the answer names the wall.
	pr = openPlanForm(t, w)
	pr.keepWall.SetText("0.5")
	test.Tap(pr.proposeButton)
	w.wait()
	if pr.plan != nil || !strings.Contains(pr.answerText, "wall") {
		t.Errorf("keeping 0.5 mm of wall gave plan %v, message %q", pr.plan != nil, pr.answerText)
	}

	pr = openPlanForm(t, w)
	test.Tap(pr.proposeButton)
	test.Tap(pr.cancelButton)
	w.wait()
	if !pr.cancelled || pr.plan != nil || w.seq != mine {
		t.Errorf("cancel: cancelled %v, plan %v, sequence kept %v", pr.cancelled, pr.plan != nil, w.seq == mine)
	}
}

// TestPlanWeightsCanBeChanged: the objective's weights are read from the form, stated in plain
// words, and a form where nothing counts is refused at the form.
func TestPlanWeightsCanBeChanged(t *testing.T) {
	w := openDemo(t)
	pr := openPlanForm(t, w)
	before := pr.objective.Text
	pr.weights[0].SetText("3")
	if pr.objective.Text == before || !strings.Contains(pr.objective.Text, "3") {
		t.Errorf("objective after weighting engaged length 3: %q (was %q)", pr.objective.Text, before)
	}
	opt, err := pr.options()
	if err != nil || opt.Weights.Engaged != 3 || opt.Weights.Torque != 1 {
		t.Errorf("options read %+v, %v", opt.Weights, err)
	}
	for _, e := range pr.weights {
		e.SetText("0")
	}
	test.Tap(pr.proposeButton)
	if !pr.formErr.Visible() || !strings.Contains(pr.formErr.Text, "weights") || pr.cancel != nil {
		t.Errorf("weights of nothing started a search or showed %q", pr.formErr.Text)
	}
}
