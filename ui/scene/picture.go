package scene

import (
	"fmt"
	"image"
	"image/color"

	"tapersweep/analysis"
	"tapersweep/ui/render"
)

// Sizes of a picture, pixels per side: under the smallest there is no room for the legend; the
// largest is more than any print needs and bounds the memory of the supersampled buffers.
const (
	MinPictureSide = 64
	MaxPictureSide = 8192
)

// Picture renders one view of a step (or the canal alone) with its legend and title into a new
// image of w x h pixels, supersampled for print. The window uses Build and the renderer
// directly; the CLI and the report use this.
func Picture(c *analysis.Canal, res *analysis.Result, opt Options, view string, w, h int) (*image.RGBA, error) {
	if w < MinPictureSide || h < MinPictureSide || w > MaxPictureSide || h > MaxPictureSide {
		return nil, fmt.Errorf("picture size %dx%d is outside %d..%d pixels", w, h, MinPictureSide, MaxPictureSide)
	}
	b, err := Build(c, res, opt)
	if err != nil {
		return nil, err
	}
	cam := render.NewCamera()
	if err := Aim(cam, c, view, float64(w)/float64(h)); err != nil {
		return nil, err
	}
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	r := render.NewRenderer()
	defer r.Close()
	r.Render(img, b.Scene, cam, render.Options{Supersample: 2})
	Decorate(img, b, c, view)
	return img, nil
}

// Decorate draws the title, the legend (when a step is shown) and the view's name on a frame.
func Decorate(img *image.RGBA, b *Built, c *analysis.Canal, view string) {
	ink := color.RGBA{40, 40, 40, 255}
	size := 13.0
	if img.Bounds().Dx() < 500 {
		size = 11
	}
	render.DrawText(img, 10, 8, b.Title, ink, size)
	if b.FileIndex >= 0 || b.Title != "canal" {
		lw, lh := 130, 200
		if img.Bounds().Dy() < 320 {
			lh = img.Bounds().Dy() - 60
		}
		rect := image.Rect(10, 32, 10+lw, 32+lh)
		render.DrawLegend(img, rect, b.Scale, 0, b.LegendMax, "mm", "depth of cut", "no contact")
	}
	if view == "" {
		view = DefaultView
	}
	note := fmt.Sprintf("view: %s", view)
	if b.OwnPath {
		note += " · the file bends on its own path; thin line: the centerline"
	}
	_, th := render.MeasureText(note, 11)
	render.DrawText(img, 10, img.Bounds().Dy()-th-8, note, color.RGBA{110, 110, 110, 255}, 11)
}
