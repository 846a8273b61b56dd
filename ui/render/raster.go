package render

import (
	"math"
	"math/bits"
)

// Rows are split into bands of bandH rows; one worker owns a band at a time, so no
// two goroutines write the same pixel and the result does not depend on scheduling.

// opaquePhase clears each band and draws the opaque triangles into it, object by object nearest
// first (opaqueOrder). A pixel goes to the nearest surface and, of surfaces at the same depth,
// to the one of the lowest object number: the first one drawn when objects are drawn in their
// order, so the picture does not depend on the order (within an object, triangles keep theirs).
// Once the nearest object is drawn, a triangle of another that lies behind everything drawn in
// the tiles it touches is skipped whole (behindTiles).
func (r *Renderer) opaquePhase(worker int) {
	tiles := r.tiles[worker]
	for {
		band, ok := r.nextItem(r.nBands)
		if !ok {
			return
		}
		y0, y1 := r.bandRows(band)
		r.clearRows(y0, y1, band)
		lo, hi := int32(r.w), int32(-1)
		tilesSet := false
		for k, oi := range r.opaqueOrder {
			for c := r.objChunks[oi][0]; c < r.objChunks[oi][1]; c++ {
				list := r.chunks[c].opaque
				for _, idx := range r.bins[c*r.nBands+band] {
					t := &list[idx]
					ys, ye := max(t.minY, int32(y0)), min(t.maxY, int32(y1-1))
					if k > 0 && !tilesSet { // the nearest object is drawn
						r.farthestInTiles(tiles, y0, y1, lo, hi)
						tilesSet = true
					}
					lo, hi = min(lo, t.minX), max(hi, t.maxX)
					if k > 0 && behindTiles(t, ys, ye, tiles) {
						continue
					}
					if t.cover != 0 { // most triangles: no edge functions, so no setup for them
						r.rasterOpaqueSmall(t, ys, ye)
					} else {
						r.rasterOpaque(t, ys, ye)
					}
				}
			}
		}
		r.opaqueSpan[band] = [2]int32{lo, hi}
	}
}

// tileCols is the width in columns of the tiles whose farthest depth hides triangles.
const tileCols = 8

// farthestInTiles sets tiles[i] to the smallest 1/w (0 where nothing is drawn) in rows y0..y1-1
// of columns i*tileCols.. (i+1)*tileCols-1, for the tiles that meet columns lo..hi, outside of
// which nothing is drawn yet; 0 elsewhere.
func (r *Renderer) farthestInTiles(tiles []float32, y0, y1 int, lo, hi int32) {
	clear(tiles)
	if lo > hi {
		return
	}
	t0, t1 := int(lo)/tileCols, int(hi)/tileCols
	for i := t0; i <= t1; i++ {
		tiles[i] = float32(math.Inf(1))
	}
	x0, x1 := t0*tileCols, min(r.w, (t1+1)*tileCols)
	for y := y0; y < y1; y++ {
		row := r.z[y*r.w+x0 : y*r.w+x1]
		for x, z := range row {
			if i := (x0 + x) / tileCols; z < tiles[i] {
				tiles[i] = z
			}
		}
	}
}

// behindTiles reports whether every pixel of t in rows ys..ye lies behind the farthest depth of
// each tile it touches, by more than the rounding of the pixels' depths: drawing it would
// change nothing.
func behindTiles(t *triSetup, ys, ye int32, tiles []float32) bool {
	if ys > ye {
		return true
	}
	fa, fb, fx := float32(ys-t.minY), float32(ye-t.minY), float32(t.maxX-t.minX)
	za, zb, zx := t.zdy*fa, t.zdy*fb, t.zdx*fx
	nearest := t.z + max(za, zb) + max(zx, 0)
	// Each pixel's 1/w is two roundings of float32 sums away from the plane's: a bound on
	// their error, with room to spare.
	slack := (abs32(t.z) + abs32(za) + abs32(zb) + abs32(zx)) * 1e-5
	if !(nearest+slack < float32(math.Inf(1))) {
		return false // NaN or infinite planes: drawn, as before
	}
	for _, far := range tiles[t.minX/tileCols : t.maxX/tileCols+1] {
		if !(nearest+slack < far) {
			return false
		}
	}
	return true
}

// seeThroughPhase outlines the opaque layer, then blends the see-through triangles far to near.
func (r *Renderer) seeThroughPhase(worker int) {
	for {
		band, ok := r.nextItem(r.nBands)
		if !ok {
			return
		}
		y0, y1 := r.bandRows(band)
		r.outlineRows(y0, y1, r.z, r.oObj, 190, r.opaqueSpan[band])
		lo, hi := int32(r.w), int32(-1)
		for _, it := range r.sortSeeThrough(band, worker) {
			t := &r.chunks[it.chunk].clear[it.idx]
			r.rasterSeeThrough(t, y0, y1, r.objs[t.obj-1].alpha)
			lo, hi = min(lo, t.minX), max(hi, t.maxX)
		}
		r.clearSpan[band] = [2]int32{lo, hi}
	}
}

// finishPhase outlines the see-through layer and, when supersampling, filters the band down.
func (r *Renderer) finishPhase(int) {
	for {
		band, ok := r.nextItem(r.nBands)
		if !ok {
			return
		}
		y0, y1 := r.bandRows(band)
		r.outlineRows(y0, y1, r.tz, r.tObj, 150, r.clearSpan[band])
		if r.ss > 1 {
			r.downsampleRows(y0, y1)
		}
	}
}

func (r *Renderer) bandRows(band int) (int, int) {
	y0 := band * r.bandH
	return y0, min(y0+r.bandH, r.h)
}

// clearRows paints rows y0..y1-1 of band with the background and empties their depth and
// object buffers. Depth and objects are written only where the last frame drew, so only the
// columns its spans cover need clearing (whole rows after a resize): most frames leave the
// see-through layer empty and the sides of the view untouched, and clearing 12 bytes a pixel
// over the whole frame was a tenth of an opaque frame's time.
func (r *Renderer) clearRows(y0, y1, band int) {
	full := [2]int32{0, int32(r.w - 1)}
	os, cs := full, full
	if r.spansValid {
		os, cs = r.opaqueSpan[band], r.clearSpan[band]
	}
	for y := y0; y < y1; y++ {
		o := r.base + y*r.stride
		copy(r.pix[o:o+r.w*4], r.bgRow)
		if os[0] <= os[1] {
			a, b := y*r.w+int(os[0]), y*r.w+int(os[1])+1
			clear(r.z[a:b])
			clear(r.oObj[a:b])
		}
		if cs[0] <= cs[1] {
			a, b := y*r.w+int(cs[0]), y*r.w+int(cs[1])+1
			clear(r.tz[a:b])
			clear(r.tObj[a:b])
		}
	}
}

// edges returns the three edge functions of t at the centre of pixel (x, y) and their
// steps per pixel in x. Each is biased by -1 on edges that are not top or left, so
// "e >= 0" is the top-left fill rule and shared edges are drawn exactly once.
func edges(t *triSetup, x, y int32) (e0, e1, e2, s0, s1, s2 int64) {
	px := int64(x)<<subBits + subHalf
	py := int64(y)<<subBits + subHalf
	e0, s0 = edgeFunction(t.x1, t.y1, t.x2, t.y2, px, py)
	e1, s1 = edgeFunction(t.x2, t.y2, t.x0, t.y0, px, py)
	e2, s2 = edgeFunction(t.x0, t.y0, t.x1, t.y1, px, py)
	return
}

// edgeFunction returns the edge function of edge a->b at point (px, py) (fixed point), biased
// for the top-left rule, and its step per pixel in x.
func edgeFunction(ax, ay, bx, by int32, px, py int64) (e, step int64) {
	dx, dy := int64(bx-ax), int64(by-ay)
	e = dx*(py-int64(ay)) - dy*(px-int64(ax))
	if !(dy < 0 || (dy == 0 && dx > 0)) {
		e--
	}
	return e, -dy << subBits
}

// rowStep is how much the edge functions grow from one pixel row to the next.
func rowStep(t *triSetup) (r0, r1, r2 int64) {
	return int64(t.x2-t.x1) << subBits, int64(t.x0-t.x2) << subBits, int64(t.x1-t.x0) << subBits
}

// span returns the pixel offsets lo..hi (from the row start) where all three edge
// functions are >= 0; lo > hi when the row misses the triangle. It saves walking the
// empty part of a wide bounding box (long slivers close to the eye).
func span(e0, e1, e2, s0, s1, s2, last int64) (lo, hi int64) {
	lo, hi = 0, last
	for _, es := range [3][2]int64{{e0, s0}, {e1, s1}, {e2, s2}} {
		e, st := es[0], es[1]
		switch {
		case st > 0:
			if e < 0 {
				lo = max(lo, (-e+st-1)/st)
			}
		case st < 0:
			if e < 0 {
				return 1, 0
			}
			hi = min(hi, e/(-st))
		default:
			if e < 0 {
				return 1, 0
			}
		}
	}
	return lo, hi
}

// wideBox is the bounding-box width from which computing each row's span pays off.
const wideBox = 12

func clampByte(v float32) byte {
	if v >= 255 {
		return 255
	}
	if v <= 0 {
		return 0
	}
	return byte(v + 0.5)
}

// rasterOpaque draws the rows ys..ye of t, a triangle without a cover mask, with a depth test
// (larger 1/w is nearer; opaquePhase says who wins a tie).
func (r *Renderer) rasterOpaque(t *triSetup, ys, ye int32) {
	if ys > ye {
		return
	}
	e0, e1, e2, s0, s1, s2 := edges(t, t.minX, ys)
	r0, r1, r2 := rowStep(t)
	wide := t.maxX-t.minX >= wideBox
	w := int32(r.w)
	zb, pix := r.z, r.pix
	for y := ys; y <= ye; y++ {
		a0, a1, a2 := e0, e1, e2
		fy := float32(y - t.minY)
		zr, rr, gr, br := t.z+t.zdy*fy, t.r+t.rdy*fy, t.g+t.gdy*fy, t.b+t.bdy*fy
		x0, x1 := t.minX, t.maxX
		if wide {
			lo, hi := span(a0, a1, a2, s0, s1, s2, int64(x1-x0))
			if lo > hi {
				e0 += r0
				e1 += r1
				e2 += r2
				continue
			}
			x0, x1 = t.minX+int32(lo), t.minX+int32(hi)
			a0, a1, a2 = a0+s0*lo, a1+s1*lo, a2+s2*lo
		}
		i := int(y*w + x0)
		o := r.base + int(y)*r.stride + int(x0)*4
		fx := float32(x0 - t.minX)
		for x := x0; x <= x1; x++ {
			if a0|a1|a2 >= 0 {
				if iw := zr + t.zdx*fx; iw > zb[i] || iw == zb[i] && t.obj < r.oObj[i] {
					zb[i] = iw
					k := 1 / iw
					p := pix[o : o+4 : o+4]
					p[0] = clampByte((rr + t.rdx*fx) * k)
					p[1] = clampByte((gr + t.gdx*fx) * k)
					p[2] = clampByte((br + t.bdx*fx) * k)
					p[3] = 255
					r.oObj[i] = t.obj
					r.triID[i] = t.tri
				}
			}
			a0 += s0
			a1 += s1
			a2 += s2
			fx++
			i++
			o += 4
		}
		e0 += r0
		e1 += r1
		e2 += r2
	}
}

// rasterOpaqueSmall is rasterOpaque for a triangle whose covered pixels are known
// (triSetup.cover), in rows ys..ye (none when ys > ye); the same arithmetic gives the same
// depths and colours.
func (r *Renderer) rasterOpaqueSmall(t *triSetup, ys, ye int32) {
	for m := uint(t.cover); m != 0; m &= m - 1 {
		j := int32(bits.TrailingZeros(m))
		dy := j >> 2
		y := t.minY + dy
		if y < ys || y > ye {
			continue
		}
		dx := j & 3
		fy, fx := float32(dy), float32(dx)
		i := int(y*int32(r.w) + t.minX + dx)
		if iw := t.z + t.zdy*fy + t.zdx*fx; iw > r.z[i] || iw == r.z[i] && t.obj < r.oObj[i] {
			r.z[i] = iw
			k := 1 / iw
			o := r.base + int(y)*r.stride + int(t.minX+dx)*4
			p := r.pix[o : o+4 : o+4]
			p[0] = clampByte((t.r + t.rdy*fy + t.rdx*fx) * k)
			p[1] = clampByte((t.g + t.gdy*fy + t.gdx*fx) * k)
			p[2] = clampByte((t.b + t.bdy*fy + t.bdx*fx) * k)
			p[3] = 255
			r.oObj[i] = t.obj
			r.triID[i] = t.tri
		}
	}
}

// rasterSeeThrough blends t (opacity alpha/256) over what is drawn, behind no opaque surface.
func (r *Renderer) rasterSeeThrough(t *triSetup, y0, y1 int, alpha int32) {
	ys, ye := max(t.minY, int32(y0)), min(t.maxY, int32(y1-1))
	if ys > ye {
		return
	}
	if t.cover != 0 {
		r.rasterSeeThroughSmall(t, ys, ye, alpha)
		return
	}
	e0, e1, e2, s0, s1, s2 := edges(t, t.minX, ys)
	r0, r1, r2 := rowStep(t)
	wide := t.maxX-t.minX >= wideBox
	w := int32(r.w)
	zb, tz, pix := r.z, r.tz, r.pix
	for y := ys; y <= ye; y++ {
		a0, a1, a2 := e0, e1, e2
		fy := float32(y - t.minY)
		zr, rr, gr, br := t.z+t.zdy*fy, t.r+t.rdy*fy, t.g+t.gdy*fy, t.b+t.bdy*fy
		x0, x1 := t.minX, t.maxX
		if wide {
			lo, hi := span(a0, a1, a2, s0, s1, s2, int64(x1-x0))
			if lo > hi {
				e0 += r0
				e1 += r1
				e2 += r2
				continue
			}
			x0, x1 = t.minX+int32(lo), t.minX+int32(hi)
			a0, a1, a2 = a0+s0*lo, a1+s1*lo, a2+s2*lo
		}
		i := int(y*w + x0)
		o := r.base + int(y)*r.stride + int(x0)*4
		fx := float32(x0 - t.minX)
		for x := x0; x <= x1; x++ {
			if a0|a1|a2 >= 0 {
				if iw := zr + t.zdx*fx; iw > zb[i] {
					k := 1 / iw
					p := pix[o : o+4 : o+4]
					p[0] = blend(p[0], clampByte((rr+t.rdx*fx)*k), alpha)
					p[1] = blend(p[1], clampByte((gr+t.gdx*fx)*k), alpha)
					p[2] = blend(p[2], clampByte((br+t.bdx*fx)*k), alpha)
					if iw > tz[i] {
						tz[i] = iw
						r.tObj[i] = t.obj
						r.triID[i] = t.tri
					}
				}
			}
			a0 += s0
			a1 += s1
			a2 += s2
			fx++
			i++
			o += 4
		}
		e0 += r0
		e1 += r1
		e2 += r2
	}
}

// rasterSeeThroughSmall is rasterSeeThrough for a triangle whose covered pixels are known
// (triSetup.cover), in rows ys..ye.
func (r *Renderer) rasterSeeThroughSmall(t *triSetup, ys, ye int32, alpha int32) {
	for m := uint(t.cover); m != 0; m &= m - 1 {
		j := int32(bits.TrailingZeros(m))
		dy := j >> 2
		y := t.minY + dy
		if y < ys || y > ye {
			continue
		}
		dx := j & 3
		fy, fx := float32(dy), float32(dx)
		i := int(y*int32(r.w) + t.minX + dx)
		if iw := t.z + t.zdy*fy + t.zdx*fx; iw > r.z[i] {
			k := 1 / iw
			o := r.base + int(y)*r.stride + int(t.minX+dx)*4
			p := r.pix[o : o+4 : o+4]
			p[0] = blend(p[0], clampByte((t.r+t.rdy*fy+t.rdx*fx)*k), alpha)
			p[1] = blend(p[1], clampByte((t.g+t.gdy*fy+t.gdx*fx)*k), alpha)
			p[2] = blend(p[2], clampByte((t.b+t.bdy*fy+t.bdx*fx)*k), alpha)
			if iw > r.tz[i] {
				r.tz[i] = iw
				r.tObj[i] = t.obj
				r.triID[i] = t.tri
			}
		}
	}
}

// blend returns dst + (src-dst)*alpha/256, rounded.
func blend(dst, src byte, alpha int32) byte {
	d := int32(dst)
	return byte(d + ((int32(src)-d)*alpha+128)>>8)
}
