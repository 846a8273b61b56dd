package analysis

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"tapersweep/models"
)

// The start of a file decides what it is; JSON of any kind, even UTF-16 or not an object, is
// answered as JSON, never with an STL error (ECMA-404 for what JSON is; UTF-16 by its
// byte-order marks). models.LooksLikeJSON decides; this is the loader's table of cases.
func TestSniffCanalFiles(t *testing.T) {
	for text, want := range map[string]bool{
		`{"segments": []}`:         true,
		"\xEF\xBB\xBF {\"a\": 1}":  true,
		"null":                     true,
		" [1, 2]":                  true,
		`"canal"`:                  true,
		"42\n":                     true,
		"\xFF\xFE{\x00\"\x00":      true,
		"\xFE\xFF\x00{":            true,
		"{\x00\"\x00s\x00":         true,
		"solid canal\nfacet":       false,
		"SOLID CANAL\n":            false,
		"\x00\x00binary header...": false,
		"":                         false,
	} {
		if got := models.LooksLikeJSON([]byte(text)); got != want {
			t.Errorf("%q: JSON %v, want %v", text, got, want)
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
