package plainlocale

import "testing"

// Locale names as POSIX (IEEE Std 1003.1, "Locale") writes them: language[_territory][.codeset][@modifier].
func TestPlain(t *testing.T) {
	for loc, want := range map[string]bool{
		"C.UTF-8": true, "C.utf8": true, "POSIX.UTF-8": true, "C.UTF-8@euro": true,
		"C": false, "POSIX": false, "": false, "de_DE.UTF-8": false, "en_GB": false, "Ca.UTF-8": false, "C.": false,
	} {
		if got := plain(loc); got != want {
			t.Errorf("plain(%q) = %v, want %v", loc, got, want)
		}
	}
}
