package report

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"regexp"
	"strconv"
	"strings"
	"sync"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
)

var (
	demoOnce sync.Once
	demoRes  *analysis.Result
	demoErr  error
)

// demoRun runs the built-in demo sequence through the built-in demo canal once per test binary.
func demoRun(t testing.TB) *analysis.Result {
	demoOnce.Do(func() {
		ctx := context.Background()
		c, err := analysis.CanalFromSpec(ctx, "demo canal", models.DemoCanal(), analysis.CanalOptions{})
		if err != nil {
			demoErr = err
			return
		}
		seq, err := models.ParseSequence("demo sequence", models.DemoSequenceJSON())
		if err != nil {
			demoErr = err
			return
		}
		demoRes, demoErr = analysis.Run(ctx, c, seq, analysis.RunOptions{})
	})
	if demoErr != nil {
		t.Fatal(demoErr)
	}
	return demoRes
}

// pageObject matches a page object of the PDF 1.7 standard (ISO 32000-1, 7.7.3.3: /Type /Page),
// not the page tree root (/Type /Pages).
var pageObject = regexp.MustCompile(`/Type\s*/Page[^s]`)

func TestDemoReportHasSummaryAndOnePagePerStep(t *testing.T) {
	res := demoRun(t)
	var buf bytes.Buffer
	if err := WritePDF(&buf, res, Options{CanalFile: "demo-canal.json", ImageWidth: 900, ImageHeight: 480}); err != nil {
		t.Fatal(err)
	}
	b := buf.Bytes()
	if !bytes.HasPrefix(b, []byte("%PDF-")) {
		t.Fatalf("not a PDF: starts %q", b[:min(len(b), 8)])
	}
	want := 1 + len(res.Steps)
	if got := len(pageObject.FindAll(b, -1)); got != want {
		t.Errorf("%d page objects, want the summary and one per step: %d", got, want)
	}
	// The page tree's /Count must agree (ISO 32000-1, 7.7.3.2).
	if m := regexp.MustCompile(`/Type /Pages\s*/Kids \[[^\]]*\]\s*/Count (\d+)`).FindSubmatch(b); m == nil {
		t.Error("no page tree with a count")
	} else if n, _ := strconv.Atoi(string(m[1])); n != want {
		t.Errorf("page tree counts %d pages, want %d", n, want)
	}

	// A PDF reader (poppler's pdftotext, Debian poppler-utils) must find the same numbers as
	// the run's JSON summary in the text it extracts.
	text := pdfText(t, b)
	if text == "" {
		return
	}
	if got := strings.Count(text, "\f") + 1; got != want {
		t.Errorf("pdftotext saw %d pages, want %d", got, want)
	}
	js, err := json.Marshal(res.Summary())
	if err != nil {
		t.Fatal(err)
	}
	var sum analysis.ResultSummary
	if err := json.Unmarshal(js, &sum); err != nil {
		t.Fatal(err)
	}
	pages := strings.Split(text, "\f")
	for _, m := range sum.Steps {
		page := pages[m.Step]
		// Printed with the decimals the measurement supports: the JSON's numbers rounded.
		for col, v := range map[string]float64{"engaged_length_mm": m.EngagedLengthMM, "engaged_area_mm2": m.EngagedAreaMM2,
			"removed_volume_mm3": m.RemovedVolumeMM3, "max_depth_of_cut_mm": m.MaxDepthOfCutMM, "fatigue_damage": m.FatigueDamage} {
			c, _ := analysis.StepColumn(col)
			s := strconv.FormatFloat(v, 'f', c.Shown, 64)
			if !strings.Contains(pages[0], s) {
				t.Errorf("summary page lacks step %d's %s", m.Step, s)
			}
			if !strings.Contains(page, s) {
				t.Errorf("step %d's page lacks %s", m.Step, s)
			}
		}
		if !strings.Contains(page, "Step "+strconv.Itoa(m.Step)+" of") {
			t.Errorf("page %d is not step %d's", m.Step+1, m.Step)
		}
		for _, a := range m.Advice {
			if !strings.Contains(squash(page), squash(a.Text)) {
				t.Errorf("step %d's page lacks the advice %q", m.Step, a.Text)
			}
		}
	}
	// A reader sees words, not the JSON's field names (the step pages once listed
	// transportation_1_mm ... above the section that states them in words).
	for _, c := range append(analysis.StepColumns(), analysis.StepDetails()...) {
		if strings.Contains(c.Key, "_") && strings.Contains(text, c.Key) {
			t.Errorf("the report shows the field name %s", c.Key)
		}
	}
	if !strings.Contains(squash(pages[0]), squash(analysis.Caution)) {
		t.Error("the summary page lacks the caution wording")
	}
	if !strings.Contains(pages[0], "mm²") || !strings.Contains(pages[0], "°") {
		t.Error("symbols did not survive: the UTF-8 font is not in use")
	}
}

// squash folds whitespace so wrapped lines compare with the text they came from.
func squash(s string) string { return strings.Join(strings.Fields(s), " ") }

// reportPages writes res's report at the tests' picture size and returns each page's text;
// nil when pdftotext is not installed (the text checks are then skipped).
func reportPages(t *testing.T, res *analysis.Result) []string {
	t.Helper()
	var buf bytes.Buffer
	if err := WritePDF(&buf, res, Options{ImageWidth: 260, ImageHeight: 390}); err != nil {
		t.Fatal(err)
	}
	text := pdfText(t, buf.Bytes())
	if text == "" {
		return nil
	}
	return strings.Split(text, "\f")
}

// pdfText extracts the text of a PDF with pdftotext, page breaks as form feeds; it skips the
// text checks when the tool is not installed (.ci/setup.sh installs poppler-utils).
func pdfText(t *testing.T, pdf []byte) string {
	path, err := exec.LookPath("pdftotext")
	if err != nil {
		t.Log("pdftotext not installed: text checks skipped")
		return ""
	}
	f := t.TempDir() + "/r.pdf"
	if err := os.WriteFile(f, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(path, "-enc", "UTF-8", f, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	return strings.TrimSuffix(string(out), "\f")
}

func TestStepTableHoldsTheJSONNumbers(t *testing.T) {
	res := demoRun(t)
	sum := res.Summary()
	labels, cells := StepTable(sum)
	// The CSV's transportation columns are stated by the report's own transportation rows.
	var cols []analysis.Column
	for _, c := range analysis.StepColumns() {
		if !statedApart(c) && !onStepPagesOnly(c) {
			cols = append(cols, c)
		}
	}
	if want := len(cols) + len(summaryTransportRows); len(labels) != want {
		t.Fatalf("%d rows, want one per column and transportation row: %d", len(labels), want)
	}
	rowOf := map[string]int{}
	for i, l := range labels {
		rowOf[l] = i
	}
	// The JSON that `analyze --format json` prints, read back by name.
	js, _ := json.Marshal(sum)
	var back struct {
		Steps []map[string]any `json:"steps"`
	}
	if err := json.Unmarshal(js, &back); err != nil {
		t.Fatal(err)
	}
	for _, c := range cols {
		col := c.Key
		i, ok := rowOf[c.Label]
		if !ok {
			t.Fatalf("no row for %s", col)
		}
		for j, step := range back.Steps {
			v, ok := step[col]
			if !ok {
				continue // advice is a list in JSON; checked as codes below
			}
			cell := cells[i][j]
			switch v := v.(type) {
			case nil:
				if cell != "–" {
					t.Errorf("step %d %s: JSON null, table %q", j+1, col, cell)
				}
			case float64:
				// The table prints the JSON's number with the decimals the measurement supports.
				got, err := strconv.ParseFloat(cell, 64)
				tol := 1e-12
				if c.Shown >= 0 {
					tol = 0.5*math.Pow10(-c.Shown) + 1e-12
				}
				if err != nil || math.Abs(got-v) > tol {
					t.Errorf("step %d %s: JSON %v, table %q", j+1, col, v, cell)
				}
			case string:
				if cell != v {
					t.Errorf("step %d %s: JSON %q, table %q", j+1, col, v, cell)
				}
			}
		}
	}
}

// TestStepTableHoldsTheTransportationOfTheJSON: the transportation rows carry the numbers of
// the JSON fields transportation_mm, centering_ratio and foramen_shift_mm (keyed "1", "3",
// "5"), read back by name from what `analyze --format json` prints.
func TestStepTableHoldsTheTransportationOfTheJSON(t *testing.T) {
	res := elasticRun(t)
	sum := res.Summary()
	labels, cells := StepTable(sum)
	rowOf := map[string]int{}
	for i, l := range labels {
		rowOf[l] = i
	}
	js, _ := json.Marshal(sum)
	var back struct {
		Steps []struct {
			Transportation map[string]float64  `json:"transportation_mm"`
			Centering      map[string]*float64 `json:"centering_ratio"`
			Foramen        float64             `json:"foramen_shift_mm"`
		} `json:"steps"`
	}
	if err := json.Unmarshal(js, &back); err != nil {
		t.Fatal(err)
	}
	nonzero := 0
	for j, st := range back.Steps {
		// "a / b / c" for the levels 1, 3 and 5 mm, as the JSON writes each number.
		split := func(row string) []string { return strings.Split(cells[rowOf[row]][j], " / ") }
		tr, cr := split("transportation at 1 / 3 / 5 mm, mm"), split("centring ratio at 1 / 3 / 5 mm")
		if len(tr) != 3 || len(cr) != 3 {
			t.Fatalf("step %d: cells %q and %q do not hold three levels", j+1, tr, cr)
		}
		// Micrometres for transportation, two decimals for the ratio: the JSON's numbers rounded.
		near := func(cell string, v float64, d int) bool {
			got, err := strconv.ParseFloat(cell, 64)
			return err == nil && math.Abs(got-v) <= 0.5*math.Pow10(-d)+1e-12
		}
		for k, key := range []string{"1", "3", "5"} {
			if !near(tr[k], st.Transportation[key], 3) {
				t.Errorf("step %d transportation at %s mm: JSON %v, table %q", j+1, key, st.Transportation[key], tr[k])
			}
			if st.Transportation[key] != 0 {
				nonzero++
			}
			if c := st.Centering[key]; c == nil && cr[k] != "–" || c != nil && !near(cr[k], *c, 2) {
				t.Errorf("step %d centring at %s mm: JSON %v, table %q", j+1, key, c, cr[k])
			}
		}
		if cell := cells[rowOf["apical foramen shift, mm"]][j]; !near(cell, st.Foramen, 3) {
			t.Errorf("step %d foramen shift: JSON %v, table %q", j+1, st.Foramen, cell)
		}
	}
	if nonzero == 0 {
		t.Error("no step of the elastic demo moves the canal: the rows would hold only zeros")
	}
	if labels[len(labels)-1] != "advice" {
		t.Errorf("the last row is %q, want the advice", labels[len(labels)-1])
	}
}

var (
	elasticOnce sync.Once
	elasticRes  *analysis.Result
	elasticErr  error
)

// elasticRun is the demo with the file as a bending beam.
func elasticRun(t testing.TB) *analysis.Result {
	centred := demoRun(t)
	elasticOnce.Do(func() {
		elasticRes, elasticErr = analysis.Run(context.Background(), centred.Canal, centred.Sequence,
			analysis.RunOptions{PathModel: models.PathElastic})
	})
	if elasticErr != nil {
		t.Fatal(elasticErr)
	}
	return elasticRes
}

// TestElasticReportStatesPathAndTransportation: with the elastic path, the summary page names
// the model and its illustrative wall stiffness and carries the whole sequence's
// transportation; each step's page carries its own Gambill measures, place and direction.
func TestElasticReportStatesPathAndTransportation(t *testing.T) {
	res := elasticRun(t)
	pages := reportPages(t, res)
	if pages == nil {
		return
	}
	sum := res.Summary()
	first := squash(pages[0])
	for _, want := range []string{"elastic: the file's axis bends as a beam",
		strconv.FormatFloat(sum.Model.WallStiffnessNPerMM2, 'f', -1, 64) + " N/mm² (illustrative",
		"How the whole sequence moved the canal"} {
		if !strings.Contains(first, want) {
			t.Errorf("the summary page lacks %q", want)
		}
	}
	// Transportation to the micrometre, places to a hundredth of a mm.
	seqVals := map[float64]int{sum.Sequence.TransportationMM["1"]: 3, sum.Sequence.TransportationMM["3"]: 3,
		sum.Sequence.TransportationMM["5"]: 3, sum.Sequence.Largest.MM: 3, sum.Sequence.Largest.FromApexMM: 2}
	for v, d := range seqVals {
		if s := strconv.FormatFloat(v, 'f', d, 64); !strings.Contains(first, s) {
			t.Errorf("the summary page lacks the sequence's %s", s)
		}
	}
	checked := 0
	for _, m := range sum.Steps {
		page := pages[m.Step]
		if !strings.Contains(page, "How this step moved the canal") {
			t.Errorf("step %d's page has no transportation section", m.Step)
		}
		for _, v := range []float64{m.TransportationMM["1"], m.TransportationMM["3"], m.TransportationMM["5"], m.Largest.MM} {
			if v == 0 {
				continue
			}
			checked++
			if s := strconv.FormatFloat(v, 'f', 3, 64); !strings.Contains(page, s) {
				t.Errorf("step %d's page lacks its transportation %s", m.Step, s)
			}
		}
		if m.Largest.MM > 0 {
			dir := strconv.FormatFloat(m.Largest.TowardDeg, 'f', 0, 64) + "° " + sideWord(m.Largest.TowardDeg)
			if !strings.Contains(page, dir) {
				t.Errorf("step %d's page lacks the direction %q", m.Step, dir)
			}
		}
	}
	if checked == 0 {
		t.Error("no nonzero transportation to look for")
	}
}

func TestWriteCSVHasAHeaderAndARowPerStep(t *testing.T) {
	res := demoRun(t)
	var buf bytes.Buffer
	if err := WriteCSV(&buf, res); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 1+len(res.Steps) {
		t.Fatalf("%d rows, want 1 + %d", len(rows), len(res.Steps))
	}
	if strings.Join(rows[0], ",") != strings.Join(analysis.StepColumnKeys(), ",") {
		t.Errorf("header %v", rows[0])
	}
	for k, st := range res.Steps {
		if rows[k+1][0] != strconv.Itoa(st.Number) {
			t.Errorf("row %d is step %s", k+1, rows[k+1][0])
		}
	}
}

func TestWritePDFRejectsAnUnknownView(t *testing.T) {
	res := demoRun(t)
	err := WritePDF(&bytes.Buffer{}, res, Options{View: "sideways"})
	if err == nil || !strings.Contains(err.Error(), "sideways") {
		t.Fatalf("want an error naming the view, got %v", err)
	}
}
