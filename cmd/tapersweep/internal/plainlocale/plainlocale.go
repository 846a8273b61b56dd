// Package plainlocale keeps the window toolkit quiet when the process runs in the plain "C"
// locale with a character set (LANG=C.UTF-8, the default on servers and in containers).
//
// The toolkit reads the user's language while its packages are initialised and takes "C" from
// "C.UTF-8" for a language name, which it cannot parse, so every command would print three lines
// of error before its own output. The plain locale means "no language": this package names
// English in LANGUAGE, which the toolkit reads next and which gettext ignores in the C locale.
// It runs before the toolkit because packages are initialised in import-path order once their
// imports are ready, and it imports only os and strings, whose paths are ready before the
// toolkit's own text packages (text/template sorts after this path).
//
// A real locale (de_DE.UTF-8, en_GB) and an explicit LANGUAGE are left alone, so a language the
// toolkit cannot read is still reported.
package plainlocale

import (
	"os"
	"strings"
)

func init() {
	if os.Getenv("LANGUAGE") != "" {
		return
	}
	if plain(effective()) {
		os.Setenv("LANGUAGE", "en")
	}
}

// effective is the locale that decides the language of messages (POSIX order).
func effective() string {
	for _, v := range []string{"LC_ALL", "LC_MESSAGES", "LANG"} {
		if s := os.Getenv(v); s != "" {
			return s
		}
	}
	return ""
}

// plain says whether a locale is the C or POSIX locale with a character set or modifier
// ("C.UTF-8", "C.utf8", "POSIX.UTF-8"); the bare names need no help.
func plain(loc string) bool {
	name, _, _ := strings.Cut(loc, "@")
	lang, codeset, found := strings.Cut(name, ".")
	return found && codeset != "" && (lang == "C" || lang == "POSIX")
}
