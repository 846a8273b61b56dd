package scene

import (
	"context"
	"flag"
	"image"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"sync"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
	"tapersweep/ui/render"
)

var update = flag.Bool("update", false, "rewrite the golden images")

var (
	demoOnce  sync.Once
	demoCanal *analysis.Canal
	demoRun   *analysis.Result
	demoErr   error
)

func demo(t testing.TB) (*analysis.Canal, *analysis.Result) {
	t.Helper()
	demoOnce.Do(func() {
		ctx := context.Background()
		demoCanal, demoErr = analysis.CanalFromSpec(ctx, "demo", models.DemoCanal(), analysis.CanalOptions{})
		if demoErr != nil {
			return
		}
		seq, err := models.ParseSequence("demo", models.DemoSequenceJSON())
		if err != nil {
			demoErr = err
			return
		}
		demoRun, demoErr = analysis.Run(ctx, demoCanal, seq, analysis.RunOptions{})
	})
	if demoErr != nil {
		t.Fatal(demoErr)
	}
	return demoCanal, demoRun
}

// busiestStep is the step with the largest engaged area: the one a picture should show.
func busiestStep(res *analysis.Result) int {
	best := 1
	for _, s := range res.Steps {
		if s.Metrics.EngagedAreaMM2 > res.Steps[best-1].Metrics.EngagedAreaMM2 {
			best = s.Number
		}
	}
	return best
}

// TestDemoPictureGolden renders the demo canal with a file in it and compares it with the
// golden image a person has looked at (ui/scene/testdata/demo_step.png; rewrite with -update).
// Tolerance: at most 1 % of pixels may differ by more than 24 levels in any channel, which
// absorbs rounding differences but not a moved band, a lost file or a changed colour scale.
func TestDemoPictureGolden(t *testing.T) {
	c, res := demo(t)
	img, err := Picture(c, res, Options{Step: busiestStep(res)}, "side", 480, 640, 0)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join("testdata", "demo_step.png")
	if *update {
		f, err := os.Create(path)
		if err != nil {
			t.Fatal(err)
		}
		if err := png.Encode(f, img); err != nil {
			t.Fatal(err)
		}
		f.Close()
		return
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatalf("golden image missing (run with -update and look at it): %v", err)
	}
	defer f.Close()
	gold, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	if gold.Bounds() != img.Bounds() {
		t.Fatalf("golden is %v, picture %v", gold.Bounds(), img.Bounds())
	}
	bad := 0
	for y := 0; y < img.Rect.Dy(); y++ {
		for x := 0; x < img.Rect.Dx(); x++ {
			r1, g1, b1, _ := gold.At(x, y).RGBA()
			p := img.PixOffset(x, y)
			d := max(absDiff(r1>>8, img.Pix[p]), absDiff(g1>>8, img.Pix[p+1]), absDiff(b1>>8, img.Pix[p+2]))
			if d > 24 {
				bad++
			}
		}
	}
	if share := float64(bad) / float64(img.Rect.Dx()*img.Rect.Dy()); share > 0.01 {
		out := filepath.Join(t.TempDir(), "demo_step.png")
		o, _ := os.Create(out)
		png.Encode(o, img)
		o.Close()
		t.Errorf("%.2f%% of pixels differ from the golden image (limit 1%%); new picture at %s", 100*share, out)
	}
}

func absDiff(a uint32, b uint8) int {
	return int(math.Abs(float64(int(a) - int(b))))
}

// TestBandsSitWhereTheAnalysisSays: every wall vertex drawn in a depth-of-cut colour carries,
// at its own (s, theta), a cut above the contact threshold in the analysis, and the colour is
// the scale's colour for that depth; every other vertex is neutral.
func TestBandsSitWhereTheAnalysisSays(t *testing.T) {
	c, res := demo(t)
	step := busiestStep(res)
	b, err := Build(c, res, Options{Step: step})
	if err != nil {
		t.Fatal(err)
	}
	st := res.Steps[step-1]
	cols := b.Scene.Objects[b.WallIndex].Colors
	coloured := 0
	for v := range c.Mesh.Vertices {
		e := c.MapAt(st.Cut, float64(c.VertexS[v]), float64(c.VertexTheta[v]))
		want := b.Scale.Neutral
		if e > res.Options.ContactThreshold {
			want = b.Scale.At(math.Min(1, e/b.LegendMax))
			coloured++
		}
		if cols[v] != want {
			t.Fatalf("vertex %d (s %.2f): colour %v, want %v for a cut of %.4f mm", v, c.VertexS[v], cols[v], want, e)
		}
	}
	if coloured == 0 {
		t.Fatal("the busiest step colours no wall vertex")
	}
}

// TestViewsAndBadStep: every named view aims at the canal; an unknown view or a step that
// does not exist is an error naming it, never a panic.
func TestViewsAndBadStep(t *testing.T) {
	c, res := demo(t)
	for _, v := range ViewNames() {
		cam := render.NewCamera()
		if err := Aim(cam, c, v, 1.6); err != nil {
			t.Errorf("view %s: %v", v, err)
		}
	}
	if err := Aim(render.NewCamera(), c, "sideways", 1); err == nil {
		t.Error("unknown view accepted")
	}
	if _, err := Build(c, res, Options{Step: len(res.Steps) + 1}); err == nil {
		t.Error("step past the end accepted")
	}
	if _, err := Build(c, nil, Options{Step: 1}); err == nil {
		t.Error("a step without a run accepted")
	}
	img, err := Picture(c, nil, Options{}, "down", 200, 200, 0)
	if err != nil || img.Bounds() != image.Rect(0, 0, 200, 200) {
		t.Errorf("canal alone: %v %v", err, img.Bounds())
	}
}

// TestCutOpenReachesTheApicalEnd: the lengthwise cut passes through the canal all along it, the
// apical end too, so each 0.5 mm of wall keeps about half its vertices (a cut through the axis
// of a tube halves it: geometry), whatever way the canal bends.
func TestCutOpenReachesTheApicalEnd(t *testing.T) {
	c, res := demo(t)
	b, err := Build(c, res, Options{Step: 3, Clip: true})
	if err != nil {
		t.Fatal(err)
	}
	d := b.Scene.Objects[0].ClipDistance
	if len(d) != len(c.Mesh.Vertices) {
		t.Fatalf("the wall has %d cut distances for %d vertices", len(d), len(c.Mesh.Vertices))
	}
	L := c.Line.Length()
	for from := 0.0; from < L-0.5; from += 0.5 {
		kept, all := 0, 0
		for v := range d {
			if s := float64(c.VertexS[v]); s >= from && s < from+0.5 {
				all++
				if d[v] >= 0 {
					kept++
				}
			}
		}
		if all > 0 && (kept < all/4 || kept > 3*all/4) {
			t.Errorf("%.1f-%.1f mm from the orifice: %d of %d wall vertices kept", from, from+0.5, kept, all)
		}
	}
}
