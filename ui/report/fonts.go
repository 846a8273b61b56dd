package report

import (
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
)

// The Go fonts are TrueType with a wide character set (°, ², ³, ≤, ×), embedded in the binary,
// so a report looks the same on every machine.
var (
	goRegularTTF = goregular.TTF
	goBoldTTF    = gobold.TTF
)
