package main

import (
	"errors"
	"flag"
	"fmt"
	"io"

	"fyne.io/fyne/v2/app"

	"tapersweep/ui"
)

// runWindow opens the window; flags name a canal and a sequence to open instead of the demo.
func runWindow(args []string, stderr io.Writer) int {
	fs := flag.NewFlagSet("tapersweep", flag.ContinueOnError)
	fs.SetOutput(stderr)
	canal := fs.String("canal", "", "canal `file` to open (STL or canal spec); default: the built-in demo")
	seq := fs.String("sequence", "", "sequence `file` to open; default: the demo sequence")
	scale := fs.Float64("scale", 1, "multiply STL coordinates by `factor` (0.001 for a surface in micrometres)")
	scan := fs.String("scan", "", "a scan to open in the scan window: a DICOM or image-slice `folder`, a NIfTI or DICOM multi-frame file")
	voxel := fs.Float64("voxel", 0, "voxel edge in `mm` of a stack of image slices")
	label := fs.String("label", "", "name of the scan on screen and in saved files (default: its folder's or file's name)")
	orifice := fs.String("orifice", "", "with --scan: the canal's coronal end `X,Y,Z` (mm); with --apical-end the canal is found at once")
	apex := fs.String("apical-end", "", "with --scan: the canal's apical end `X,Y,Z` (mm)")
	if err := fs.Parse(args); err != nil {
		return exitUsage
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "tapersweep: unexpected argument %q (commands: tapersweep --help)\n", fs.Arg(0))
		return exitUsage
	}
	if !(*scale > 0) || *scale > 1000 {
		fmt.Fprintf(stderr, "tapersweep: --scale must be a factor above 0 and at most 1000, not %g\n", *scale)
		return exitUsage
	}
	opt := ui.Options{CanalPath: *canal, SequencePath: *seq, Scale: *scale}
	if *scan != "" {
		o, err1 := point(*orifice)
		x, err2 := point(*apex)
		if err := errors.Join(err1, err2); err != nil {
			fmt.Fprintf(stderr, "tapersweep: %v\n", err)
			return exitUsage
		}
		opt.Scan = &ui.ScanOptions{Path: *scan, Voxel: *voxel, Label: *label, Orifice: o, Apex: x}
	}
	a := app.NewWithID("org.tapersweep.desktop")
	win := ui.Open(a, opt)
	a.Lifecycle().SetOnStarted(func() { fitScreen(win) })
	a.Run()
	return exitOK
}
