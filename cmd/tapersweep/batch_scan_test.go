package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"tapersweep/mesh/volume/volumetest"
)

// A manifest row may name a scan and the canal's two ends instead of a canal file: the batch
// finds the canal as `centerline --scan` does (the same length), names it by its label, never
// writes the patient, and refuses a scan row without its ends or with a scale.
func TestBatchManifestScans(t *testing.T) {
	dir, ends := patientPhantom(t)
	series := filepath.Join(dir, "series")
	orifice, apex := ends[1], ends[3]
	code, stdout, stderr := runCLI(t, append([]string{"centerline", "--scan", series}, ends...)...)
	var line struct {
		LengthMM float64 `json:"length_mm"`
	}
	if code != exitOK || json.Unmarshal([]byte(stdout), &line) != nil || line.LengthMM == 0 {
		t.Fatalf("centerline --scan: exit %d: %s %s", code, stdout, stderr)
	}
	wantLen := line.LengthMM

	manifest := writeFileIn(t, dir, "study.csv", "scan,label,orifice,apical_end,file\n"+
		fmt.Sprintf("series,tooth 46 demo canal,%q,%q,\n", orifice, apex)+
		",,,,"+filepath.Base(writeFileIn(t, dir, "spec.json", planCanalJSON))+"\n")
	seq := writeFile(t, "seq.json", []byte(testSequence))
	out := filepath.Join(t.TempDir(), "study_out.csv")
	code, _, errOut := runCLI(t, "batch", "--manifest", manifest, "--sequence", seq, "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	text, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	for _, id := range strings.Split(volumetest.MadeUpPatient, "|") {
		for _, part := range strings.Split(id, "^") {
			if strings.Contains(string(text), part) || strings.Contains(errOut, part) {
				t.Errorf("the batch output carries the patient's %q", part)
			}
		}
	}
	rows := readCSV(t, out)
	col := func(name string) int { return slices.Index(rows[0], name) }
	if len(rows) != 5 || rows[1][col("canal_file")] != "tooth 46 demo canal" || rows[1][col("error")] != "" {
		t.Fatalf("rows %q", rows)
	}
	got, _ := strconv.ParseFloat(rows[1][col("length_mm")], 64)
	// The same pipeline as centerline --scan: the same canal to the float's rounding.
	if diff := got - wantLen; diff > 1e-6 || diff < -1e-6 {
		t.Errorf("batch length %v, centerline --scan %v", got, wantLen)
	}
	if !strings.Contains(rows[1][col("warnings")], "found in the scan") {
		t.Errorf("the scan's caution is not among the row's warnings: %q", rows[1][col("warnings")])
	}

	for _, bad := range []struct{ text, say string }{
		{"scan,orifice\nseries," + strconv.Quote(orifice) + "\n", "line 2, column apical_end: a scan needs the canal's two ends"},
		{"scan,orifice,apical_end,scale\nseries," + strconv.Quote(orifice) + "," + strconv.Quote(apex) + ",0.001\n", "line 2, column scale"},
		{"scan,file\nseries,spec.json\n", "line 2, column scan: a row names a canal file or a scan, not both"},
		{"file,voxel_mm\nspec.json,0.02\n", "line 2, column voxel_mm"},
		{"scan,orifice,apical_end\nseries," + strconv.Quote(orifice) + "," + strconv.Quote(apex) + "\nseries," +
			strconv.Quote(orifice) + "," + strconv.Quote(apex) + "\n", "line 3, column scan"},
	} {
		p := writeFileIn(t, dir, "bad.csv", bad.text)
		code, _, errOut := runCLI(t, "batch", "--manifest", p, "--sequence", seq, "--out", out)
		if code != exitBadInput || !strings.Contains(errOut, bad.say) || !strings.Contains(errOut, "bad.csv") {
			t.Errorf("%q: exit %d, stderr %q; want %q", bad.text, code, errOut, bad.say)
		}
	}
}
