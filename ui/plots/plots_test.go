package plots

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
	"tapersweep/ui/scene"
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

// golden compares img with testdata/name, a picture a person has looked at (rewrite with
// -update, then look at it). At most 1 % of pixels may differ by more than 24 levels: rounding
// passes, a moved outline, a lost arrow or a changed colour does not.
func golden(t *testing.T, name string, img *image.RGBA) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		f, err := os.Create(path)
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		if err := png.Encode(f, img); err != nil {
			t.Fatal(err)
		}
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
			r, g, b, _ := gold.At(x, y).RGBA()
			o := img.PixOffset(x, y)
			d := max(diff(r>>8, img.Pix[o]), diff(g>>8, img.Pix[o+1]), diff(b>>8, img.Pix[o+2]))
			if d > 24 {
				bad++
			}
		}
	}
	if share := float64(bad) / float64(img.Rect.Dx()*img.Rect.Dy()); share > 0.01 {
		out := filepath.Join(os.TempDir(), "tapersweep-"+name)
		if o, err := os.Create(out); err == nil {
			png.Encode(o, img)
			o.Close()
		}
		t.Errorf("%s: %.2f%% of pixels differ from the golden image (limit 1%%); new picture at %s", name, 100*share, out)
	}
}

func diff(a uint32, b uint8) int { return int(math.Abs(float64(int(a) - int(b)))) }

func demoSections(t *testing.T, step int) []*analysis.Section {
	c, res := demo(t)
	var secs []*analysis.Section
	for _, x := range analysis.SectionLevels {
		s, err := analysis.SectionAt(c, res, step, x)
		if err != nil {
			t.Fatal(err)
		}
		secs = append(secs, s)
	}
	return secs
}

// TestSectionsGolden: the demo's last step at 1, 3 and 5 mm, as the report prints it.
func TestSectionsGolden(t *testing.T) {
	_, res := demo(t)
	n := len(res.Steps)
	img := SectionsImage(demoSections(t, n), 900, 360, SectionOptions{
		LegendTop: scene.LegendTop(res, n, false), ContactMM: res.Options.ContactThreshold, DPI: 110, Key: true, Selected: -1})
	golden(t, "demo_sections.png", img)
}

// TestProfilesGolden: the three profiles of the demo's busiest step as the window shows them.
func TestProfilesGolden(t *testing.T) {
	c, res := demo(t)
	pr := analysis.ProfileOf(c, res.Steps[2])
	img := image.NewRGBA(image.Rect(0, 0, 3*240, 190))
	for k, p := range []*image.RGBA{Image(CutPlot(pr, Screen), 240, 190, 96), Image(CurvaturePlot(pr, Screen), 240, 190, 96), Image(DiameterPlot(pr, Screen), 240, 190, 96)} {
		for y := 0; y < 190; y++ {
			copy(img.Pix[img.PixOffset(k*240, y):img.PixOffset(k*240+240, y)], p.Pix[p.PixOffset(0, y):p.PixOffset(240, y)])
		}
	}
	golden(t, "demo_profiles.png", img)
}
