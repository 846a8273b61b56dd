package models

import (
	"strings"
	"testing"
	"unicode/utf8"
)

// TestPrintable: text a file brings along cannot drive a terminal (ANSI escape sequences, ECMA-48),
// reorder what is shown (Unicode bidirectional overrides, UAX #9) or fill a report.
func TestPrintable(t *testing.T) {
	for in, want := range map[string]string{
		"demo canal (invented)":              "demo canal (invented)",
		"mesial \x1b[31mred\x1b[0m":          "mesial \uFFFD[31mred\uFFFD[0m",
		"a\x00b":                             "a\uFFFDb",
		"evil \u202Etxt.exe":                 "evil \uFFFDtxt.exe",
		"zero\u200Bwidth":                    "zero\uFFFDwidth",
		"two\nlines\tand tab":                "two lines and tab",
		"latin-1 \xe9":                       "latin-1 \uFFFD",
		"Mésiale, racine mésio-vestibulaire": "Mésiale, racine mésio-vestibulaire",
	} {
		if got := Printable(in, MaxNameRunes); got != want {
			t.Errorf("Printable(%q) = %q, want %q", in, got, want)
		}
	}
	long := strings.Repeat("é", 500_000)
	got := Printable(long, MaxNameRunes)
	if n := utf8.RuneCountInString(got); n != MaxNameRunes+1 || !strings.HasSuffix(got, "…") {
		t.Errorf("a 500,000-character name comes out %d characters long", n)
	}
}
