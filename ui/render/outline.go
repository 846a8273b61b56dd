package render

// Outline colour: a dark blue-grey reads on light and dark surfaces alike.
const outlineR, outlineG, outlineB = 34, 38, 48

// outlineRows darkens pixels of outlined objects on the near side of a depth jump:
// a neighbour (ss samples away) that is empty, belongs to another object or is
// farther by more than the threshold. Only rows y0..y1-1 are written; depth and
// object buffers are read across the band border, which is why this runs after
// the pass that fills them. strength is out of 256. Only columns span[0]..span[1] are looked
// at: the band's drawn pixels of that layer lie there, and an outline pixel is a drawn one.
func (r *Renderer) outlineRows(y0, y1 int, depth []float32, objs []uint16, strength int32, span [2]int32) {
	anyOutline := false
	for i := range r.objs {
		anyOutline = anyOutline || r.objs[i].outline
	}
	if !anyOutline {
		return
	}
	w, h, k := r.w, r.h, r.ss
	th := 1 - r.outlineThresh
	x0, x1 := max(0, int(span[0])), min(w-1, int(span[1]))
	if x0 > x1 {
		return
	}
	for y := y0; y < y1; y++ {
		row := y * w
		up, down := row, row
		if y-k >= 0 {
			up = row - k*w
		}
		if y+k < h {
			down = row + k*w
		}
		for x := x0; x <= x1; x++ {
			id := objs[row+x]
			if id == 0 || !r.objs[id-1].outline {
				continue
			}
			c := depth[row+x]
			far := c * th
			edge := false
			check := func(j int) {
				if d := depth[j]; d < far || (objs[j] != id && d < c) {
					edge = true
				}
			}
			if x-k >= 0 {
				check(row + x - k)
			}
			if x+k < w {
				check(row + x + k)
			}
			check(up + x)
			check(down + x)
			if edge {
				o := r.base + y*r.stride + x*4
				p := r.pix[o : o+3 : o+3]
				p[0] = blend(p[0], outlineR, strength)
				p[1] = blend(p[1], outlineG, strength)
				p[2] = blend(p[2], outlineB, strength)
			}
		}
	}
}
