package render

import (
	"image"
	"image/color"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

var testBG = color.RGBA{10, 20, 30, 255}

// frontCamera looks along +y from (0, -dist, 0) with +x right and +z up.
func frontCamera(dist, fovDeg float64) *Camera {
	return &Camera{Distance: dist, FovY: fovDeg * math.Pi / 180, Near: 0.01}
}

// pinhole projects p for frontCamera onto a w x h image (analytic geometry of the
// pinhole camera: screen offset = focal length * lateral offset / depth).
func pinhole(p mgl64.Vec3, dist, fovDeg float64, w, h int) (px, py float64) {
	depth := p[1] + dist
	t := math.Tan(fovDeg * math.Pi / 360)
	aspect := float64(w) / float64(h)
	ndcX := p[0] / (depth * t * aspect)
	ndcY := p[2] / (depth * t)
	return (ndcX + 1) / 2 * float64(w), (1 - ndcY) / 2 * float64(h)
}

func render(t testing.TB, s *Scene, cam *Camera, w, h int, opt Options) *image.RGBA {
	t.Helper()
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	r := NewRenderer()
	defer r.Close()
	r.Render(img, s, cam, opt)
	return img
}

func TestSquareCoversProjectedRectangle(t *testing.T) {
	const w, h, dist, fov = 160, 100, 10.0, 40.0
	// A square 2 x 2 mm in the plane y = 3, seen face on (normal toward -y, the camera).
	x0, x1, z0, z1 := -0.7, 1.3, -1.1, 0.9
	sq := quad(mgl64.Vec3{x0, 3, z0}, mgl64.Vec3{x1, 3, z0}, mgl64.Vec3{x1, 3, z1}, mgl64.Vec3{x0, 3, z1})
	for _, opacity := range []float64{1, 0.5} {
		s := &Scene{Background: testBG, Objects: []Object{{Mesh: sq, Color: color.RGBA{200, 200, 200, 255}, Opacity: opacity}}}
		img := render(t, s, frontCamera(dist, fov), w, h, Options{})
		cov := coverage(img, testBG)
		// Exact projected rectangle from the pinhole model.
		left, top := pinhole(mgl64.Vec3{x0, 3, z1}, dist, fov, w, h)
		right, bottom := pinhole(mgl64.Vec3{x1, 3, z0}, dist, fov, w, h)
		want, got := 0, 0
		for y := 0; y < h; y++ {
			for x := 0; x < w; x++ {
				cx, cy := float64(x)+0.5, float64(y)+0.5
				inside := cx > left && cx < right && cy > top && cy < bottom
				// Pixel centres within 1/100 px of an edge may go either way (sub-pixel snapping).
				margin := math.Min(math.Min(math.Abs(cx-left), math.Abs(cx-right)), math.Min(math.Abs(cy-top), math.Abs(cy-bottom)))
				if inside {
					want++
				}
				if cov[y*w+x] {
					got++
				}
				if margin > 0.01 && cov[y*w+x] != inside {
					t.Fatalf("opacity %v: pixel (%d,%d) covered=%v, want %v (rect x %.3f..%.3f y %.3f..%.3f)",
						opacity, x, y, cov[y*w+x], inside, left, right, top, bottom)
				}
			}
		}
		if got != want {
			t.Errorf("opacity %v: %d pixels covered, want %d", opacity, got, want)
		}
		if opacity < 1 {
			// Top-left fill rule (as in the OpenGL and Direct3D rasterisation rules): the shared
			// diagonal is drawn once, so a see-through square has no darker seam.
			var first [3]byte
			for i, c := range cov {
				if !c {
					continue
				}
				o := img.PixOffset(i%w, i/w)
				px := [3]byte{img.Pix[o], img.Pix[o+1], img.Pix[o+2]}
				if first == [3]byte{} {
					first = px
				} else if px != first {
					t.Fatalf("see-through square not uniform at (%d,%d): %v vs %v", i%w, i/w, px, first)
				}
			}
		}
	}
}

func TestNearerTriangleWinsEitherOrder(t *testing.T) {
	const w, h = 64, 64
	near := &mesh.Mesh{Vertices: []mgl64.Vec3{{-1, 0, -1}, {1, 0, -1}, {0, 0, 1}}, Triangles: [][3]int32{{0, 1, 2}}}
	far := &mesh.Mesh{Vertices: []mgl64.Vec3{{-1, 2, -1}, {1, 2, -1}, {0, 2, 1}}, Triangles: [][3]int32{{0, 1, 2}}}
	red, blue := color.RGBA{255, 0, 0, 255}, color.RGBA{0, 0, 255, 255}
	for _, order := range [][2]int{{0, 1}, {1, 0}} {
		objs := []Object{{Mesh: near, Color: red}, {Mesh: far, Color: blue}}
		s := &Scene{Background: testBG, Objects: []Object{objs[order[0]], objs[order[1]]}}
		img := render(t, s, frontCamera(8, 40), w, h, Options{})
		p := img.RGBAAt(w/2, h/2)
		// Depth test: the triangle at y = 0 is 2 mm nearer than the one at y = 2.
		if !(p.R > 100 && p.B < 50) {
			t.Errorf("order %v: centre pixel %v, want the nearer red triangle", order, p)
		}
		obj, _, _, ok := lastPick(t, s, frontCamera(8, 40), w, h, w/2, h/2)
		if !ok || s.Objects[obj].Mesh != near {
			t.Errorf("order %v: pick found object %d ok=%v, want the nearer one", order, obj, ok)
		}
	}
}

// Of two surfaces at exactly the same depth the lower object number keeps the pixel, as when
// objects are drawn in their order through a strict less-than depth test (OpenGL's default
// GL_LESS: only a strictly nearer fragment replaces; from memory), even though the opaque pass
// draws the nearer object first: the second object holds the same triangle, plus one 3 mm
// nearer the eye, off screen, which brings its bounds nearer.
func TestSameDepthGoesToLowerObjectNumber(t *testing.T) {
	const w, h = 64, 64
	tri := []mgl64.Vec3{{-1, 0, -1}, {1, 0, -1}, {0, 0, 1}}
	first := &mesh.Mesh{Vertices: tri, Triangles: [][3]int32{{0, 1, 2}}}
	second := &mesh.Mesh{
		Vertices:  append(slices.Clone(tri), mgl64.Vec3{20, -3, -1}, mgl64.Vec3{21, -3, -1}, mgl64.Vec3{20.5, -3, 1}),
		Triangles: [][3]int32{{0, 1, 2}, {3, 4, 5}},
	}
	red, blue := color.RGBA{255, 0, 0, 255}, color.RGBA{0, 0, 255, 255}
	s := &Scene{Background: testBG, Objects: []Object{{Mesh: first, Color: red}, {Mesh: second, Color: blue}}}
	img := render(t, s, frontCamera(8, 40), w, h, Options{})
	if p := img.RGBAAt(w/2, h/2); !(p.R > 100 && p.B < 50) {
		t.Errorf("centre pixel %v, want the first object's red", p)
	}
	if obj, _, _, ok := lastPick(t, s, frontCamera(8, 40), w, h, w/2, h/2); !ok || obj != 0 {
		t.Errorf("pick found object %d ok=%v, want object 0", obj, ok)
	}
}

func lastPick(t *testing.T, s *Scene, cam *Camera, w, h, x, y int) (int, int32, [3]float32, bool) {
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	r := NewRenderer()
	defer r.Close()
	r.Render(img, s, cam, Options{})
	return r.Pick(x, y)
}

func TestClippingPlane(t *testing.T) {
	const w, h, dist, fov = 80, 60, 10.0, 40.0
	// The plane x = 0 keeps +x; seen from the front it projects onto the column w/2.
	plane := &Plane{Point: mgl64.Vec3{0, 0, 0}, Normal: mgl64.Vec3{1, 0, 0}}
	behind := quad(mgl64.Vec3{-2, 0, -1}, mgl64.Vec3{-0.5, 0, -1}, mgl64.Vec3{-0.5, 0, 1}, mgl64.Vec3{-2, 0, 1})
	straddle := quad(mgl64.Vec3{-2, 0, -1}, mgl64.Vec3{2, 0, -1}, mgl64.Vec3{2, 0, 1}, mgl64.Vec3{-2, 0, 1})
	grey := color.RGBA{180, 180, 180, 255}
	for _, opacity := range []float64{1, 0.4} {
		s := &Scene{Background: testBG, ClipPlane: plane, Objects: []Object{{Mesh: behind, Color: grey, Clip: true, Opacity: opacity}}}
		for _, c := range coverage(render(t, s, frontCamera(dist, fov), w, h, Options{}), testBG) {
			if c {
				t.Fatalf("opacity %v: a triangle on the removed side of the plane drew pixels", opacity)
			}
		}
		s.Objects[0].Clip = false // not obeying the plane: drawn
		if n := count(coverage(render(t, s, frontCamera(dist, fov), w, h, Options{}), testBG)); n == 0 {
			t.Fatalf("opacity %v: object that ignores the plane drew nothing", opacity)
		}
		s.Objects[0] = Object{Mesh: straddle, Color: grey, Clip: true, Opacity: opacity}
		cov := coverage(render(t, s, frontCamera(dist, fov), w, h, Options{}), testBG)
		_, top := pinhole(mgl64.Vec3{0, 0, 1}, dist, fov, w, h)
		_, bottom := pinhole(mgl64.Vec3{0, 0, -1}, dist, fov, w, h)
		right, _ := pinhole(mgl64.Vec3{2, 0, 0}, dist, fov, w, h)
		for y := int(top) + 1; y < int(bottom)-1; y++ {
			for x := 0; x < w; x++ {
				cx := float64(x) + 0.5
				if cx < w/2-0.01 && cov[y*w+x] {
					t.Fatalf("opacity %v: pixel (%d,%d) left of the plane is drawn", opacity, x, y)
				}
				if cx > w/2+0.01 && cx < right-0.01 && !cov[y*w+x] {
					t.Fatalf("opacity %v: pixel (%d,%d) right of the plane is missing", opacity, x, y)
				}
			}
		}
	}
}

func count(b []bool) int {
	n := 0
	for _, v := range b {
		if v {
			n++
		}
	}
	return n
}

func TestTriangleThroughNearPlane(t *testing.T) {
	const w, h = 120, 80
	// A floor 1 mm below the eye reaching from 50 mm behind it to 1000 mm ahead. Pinhole
	// geometry: a floor below the eye fills the lower half of the view up to the horizon
	// (the centre row); nothing above the horizon.
	cam := frontCamera(10, 60)
	floor := &mesh.Mesh{
		Vertices:  []mgl64.Vec3{{-2000, -60, -1}, {2000, -60, -1}, {0, 1000, -1}},
		Triangles: [][3]int32{{0, 1, 2}},
	}
	s := &Scene{Background: testBG, Objects: []Object{{Mesh: floor, Color: color.RGBA{120, 160, 200, 255}}}}
	img := render(t, s, cam, w, h, Options{})
	cov := coverage(img, testBG)
	for y := 0; y < h; y++ {
		for x := 0; x < w; x++ {
			above := float64(y)+0.5 < h/2-1
			below := float64(y)+0.5 > h/2+1
			if above && cov[y*w+x] {
				t.Fatalf("pixel (%d,%d) above the horizon drawn", x, y)
			}
			// The far corner narrows the floor near the horizon; the lower quarter is all floor.
			if below && y > h*3/4 && !cov[y*w+x] {
				t.Fatalf("pixel (%d,%d) of the floor not drawn", x, y)
			}
		}
	}
	// Flat floor, one colour, one normal: every floor pixel shades alike, so the clipped
	// and perspective-divided colours stayed finite and in range.
	ref := img.RGBAAt(w/2, h-1)
	for y := h*3/4 + 1; y < h; y++ {
		for x := 0; x < w; x++ {
			p := img.RGBAAt(x, y)
			if absDiff(p.R, ref.R) > 1 || absDiff(p.G, ref.G) > 1 || absDiff(p.B, ref.B) > 1 {
				t.Fatalf("floor pixel (%d,%d) = %v, want about %v", x, y, p, ref)
			}
		}
	}
	// Entirely behind the eye: nothing.
	back := &mesh.Mesh{Vertices: []mgl64.Vec3{{-1, -20, -1}, {1, -20, -1}, {0, -20, 1}}, Triangles: [][3]int32{{0, 1, 2}}}
	s.Objects[0].Mesh = back
	if n := count(coverage(render(t, s, cam, w, h, Options{}), testBG)); n != 0 {
		t.Errorf("triangle behind the eye drew %d pixels", n)
	}
}

func absDiff(a, b uint8) uint8 {
	if a > b {
		return a - b
	}
	return b - a
}

func TestSupersampleIsBoxFilterOfDoubleSize(t *testing.T) {
	s, cam := canalScene(60, 24)
	for i := range s.Objects {
		s.Objects[i].Outline = false // outline width follows the output pixel, not the sample
	}
	s.ClipPlane = &Plane{Point: mgl64.Vec3{0.1, 0, 0}, Normal: mgl64.Vec3{0, -1, 0.2}}
	const w, h = 96, 60
	small := render(t, s, cam, w, h, Options{Supersample: 2})
	big := render(t, s, cam, 2*w, 2*h, Options{})
	// Box filter: the rounded mean of each 2 x 2 block.
	for y := 0; y < h; y++ {
		for x := 0; x < w; x++ {
			for k := 0; k < 4; k++ {
				sum := 0
				for _, d := range [4][2]int{{0, 0}, {1, 0}, {0, 1}, {1, 1}} {
					sum += int(big.Pix[big.PixOffset(2*x+d[0], 2*y+d[1])+k])
				}
				if got, want := small.Pix[small.PixOffset(x, y)+k], byte((sum+2)/4); got != want {
					t.Fatalf("pixel (%d,%d) channel %d = %d, box filter of the 2x render = %d", x, y, k, got, want)
				}
			}
		}
	}
}

func TestSameImageWithAnyWorkerCount(t *testing.T) {
	s, cam := canalScene(80, 32)
	s.ClipPlane = &Plane{Point: mgl64.Vec3{0.1, 0, 0}, Normal: mgl64.Vec3{0, -1, 0}}
	cam.Orbit(0.4, 0.3)
	for _, ss := range []int{1, 2} {
		one := render(t, s, cam, 150, 110, Options{Workers: 1, Supersample: ss})
		for _, n := range []int{2, 3, 7} {
			many := render(t, s, cam, 150, 110, Options{Workers: n, Supersample: ss})
			for i := range one.Pix {
				if one.Pix[i] != many.Pix[i] {
					t.Fatalf("supersample %d: byte %d differs between 1 and %d workers", ss, i, n)
				}
			}
		}
	}
}

func TestPickGivesPointUnderPixel(t *testing.T) {
	const w, h, dist, fov = 90, 70, 10.0, 40.0
	sq := quad(mgl64.Vec3{-1, 1, -1}, mgl64.Vec3{1, 1, -1}, mgl64.Vec3{1, 1, 1}, mgl64.Vec3{-1, 1, 1})
	s := &Scene{Background: testBG, Objects: []Object{{Mesh: sq, Color: color.RGBA{200, 200, 200, 255}}}}
	img := image.NewRGBA(image.Rect(5, 7, 5+w, 7+h)) // an image not at the origin
	r := NewRenderer()
	defer r.Close()
	r.Render(img, s, frontCamera(dist, fov), Options{Supersample: 2})
	for _, p := range [][2]int{{w / 2, h / 2}, {w/2 - 5, h/2 + 3}, {w/2 + 4, h/2 - 6}} {
		obj, tri, bary, ok := r.Pick(5+p[0], 7+p[1])
		if !ok || obj != 0 {
			t.Fatalf("pick at %v: obj %d ok %v", p, obj, ok)
		}
		a, b, c := sq.Corners(int(tri))
		q := a.Mul(float64(bary[0])).Add(b.Mul(float64(bary[1]))).Add(c.Mul(float64(bary[2])))
		// The picked point must project back onto the pixel centre (pinhole model).
		px, py := pinhole(q, dist, fov, w, h)
		if math.Abs(px-float64(p[0])-0.5) > 1e-3 || math.Abs(py-float64(p[1])-0.5) > 1e-3 {
			t.Errorf("pick at %v: point %v projects to (%.4f, %.4f)", p, q, px, py)
		}
		if bary[0] < 0 || bary[1] < 0 || bary[2] < 0 {
			t.Errorf("pick at %v: weights %v outside the triangle", p, bary)
		}
	}
	if _, _, _, ok := r.Pick(5+1, 7+1); ok {
		t.Error("pick on the background reported a surface")
	}
	if _, _, _, ok := r.Pick(0, 0); ok {
		t.Error("pick outside the image reported a surface")
	}
}

func TestBadInputDrawsWithoutPanic(t *testing.T) {
	nan := math.NaN()
	bad := &mesh.Mesh{
		Vertices:  []mgl64.Vec3{{0, 0, 0}, {1, 0, 0}, {nan, 0, 1}, {0, 0, 1}, {math.Inf(1), 0, 0}},
		Triangles: [][3]int32{{0, 1, 3}, {0, 1, 2}, {0, 1, 9}, {-1, 0, 1}, {0, 4, 3}, {1, 1, 1}},
	}
	s := &Scene{Background: testBG, Objects: []Object{
		{Mesh: bad, Color: color.RGBA{200, 0, 0, 255}, Colors: make([]color.RGBA, 2), Normals: make([]mgl64.Vec3, 1)},
		{Mesh: nil}, {Mesh: &mesh.Mesh{}},
	}}
	img := render(t, s, frontCamera(5, 40), 40, 30, Options{Supersample: 3, Workers: 2})
	if count(coverage(img, testBG)) == 0 {
		t.Error("the one good triangle was not drawn")
	}
	render(t, nil, nil, 10, 10, Options{})
	render(t, s, &Camera{}, 10, 10, Options{Supersample: 99, Workers: -3})
	NewRenderer().Render(nil, s, nil, Options{})
	NewRenderer().Render(image.NewRGBA(image.Rectangle{}), s, nil, Options{})
}

func TestNoAllocationsOnceWarm(t *testing.T) {
	s, cam := canalScene(40, 16)
	s.ClipPlane = &Plane{Point: mgl64.Vec3{}, Normal: mgl64.Vec3{0, -1, 0}}
	img := image.NewRGBA(image.Rect(0, 0, 120, 80))
	r := NewRenderer()
	defer r.Close()
	r.Render(img, s, cam, Options{Workers: 2})
	if n := testing.AllocsPerRun(5, func() { r.Render(img, s, cam, Options{Workers: 2}) }); n != 0 {
		t.Errorf("%v allocations per frame once warm, want 0", n)
	}
}

func TestSharedEdgeDrawnOnce(t *testing.T) {
	// A square whose corners project exactly to pixel corners (8,8)..(56,56) of a 64 x 64
	// image, so its diagonal passes through 48 pixel centres. The top-left fill rule (as in
	// the OpenGL and Direct3D rasterisation rules) gives each such centre to one triangle:
	// 48 x 48 pixels covered, and a see-through square blends each pixel exactly once.
	const n, dist, fov = 64, 10.0, 50.0
	half := 0.75 * dist * math.Tan(fov*math.Pi/360) // NDC 0.75 is pixel 56 of 64
	sq := quad(mgl64.Vec3{-half, 0, -half}, mgl64.Vec3{half, 0, -half}, mgl64.Vec3{half, 0, half}, mgl64.Vec3{-half, 0, half})
	s := &Scene{Background: testBG, Objects: []Object{{Mesh: sq, Color: color.RGBA{220, 220, 220, 255}, Opacity: 0.5}}}
	img := render(t, s, frontCamera(dist, fov), n, n, Options{})
	cov := coverage(img, testBG)
	if got := count(cov); got != 48*48 {
		t.Errorf("%d pixels covered, want %d", got, 48*48)
	}
	ref := img.RGBAAt(20, 40)
	for y := 8; y < 56; y++ {
		for x := 8; x < 56; x++ {
			if p := img.RGBAAt(x, y); p != ref {
				t.Fatalf("pixel (%d,%d) = %v, want %v like the rest", x, y, p, ref)
			}
		}
	}
}

// A renderer reused across frames that differ (camera, see-through or not, size,
// supersampling) clears only where its last frame drew; every frame and every pick must be
// what a fresh renderer gives (the fresh one clears everything).
func TestReusedRendererMatchesFresh(t *testing.T) {
	s, cam := canalScene(60, 24)
	type frame struct {
		w, h, ss int
		opacity  float64
		orbit    float64
		dolly    float64
	}
	frames := []frame{
		{160, 100, 1, 0.35, 0, 0}, {160, 100, 1, 1, 0.5, 0}, {160, 100, 1, 1, 0.3, 0.5},
		{160, 100, 1, 0.35, 1.2, -0.6}, {160, 100, 2, 1, 0.2, 0}, {120, 90, 1, 1, 0.7, 0.4},
		{120, 90, 1, 0.35, 0.1, -0.2}, {160, 100, 1, 1, 2.5, 0},
	}
	reused := NewRenderer()
	defer reused.Close()
	for k, f := range frames {
		s.Objects[1].Opacity = f.opacity
		cam.Orbit(f.orbit, 0.1)
		cam.Dolly(f.dolly)
		a := image.NewRGBA(image.Rect(0, 0, f.w, f.h))
		reused.Render(a, s, cam, Options{Supersample: f.ss})
		fresh := NewRenderer()
		b := image.NewRGBA(image.Rect(0, 0, f.w, f.h))
		fresh.Render(b, s, cam, Options{Supersample: f.ss})
		for i := range a.Pix {
			if a.Pix[i] != b.Pix[i] {
				t.Fatalf("frame %d: byte %d differs from a fresh renderer's", k, i)
			}
		}
		for y := 0; y < f.h; y += 3 {
			for x := 0; x < f.w; x += 3 {
				o1, t1, _, ok1 := reused.Pick(x, y)
				o2, t2, _, ok2 := fresh.Pick(x, y)
				if o1 != o2 || t1 != t2 || ok1 != ok2 {
					t.Fatalf("frame %d: pick at (%d, %d) gives %d %d %v, a fresh renderer %d %d %v", k, x, y, o1, t1, ok1, o2, t2, ok2)
				}
			}
		}
		fresh.Close()
	}
}

// The fill rule holds for triangles of about a pixel, which culling tests centre by centre and
// draws from a mask: the square of TestSharedEdgeDrawnOnce cut into ~18k triangles of about
// a quarter pixel still covers each of its 48 x 48 pixel centres exactly once (a partition of
// the plane gives each sample to one triangle under the top-left rule of the OpenGL and
// Direct3D rasterisation rules): opaque, every centre drawn; see-through at half opacity,
// every pixel blended once, so all alike.
func TestFineTrianglesCoverEachCentreOnce(t *testing.T) {
	const n, dist, fov, cells = 64, 10.0, 50.0, 96
	half := 0.75 * dist * math.Tan(fov*math.Pi/360)
	rng := rand.New(rand.NewPCG(7, 11))
	// Unjittered, the vertices lie on pixel corners and centres (half a pixel apart), so
	// edges pass through centres and the rule's ties decide; jittered, they do not.
	for _, jitter := range []float64{0, 0.6} {
		m := &mesh.Mesh{}
		for j := 0; j <= cells; j++ {
			for i := 0; i <= cells; i++ {
				x, z := -half+2*half*float64(i)/cells, -half+2*half*float64(j)/cells
				if i > 0 && i < cells && j > 0 && j < cells { // the border stays on the square
					step := 2 * half / cells
					x += (rng.Float64() - 0.5) * jitter * step
					z += (rng.Float64() - 0.5) * jitter * step
				}
				m.Vertices = append(m.Vertices, mgl64.Vec3{x, 0, z})
			}
		}
		at := func(i, j int) int32 { return int32(j*(cells+1) + i) }
		for j := 0; j < cells; j++ {
			for i := 0; i < cells; i++ {
				m.Triangles = append(m.Triangles,
					[3]int32{at(i, j), at(i+1, j), at(i+1, j+1)},
					[3]int32{at(i, j), at(i+1, j+1), at(i, j+1)})
			}
		}
		for _, opacity := range []float64{1, 0.5} {
			s := &Scene{Background: testBG, Objects: []Object{{Mesh: m, Color: color.RGBA{220, 220, 220, 255}, Opacity: opacity}}}
			img := render(t, s, frontCamera(dist, fov), n, n, Options{})
			if got := count(coverage(img, testBG)); got != 48*48 {
				t.Errorf("jitter %v, opacity %v: %d pixels covered, want %d", jitter, opacity, got, 48*48)
			}
			if opacity == 1 {
				continue
			}
			ref := img.RGBAAt(20, 40)
			for y := 8; y < 56; y++ {
				for x := 8; x < 56; x++ {
					if p := img.RGBAAt(x, y); p != ref {
						t.Fatalf("jitter %v: pixel (%d,%d) = %v, want %v like the rest (blended once)", jitter, x, y, p, ref)
					}
				}
			}
		}
	}
}
