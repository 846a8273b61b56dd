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

// TestAnalyticSectionGolden draws the analytic case of analysis's section test: a round canal of
// radius 0.3 mm prepared by a round file of radius 0.42 mm whose axis lies 0.07 mm off the
// canal's toward 30° (the inner side of the curve is to the right). Looked at: the file's circle
// holds the canal's, the removed crescent is deepest toward 30° (up and to the right, the picture
// being seen from the orifice: y along -N2 is drawn up), and the arrow, 2 x 0.07 = 0.14 mm long
// by Gambill's measure, points that way at the scale of the bar.
func TestAnalyticSectionGolden(t *testing.T) {
	const n, a, b, e = 128, 0.3, 0.42, 0.07
	phi := -30 * math.Pi / 180 // toward 30° on screen: the picture's y is -N2
	scanned, after := analysis.Outline{R: make([]float64, n)}, analysis.Outline{R: make([]float64, n)}
	for j := 0; j < n; j++ {
		th := 2 * math.Pi * float64(j) / n
		c, s := math.Cos(th-phi), math.Sin(th-phi)
		scanned.R[j] = a
		after.R[j] = math.Max(a, e*c+math.Sqrt(b*b-e*e*s*s))
	}
	sec := &analysis.Section{FromApexMM: 3, Step: 1, Scanned: scanned, Before: scanned, After: after,
		File:             &analysis.FileSection{X: e * math.Cos(phi), Y: e * math.Sin(phi), RadiusMM: b},
		TransportationMM: 2 * e, TowardDeg: phi * 180 / math.Pi}
	sec.ScannedAreaMM2, sec.AfterAreaMM2 = scanned.Area(), after.Area()
	sec.RemovedMM2 = sec.AfterAreaMM2 - sec.ScannedAreaMM2
	img := SectionsImage([]*analysis.Section{sec}, 420, 420, SectionOptions{LegendTop: b + e - a, ContactMM: 0.005, DPI: 96, Key: true, Selected: -1})
	golden(t, "analytic_section.png", img)
}
