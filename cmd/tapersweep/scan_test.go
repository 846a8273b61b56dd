package main

import (
	"context"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
	"tapersweep/mesh/volume/volumetest"
)

// patientPhantom is a synthetic DICOM series (and the same scan as one multi-frame file)
// whose headers carry a made-up patient, with the canal's two ends.
func patientPhantom(t *testing.T) (dir string, ends []string) {
	t.Helper()
	dir = volumetest.Phantom(t, "--voxel", "0.3", "--sigma", "1.0", "--factor", "2", "--formats", "series,multiframe",
		"--patient", volumetest.MadeUpPatient)
	o, x := volumetest.Ends(t, dir)
	at := func(p mgl64.Vec3) string { return fmt.Sprintf("%g,%g,%g", p[0], p[1], p[2]) }
	return dir, []string{"--orifice", at(o), "--apical-end", at(x)}
}

// The segment command writes closed canal and root surfaces and states the unresolved
// stretch; other commands take --scan where they take --canal.
func TestSegmentCommand(t *testing.T) {
	dir, ends := patientPhantom(t)
	out := t.TempDir()
	args := append([]string{"segment", "--scan", filepath.Join(dir, "series"), "--out", filepath.Join(out, "canal.stl"),
		"--root", filepath.Join(out, "root.stl")}, ends...)
	code, stdout, stderr := runCLI(t, args...)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var sum segmentSummary
	if err := json.Unmarshal([]byte(stdout), &sum); err != nil {
		t.Fatalf("%v\n%s", err, stdout)
	}
	if len(sum.Canals) != 1 || len(sum.Canals[0].Unresolved) == 0 || sum.Scan.SeriesDate != "2024-06-11" || sum.Scan.Dimensions[0] == 0 {
		t.Errorf("summary %+v", sum)
	}
	for _, f := range []string{"canal.stl", "root.stl"} {
		m, rep, err := mesh.LoadFile(context.Background(), filepath.Join(out, f), mesh.LoadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if v := mesh.Validate(m); len(v.Warnings()) > 0 {
			t.Errorf("%s: %v %v", f, v.Warnings(), rep.Notes)
		}
	}
	// Two canals: one pair of points each, written as two surfaces.
	args = append(append([]string{"segment", "--scan", filepath.Join(dir, "multiframe.dcm"), "--out", filepath.Join(out, "two.stl"), "--format", "table"}, ends...), ends...)
	if code, stdout, stderr := runCLI(t, args...); code != exitOK || !strings.Contains(stdout, "canal 2:") {
		t.Fatalf("exit %d: %s %s", code, stdout, stderr)
	}
	// The same canal twice (the phantom has one): twice the triangles of one.
	count := func(f string) uint32 {
		b, err := os.ReadFile(filepath.Join(out, f))
		if err != nil || len(b) < 84 {
			t.Fatalf("%s: %v", f, err)
		}
		return binary.LittleEndian.Uint32(b[80:])
	}
	if one, two := count("canal.stl"), count("two.stl"); one == 0 || two != 2*one {
		t.Errorf("two canals: %d triangles, one canal %d", two, one)
	}
	// Usage errors.
	for _, bad := range [][]string{
		{"segment", "--scan", dir, "--out", "x.stl"},
		append([]string{"segment", "--out", "x.stl"}, ends...),
		append([]string{"centerline", "--scan", dir, "--canal", "x.stl"}, ends...),
		{"centerline", "--scan", dir},
	} {
		if code, _, _ := runCLI(t, bad...); code != exitUsage {
			t.Errorf("%v: exit %d, want %d", bad, code, exitUsage)
		}
	}
}

// No output of any command carries a patient identifier unless --show-patient asks for it
// (data-protection practice for health data; the series' headers carry a made-up name, ID,
// birth date and institution).
func TestNoPatientIdentifiersByDefault(t *testing.T) {
	dir, ends := patientPhantom(t)
	demo := t.TempDir()
	if code, _, stderr := runCLI(t, "demo", "--out", demo); code != exitOK {
		t.Fatal(stderr)
	}
	seq := filepath.Join(demo, "demo-sequence.json")
	out := t.TempDir()
	var outputs []string // every stdout and stderr
	runAll := func(extra ...string) {
		for n, scan := range []string{filepath.Join(dir, "series"), filepath.Join(dir, "multiframe.dcm")} {
			s := append([]string{"--scan", scan}, append(ends, extra...)...)
			all := [][]string{
				append([]string{"segment", "--out", filepath.Join(out, "canal.stl"), "--root", filepath.Join(out, "root.stl")}, s...),
				append([]string{"segment", "--format", "table", "--out", filepath.Join(out, "canal2.stl")}, s...),
				append([]string{"centerline", "--format", "json"}, s...),
				append([]string{"centerline", "--format", "csv"}, s...),
				append([]string{"analyze", "--sequence", seq, "--format", "json"}, s...),
				append([]string{"analyze", "--sequence", seq, "--format", "csv"}, s...),
				append([]string{"analyze", "--sequence", seq, "--format", "table"}, s...),
				append([]string{"report", "--sequence", seq, "--out", filepath.Join(out, "report.pdf")}, s...),
				append([]string{"render", "--sequence", seq, "--step", "1", "--out", filepath.Join(out, "step.png")}, s...),
				append([]string{"plan", "--target", "25/.04"}, s...),
				// A failing run: its error message must not name the patient either.
				{"segment", "--scan", scan, "--orifice", "0,0,0", "--apical-end", "0,0,-80", "--out", filepath.Join(out, "x.stl")},
			}
			if n > 0 { // the multi-frame file: its own reader's outputs; the rest is shared
				all = [][]string{all[1], all[2], all[len(all)-1]}
			}
			for _, args := range all {
				code, stdout, stderr := runCLI(t, args...)
				if code == exitUsage {
					t.Fatalf("%v: usage error %s", args, stderr)
				}
				outputs = append(outputs, fmt.Sprintf("%v\n%s\n%s", args, stdout, stderr))
			}
		}
	}
	runAll()
	identifiers := []string{"ZEBULON", "QUARTERMAINE", "ZQ-4471-0093", "19010203", "1901-02-03", "Quarry Hill"}
	files, _ := filepath.Glob(filepath.Join(out, "*"))
	if len(files) < 5 {
		t.Fatalf("outputs written: %v", files)
	}
	check := func(what, text string) {
		for _, id := range identifiers {
			if strings.Contains(strings.ToUpper(text), strings.ToUpper(id)) {
				t.Errorf("%s carries %q", what, id)
			}
		}
	}
	for _, o := range outputs {
		check("output "+strings.SplitN(o, "\n", 2)[0], o)
	}
	for _, f := range files {
		b, _ := os.ReadFile(f)
		check(f, string(b))
		if strings.HasSuffix(f, ".pdf") {
			check(f+" (text)", pdfText(t, f))
		}
	}
	// Asked for, the name is on the report, at the top of every page.
	args := append([]string{"report", "--scan", filepath.Join(dir, "series"), "--show-patient", "--sequence", seq, "--out", filepath.Join(out, "named.pdf")}, ends...)
	if code, _, stderr := runCLI(t, args...); code != exitOK {
		t.Fatal(stderr)
	}
	pages := strings.Split(pdfText(t, filepath.Join(out, "named.pdf")), "\f")
	n := 0
	for _, p := range pages {
		if strings.TrimSpace(p) == "" {
			continue
		}
		n++
		if !strings.Contains(p, "ZEBULON QUARTERMAINE") || !strings.Contains(p, "ZQ-4471-0093") {
			t.Errorf("page %d of the named report does not carry the patient at its top", n)
		}
	}
	if n < 2 {
		t.Errorf("named report has %d pages", n)
	}
}

// pdfText extracts a PDF's text with pdftotext (Debian poppler-utils); pages end in \f.
func pdfText(t *testing.T, path string) string {
	t.Helper()
	tool, err := exec.LookPath("pdftotext")
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal("pdftotext (Debian poppler-utils) is needed")
		}
		t.Skip("pdftotext not installed")
	}
	out, err := exec.Command(tool, "-enc", "UTF-8", path, "-").Output()
	if err != nil {
		t.Fatal(err)
	}
	return string(out)
}
