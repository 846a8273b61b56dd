package render

import (
	"image"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// TestWriteCheckImage renders the canal scene (gradient-coloured see-through wall, opaque
// file, outlines, a legend) to render_check.png in the temp directory for a person to look
// at: it is not compared with anything.
func TestWriteCheckImage(t *testing.T) {
	s, cam := canalScene(300, 64)
	const w, h = 420, 560
	img := image.NewRGBA(image.Rect(0, 0, 3*w, h))
	r := NewRenderer()
	defer r.Close()
	panel := func(i int) *image.RGBA { return img.SubImage(image.Rect(i*w, 0, (i+1)*w, h)).(*image.RGBA) }
	lo, hi := s.Objects[1].Mesh.Bounds()
	cam.Fit(lo, hi, float64(w)/h)
	cam.Orbit(0.5, 0.2)
	cam.Dolly(0.6)
	cam.Pan(0, 0.2)
	r.Render(panel(0), s, cam, Options{Supersample: 2})
	// Middle: the wall opened lengthwise by the clipping plane.
	s.ClipPlane = &Plane{Point: mgl64.Vec3{0, 0, 0}, Normal: mgl64.Vec3{-0.5, 1, 0}}
	r.Render(panel(1), s, cam, Options{Supersample: 2})
	// Right: the eye inside the opaque canal near its top, looking down to the bend.
	s.ClipPlane = nil
	s.Objects = s.Objects[1:]
	s.Objects[0].Opacity = 1
	inside := &Camera{Target: mgl64.Vec3{0, 0, -9}, Distance: 8.5, Pitch: math.Pi / 2, FovY: 1.0}
	r.Render(panel(2), s, inside, Options{Supersample: 2})
	DrawLegend(img, image.Rect(10, 40, 120, 260), DepthScale(), 0, 0.2, "mm", "depth of cut", "no contact")
	DrawText(img, 10, 10, "demo canal (invented), see-through wall over an opaque file", legendInk, 14)
	path := filepath.Join(os.TempDir(), "render_check.png")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := png.Encode(f, img); err != nil {
		t.Fatal(err)
	}
	t.Logf("wrote %s", path)
}
