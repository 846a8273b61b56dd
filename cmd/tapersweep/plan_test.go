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

// planCanalJSON is an invented canal: 10 mm straight, a 45 degree arc on a 5 mm radius, 3 mm
// straight, 1.0 mm across at the orifice narrowing to 0.25 mm.
const planCanalJSON = `{"name": "test canal: 45 deg curve on a 5 mm radius (invented)",
 "segments": [{"kind": "straight", "length": 10}, {"kind": "arc", "radius": 5, "angle": 45},
              {"kind": "straight", "length": 3}], "orifice_d": 1.0, "apical_d": 0.25}`

// tightCanalJSON is an invented canal with a 60 degree arc on a 3 mm radius, where a 30/.04 is
// bent past its recoverable strain.
const tightCanalJSON = `{"name": "test canal: 60 deg curve on a 3 mm radius (invented)",
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
	for _, want := range []string{"proposed plan", "compared with: " + series, "largest engaged length (cuts past the contact threshold), mm",
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
	for _, row := range []string{"largest engaged length (cuts past the contact threshold), mm", "largest peak torque, N·cm (illustrative)"} {
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
	if code != exitBadInput || !strings.Contains(stderr, "infeasible: ") || !strings.Contains(stderr, "engaged length under 0.5 mm") {
		t.Errorf("cap: exit %d: %s", code, stderr)
	}
	// A cap of 0.001 mm is stated as given, not rounded to "0.0 mm".
	code, _, stderr = runPlanCLI("plan", "--canal", canal, "--target", "30/.04", "--instruments", shelf, "--max-engaged", "0.001")
	if code != exitBadInput || !strings.Contains(stderr, "engaged length under 0.001 mm") {
		t.Errorf("tiny cap: exit %d: %s", code, stderr)
	}
	// A target the tool would warn cannot follow the canal is refused, with the reason.
	tight := filepath.Join(dir, "tight.json")
	os.WriteFile(tight, []byte(tightCanalJSON), 0o644)
	code, _, stderr = runPlanCLI("plan", "--canal", tight, "--target", "30/.04")
	if code != exitBadInput || !strings.Contains(stderr, "infeasible: ") || !strings.Contains(stderr, "recoverable strain") {
		t.Errorf("tight canal: exit %d: %s", code, stderr)
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

// TestPlanCompareSaysWhatElseDiffers: compared with a sequence in another alloy and at another
// speed, the comparison says so (fatigue use counts revolutions and depends on the alloy:
// Pruett et al. 1997), and says nothing of the kind when the compared sequence differs only in
// its files.
func TestPlanCompareSaysWhatElseDiffers(t *testing.T) {
	dir := t.TempDir()
	canal := filepath.Join(dir, "canal.json")
	os.WriteFile(canal, []byte(planCanalJSON), 0o644)
	other := filepath.Join(dir, "other.json")
	os.WriteFile(other, []byte(`{"steps": [{"size": 15, "taper": 0.02, "depth": "WL", "rpm": 300},
		{"size": 30, "taper": 0.04, "depth": "WL", "alloy": "niti-martensitic", "rpm": 300}]}`), 0o644)
	same := filepath.Join(dir, "same.json")
	os.WriteFile(same, []byte(`{"steps": [{"size": 15, "taper": 0.02, "depth": "WL"}, {"size": 30, "taper": 0.04, "depth": "WL"}]}`), 0o644)
	code, stdout, stderr := runPlanCLI("plan", "--canal", canal, "--target", "30/.04", "--max-steps", "3", "--compare", other)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"note: the compared sequence uses the alloy(s)", "niti-martensitic",
		"note: the compared sequence uses rotation at 300 rpm where the plan uses 400 rpm"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("output lacks %q:\n%s", want, stdout)
		}
	}
	code, stdout, stderr = runPlanCLI("plan", "--canal", canal, "--target", "30/.04", "--max-steps", "3", "--compare", same)
	if code != exitOK || strings.Contains(stdout, "note: the compared sequence") {
		t.Errorf("exit %d, notes where only the files differ:\n%s%s", code, stdout, stderr)
	}
}

// grooveCanalJSON is an invented canal in an oval root grooved 1 mm below the orifice on the
// outer side of the curve (the planner's own test case, analysis/plan/wall_test.go, where the
// analytic walls along the radius are worked out: about 0.46 mm for the 25/.04 taken to
// working length, 0.30 mm for a 20/.10 opener taken to 9.5 mm).
const grooveCanalJSON = `{"name": "coronal groove (invented)",
	"segments": [{"kind": "straight", "length": 10}, {"kind": "arc", "radius": 5, "angle": 40},
		{"kind": "arc", "radius": 8, "angle": 20, "plane_turn": 180}, {"kind": "straight", "length": 2}],
	"orifice_d": 0.7, "apical_d": 0.15, "oval": 1.4, "working_length": 17.5,
	"root": {"coronal_d": 4.2, "apical_d": 1.6, "oval": 1.7,
		"concavity": {"depth": 0.73, "toward_deg": 180, "width_deg": 90, "from_apex": 17.28, "length": 4}}}`

// TestPlanCommandKeepWall: with a root, the plan's tables state each step's thinnest wall and
// the least overall; a wall to keep that wide openers would break binds and is said to; one more
// than the target file alone leaves is infeasible (exit 1), naming the wall.
func TestPlanCommandKeepWall(t *testing.T) {
	canal := filepath.Join(t.TempDir(), "groove.json")
	os.WriteFile(canal, []byte(grooveCanalJSON), 0o644)
	code, stdout, stderr := runPlanCLI("plan", "--canal", canal, "--target", "25/.04", "--keep-wall", "0.33")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	for _, want := range []string{"thinnest wall mm", "thinnest wall left to the root surface, mm (estimate)", "The wall to keep (0.33 mm) binds"} {
		if !strings.Contains(stdout, want) {
			t.Errorf("output lacks %q:\n%s", want, stdout)
		}
	}
	// The least wall of the plan, from the overall table, keeps the 0.33 mm.
	for _, line := range strings.Split(stdout, "\n") {
		if f := strings.Fields(line); strings.Contains(line, "thinnest wall left") && len(f) >= 2 {
			if v, err := strconv.ParseFloat(f[len(f)-2], 64); err != nil || v < 0.33 {
				t.Errorf("the plan leaves %q mm of wall, want at least 0.33", f[len(f)-2])
			}
		}
	}
	code, _, stderr = runPlanCLI("plan", "--canal", canal, "--target", "25/.04", "--keep-wall", "0.47")
	if code != exitBadInput || !strings.Contains(stderr, "infeasible") || !strings.Contains(stderr, "0.47 mm") || !strings.Contains(stderr, "wall") {
		t.Errorf("--keep-wall 0.47: exit %d, %q; want infeasible naming the wall", code, stderr)
	}
}
