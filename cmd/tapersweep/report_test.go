package main

import (
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
)

// pdfPage matches a page object (ISO 32000-1, 7.7.3.3: /Type /Page), not the page tree (/Pages).
var pdfPage = regexp.MustCompile(`/Type\s*/Page[^s]`)

// TestDemoReportAgreesWithAnalyze: the demo report has the summary page and one page per step,
// and a PDF reader finds in it the numbers `analyze --format json` prints for the same input.
func TestDemoReportAgreesWithAnalyze(t *testing.T) {
	dir := t.TempDir()
	if code, _, errOut := runCLI(t, "demo", "--out", dir); code != exitOK {
		t.Fatalf("demo: exit %d: %s", code, errOut)
	}
	canal, seq := filepath.Join(dir, demoCanalSpecFile), filepath.Join(dir, demoSequenceFile)
	out := filepath.Join(dir, "demo.pdf")
	if code, _, errOut := runCLI(t, "report", "--canal", canal, "--sequence", seq, "--out", out); code != exitOK {
		t.Fatalf("report: exit %d: %s", code, errOut)
	}
	code, js, errOut := runCLI(t, "analyze", "--canal", canal, "--sequence", seq, "--format", "json")
	if code != exitOK {
		t.Fatalf("analyze: exit %d: %s", code, errOut)
	}
	var sum analysis.ResultSummary
	if err := json.Unmarshal([]byte(js), &sum); err != nil {
		t.Fatal(err)
	}
	pdf, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	want := 1 + len(sum.Steps)
	if len(sum.Steps) == 0 {
		t.Fatal("the demo has no steps")
	}
	if got := len(pdfPage.FindAll(pdf, -1)); got != want {
		t.Errorf("%d pages, want the summary and one per step: %d", got, want)
	}

	tool, err := exec.LookPath("pdftotext") // Debian poppler-utils
	if err != nil {
		t.Skip("pdftotext not installed: the text of the report is not checked")
	}
	text, err := exec.Command(tool, "-enc", "UTF-8", out, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	pages := strings.Split(strings.TrimSuffix(string(text), "\f"), "\f")
	if len(pages) != want {
		t.Fatalf("pdftotext read %d pages, want %d", len(pages), want)
	}
	// The report prints each figure to the decimals its column shows a person (Shown).
	shown := func(key string, v float64) string {
		c, _ := analysis.StepColumn(key)
		return strconv.FormatFloat(v, 'f', c.Shown, 64)
	}
	for _, m := range sum.Steps {
		for key, v := range map[string]float64{"tip_depth_mm": m.TipDepthMM, "engaged_length_mm": m.EngagedLengthMM,
			"engaged_area_mm2": m.EngagedAreaMM2, "removed_volume_mm3": m.RemovedVolumeMM3, "untouched_wall_pct": m.UntouchedWallPct,
			"peak_strain_pct": m.PeakStrainPct, "fatigue_damage": m.FatigueDamage, "peak_torque_index": m.PeakTorqueIndex} {
			if !strings.Contains(pages[0], shown(key, v)) {
				t.Errorf("the summary page lacks step %d's %s %s", m.Step, key, shown(key, v))
			}
			if !strings.Contains(pages[m.Step], shown(key, v)) {
				t.Errorf("step %d's page lacks %s %s", m.Step, key, shown(key, v))
			}
		}
		if m.TorsionMargin != nil && !strings.Contains(pages[m.Step], shown("torsion_margin", *m.TorsionMargin)) {
			t.Errorf("step %d's page lacks its torsional margin %s", m.Step, shown("torsion_margin", *m.TorsionMargin))
		}
	}
	for _, v := range []float64{sum.Canal.LengthMM, sum.Canal.WorkingLengthMM} {
		if !strings.Contains(pages[0], strconv.FormatFloat(v, 'f', 2, 64)+" mm") {
			t.Errorf("the summary page lacks the canal's %.2f mm", v)
		}
	}
	if !strings.Contains(strings.Join(strings.Fields(pages[0]), " "), analysis.Caution) {
		t.Error("the summary page lacks the caution wording")
	}
}

// TestElasticReportAgreesWithAnalyze: `report --path-model elastic` states the model and
// carries the transportation `analyze --path-model elastic --format json` prints, per step
// (transportation_mm) and for the whole sequence.
func TestElasticReportAgreesWithAnalyze(t *testing.T) {
	dir := t.TempDir()
	canal := writeFile(t, "canal.json", models.DemoCanalJSON())
	seq := writeFile(t, "seq.json", models.DemoSequenceJSON())
	out := filepath.Join(dir, "elastic.pdf")
	if code, _, errOut := runCLI(t, "report", "--canal", canal, "--sequence", seq, "--out", out, "--path-model", "elastic"); code != exitOK {
		t.Fatalf("report: exit %d: %s", code, errOut)
	}
	code, js, errOut := runCLI(t, "analyze", "--canal", canal, "--sequence", seq, "--format", "json", "--path-model", "elastic")
	if code != exitOK {
		t.Fatalf("analyze: exit %d: %s", code, errOut)
	}
	var sum analysis.ResultSummary
	if err := json.Unmarshal([]byte(js), &sum); err != nil {
		t.Fatal(err)
	}
	if sum.Model.PathModel != models.PathElastic {
		t.Fatalf("analyze ran %q", sum.Model.PathModel)
	}
	tool, err := exec.LookPath("pdftotext") // Debian poppler-utils
	if err != nil {
		t.Skip("pdftotext not installed: the text of the report is not checked")
	}
	text, err := exec.Command(tool, "-enc", "UTF-8", out, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	pages := strings.Split(strings.TrimSuffix(string(text), "\f"), "\f")
	if len(pages) != 1+len(sum.Steps) {
		t.Fatalf("pdftotext read %d pages, want %d", len(pages), 1+len(sum.Steps))
	}
	if !strings.Contains(pages[0], "elastic:") {
		t.Error("the summary page does not name the elastic path")
	}
	// Transportation is printed to the micrometre, as its column shows it.
	num := func(v float64) string { return strconv.FormatFloat(v, 'f', 3, 64) }
	found := 0
	for _, m := range sum.Steps {
		for _, k := range []string{"1", "3", "5"} {
			if v := m.TransportationMM[k]; v != 0 {
				found++
				if !strings.Contains(pages[m.Step], num(v)) {
					t.Errorf("step %d's page lacks its transportation at %s mm, %s", m.Step, k, num(v))
				}
			}
		}
	}
	for _, k := range []string{"1", "3", "5"} {
		if v := sum.Sequence.TransportationMM[k]; v != 0 && !strings.Contains(pages[0], num(v)) {
			t.Errorf("the summary page lacks the sequence's transportation at %s mm, %s", k, num(v))
		}
	}
	if found == 0 {
		t.Error("the elastic demo moves the canal nowhere: nothing to look for")
	}
}

func TestReportUsageAndBadInput(t *testing.T) {
	dir := t.TempDir()
	seq := writeFile(t, "seq.json", models.DemoSequenceJSON())
	canal := writeFile(t, "canal.json", models.DemoCanalJSON())
	bad := writeFile(t, "bad.stl", []byte("solid x\nfacet normal 0 0 1\n"))
	out := filepath.Join(dir, "r.pdf")
	cases := []struct {
		args []string
		code int
		say  string
	}{
		{[]string{"--sequence", seq, "--out", out}, exitUsage, "--canal is required"},
		{[]string{"--canal", canal, "--out", out}, exitUsage, "--sequence is required"},
		{[]string{"--canal", canal, "--sequence", seq}, exitUsage, "--out is required"},
		{[]string{"--canal", canal, "--sequence", seq, "--out", out, "--view", "sideways"}, exitUsage, "--view"},
		{[]string{"--canal", canal, "--sequence", seq, "--out", out, "--path-model", "wobbly"}, exitUsage, "--path-model"},
		{[]string{"--canal", canal, "--sequence", seq, "--out", out, "--bogus"}, exitUsage, "bogus"},
		{[]string{"--canal", bad, "--sequence", seq, "--out", out}, exitBadInput, "bad.stl"},
		{[]string{"--canal", canal, "--sequence", seq, "--out", filepath.Join(dir, "no", "such", "r.pdf")}, exitBadInput, "r.pdf"},
	}
	for _, c := range cases {
		code, _, errOut := runCLI(t, append([]string{"report"}, c.args...)...)
		if code != c.code || !strings.Contains(errOut, c.say) {
			t.Errorf("report %v: exit %d, want %d with %q; stderr:\n%s", c.args, code, c.code, c.say, errOut)
		}
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Error("a failed report left a file")
	}
}

// TestHelpOnEveryCommand: one style across subcommands: --help exits 0 with the usage, the flags
// and an example that starts with the program's name and the command.
func TestHelpOnEveryCommand(t *testing.T) {
	for _, c := range commands() {
		code, out, _ := runCLI(t, c.name, "--help")
		if code != exitOK {
			t.Errorf("%s --help: exit %d", c.name, code)
		}
		for _, want := range []string{"Usage: tapersweep " + c.name, "Flags:", "Example:\n  tapersweep " + c.name} {
			if !strings.Contains(out, want) {
				t.Errorf("%s --help lacks %q:\n%s", c.name, want, out)
			}
		}
		if code, _, _ := runCLI(t, c.name, "--no-such-flag"); code != exitUsage {
			t.Errorf("%s with an unknown flag: exit %d, want %d", c.name, code, exitUsage)
		}
	}
}

func TestDemoWritesFilesThatLoad(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "new", "folder")
	code, out, errOut := runCLI(t, "demo", "--out", dir)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	for _, f := range []string{demoCanalSpecFile, demoCanalSTLFile, demoSequenceFile} {
		if !strings.Contains(out, filepath.Join(dir, f)) {
			t.Errorf("demo does not list %s", f)
		}
	}
	spec, _ := os.ReadFile(filepath.Join(dir, demoCanalSpecFile))
	seq, _ := os.ReadFile(filepath.Join(dir, demoSequenceFile))
	if !bytes.Equal(spec, models.DemoCanalJSON()) || !bytes.Equal(seq, models.DemoSequenceJSON()) {
		t.Error("the demo files differ from the built-in demo")
	}
	// The STL is the same canal: its centerline is as long as the spec's path, 10 + 2 straight
	// and arcs of 5 mm over 40 deg and 8 mm over 20 deg (analytic: 12 + 5*40*pi/180 + 8*20*pi/180).
	want := 12 + 5*40*3.141592653589793/180 + 8*20*3.141592653589793/180
	code, js, errOut := runCLI(t, "centerline", "--canal", filepath.Join(dir, demoCanalSTLFile))
	if code != exitOK {
		t.Fatalf("centerline of the demo STL: exit %d: %s", code, errOut)
	}
	var got struct {
		LengthMM float64 `json:"length_mm"`
	}
	if err := json.Unmarshal([]byte(js), &got); err != nil {
		t.Fatal(err)
	}
	if d := got.LengthMM - want; d > 0.01*want || d < -0.01*want {
		t.Errorf("demo STL centerline %.3f mm, want %.3f within 1 %%", got.LengthMM, want)
	}
	if code, _, _ := runCLI(t, "demo"); code != exitUsage {
		t.Errorf("demo without --out: exit %d, want %d", code, exitUsage)
	}
}
