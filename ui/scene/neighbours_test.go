package scene

import (
	"image"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// Another canal of the tooth, 4 mm to the side of the demo canal, is drawn with it: the
// bounds the view fits to hold both (analytic: the copy's extent is the canal's moved 4 mm),
// and the picture shows the neighbour's grey where only background was.
func TestOtherCanalsAreDrawnTogether(t *testing.T) {
	c, res := demo(t)
	const shift = 4.0
	other := &mesh.Mesh{Triangles: c.Mesh.Triangles}
	for _, v := range c.Mesh.Vertices {
		other.Vertices = append(other.Vertices, v.Add(mgl64.Vec3{shift, 0, 0}))
	}
	step := busiestStep(res)
	alone, err := Build(c, res, Options{Step: step})
	if err != nil {
		t.Fatal(err)
	}
	both, err := Build(c, res, Options{Step: step, Others: []*mesh.Mesh{other}})
	if err != nil {
		t.Fatal(err)
	}
	_, chi := c.Mesh.Bounds()
	if got, want := both.Hi[0], chi[0]+shift; got < want-1e-9 {
		t.Errorf("the bounds reach x = %.3f, the other canal reaches %.3f", got, want)
	}
	if n := len(both.Scene.Objects) - len(alone.Scene.Objects); n != 1 {
		t.Fatalf("%d objects added for one other canal", n)
	}
	o := both.Scene.Objects[len(both.Scene.Objects)-1]
	if !(o.Opacity > 0 && o.Opacity < 1) || o.Clip {
		t.Errorf("the other canal is drawn with opacity %.2f, clipped %v: want see-through, not cut", o.Opacity, o.Clip)
	}
	// Each picture fits its own bounds; the neighbour adds drawn pixels.
	count := func(opt Options) int {
		img, err := Picture(c, res, opt, DefaultView, 400, 400, 1)
		if err != nil {
			t.Fatal(err)
		}
		return paperless(img)
	}
	a, b := count(Options{Step: step}), count(Options{Step: step, Others: []*mesh.Mesh{other}})
	if b <= a {
		t.Errorf("with the other canal %d drawn pixels, alone %d", b, a)
	}
}

// paperless counts the pixels that are not the background.
func paperless(img *image.RGBA) int {
	n := 0
	for i := 0; i < len(img.Pix); i += 4 {
		if img.Pix[i] != Background.R || img.Pix[i+1] != Background.G || img.Pix[i+2] != Background.B {
			n++
		}
	}
	return n
}
