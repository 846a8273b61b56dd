package render

import (
	"image"
	"image/color"
	"math"
	"strconv"
)

// LegendTicks returns at most n tick values (n < 2 counts as 2) that are whole multiples
// of the smallest step of the form 1, 2 or 5 times a power of ten giving no more than n
// ticks within [min, max]. Values are exact decimals (3*0.05 gives 0.15, not 0.15000000000000002).
func LegendTicks(min, max float64, n int) []float64 {
	ticks, _ := legendTicks(min, max, n)
	return ticks
}

// legendTicks also returns the number of decimals the step needs.
func legendTicks(lo, hi float64, n int) ([]float64, int) {
	if math.IsNaN(lo) || math.IsNaN(hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil, 0
	}
	if lo > hi {
		lo, hi = hi, lo
	}
	n = max(2, min(n, 1000))
	if lo == hi {
		return []float64{lo}, decimalsOf(lo)
	}
	e := -320 // below this 10^e underflows
	if r := (hi - lo) / float64(n); r > 0 && !math.IsInf(r, 0) {
		e = max(e, int(math.Floor(math.Log10(r)))-1)
	}
	for ; e <= 308; e++ {
		for _, m := range [3]float64{1, 2, 5} {
			step := m * math.Pow10(e)
			first, last := math.Ceil(lo/step-1e-9), math.Floor(hi/step+1e-9)
			if !(step > 0) || !(last-first+1 <= float64(n)) {
				continue
			}
			out := make([]float64, 0, n)
			for k := first; k <= last && len(out) < n; k++ {
				out = append(out, decimal(k*m, e))
			}
			return out, max(0, -e)
		}
	}
	return nil, 0
}

// decimal returns v * 10^e rounded once, so it equals the literal a person would write.
func decimal(v float64, e int) float64 {
	if v == 0 {
		return 0 // never -0
	}
	if e >= 0 {
		return v * math.Pow10(e)
	}
	if e < -308 {
		return v * math.Pow10(e) // 10^-e would overflow
	}
	return v / math.Pow10(-e)
}

func decimalsOf(v float64) int {
	s := strconv.FormatFloat(v, 'f', -1, 64)
	for i := range s {
		if s[i] == '.' {
			return len(s) - i - 1
		}
	}
	return 0
}

// FormatTick writes v with the given decimals and a unit after a space ("0.05 mm").
func FormatTick(v float64, decimals int, unit string) string {
	if v == 0 {
		v = 0 // no "-0"
	}
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if unit != "" {
		s += " " + unit
	}
	return s
}

// Legend colours: a light panel with dark text, readable over the light scene background.
var (
	legendPanel = color.RGBA{250, 250, 248, 230}
	legendInk   = color.RGBA{30, 32, 38, 255}
)

// DrawLegend draws a vertical colour bar for s inside rect: title on top, min at the
// bottom and max at the top, ticks at LegendTicks values labelled with unit, and below
// the bar a swatch of the scale's neutral colour labelled neutralLabel (none when empty).
// What does not fit in rect is left out.
func DrawLegend(dst *image.RGBA, rect image.Rectangle, s *Scale, min, max float64, unit, title, neutralLabel string) {
	DrawLegendScaled(dst, rect, s, min, max, unit, title, neutralLabel, 1)
}

// DrawLegendScaled is DrawLegend with text, bar and spacing k times their screen size (for
// pictures printed small); when max is not a tick it is labelled too, so the top of the scale
// reads as the value it stands for.
func DrawLegendScaled(dst *image.RGBA, rect image.Rectangle, s *Scale, min, max float64, unit, title, neutralLabel string, k float64) {
	if dst == nil || s == nil {
		return
	}
	rect = rect.Intersect(dst.Rect)
	if rect.Dx() < 20 || rect.Dy() < 30 {
		return
	}
	fillBlend(dst, rect, legendPanel)
	k = math.Max(1, k)
	pad, barW := int(math.Round(6*k)), int(math.Round(14*k))
	textSize, titleSize := 11*k, 12*k
	_, lineH := MeasureText("0", textSize)
	top := rect.Min.Y + pad
	if title != "" {
		DrawText(dst, rect.Min.X+pad, top, title, legendInk, titleSize)
		_, th := MeasureText(title, titleSize)
		top += th + pad
	}
	bottom := rect.Max.Y - pad - lineH/2
	if neutralLabel != "" {
		bottom -= lineH + pad
	}
	top += lineH / 2 // room for the top label
	if bottom-top < 10 {
		return
	}
	x0 := rect.Min.X + pad
	for y := top; y <= bottom; y++ {
		t := float64(bottom-y) / float64(bottom-top)
		fillBlend(dst, image.Rect(x0, y, x0+barW, y+1), s.At(t))
	}
	strokeRect(dst, image.Rect(x0-1, top-1, x0+barW+1, bottom+2), legendInk)

	ticks, dec := legendTicks(min, max, int(math.Max(2, math.Min(6, float64(bottom-top)/float64(lineH+4)))))
	tick := int(math.Round(4 * k))
	place := func(v float64) int {
		if max == min {
			return bottom
		}
		return bottom - int(math.Round((v-min)/(max-min)*float64(bottom-top)))
	}
	for _, v := range ticks {
		y := place(v)
		if len(ticks) > 0 && v != max && y-top < lineH && ticks[len(ticks)-1] != max {
			continue // the top's own label goes here
		}
		fillBlend(dst, image.Rect(x0+barW, y, x0+barW+tick, y+max1(k)), legendInk)
		DrawText(dst, x0+barW+tick+3, y-lineH/2, FormatTick(v, dec, unit), legendInk, textSize)
	}
	if len(ticks) > 0 && ticks[len(ticks)-1] != max {
		fillBlend(dst, image.Rect(x0+barW, top, x0+barW+tick, top+max1(k)), legendInk)
		DrawText(dst, x0+barW+tick+3, top-lineH/2, FormatTick(max, dec+1, unit), legendInk, textSize)
	}
	if neutralLabel != "" {
		y := rect.Max.Y - pad - lineH
		fillBlend(dst, image.Rect(x0, y, x0+barW, y+lineH), s.Neutral)
		strokeRect(dst, image.Rect(x0-1, y-1, x0+barW+1, y+lineH+1), legendInk)
		DrawText(dst, x0+barW+tick+3, y, neutralLabel, legendInk, textSize)
	}
}

// max1 is a line width of k pixels, at least one.
func max1(k float64) int { return max(1, int(math.Round(k))) }

// fillBlend paints r (clipped to dst) with c blended by its alpha.
func fillBlend(dst *image.RGBA, r image.Rectangle, c color.RGBA) {
	r = r.Intersect(dst.Rect)
	a := int32(c.A) + int32(c.A)>>7 // 0..256
	for y := r.Min.Y; y < r.Max.Y; y++ {
		o := dst.PixOffset(r.Min.X, y)
		for x := r.Min.X; x < r.Max.X; x++ {
			p := dst.Pix[o : o+4 : o+4]
			p[0] = blend(p[0], c.R, a)
			p[1] = blend(p[1], c.G, a)
			p[2] = blend(p[2], c.B, a)
			p[3] = blend(p[3], 255, a)
			o += 4
		}
	}
}

// strokeRect draws the one-pixel border of r.
func strokeRect(dst *image.RGBA, r image.Rectangle, c color.RGBA) {
	fillBlend(dst, image.Rect(r.Min.X, r.Min.Y, r.Max.X, r.Min.Y+1), c)
	fillBlend(dst, image.Rect(r.Min.X, r.Max.Y-1, r.Max.X, r.Max.Y), c)
	fillBlend(dst, image.Rect(r.Min.X, r.Min.Y, r.Min.X+1, r.Max.Y), c)
	fillBlend(dst, image.Rect(r.Max.X-1, r.Min.Y, r.Max.X, r.Max.Y), c)
}
