package main

import (
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
	a := app.NewWithID("org.tapersweep.desktop")
	ui.Open(a, ui.Options{CanalPath: *canal, SequencePath: *seq, Scale: *scale})
	a.Run()
	return exitOK
}
