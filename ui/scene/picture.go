package scene

import (
	"fmt"
	"image"
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/ui/render"
)

// Picture renders one view of a step (or the canal alone) with its legend and title into a new
// image of w x h pixels, supersampled for print; textScale (0 = 1) enlarges the title and the
// legend for a picture printed small. The window uses Build and the renderer directly; the CLI
// and the report use this.
func Picture(c *analysis.Canal, res *analysis.Result, opt Options, view string, w, h int, textScale float64) (*image.RGBA, error) {
	if w < 64 || h < 64 || w > 8192 || h > 8192 {
		return nil, fmt.Errorf("picture size %dx%d is outside 64..8192 pixels", w, h)
	}
	b, err := Build(c, res, opt)
	if err != nil {
		return nil, err
	}
	cam := render.NewCamera()
	if err := Aim(cam, c, view, float64(w)/float64(h)); err != nil {
		return nil, err
	}
	Frame(cam, b, float64(w)/float64(h))
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	r := render.NewRenderer()
	defer r.Close()
	r.Render(img, b.Scene, cam, render.Options{Supersample: 2})
	DecorateScaled(img, b, c, view, textScale)
	return img, nil
}

// Frame fits the camera, keeping its direction, to the canal and the file (the handle above the
// orifice too), with room above for the title and below for the view's note.
func Frame(cam *render.Camera, b *Built, aspect float64) {
	var file []mgl64.Vec3
	if b.File != nil {
		file = b.File.Vertices
	}
	cam.FitPoints(aspect, 0.06, b.Wall.Vertices, file)
}

// Decorate draws the title, the legend (when a step is shown) and the view's name on a frame.
func Decorate(img *image.RGBA, b *Built, c *analysis.Canal, view string) {
	DecorateScaled(img, b, c, view, 1)
}

// DecorateScaled is Decorate with text and legend k times their screen size.
func DecorateScaled(img *image.RGBA, b *Built, c *analysis.Canal, view string, k float64) {
	k = math.Max(1, k)
	px := func(v float64) int { return int(math.Round(v * k)) }
	size := 13.0
	if img.Bounds().Dx() < 500 {
		size = 11
	}
	render.DrawText(img, px(10), px(8), b.Title, Ink, size*k)
	if b.FileIndex >= 0 || b.Title != "canal" {
		lw, lh := px(138), px(210)
		if img.Bounds().Dy() < px(330) {
			lh = img.Bounds().Dy() - px(60)
		}
		rect := image.Rect(px(10), px(32), px(10)+lw, px(32)+lh)
		render.DrawLegendScaled(img, rect, b.Scale, 0, b.LegendMax, "mm", "depth of cut", "no contact", k)
	}
	if view == "" {
		view = Views[0].Name
	}
	note := fmt.Sprintf("view: %s", view)
	if b.OwnPath {
		note += " · the file bends on its own path; thin line: the centerline"
	}
	if b.PatchMM > 0 {
		note += fmt.Sprintf(" · depth averaged over %.2g mm patches of the scanned wall", b.PatchMM)
	}
	_, th := render.MeasureText(note, 11*k)
	render.DrawText(img, px(10), img.Bounds().Dy()-th-px(8), note, ScannedInk, 11*k)
}
