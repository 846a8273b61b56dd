package render

import (
	"image"
	"testing"
)

// TestTurningDrawsASimplifiedCopy: a wall of 1M triangles drawn while turning comes from a copy
// of about 200k triangles that covers the same pixels (the outline of a tube does not depend on
// its tessellation once triangles are far below a pixel: within 1 % of the covered pixels), and
// Pick answers nothing on it, since its triangles are not the scene's.
func TestTurningDrawsASimplifiedCopy(t *testing.T) {
	s, cam := canalScene(2500, 200)
	s.Objects = s.Objects[1:] // the wall alone
	s.Objects[0].Opacity = 1
	r := NewRenderer()
	defer r.Close()
	full := image.NewRGBA(image.Rect(0, 0, 640, 400))
	fast := image.NewRGBA(full.Rect)
	r.Render(full, s, cam, Options{})
	if _, _, _, ok := r.Pick(320, 200); !ok {
		t.Fatal("no wall under the centre of the still frame")
	}
	r.Render(fast, s, cam, Options{Turning: true})
	sc := r.simpler[s.Objects[0].Mesh]
	if sc == nil {
		t.Fatal("no simplified copy while turning")
	}
	if n := len(sc.mesh.Triangles); n < turningTarget/2 || n > 2*turningTarget {
		t.Errorf("the copy keeps %d triangles, want about %d", n, turningTarget)
	}
	if _, _, _, ok := r.Pick(320, 200); ok {
		t.Error("Pick answered on a simplified copy")
	}
	a, b := coverage(full, s.Background), coverage(fast, s.Background)
	covered, differ := 0, 0
	for i := range a {
		if a[i] {
			covered++
		}
		if a[i] != b[i] {
			differ++
		}
	}
	if covered == 0 || float64(differ) > 0.01*float64(covered) {
		t.Errorf("%d of %d covered pixels differ between the whole wall and its copy", differ, covered)
	}
	// A small mesh is drawn whole while turning.
	small, cam2 := canalScene(100, 50)
	r.Render(full, small, cam2, Options{Turning: true})
	if len(r.simpler) > 1 {
		t.Errorf("%d simplified copies after drawing a small scene", len(r.simpler))
	}
}
