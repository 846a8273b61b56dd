package models

import (
	"strings"
	"unicode"
	"unicode/utf8"
)

// Lengths of untrusted text in outputs: a name (a canal's, an alloy's, a file's) and a message
// that may quote one. A 500 kB canal name once made a 276-page report.
const (
	MaxNameRunes    = 120
	MaxMessageRunes = 2000
)

// Printable makes text from a file or a file name safe to show on a terminal, in a CSV cell,
// a PDF or a window: bytes that are not UTF-8 and control characters become U+FFFD, as do the
// invisible characters that reorder or hide text (bidirectional overrides, zero-width marks);
// line breaks and tabs become spaces; text longer than maxRunes is cut and ends with "…".
// JSON outputs keep the text as it was (encoding/json escapes control characters).
func Printable(s string, maxRunes int) string {
	if isPlain(s, maxRunes) {
		return s
	}
	var b strings.Builder
	n := 0
	for _, r := range strings.ToValidUTF8(s, "\uFFFD") {
		if n == maxRunes {
			b.WriteRune('…')
			break
		}
		switch {
		case r == '\t' || r == '\n' || r == '\r' || r == '\u2028' || r == '\u2029':
			r = ' '
		case unicode.IsControl(r) || unicode.Is(unicode.Cf, r):
			r = '\uFFFD'
		}
		b.WriteRune(r)
		n++
	}
	return b.String()
}

// isPlain is the common case: short printable ASCII, returned as it is.
func isPlain(s string, maxRunes int) bool {
	if len(s) > maxRunes {
		return false
	}
	for i := 0; i < len(s); i++ {
		if c := s[i]; c < 0x20 || c >= utf8.RuneSelf || c == 0x7F {
			return false
		}
	}
	return true
}
