package models

import "image/color"

// isoSizes is the ISO 3630-1 list of nominal sizes: the tip diameter in hundredths of a millimetre.
var isoSizes = [...]int{6, 8, 10, 15, 20, 25, 30, 35, 40, 45, 50, 55, 60, 70, 80, 90, 100, 110, 120, 130, 140}

// isoColour is one entry of the ISO 3630-1 size colour code, kept as the colour's name and the
// plain sRGB value of that name (CSS Color Module Level 4 named colours).
type isoColour struct {
	name string
	rgb  color.RGBA
}

var (
	isoPink   = isoColour{"pink", color.RGBA{0xFF, 0xC0, 0xCB, 0xFF}}
	isoGrey   = isoColour{"grey", color.RGBA{0x80, 0x80, 0x80, 0xFF}}
	isoPurple = isoColour{"purple", color.RGBA{0x80, 0x00, 0x80, 0xFF}}
	isoWhite  = isoColour{"white", color.RGBA{0xFF, 0xFF, 0xFF, 0xFF}}
	isoYellow = isoColour{"yellow", color.RGBA{0xFF, 0xFF, 0x00, 0xFF}}
	isoRed    = isoColour{"red", color.RGBA{0xFF, 0x00, 0x00, 0xFF}}
	isoBlue   = isoColour{"blue", color.RGBA{0x00, 0x00, 0xFF, 0xFF}}
	isoGreen  = isoColour{"green", color.RGBA{0x00, 0x80, 0x00, 0xFF}}
	isoBlack  = isoColour{"black", color.RGBA{0x00, 0x00, 0x00, 0xFF}}
)

// isoCycle is the six-colour run that starts at size 15 and repeats for 45-80 and 90-140.
var isoCycle = [6]isoColour{isoWhite, isoYellow, isoRed, isoBlue, isoGreen, isoBlack}

// ISOSizes returns the ISO 3630-1 size list in ascending order (a fresh copy).
func ISOSizes() []int {
	out := make([]int, len(isoSizes))
	copy(out, isoSizes[:])
	return out
}

// IsISOSize reports whether size is on the ISO 3630-1 size list.
func IsISOSize(size int) bool {
	return isoIndex(size) >= 0
}

func isoIndex(size int) int {
	for i, s := range isoSizes {
		if s == size {
			return i
		}
	}
	return -1
}

// ISOColor returns the ISO 3630-1 colour of a size: its plain name and the sRGB value of that name.
// White is returned as true white; drawing it so that it shows on a light background is up to the
// renderer. ok is false for a size off the ISO list.
func ISOColor(size int) (name string, rgb color.RGBA, ok bool) {
	i := isoIndex(size)
	if i < 0 {
		return "", color.RGBA{}, false
	}
	var c isoColour
	switch {
	case size == 6:
		c = isoPink
	case size == 8:
		c = isoGrey
	case size == 10:
		c = isoPurple
	default:
		// From size 15 on (list index 3) the six colours run in order, three times over.
		c = isoCycle[(i-3)%len(isoCycle)]
	}
	return c.name, c.rgb, true
}
