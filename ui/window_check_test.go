package ui

import (
	"context"
	"image"
	"image/color"
	"image/draw"
	"image/png"
	"os"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
	"tapersweep/ui/render"
)

// legendMargin is how far from the left edge of the viewport the legend reaches (drawn at
// x = 10, 130 px wide by scene.Decorate, inside a few pixels of padding): depth colours right
// of it are on the wall.
const legendMargin = 170

// depthSamples are colours of the depth-of-cut scale away from its neutral.
var depthSamples = func() []color.RGBA {
	s := render.DepthScale()
	var out []color.RGBA
	for t := 0.04; t <= 1.0001; t += 0.02 {
		out = append(out, s.At(t))
	}
	return out
}()

// isDepthColour says whether pixel (x, y) is a lit depth-of-cut colour. The renderer shades a
// colour c as k*c (ambient light keeps k above about 0.3), so a pixel counts when some k in
// 0.4..1.05 brings a scale colour within 10 levels per channel. Grey pixels (a dark theme, the
// neutral wall) are left out by asking for a channel spread of at least 24 levels: the scale
// keeps a chroma of at least 0.07 everywhere.
func isDepthColour(img image.Image, x, y int) bool {
	r, g, b, _ := img.At(x, y).RGBA()
	p := [3]float64{float64(r >> 8), float64(g >> 8), float64(b >> 8)}
	if max(p[0], p[1], p[2])-min(p[0], p[1], p[2]) < 24 {
		return false
	}
	for _, c := range depthSamples {
		q := [3]float64{float64(c.R), float64(c.G), float64(c.B)}
		// best shade factor by least squares, clamped to what lighting does
		k := (p[0]*q[0] + p[1]*q[1] + p[2]*q[2]) / (q[0]*q[0] + q[1]*q[1] + q[2]*q[2] + 1e-9)
		k = max(0.4, min(1.05, k))
		if abs3(p[0]-k*q[0]) <= 10 && abs3(p[1]-k*q[1]) <= 10 && abs3(p[2]-k*q[2]) <= 10 {
			return true
		}
	}
	return false
}

func abs3(v float64) float64 {
	if v < 0 {
		return -v
	}
	return v
}

// depthColourPixels counts depth-of-cut coloured pixels right of skipLeft.
func depthColourPixels(img image.Image, skipLeft int) int {
	b := img.Bounds()
	n := 0
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X + skipLeft; x < b.Max.X; x++ {
			if isDepthColour(img, x, y) {
				n++
			}
		}
	}
	return n
}

// distinctColours counts colours up to limit.
func distinctColours(img image.Image, limit int) int {
	seen := map[color.RGBA]bool{}
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y += 2 {
		for x := b.Min.X; x < b.Max.X; x += 2 {
			r, g, bb, _ := img.At(x, y).RGBA()
			seen[color.RGBA{uint8(r >> 8), uint8(g >> 8), uint8(bb >> 8), 255}] = true
			if len(seen) >= limit {
				return len(seen)
			}
		}
	}
	return len(seen)
}

// checkWindowPicture is the window check: not blank, and the wall carries depth-of-cut colours.
func checkWindowPicture(img image.Image) (colours, depth int, ok bool) {
	colours = distinctColours(img, 1000)
	depth = depthColourPixels(img, legendMargin)
	return colours, depth, colours >= 200 && depth >= 200
}

// TestWindowCapture checks a capture of the real window (the CI window check sets
// TAPERSWEEP_WINDOW_PNG after taking it under Xvfb).
func TestWindowCapture(t *testing.T) {
	path := os.Getenv("TAPERSWEEP_WINDOW_PNG")
	if path == "" {
		t.Skip("TAPERSWEEP_WINDOW_PNG not set: no window capture to check")
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	colours, depth, ok := checkWindowPicture(img)
	t.Logf("%s: %dx%d, %d+ colours, %d pixels in depth-of-cut colours", path, img.Bounds().Dx(), img.Bounds().Dy(), colours, depth)
	if !ok {
		t.Errorf("%s: the window looks blank or shows no contact (%d colours, %d depth-of-cut pixels; want 200 of each)", path, colours, depth)
	}
}

// The check must be able to fail: a blank window, the canal alone, and a step whose file does
// not touch the wall (only the legend carries the scale) are all rejected; a step with a long
// contact band passes.
func TestWindowCheckRejectsBlankAndContactFreeFrames(t *testing.T) {
	w := openDemo(t)
	blank := image.NewRGBA(image.Rect(0, 0, 900, 600))
	draw.Draw(blank, blank.Rect, image.NewUniform(color.RGBA{30, 30, 30, 255}), image.Point{}, draw.Src)
	if _, _, ok := checkWindowPicture(blank); ok {
		t.Error("a blank window passes")
	}
	// Every file of the demo engages its (narrow) canal: a small file held short of the canal's
	// narrow part gives the frame without contact.
	free, err := models.ParseSequence("free.json", []byte(`{"steps": [{"size": 6, "taper": 0.02, "depth": 8}]}`))
	if err != nil {
		t.Fatal(err)
	}
	freeRes, err := analysis.Run(context.Background(), w.canal, free, analysis.RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	frame := func(step int) image.Image {
		in := w.view.input()
		in.opt.Step, in.res = step, w.res
		if step < 0 {
			in.opt.Step, in.res = 1, freeRes
		}
		if step == 0 {
			in.res = nil
		}
		cam, view := w.view.camera()
		img, err := viewPicture(in, cam, view, 900, 600)
		if err != nil {
			t.Fatal(err)
		}
		return img
	}
	if a := freeRes.Steps[0].Metrics.EngagedAreaMM2; a != 0 {
		t.Fatalf("a 06/.02 to 8 mm is expected to run free of the wall (area %v)", a)
	}
	if c, d, ok := checkWindowPicture(frame(-1)); ok {
		t.Errorf("a step without contact passes (%d colours, %d depth pixels)", c, d)
	}
	if c, d, ok := checkWindowPicture(frame(3)); !ok {
		t.Errorf("step 3, with a long contact band, fails (%d colours, %d depth pixels)", c, d)
	}
	if c, d, ok := checkWindowPicture(frame(0)); ok {
		t.Errorf("the canal alone passes (%d colours, %d depth pixels)", c, d)
	}
}
