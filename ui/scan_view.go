package ui

import (
	"image"
	"sync"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/widget"
	"github.com/go-gl/mathgl/mgl64"
)

// sliceView shows one slice picture scaled to fit; a click reports the point of the scan
// under it.
type sliceView struct {
	widget.BaseWidget
	raster  *canvas.Raster
	onClick func(p mgl64.Vec3)

	mu             sync.Mutex
	pic            *slicePicture
	scale, ox, oy  float64 // of the last frame: screen pixel = o + scale * picture pixel
	pixelsPerPoint float32
}

func newSliceView(onClick func(p mgl64.Vec3)) *sliceView {
	v := &sliceView{onClick: onClick, scale: 1, pixelsPerPoint: 1}
	v.raster = canvas.NewRaster(v.generate)
	v.ExtendBaseWidget(v)
	return v
}

func (v *sliceView) CreateRenderer() fyne.WidgetRenderer { return widget.NewSimpleRenderer(v.raster) }

func (v *sliceView) MinSize() fyne.Size { return fyne.NewSize(220, 220) }

// show replaces the picture (any goroutine) and redraws on the UI goroutine's next frame.
func (v *sliceView) show(pic *slicePicture) {
	v.mu.Lock()
	v.pic = pic
	v.mu.Unlock()
	v.raster.Refresh()
}

func (v *sliceView) generate(w, h int) image.Image {
	v.mu.Lock()
	defer v.mu.Unlock()
	if v.pic == nil {
		return image.NewRGBA(image.Rect(0, 0, max(w, 1), max(h, 1)))
	}
	img, s, ox, oy := fitImage(v.pic.img, w, h)
	v.scale, v.ox, v.oy = s, ox, oy
	if sz := v.Size(); sz.Width > 0 {
		v.pixelsPerPoint = float32(w) / sz.Width
	}
	return img
}

// Tapped places a point where the user clicked.
func (v *sliceView) Tapped(e *fyne.PointEvent) {
	v.mu.Lock()
	pic, s, ox, oy, ppp := v.pic, v.scale, v.ox, v.oy, v.pixelsPerPoint
	v.mu.Unlock()
	if pic == nil || v.onClick == nil || s <= 0 {
		return
	}
	x := (float64(e.Position.X*ppp) - ox) / s
	y := (float64(e.Position.Y*ppp) - oy) / s
	b := pic.img.Rect
	if x < 0 || y < 0 || x > float64(b.Dx()) || y > float64(b.Dy()) {
		return
	}
	v.onClick(pic.world(x, y))
}
