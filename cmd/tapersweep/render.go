package main

import (
	"context"
	"flag"
	"fmt"
	"image"
	"image/png"
	"io"
	"strconv"
	"strings"

	"tapersweep/analysis"
	"tapersweep/ui/plots"
	"tapersweep/ui/scene"
)

func renderCommand() command {
	return command{
		name:    "render",
		summary: "draw a canal, or one step of a sequence with the wall shaded by depth of cut, to a PNG",
		usage:   "--canal PATH [--sequence PATH --step N] --out FILE.png [--size WxH] [--view NAME | --section MM[,MM...]]",
		example: "tapersweep render --canal canal.stl --sequence plan.json --step 2 --section 1,3,5 --out step2-sections.png",
		flags: func(fs *flag.FlagSet) func(stdout, stderr io.Writer) int {
			var cf canalFlags
			cf.register(fs)
			cf.registerWall(fs)
			seqPath := fs.String("sequence", "", "sequence `file` (JSON); needed with --step")
			step := fs.Int("step", 0, "step `N` to draw, numbered from 1 (default: the canal alone)")
			out := fs.String("out", "", "PNG `file` to write")
			size := fs.String("size", "1280x800", "image size `WxH` in pixels")
			view := fs.String("view", scene.DefaultView, "named `view`: "+strings.Join(scene.ViewNames(), ", "))
			before := fs.Bool("before", false, "draw the canal as the step meets it instead of as the step leaves it")
			clip := fs.Bool("open", false, "open the canal lengthwise along the plane of its main curve")
			section := fs.String("section", "", "draw cross-sections at these `levels`, mm from the apical end (e.g. 3 or 1,3,5), instead of the view")
			fixed := fs.Bool("fixed-scale", false, "top the depth-of-cut colours at the whole sequence's deepest cut, to compare steps")
			return func(stdout, stderr io.Writer) int {
				if code := cf.check(stderr, "render"); code != exitOK {
					return code
				}
				if *out == "" {
					return usageError(stderr, "render", "--out is required")
				}
				var w, h int
				if _, err := fmt.Sscanf(*size, "%dx%d", &w, &h); err != nil || min(w, h) < scene.MinPictureSide || max(w, h) > scene.MaxPictureSide {
					return usageError(stderr, "render", "--size must be WxH between %d and %d, not %q", scene.MinPictureSide, scene.MaxPictureSide, *size)
				}
				if *step < 0 || (*step > 0 && *seqPath == "") {
					return usageError(stderr, "render", "--step needs --sequence and a step number from 1")
				}
				if !isView(*view) {
					return usageError(stderr, "render", "--view must be one of %s", strings.Join(scene.ViewNames(), ", "))
				}
				if err := checkOutput(*out, *cf.path, *seqPath); err != nil {
					return inputError(stderr, "render", err)
				}
				ctx := context.Background()
				c, err := cf.load(ctx)
				if err != nil {
					return inputError(stderr, "render", err)
				}
				var res *analysis.Result
				if *seqPath != "" {
					seq, err := loadSequence(*seqPath)
					if err != nil {
						return inputError(stderr, "render", err)
					}
					if res, err = analysis.Run(ctx, c, seq, cf.runOptions(analysis.RunOptions{})); err != nil {
						return inputError(stderr, "render", err)
					}
				}
				if res != nil {
					printWarnings(stderr, "render", runWarnings(res))
				} else {
					printWarnings(stderr, "render", c.Warnings)
				}
				levels, err := sectionLevels(*section)
				if err != nil {
					return usageError(stderr, "render", "--section: %v", err)
				}
				var img *image.RGBA
				if levels != nil {
					img, err = sectionsPicture(c, res, *step, levels, *fixed, w, h)
				} else {
					img, err = scene.Picture(c, res, scene.Options{Step: *step, Before: *before, Clip: *clip, FixedScale: *fixed}, *view, w, h, 0)
				}
				if err != nil {
					return inputError(stderr, "render", err)
				}
				if err := writeOutput(*out, func(w io.Writer) error { return png.Encode(w, img) }); err != nil {
					return inputError(stderr, "render", err)
				}
				return exitOK
			}
		},
	}
}

// sectionLevels reads --section: levels in mm from the apical end, comma-separated; nil when empty.
func sectionLevels(s string) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, nil
	}
	var out []float64
	for _, f := range strings.Split(s, ",") {
		v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
		if err != nil || v < 0 {
			return nil, fmt.Errorf("%q is not a distance in mm from the apical end", f)
		}
		out = append(out, v)
	}
	if len(out) > 6 {
		return nil, fmt.Errorf("at most 6 levels, not %d", len(out))
	}
	return out, nil
}

// sectionsPicture draws the canal's cross-sections at the levels with the step shown.
func sectionsPicture(c *analysis.Canal, res *analysis.Result, step int, levels []float64, fixed bool, w, h int) (*image.RGBA, error) {
	secs := make([]*analysis.Section, 0, len(levels))
	for _, x := range levels {
		sec, err := analysis.SectionAt(c, res, step, x)
		if err != nil {
			return nil, err
		}
		secs = append(secs, sec)
	}
	opt := plots.SectionOptions{LegendTop: scene.LegendTop(res, step, fixed), DPI: 96 * max(1, float64(w)/900), Key: true, Selected: -1}
	if res != nil {
		opt.ContactMM = res.Options.ContactThreshold
	}
	return plots.SectionsImage(secs, w, h, opt), nil
}
