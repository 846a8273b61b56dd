package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"tapersweep/mesh"
	"tapersweep/models"
)

// testSequence is small so that the batch tests stay quick: two files to a millimetre short of
// working length.
const testSequence = `{"steps": [{"size": 15, "taper": 0.02, "depth": "WL-1"},
                                {"size": 25, "taper": 0.04, "depth": "WL-1"}]}`

// batchFolder writes the invented example canals (parametric ones as coarse STL surfaces, some
// also as specs) and four broken files to a folder; it returns the folder and the names of the
// good and the broken files.
func batchFolder(t *testing.T) (dir string, good, broken []string) {
	t.Helper()
	dir = t.TempDir()
	var goodMesh *mesh.Mesh
	for _, ex := range models.ExampleCanals() {
		if ex.ScanLike {
			continue
		}
		m := ex.Spec.Mesh(0.25, 24)
		goodMesh = m
		name := ex.File + ".stl"
		if err := mesh.WriteSTLFile(filepath.Join(dir, name), m); err != nil {
			t.Fatal(err)
		}
		good = append(good, name)
		if len(good)%4 == 0 {
			js, err := ex.SpecJSON()
			if err != nil {
				t.Fatal(err)
			}
			name := ex.File + "_spec.json"
			if err := os.WriteFile(filepath.Join(dir, name), js, 0o644); err != nil {
				t.Fatal(err)
			}
			good = append(good, name)
		}
	}
	write := func(name string, data []byte) {
		if err := os.WriteFile(filepath.Join(dir, name), data, 0o644); err != nil {
			t.Fatal(err)
		}
		broken = append(broken, name)
	}
	write("broken_empty.stl", nil)
	var whole bytes.Buffer
	if err := mesh.WriteSTL(&whole, goodMesh, "whole"); err != nil {
		t.Fatal(err)
	}
	write("broken_truncated.stl", whole.Bytes()[:whole.Len()/2])
	write("broken_syntax.json", []byte(`{"name": "cut short", "segments": [{"kind": "straight", "length": 8}`))
	// A canal surface cut open lengthwise: half a tube encloses nothing.
	half := &mesh.Mesh{Vertices: goodMesh.Vertices}
	for _, tr := range goodMesh.Triangles {
		if goodMesh.Vertices[tr[0]].Add(goodMesh.Vertices[tr[1]]).Add(goodMesh.Vertices[tr[2]])[1] > 0 {
			half.Triangles = append(half.Triangles, tr)
		}
	}
	var open bytes.Buffer
	if err := mesh.WriteSTL(&open, half, "open"); err != nil {
		t.Fatal(err)
	}
	write("broken_open.stl", open.Bytes())
	// Not canal files: ignored, as is a subfolder.
	if err := os.WriteFile(filepath.Join(dir, "notes.txt"), []byte("not a canal"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Mkdir(filepath.Join(dir, "sub.stl"), 0o755); err != nil {
		t.Fatal(err)
	}
	return dir, good, broken
}

func readCSV(t *testing.T, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return rows
}

func TestBatchRowsErrorsAndJobsDoNotMatter(t *testing.T) {
	dir, good, broken := batchFolder(t)
	if n := len(good) + len(broken); n < 20 {
		t.Fatalf("only %d canals", n)
	}
	seq := writeFile(t, "seq.json", []byte(testSequence))
	outDir := t.TempDir()
	out1, out2 := filepath.Join(outDir, "jobs1.csv"), filepath.Join(outDir, "jobs2.csv")
	// Some canals fail: the table is written whole all the same, and the exit code says so.
	code, _, errOut := runCLI(t, "batch", "--canals", dir, "--sequence", seq, "--out", out1, "--jobs", "1")
	if code != exitBadInput {
		t.Fatalf("jobs 1: exit %d: %s", code, errOut)
	}
	// Not a terminal: one plain progress line per canal.
	total := len(good) + len(broken)
	if got := strings.Count("\n"+errOut, "\nbatch: "); got != total {
		t.Errorf("%d progress lines, want %d:\n%s", got, total, errOut)
	}
	if !strings.Contains(errOut, fmt.Sprintf("%d of %d canals failed", len(broken), total)) {
		t.Errorf("no closing count of failures:\n%s", errOut)
	}
	code, _, errOut = runCLI(t, "batch", "--canals", dir, "--sequence", seq, "--out", out2, "--jobs", "2")
	if code != exitBadInput {
		t.Fatalf("jobs 2: exit %d: %s", code, errOut)
	}
	b1, _ := os.ReadFile(out1)
	b2, _ := os.ReadFile(out2)
	if !bytes.Equal(b1, b2) {
		t.Fatal("the CSV differs between --jobs 1 and --jobs 2")
	}
	if left, _ := filepath.Glob(filepath.Join(outDir, "*partial*")); len(left) > 0 {
		t.Errorf("temporary files left behind: %v", left)
	}

	rows := readCSV(t, out1)
	header := rows[0]
	if !slices.Equal(header, batchColumns()) {
		t.Fatalf("header %v", header)
	}
	col := func(name string) int { return slices.Index(header, name) }
	fileCol, stepCol, errCol := col("canal_file"), col("step"), col("error")
	byFile := map[string][][]string{}
	var order []string
	for _, r := range rows[1:] {
		if len(r) != len(header) {
			t.Fatalf("row of %d fields: %v", len(r), r)
		}
		if len(order) == 0 || order[len(order)-1] != r[fileCol] {
			order = append(order, r[fileCol])
		}
		byFile[r[fileCol]] = append(byFile[r[fileCol]], r)
	}
	want := append(append([]string{}, good...), broken...)
	slices.Sort(want)
	if !slices.Equal(order, want) {
		t.Errorf("canals in the table, in order:\n%v\nwant sorted:\n%v", order, want)
	}
	for _, f := range good {
		rs := byFile[f]
		if len(rs) != 2 {
			t.Errorf("%s: %d rows, want one per step (2)", f, len(rs))
			continue
		}
		for k, r := range rs {
			if r[errCol] != "" || r[stepCol] != []string{"1", "2"}[k] || r[col("engaged_length_mm")] == "" || r[col("length_mm")] == "" {
				t.Errorf("%s row %d: step %q error %q", f, k, r[stepCol], r[errCol])
			}
		}
	}
	for _, f := range broken {
		rs := byFile[f]
		if len(rs) != 1 || rs[0][errCol] == "" || rs[0][stepCol] != "" {
			t.Errorf("%s: want one error row, got %v", f, rs)
			continue
		}
		if !strings.Contains(rs[0][errCol], f) {
			t.Errorf("%s: the error does not name the file: %q", f, rs[0][errCol])
		}
	}

	// A shard holds exactly the full table's rows of its canals (sorted index k, k % 5 == 1).
	outS := filepath.Join(outDir, "shard.csv")
	if code, _, errOut := runCLI(t, "batch", "--canals", dir, "--sequence", seq, "--out", outS, "--shard", "2/5"); code != exitBadInput {
		t.Fatalf("shard: exit %d: %s", code, errOut)
	}
	var wantRows [][]string
	for k, f := range want {
		if k%5 == 1 {
			wantRows = append(wantRows, byFile[f]...)
		}
	}
	shard := readCSV(t, outS)
	if !slices.EqualFunc(shard[1:], wantRows, slices.Equal[[]string]) {
		t.Errorf("shard 2/5 has %d rows, want %d taken from the full table", len(shard)-1, len(wantRows))
	}
}

func TestBatchUsageAndBadInput(t *testing.T) {
	seq := writeFile(t, "seq.json", []byte(testSequence))
	empty := t.TempDir()
	out := filepath.Join(t.TempDir(), "o.csv")
	cases := []struct {
		args []string
		code int
		say  string
	}{
		{[]string{"--sequence", seq, "--out", out}, exitUsage, "--canals is required"},
		{[]string{"--canals", empty, "--out", out}, exitUsage, "--sequence is required"},
		{[]string{"--canals", empty, "--sequence", seq}, exitUsage, "--out is required"},
		{[]string{"--canals", empty, "--sequence", seq, "--out", out, "--jobs", "0"}, exitUsage, "--jobs"},
		{[]string{"--canals", empty, "--sequence", seq, "--out", out, "--shard", "0/3"}, exitUsage, "--shard"},
		{[]string{"--canals", empty, "--sequence", seq, "--out", out, "--shard", "4/3"}, exitUsage, "--shard"},
		{[]string{"--canals", empty, "--sequence", seq, "--out", out, "--shard", "x"}, exitUsage, "--shard"},
		{[]string{"--canals", empty, "--sequence", seq, "--out", out}, exitBadInput, "no canal files"},
		{[]string{"--canals", filepath.Join(empty, "missing"), "--sequence", seq, "--out", out}, exitBadInput, "missing"},
		{[]string{"--canals", empty, "--sequence", filepath.Join(empty, "none.json"), "--out", out}, exitBadInput, "none.json"},
	}
	for _, c := range cases {
		code, _, errOut := runCLI(t, append([]string{"batch"}, c.args...)...)
		if code != c.code || !strings.Contains(errOut, c.say) {
			t.Errorf("batch %v: exit %d, want %d with %q; stderr:\n%s", c.args, code, c.code, c.say, errOut)
		}
	}
}

func TestShardsPartitionTheSortedFiles(t *testing.T) {
	files := []string{"a", "b", "c", "d", "e", "f", "g"}
	var all []string
	for i := 1; i <= 3; i++ {
		all = append(all, shardFiles(files, i, 3)...)
	}
	slices.Sort(all)
	if !slices.Equal(all, files) {
		t.Errorf("shards 1..3 of 3 cover %v", all)
	}
	if got := shardFiles(files, 2, 3); !slices.Equal(got, []string{"b", "e"}) {
		t.Errorf("shard 2/3 = %v, want indices 1 and 4", got)
	}
	for _, s := range []string{"1/1", "3/10", " 2 / 2 "} {
		if _, _, err := parseShard(s); err != nil {
			t.Errorf("%q: %v", s, err)
		}
	}
	for _, s := range []string{"", "1", "0/1", "2/1", "-1/3", "1/0", "a/b", "1/2/3"} {
		if _, _, err := parseShard(s); err == nil {
			t.Errorf("%q accepted", s)
		}
	}
}

func TestProgressBarOnATerminal(t *testing.T) {
	var b bytes.Buffer
	p := newProgress(&b, true)
	p(1, 4, 0, "a.stl", nil)
	p(4, 4, 1, "d.stl", context.Canceled)
	s := b.String()
	if !strings.HasPrefix(s, "\r[") || !strings.Contains(s, "4/4 canals, 1 failed") || !strings.HasSuffix(s, "\n") {
		t.Errorf("bar: %q", s)
	}
	if strings.Count(s, "\n") != 1 {
		t.Errorf("a terminal bar redraws one line: %q", s)
	}
}
