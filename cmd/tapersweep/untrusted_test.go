package main

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"tapersweep/models"
)

// hostileName holds an ANSI colour escape (ECMA-48), a NUL and a right-to-left override
// (Unicode UAX #9), written as JSON escapes so that the spec is valid JSON.
const hostileName = `\u001b[31mred\u001b[0m \u202eevil\u0000`

// TestUntrustedNamesArePrintedSafely: a canal's name from its file reaches the terminal table,
// the CSV of a batch and the PDF without control characters, the JSON as it was (escaped),
// and a 500 kB name does not fill the report.
func TestUntrustedNamesArePrintedSafely(t *testing.T) {
	dir, canals := t.TempDir(), t.TempDir()
	spec := `{"name": "` + hostileName + `", "segments": [{"kind": "straight", "length": 12}], "orifice_d": 1, "apical_d": 0.3}`
	canal := filepath.Join(canals, "c.json")
	seq := filepath.Join(dir, "s.json")
	os.WriteFile(canal, []byte(spec), 0o644)
	os.WriteFile(seq, []byte(`{"steps": [{"size": 20, "taper": 0.04, "depth": "WL"}]}`), 0o644)
	bad := func(s string) bool { return strings.ContainsAny(s, "\x1b\x00\u202e") }

	code, out, errOut := runCLI(t, "analyze", "--canal", canal, "--sequence", seq, "--format", "table")
	if code != exitOK || bad(out) || !strings.Contains(out, "red") {
		t.Errorf("table: exit %d, %q %s", code, out[:min(len(out), 120)], errOut)
	}
	code, out, _ = runCLI(t, "analyze", "--canal", canal, "--sequence", seq, "--format", "json")
	var sum struct {
		Canal struct{ Name string } `json:"canal"`
	}
	if code != exitOK || json.Unmarshal([]byte(out), &sum) != nil || sum.Canal.Name != "\x1b[31mred\x1b[0m \u202eevil\x00" ||
		strings.Contains(out, "\x1b") {
		t.Errorf("JSON: the name is not kept escaped and faithful: %q", sum.Canal.Name)
	}
	csvPath := filepath.Join(dir, "out.csv")
	if code, _, errOut := runCLI(t, "batch", "--canals", canals, "--sequence", seq, "--out", csvPath); code != exitOK {
		t.Errorf("batch: exit %d: %s", code, errOut)
	}
	data, _ := os.ReadFile(csvPath)
	rows, err := csv.NewReader(strings.NewReader(string(data))).ReadAll()
	if err != nil || len(rows) < 2 || bad(string(data)) || !strings.Contains(string(data), "red") {
		t.Errorf("batch CSV: %v %q", err, data)
	}

	// The same canal with a name as long as any is shown and with a 480,000-character one: the
	// same pages, as poppler's pdfinfo (Debian poppler-utils) counts them.
	tool, err := exec.LookPath("pdfinfo")
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal("pdfinfo is missing")
		}
		t.Skip("pdfinfo is missing")
	}
	pages := func(name string) string {
		os.WriteFile(canal, []byte(`{"name": "`+name+`", "segments": [{"kind": "straight", "length": 12}], "orifice_d": 1, "apical_d": 0.3}`), 0o644)
		pdf := filepath.Join(dir, "r.pdf")
		if code, _, errOut := runCLI(t, "report", "--canal", canal, "--sequence", seq, "--out", pdf); code != exitOK {
			t.Fatalf("report: exit %d: %s", code, errOut)
		}
		info, err := exec.Command(tool, pdf).Output()
		if err != nil {
			t.Fatal(err)
		}
		for _, l := range strings.Split(string(info), "\n") {
			if strings.HasPrefix(l, "Pages:") {
				return strings.TrimSpace(strings.TrimPrefix(l, "Pages:"))
			}
		}
		return ""
	}
	long := strings.Repeat("a long name ", 40_000)
	shown, huge := pages(long[:models.MaxNameRunes]), pages(long)
	if shown == "" || huge != shown {
		t.Errorf("a 480,000-character name gives %s pages, one of %d characters %s", huge, models.MaxNameRunes, shown)
	}
}
