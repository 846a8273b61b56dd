package analysis

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The start of a file decides what it is; JSON that is not a canal spec gets a message about
// JSON, never an STL error (ECMA-404 for what JSON is; UTF-16 by its byte-order marks).
func TestSniffCanalFiles(t *testing.T) {
	for text, want := range map[string]int{
		`{"segments": []}`:         sniffJSON,
		"\xEF\xBB\xBF {\"a\": 1}":  sniffJSON,
		"null":                     sniffNotAnObj,
		" [1, 2]":                  sniffNotAnObj,
		`"canal"`:                  sniffNotAnObj,
		"42\n":                     sniffNotAnObj,
		"\xFF\xFE{\x00\"\x00":      sniffUTF16,
		"\xFE\xFF\x00{":            sniffUTF16,
		"{\x00\"\x00s\x00":         sniffUTF16,
		"solid canal\nfacet":       sniffSTL,
		"SOLID CANAL\n":            sniffSTL,
		"\x00\x00binary header...": sniffSTL,
		"":                         sniffSTL,
	} {
		if got := sniff([]byte(text)); got != want {
			t.Errorf("%q: %d, want %d", text, got, want)
		}
	}
}

// A sequence given as the canal, JSON that is no object, and a spec over the size limit are
// refused with messages that say so and name the file.
func TestLoadCanalRefusesWhatIsNotACanal(t *testing.T) {
	dir := t.TempDir()
	put := func(name, text string) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(text), 0o644)
		return p
	}
	for path, say := range map[string]string{
		put("plan.json", `{"steps": [{"size": 25, "taper": 0.04, "depth": "WL"}]}`): "this is a sequence, not a canal",
		put("list.json", `[{"kind": "straight", "length": 5}]`):                     "not a canal spec",
		put("big.json", `{"segments": []`+strings.Repeat(" ", 2<<20)+`}`):           "more than a canal spec can need",
		dir: "folder",
	} {
		_, err := LoadCanal(t.Context(), path, LoadOptions{})
		if err == nil || !strings.Contains(err.Error(), say) || !strings.Contains(err.Error(), path) {
			t.Errorf("%s: %v, want %q", path, err, say)
		}
		if errors.Is(err, ErrUntrustedSurface) {
			t.Errorf("%s: not a surface question", path)
		}
	}
}
