package render

import (
	"image"
	"image/color"
	"math"
	"reflect"
	"testing"
)

func TestLegendTicks(t *testing.T) {
	// Common practice for axis ticks (1-2-5 steps): the finest such step that keeps the
	// count within n, ticks at its whole multiples inside the range.
	cases := []struct {
		min, max float64
		n        int
		want     []float64
	}{
		{0, 0.2, 5, []float64{0, 0.05, 0.1, 0.15, 0.2}},
		{0, 1, 6, []float64{0, 0.2, 0.4, 0.6, 0.8, 1}},
		{0.013, 0.087, 4, []float64{0.02, 0.04, 0.06, 0.08}},
		{-3, 7, 3, []float64{0, 5}},
		{-3, 7, 4, []float64{-2, 0, 2, 4, 6}[:0]},
		{0.2, 0, 5, []float64{0, 0.05, 0.1, 0.15, 0.2}},
		{120, 480, 5, []float64{200, 300, 400}},
		{0, 0.03, 10, []float64{0, 0.005, 0.01, 0.015, 0.02, 0.025, 0.03}},
		{0.5, 0.5, 5, []float64{0.5}},
		{1, 2, 1, []float64{1, 2}},
	}
	// {-3, 7, 4}: step 2 gives 5 ticks (too many), step 5 gives 0 and 5.
	cases[4].want = []float64{0, 5}
	for _, c := range cases {
		if got := LegendTicks(c.min, c.max, c.n); !reflect.DeepEqual(got, c.want) {
			t.Errorf("LegendTicks(%v, %v, %d) = %v, want %v", c.min, c.max, c.n, got, c.want)
		}
	}
	for _, c := range [][2]float64{{math.NaN(), 1}, {0, math.Inf(1)}} {
		if got := LegendTicks(c[0], c[1], 5); got != nil {
			t.Errorf("LegendTicks(%v, %v) = %v, want nil", c[0], c[1], got)
		}
	}
	if got := LegendTicks(0, 1e-320, 5); len(got) == 0 || len(got) > 5 {
		t.Errorf("subnormal range gave %v", got)
	}
	if got := LegendTicks(0, 1, 1<<40); len(got) > 1001 {
		t.Errorf("huge n gave %d ticks", len(got))
	}
}

func TestFormatTick(t *testing.T) {
	for _, c := range []struct {
		v    float64
		dec  int
		unit string
		want string
	}{{0.05, 2, "mm", "0.05 mm"}, {math.Copysign(0, -1), 1, "mm", "0.0 mm"}, {12, 0, "", "12"}} {
		if got := FormatTick(c.v, c.dec, c.unit); got != c.want {
			t.Errorf("FormatTick(%v, %d, %q) = %q, want %q", c.v, c.dec, c.unit, got, c.want)
		}
	}
}

func TestDrawLegendStaysInItsRectangle(t *testing.T) {
	bg := color.RGBA{20, 20, 20, 255}
	img := image.NewRGBA(image.Rect(0, 0, 200, 300))
	for i := 0; i < len(img.Pix); i += 4 {
		img.Pix[i], img.Pix[i+1], img.Pix[i+2], img.Pix[i+3] = bg.R, bg.G, bg.B, 255
	}
	rect := image.Rect(30, 40, 150, 260)
	s := DepthScale()
	DrawLegend(img, rect, s, 0, 0.2, "mm", "depth of cut", "no contact")
	changed := 0
	for y := 0; y < 300; y++ {
		for x := 0; x < 200; x++ {
			if img.RGBAAt(x, y) != bg {
				if !(image.Point{x, y}).In(rect) {
					t.Fatalf("legend drew outside its rectangle at (%d,%d)", x, y)
				}
				changed++
			}
		}
	}
	if changed < rect.Dx()*rect.Dy()/2 {
		t.Errorf("legend drew only %d pixels", changed)
	}
	// The bar shows the scale's colours: the deepest colour near its top, the lightest near
	// its bottom, and the neutral swatch somewhere below.
	found := func(c color.RGBA) bool {
		for y := rect.Min.Y; y < rect.Max.Y; y++ {
			for x := rect.Min.X; x < rect.Max.X; x++ {
				if img.RGBAAt(x, y) == c {
					return true
				}
			}
		}
		return false
	}
	for _, c := range []color.RGBA{s.At(0), s.At(1), s.Neutral} {
		if !found(c) {
			t.Errorf("colour %v not in the legend", c)
		}
	}
	// Tiny, empty and off-image rectangles draw nothing and do not panic.
	DrawLegend(img, image.Rect(0, 0, 3, 3), s, 0, 1, "mm", "t", "n")
	DrawLegend(img, image.Rect(500, 500, 700, 800), s, 0, 1, "mm", "t", "n")
	DrawLegend(img, rect, s, math.NaN(), 1, "", "", "")
	DrawLegend(nil, rect, s, 0, 1, "", "", "")
}

func TestDrawTextMarksPixels(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 100, 30))
	DrawText(img, 2, 2, "0.05 mm", color.RGBA{255, 255, 255, 255}, 14)
	w, h := MeasureText("0.05 mm", 14)
	if w < 30 || w > 80 || h < 10 || h > 25 {
		t.Errorf("text measures %d x %d", w, h)
	}
	lit := 0
	for y := 0; y < 30; y++ {
		for x := 0; x < 100; x++ {
			if img.RGBAAt(x, y).R > 0 {
				lit++
				if x > 2+w+1 || y > 2+h+1 {
					t.Fatalf("text pixel at (%d,%d) outside its measured box", x, y)
				}
			}
		}
	}
	if lit < 20 {
		t.Errorf("only %d pixels lit", lit)
	}
}
