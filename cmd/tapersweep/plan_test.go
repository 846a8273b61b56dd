package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"tapersweep/models"
)

// planCanalJSON is an invented canal: 10 mm straight, a 60 degree arc on a 3 mm radius, 2 mm
// straight, 1.0 mm across at the orifice narrowing to 0.25 mm.
const planCanalJSON = `{"name": "test canal: 60 deg curve on a 3 mm radius (invented)",
 "segments": [{"kind": "straight", "length": 10}, {"kind": "arc", "radius": 3, "angle": 60},
              {"kind": "straight", "length": 2}], "orifice_d": 1.0, "apical_d": 0.25}`

func runPlanCLI(args ...string) (code int, stdout, stderr string) {
	var out, errOut bytes.Buffer
	code = run(args, &out, &errOut)
	return code, out.String(), errOut.String()
}

// TestPlanCommand: plan writes a sequence that analyze reads, and prints the comparison with
// the --compare sequence, per step and overall; the plan's largest engaged length and peak
// torque are no higher than those of the same-taper series 20/.04, 25/.04, 30/.04 (common
// practice of the trade: change taper when changing files).
func TestPlanCommand(t *testing.T) {
	dir := t.TempDir()
	canal := filepath.Join(dir, "canal.json")
	series := filepath.Join(dir, "series.json")
	out := filepath.Join(dir, "plan.json")
	os.WriteFile(canal, []byte(planCanalJSON), 0o644)
	os.WriteFile(series, []byte(`{"steps": [{"size": 20, "taper": 0.04, "depth": "WL"},
		{"size": 25, "taper": 0.04, "depth": "WL"}, {"size": 30, "taper": 0.04, "depth": "WL"}]}`), 0o644)
	code, stdout, stderr := runPlanCLI("plan", "--canal", canal, "--target", "30/.04", "--max-steps", "4",
		"--out", out, "--compare", series)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"proposed plan", "compared with: " + series, "largest engaged length, mm",
		"largest peak torque, N·cm (illustrative)", "largest fatigue use (1 = fracture)", "Objective:", "proposed sequence written to"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("output lacks %q:\n%s", want, stdout)
		}
	}
	data, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	seq, err := models.ParseSequence(out, data)
	if err != nil {
		t.Fatalf("the written plan does not read back: %v", err)
	}
	if last := seq.Steps[len(seq.Steps)-1]; last.Instrument.Label() != "30/.04" || last.Depth != models.DepthWL(0) {
		t.Errorf("last step %s to %s, want 30/.04 to WL", last.Instrument.Label(), last.Depth)
	}
	if code, _, stderr := runPlanCLI("analyze", "--canal", canal, "--sequence", out, "--format", "csv"); code != exitOK {
		t.Errorf("analyze rejects the plan: exit %d: %s", code, stderr)
	}
	// The overall rows: plan then compared.
	for _, row := range []string{"largest engaged length, mm", "largest peak torque, N·cm (illustrative)"} {
		i := strings.Index(stdout, row)
		if i < 0 {
			continue
		}
		rest := stdout[i+len(row):]
		fields := strings.Fields(rest[:strings.Index(rest, "\n")])
		if len(fields) != 2 {
			t.Errorf("%s: %v", row, fields)
			continue
		}
		plan, err1 := strconv.ParseFloat(fields[0], 64)
		cmp, err2 := strconv.ParseFloat(fields[1], 64)
		if err1 != nil || err2 != nil || plan > cmp {
			t.Errorf("%s: plan %s against series %s", row, fields[0], fields[1])
		}
	}
}

// TestPlanCommandInputs: an engaged-length cap no plan can keep is bad input (exit 1) and the
// message names the constraint; a missing or malformed target is a usage error (exit 2).
func TestPlanCommandInputs(t *testing.T) {
	dir := t.TempDir()
	canal := filepath.Join(dir, "canal.json")
	os.WriteFile(canal, []byte(planCanalJSON), 0o644)
	shelf := filepath.Join(dir, "shelf.json")
	os.WriteFile(shelf, []byte(`[{"size": 20, "taper": 0.06}, {"size": 30, "taper": 0.04}]`), 0o644)
	code, _, stderr := runPlanCLI("plan", "--canal", canal, "--target", "30/.04", "--instruments", shelf, "--max-engaged", "0.5")
	if code != exitBadInput || !strings.Contains(stderr, "engaged length under 0.5 mm") {
		t.Errorf("cap: exit %d: %s", code, stderr)
	}
	if code, _, stderr := runPlanCLI("plan", "--canal", canal); code != exitUsage || !strings.Contains(stderr, "--target is required") {
		t.Errorf("no target: exit %d: %s", code, stderr)
	}
	if code, _, _ := runPlanCLI("plan", "--canal", canal, "--target", "30-04"); code != exitUsage {
		t.Errorf("bad target: exit %d", code)
	}
	if code, _, _ := runPlanCLI("plan", "--canal", canal, "--target", "30/.04", "--weights", "1,2"); code != exitUsage {
		t.Errorf("bad weights: exit %d", code)
	}
	bad := filepath.Join(dir, "bad.json")
	os.WriteFile(bad, []byte(`[{"size": 20}]`), 0o644)
	if code, _, stderr := runPlanCLI("plan", "--canal", canal, "--target", "30/.04", "--instruments", bad); code != exitBadInput ||
		!strings.Contains(stderr, "instrument 1: taper: missing") {
		t.Errorf("bad instruments: exit %d: %s", code, stderr)
	}
	if code, stdout, _ := runPlanCLI("plan", "--help"); code != exitOK || !strings.Contains(stdout, "Example:") {
		t.Errorf("help: exit %d", code)
	}
}
