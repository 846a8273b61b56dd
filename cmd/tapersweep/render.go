package main

import (
	"context"
	"flag"
	"fmt"
	"image/png"
	"io"
	"strings"

	"tapersweep/analysis"
	"tapersweep/ui/scene"
)

func renderCommand() command {
	return command{
		name:    "render",
		summary: "draw a canal, or one step of a sequence with the wall shaded by depth of cut, to a PNG",
		usage:   "--canal PATH [--sequence PATH --step N] --out FILE.png [--size WxH] [--view NAME]",
		example: "tapersweep render --canal canal.stl --sequence plan.json --step 2 --view side --out step2.png",
		flags: func(fs *flag.FlagSet) func(stdout, stderr io.Writer) int {
			var cf canalFlags
			cf.register(fs)
			seqPath := fs.String("sequence", "", "sequence `file` (JSON); needed with --step")
			step := fs.Int("step", 0, "step `N` to draw, numbered from 1 (default: the canal alone)")
			out := fs.String("out", "", "PNG `file` to write")
			size := fs.String("size", "1280x800", "image size `WxH` in pixels")
			view := fs.String("view", scene.Views[0].Name, "named `view`: "+strings.Join(scene.ViewNames(), ", "))
			before := fs.Bool("before", false, "draw the canal as the step meets it instead of as the step leaves it")
			clip := fs.Bool("open", false, "open the canal lengthwise along the plane of its main curve")
			return func(stdout, stderr io.Writer) int {
				if code := cf.check(stderr, "render"); code != exitOK {
					return code
				}
				if *out == "" {
					return usageError(stderr, "render", "--out is required")
				}
				var w, h int
				if _, err := fmt.Sscanf(*size, "%dx%d", &w, &h); err != nil || w < 64 || h < 64 || w > 8192 || h > 8192 {
					return usageError(stderr, "render", "--size must be WxH between 64 and 8192, not %q", *size)
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
					if res, err = analysis.Run(ctx, c, seq, analysis.RunOptions{}); err != nil {
						return inputError(stderr, "render", err)
					}
				}
				if res != nil {
					printWarnings(stderr, "render", runWarnings(res))
				} else {
					printWarnings(stderr, "render", c.Warnings)
				}
				img, err := scene.Picture(c, res, scene.Options{Step: *step, Before: *before, Clip: *clip}, *view, w, h)
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
