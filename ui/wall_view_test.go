package ui

import (
	"fmt"
	"image/color"
	"path/filepath"
	"strings"
	"testing"

	"tapersweep/ui/scene"
)

// TestWallToRootColours: the demo canal has a root, so "Wall to root" can be ticked; the view
// then draws the wall in the wall scale's colours (red-orange where thin), none of the
// depth-of-cut teal, and the thinnest part of the demo's wall (0.14 mm after step 3) in the
// scale's thin end.
func TestWallToRootColours(t *testing.T) {
	w := openDemo(t)
	vc := w.controls
	if vc.wall.Disabled() {
		t.Fatal("the demo canal has a root, yet \"Wall to root\" is disabled")
	}
	vc.wall.SetChecked(true)
	in := w.view.input()
	in.opt = vc.sceneOptions()
	if !in.opt.WallThickness {
		t.Fatal("ticking \"Wall to root\" does not reach the scene's options")
	}
	in.opt.Step, in.res = 3, w.res
	cam, view := w.view.camera()
	img, err := viewPicture(in, cam, view, 900, 600)
	if err != nil {
		t.Fatal(err)
	}
	near := func(a, b color.RGBA, tol int) bool {
		d := func(x, y uint8) int { return max(int(x), int(y)) - min(int(x), int(y)) }
		return d(a.R, b.R) <= tol && d(a.G, b.G) <= tol && d(a.B, b.B) <= tol
	}
	thin := scene.WallScale().At(0.14 / scene.WallLegendTop)
	teal := scene.DepthScale().At(0.6)
	var thinPx, tealPx int
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X + 160; x < b.Max.X; x++ { // right of the legend
			c := img.RGBAAt(x, y)
			if near(c, thin, 28) {
				thinPx++
			}
			if near(c, teal, 12) {
				tealPx++
			}
		}
	}
	t.Logf("%d pixels near the thin wall's colour, %d in depth-of-cut teal", thinPx, tealPx)
	if thinPx < 20 || tealPx > 20 {
		t.Errorf("the wall view shows %d thin-wall pixels and %d depth-of-cut pixels", thinPx, tealPx)
	}
}

// TestWholeSequenceStatesTheWall: with a root the panel under the file path states the wall
// as scanned and after the last step, each equal to the run's own figure (as analyze's JSON
// gives it); a canal without a root (an STL of the canal alone) states none.
func TestWholeSequenceStatesTheWall(t *testing.T) {
	w := openDemo(t)
	res := w.res
	last := res.Steps[len(res.Steps)-1].Metrics.Wall
	if res.ScannedWall.ThinnestWallMM == nil || last.ThinnestWallMM == nil {
		t.Fatal("the demo canal's run has no wall figures")
	}
	want := fmt.Sprintf("thinnest %.2f mm as scanned, %.2f mm after the sequence", *res.ScannedWall.ThinnestWallMM, *last.ThinnestWallMM)
	if got := w.path.moved.Text; !strings.Contains(got, want) || !strings.Contains(got, "estimate") {
		t.Errorf("the whole-sequence text %q does not state %q as an estimate", got, want)
	}
	stl, err := filepath.Abs("../testdata/curve_20deg_r5.stl")
	if err != nil {
		t.Fatal(err)
	}
	w.openPath(stl)
	w.wait()
	if got := w.path.moved.Text; w.res == nil || strings.Contains(got, "Root wall") {
		t.Errorf("a canal without a root: %q", got)
	}
}
