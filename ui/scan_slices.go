package ui

import (
	"image"
	"image/color"
	"math"
	"slices"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis/segment"
	"tapersweep/mesh"
	"tapersweep/mesh/volume"
)

// A slice picture: grey values of a plane through the scan, a mapping from its pixels to the
// scan's coordinates (mm), and what is drawn over it.
type slicePicture struct {
	img   *image.RGBA
	world func(x, y float64) mgl64.Vec3 // pixel (x right, y down, fractions allowed) -> mm
}

// Colours over the grey scan: the two ends and the found outlines.
var (
	orificeColour    = color.RGBA{60, 200, 90, 255}
	apexColour       = color.RGBA{240, 150, 30, 255}
	lumenColour      = color.RGBA{70, 170, 255, 255}
	rootColour       = color.RGBA{250, 220, 60, 255}
	unresolvedColour = color.RGBA{230, 70, 70, 255}
)

// greyLevels maps intensities to grey by window (width) and level (centre).
type greyLevels struct{ level, window float64 }

func (g greyLevels) grey(v float64) uint8 {
	t := (v-g.level)/math.Max(g.window, 1e-9) + 0.5
	return uint8(math.Round(255 * math.Max(0, math.Min(1, t))))
}

// defaultLevels spans the 1st to the 99.5th percentile of a sample of the scan.
func defaultLevels(v *volume.Volume) greyLevels {
	step := max(1, len(v.Data)/200_000)
	var s []float64
	for i := 0; i < len(v.Data); i += step {
		s = append(s, v.Value(v.Data[i]))
	}
	slices.Sort(s)
	lo, hi := s[len(s)/100], s[len(s)*995/1000]
	return greyLevels{level: 0.5 * (lo + hi), window: math.Max(hi-lo, 1)}
}

// axialPicture is the scan's own slice k (columns i, rows j).
func axialPicture(v *volume.Volume, k int, g greyLevels) *slicePicture {
	img := image.NewRGBA(image.Rect(0, 0, v.NX, v.NY))
	for j := range v.NY {
		for i := range v.NX {
			c := g.grey(v.At(i, j, k))
			o := img.PixOffset(i, j)
			img.Pix[o], img.Pix[o+1], img.Pix[o+2], img.Pix[o+3] = c, c, c, 255
		}
	}
	return &slicePicture{img: img, world: func(x, y float64) mgl64.Vec3 {
		return v.World(mgl64.Vec3{x - 0.5, y - 0.5, float64(k)})
	}}
}

// planePicture samples the plane through centre spanned by across (pixels to the right) and
// down (pixels downward), w x h pixels of size px mm.
func planePicture(v *volume.Volume, centre, across, down mgl64.Vec3, w, h int, px float64, g greyLevels) *slicePicture {
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	world := func(x, y float64) mgl64.Vec3 {
		return centre.Add(across.Mul((x - float64(w)/2) * px)).Add(down.Mul((y - float64(h)/2) * px))
	}
	for y := range h {
		for x := range w {
			p := world(float64(x)+0.5, float64(y)+0.5)
			c := uint8(0)
			if v.Contains(p) {
				c = g.grey(v.SampleWorld(p))
			}
			o := img.PixOffset(x, y)
			img.Pix[o], img.Pix[o+1], img.Pix[o+2], img.Pix[o+3] = c, c, c, 255
		}
	}
	return &slicePicture{img: img, world: world}
}

// straightPicture shows the scan along a found canal, straightened: row r is station r (from
// the orifice at the top), column x lies across the path along the ray at angle theta.
func straightPicture(v *volume.Volume, res *segment.Result, ray int, halfWidth float64, g greyLevels) *slicePicture {
	f := res.Frames
	n := f.Len()
	px := res.DS
	w := 2*int(math.Ceil(halfWidth/px)) + 1
	dir := func(i int) mgl64.Vec3 {
		th := 2 * math.Pi * float64(ray) / float64(res.Rays)
		return f.N1[i].Mul(math.Cos(th)).Add(f.N2[i].Mul(math.Sin(th)))
	}
	world := func(x, y float64) mgl64.Vec3 {
		i := max(0, min(n-1, int(y)))
		return f.Points[i].Add(dir(i).Mul((x - float64(w)/2) * px))
	}
	img := image.NewRGBA(image.Rect(0, 0, w, n))
	for y := range n {
		for x := range w {
			p := world(float64(x)+0.5, float64(y))
			c := uint8(0)
			if v.Contains(p) {
				c = g.grey(v.SampleWorld(p))
			}
			o := img.PixOffset(x, y)
			img.Pix[o], img.Pix[o+1], img.Pix[o+2], img.Pix[o+3] = c, c, c, 255
		}
	}
	// The outlines: lumen and root on both sides of the path; a red band where unresolved.
	opp := (ray + res.Rays/2) % res.Rays
	for y := range n {
		for _, side := range []struct {
			ray  int
			sign float64
		}{{ray, 1}, {opp, -1}} {
			plot := func(r float64, c color.RGBA) {
				if math.IsNaN(r) {
					return
				}
				x := int(math.Round(float64(w)/2 + side.sign*r/px))
				if x >= 0 && x < w {
					img.SetRGBA(x, y, c)
				}
			}
			if res.Resolved[y] {
				plot(res.LumenRadius[y][side.ray], lumenColour)
			}
			plot(res.RootRadius[y][side.ray], rootColour)
		}
		if !res.Resolved[y] {
			for x := range 3 {
				img.SetRGBA(x, y, unresolvedColour)
				img.SetRGBA(w-1-x, y, unresolvedColour)
			}
		}
	}
	return &slicePicture{img: img, world: world}
}

// drawMeshSection draws where a surface crosses the axial slice k.
func drawMeshSection(pic *image.RGBA, v *volume.Volume, m *mesh.Mesh, k float64, c color.RGBA) {
	if m == nil {
		return
	}
	idx := make([]mgl64.Vec3, len(m.Vertices))
	for i, p := range m.Vertices {
		idx[i] = v.IndexOf(p)
	}
	for _, t := range m.Triangles {
		var pts []mgl64.Vec3
		for e := range 3 {
			a, b := idx[t[e]], idx[t[(e+1)%3]]
			if (a[2]-k)*(b[2]-k) < 0 {
				u := (k - a[2]) / (b[2] - a[2])
				pts = append(pts, a.Add(b.Sub(a).Mul(u)))
			}
		}
		if len(pts) == 2 {
			drawLine(pic, pts[0][0]+0.5, pts[0][1]+0.5, pts[1][0]+0.5, pts[1][1]+0.5, c)
		}
	}
}

func drawLine(img *image.RGBA, x0, y0, x1, y1 float64, c color.RGBA) {
	n := int(math.Ceil(math.Max(math.Abs(x1-x0), math.Abs(y1-y0))*2)) + 1
	for s := 0; s <= n; s++ {
		t := float64(s) / float64(n)
		x, y := int(x0+(x1-x0)*t), int(y0+(y1-y0)*t)
		if image.Pt(x, y).In(img.Rect) {
			img.SetRGBA(x, y, c)
		}
	}
}

// drawMarker draws a ring around pixel (x, y).
func drawMarker(img *image.RGBA, x, y float64, r float64, c color.RGBA) {
	for a := 0.0; a < 2*math.Pi; a += 0.05 {
		for _, rr := range []float64{r, r + 0.7} {
			px, py := int(x+rr*math.Cos(a)), int(y+rr*math.Sin(a))
			if image.Pt(px, py).In(img.Rect) {
				img.SetRGBA(px, py, c)
			}
		}
	}
}

// fitImage scales src into a w x h image (nearest sample, aspect kept, centred on black) and
// returns the scale and offset that map its pixels back to src's.
func fitImage(src *image.RGBA, w, h int) (*image.RGBA, float64, float64, float64) {
	out := image.NewRGBA(image.Rect(0, 0, max(w, 1), max(h, 1)))
	sw, sh := src.Rect.Dx(), src.Rect.Dy()
	if sw == 0 || sh == 0 {
		return out, 1, 0, 0
	}
	s := math.Min(float64(w)/float64(sw), float64(h)/float64(sh))
	ox, oy := (float64(w)-s*float64(sw))/2, (float64(h)-s*float64(sh))/2
	for y := range h {
		sy := int((float64(y) + 0.5 - oy) / s)
		if sy < 0 || sy >= sh {
			continue
		}
		for x := range w {
			sx := int((float64(x) + 0.5 - ox) / s)
			if sx < 0 || sx >= sw {
				continue
			}
			copy(out.Pix[out.PixOffset(x, y):out.PixOffset(x, y)+4], src.Pix[src.PixOffset(sx, sy):src.PixOffset(sx, sy)+4])
		}
	}
	return out, s, ox, oy
}
