package main

import (
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"tapersweep/mesh"
	"tapersweep/models"
)

// A manifest gives each canal its own working length and scale: the same canal written in mm
// and in micrometres (scale 0.001) measures the same, and the working length given for one
// row is the one in its rows (and the others keep their own).
func TestBatchManifest(t *testing.T) {
	dir := t.TempDir()
	ex := models.ExampleCanals()[1]
	m := ex.Spec.Mesh(0.25, 24)
	if err := mesh.WriteSTLFile(filepath.Join(dir, "mm.stl"), m); err != nil {
		t.Fatal(err)
	}
	um := &mesh.Mesh{Triangles: m.Triangles}
	for _, v := range m.Vertices {
		um.Vertices = append(um.Vertices, v.Mul(1000))
	}
	if err := os.MkdirAll(filepath.Join(dir, "scans"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := mesh.WriteSTLFile(filepath.Join(dir, "scans", "um.stl"), um); err != nil {
		t.Fatal(err)
	}
	manifest := writeFileIn(t, dir, "study.csv", "file,working_length_mm,scale,orifice,apical_end\n"+
		"mm.stl,,,,\n"+
		"# a comment line\n"+
		"scans/um.stl,9.5,0.001,,\n")
	seq := writeFile(t, "seq.json", []byte(testSequence))
	out := filepath.Join(t.TempDir(), "study_out.csv")
	code, _, errOut := runCLI(t, "batch", "--manifest", manifest, "--sequence", seq, "--out", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	rows := readCSV(t, out)
	col := func(name string) int { return slices.Index(rows[0], name) }
	if len(rows) != 5 {
		t.Fatalf("%d rows, want a header and two steps for each of two canals", len(rows))
	}
	mmLen, _ := strconv.ParseFloat(rows[1][col("length_mm")], 64)
	umLen, _ := strconv.ParseFloat(rows[3][col("length_mm")], 64)
	// The same surface in other units: the same centerline within float32 rounding.
	if rows[3][col("canal_file")] != "scans/um.stl" || mmLen == 0 || (mmLen-umLen)/mmLen > 1e-3 || (umLen-mmLen)/mmLen > 1e-3 {
		t.Errorf("lengths %v (mm) and %v (um scaled): %v", mmLen, umLen, rows[3])
	}
	if rows[3][col("working_length_mm")] != "9.5" || rows[1][col("working_length_mm")] == "9.5" {
		t.Errorf("working lengths %q and %q; want the manifest's 9.5 only on the second canal",
			rows[1][col("working_length_mm")], rows[3][col("working_length_mm")])
	}

	for _, bad := range []struct{ text, say string }{
		{"file,colour\nmm.stl,red\n", "line 1, column 2: unknown column \"colour\""},
		{"working_length_mm\n12\n", "no \"file\" or \"scan\" column"},
		{"file,working_length_mm\nmm.stl,twelve\n", "line 2, column working_length_mm"},
		{"file,orifice\nmm.stl,1 2\n", "line 2, column orifice"},
		{"file,scale\nmm.stl,-1\n", "line 2, column scale"},
		{"file\nmm.stl\nmm.stl\n", "line 3, column file: mm.stl is listed again (first on line 2)"},
		{"file\n", "lists no canals"},
	} {
		p := writeFileIn(t, dir, "bad.csv", bad.text)
		code, _, errOut := runCLI(t, "batch", "--manifest", p, "--sequence", seq, "--out", out)
		if code != exitBadInput || !strings.Contains(errOut, bad.say) || !strings.Contains(errOut, "bad.csv") {
			t.Errorf("%q: exit %d, stderr %q; want %q", bad.text, code, errOut, bad.say)
		}
	}
	if code, _, _ := runCLI(t, "batch", "--manifest", manifest, "--canals", dir, "--sequence", seq, "--out", out); code != exitUsage {
		t.Errorf("--manifest with --canals: exit %d, want %d", code, exitUsage)
	}
}

// A sequence left among the canals fails its row with a message that says what it is; the
// batch exits 1 although the table is written; the output may not replace an input.
func TestBatchSequenceInCanalsFolderAndOutputChecks(t *testing.T) {
	dir := t.TempDir()
	ex := models.ExampleCanals()[0]
	if err := mesh.WriteSTLFile(filepath.Join(dir, "a.stl"), ex.Spec.Mesh(0.25, 24)); err != nil {
		t.Fatal(err)
	}
	seq := writeFileIn(t, dir, "plan.json", testSequence)
	out := filepath.Join(t.TempDir(), "o.csv")
	code, _, errOut := runCLI(t, "batch", "--canals", dir, "--sequence", seq, "--out", out)
	if code != exitBadInput || !strings.Contains(errOut, "this is a sequence, not a canal") {
		t.Errorf("exit %d, stderr:\n%s", code, errOut)
	}
	rows := readCSV(t, out)
	if len(rows) != 4 || !strings.Contains(rows[3][len(rows[3])-1], "plan.json: this is a sequence, not a canal") {
		t.Errorf("rows %v", rows)
	}
	before, _ := os.ReadFile(seq)
	code, _, errOut = runCLI(t, "batch", "--canals", dir, "--sequence", seq, "--out", seq)
	after, _ := os.ReadFile(seq)
	if code != exitBadInput || !strings.Contains(errOut, "would replace the input") || string(before) != string(after) {
		t.Errorf("--out equal to the sequence: exit %d, %s", code, errOut)
	}
	code, _, errOut = runCLI(t, "batch", "--canals", dir, "--sequence", seq, "--out", filepath.Join(dir, "a.stl"))
	if code != exitBadInput || !strings.Contains(errOut, "would replace the input") {
		t.Errorf("--out equal to a canal: exit %d, %s", code, errOut)
	}
}

func writeFileIn(t *testing.T, dir, name, text string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}
