package render

import (
	"image"
	"image/color"
	"math"
	"sync"

	"golang.org/x/image/font"
	"golang.org/x/image/font/basicfont"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"
	"golang.org/x/image/math/fixed"
)

// Faces are cached per size; a face is not safe for concurrent use, so drawing holds the lock.
var (
	faceMu    sync.Mutex
	faceFont  *opentype.Font
	faceCache = map[float64]font.Face{}
)

// faceFor returns the cached face of the given pixel size; the caller holds faceMu.
func faceFor(size float64) font.Face {
	if !(size >= 4) || math.IsInf(size, 0) {
		size = 4
	}
	size = math.Min(math.Round(size*2)/2, 400)
	if f, ok := faceCache[size]; ok {
		return f
	}
	var face font.Face = basicfont.Face7x13
	if faceFont == nil {
		faceFont, _ = opentype.Parse(goregular.TTF)
	}
	if faceFont != nil {
		if f, err := opentype.NewFace(faceFont, &opentype.FaceOptions{Size: size, DPI: 72, Hinting: font.HintingFull}); err == nil {
			face = f
		}
	}
	faceCache[size] = face
	return face
}

// DrawText draws s with its top-left corner at (x, y) in colour c, size in pixels.
func DrawText(dst *image.RGBA, x, y int, s string, c color.RGBA, size float64) {
	if dst == nil || s == "" {
		return
	}
	faceMu.Lock()
	defer faceMu.Unlock()
	face := faceFor(size)
	d := font.Drawer{Dst: dst, Src: image.NewUniform(c), Face: face,
		Dot: fixed.Point26_6{X: fixed.I(x), Y: fixed.I(y) + face.Metrics().Ascent}}
	d.DrawString(s)
}

// MeasureText returns the width and line height in pixels of s drawn at size.
func MeasureText(s string, size float64) (w, h int) {
	faceMu.Lock()
	defer faceMu.Unlock()
	face := faceFor(size)
	m := face.Metrics()
	return font.MeasureString(face, s).Ceil(), (m.Ascent + m.Descent).Ceil()
}
