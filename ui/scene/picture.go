package scene

import (
	"fmt"
	"image"
	"math"

	"github.com/go-gl/mathgl/mgl64"

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
// image of w x h pixels, supersampled for print; textScale (0 = 1) enlarges the title and the
// legend for a picture printed small. The window uses Build and the renderer directly; the CLI
// and the report use this.
func Picture(c *analysis.Canal, res *analysis.Result, opt Options, view string, w, h int, textScale float64) (*image.RGBA, error) {
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
	Frame(cam, b, w, h, textScale)
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	r := render.NewRenderer()
	defer r.Close()
	r.Render(img, b.Scene, cam, render.Options{Supersample: 2})
	DecorateScaled(img, b, c, view, textScale)
	return img, nil
}

// Frame fits the camera, keeping its direction, to the canal and the file (the handle above the
// orifice too) in a w x h picture, with room above for the title, below for the view's note and
// on the left for the legend drawn k times its screen size (DecorateScaled).
func Frame(cam *render.Camera, b *Built, w, h int, k float64) {
	var file []mgl64.Vec3
	if b.File != nil {
		file = b.File.Vertices
	}
	left := 0
	if hasLegend(b) {
		left = min(w/3, legendRect(w, h, math.Max(1, k)).Max.X)
	}
	if b.RootIndex >= 0 {
		file = append(append([]mgl64.Vec3{}, file...), b.Scene.Objects[b.RootIndex].Mesh.Vertices...)
	}
	cam.FitPoints(float64(w-left)/float64(h), 0.06, b.Wall.Vertices, file)
	cam.Pan(-float64(left)/2/float64(h), 0)
}

// hasLegend says whether the picture carries the depth-of-cut legend: when a step is shown.
func hasLegend(b *Built) bool { return b.WallMode || b.FileIndex >= 0 || b.Title != "canal" }

// legendRect is where the legend goes in a w x h picture at text scale k.
func legendRect(w, h int, k float64) image.Rectangle {
	px := func(v float64) int { return int(math.Round(v * k)) }
	lw, lh := px(138), px(210)
	if h < px(330) {
		lh = h - px(60)
	}
	return image.Rect(px(10), px(32), px(10)+lw, px(32)+lh)
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
	if hasLegend(b) {
		rect := legendRect(img.Bounds().Dx(), img.Bounds().Dy(), k)
		if b.WallMode {
			render.DrawLegendScaled(img, rect, b.Scale, 0, b.LegendMax, "mm", "wall to root", "", k)
		} else {
			render.DrawLegendScaled(img, rect, b.Scale, 0, b.LegendMax, "mm", "depth of cut", "no contact", k)
		}
	}
	if view == "" {
		view = DefaultView
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
