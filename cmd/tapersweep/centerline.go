package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"strconv"

	"tapersweep/analysis"
)

func centerlineCommand() command {
	return command{
		name:    "centerline",
		summary: "extract a canal's centerline and curvature measures from an STL surface or a canal spec",
		usage:   "--canal PATH [--format json|csv] [--working-length MM] [--scale K]",
		example: "tapersweep centerline --canal canal.stl --format csv --scale 0.001 > line.csv",
		flags: func(fs *flag.FlagSet) func(stdout, stderr io.Writer) int {
			var cf canalFlags
			cf.register(fs)
			format := fs.String("format", "json", "output `format`: json or csv")
			return func(stdout, stderr io.Writer) int {
				if *format != "json" && *format != "csv" {
					return usageError(stderr, "centerline", "--format must be json or csv, not %q", *format)
				}
				if code := cf.check(stderr, "centerline"); code != exitOK {
					return code
				}
				c, err := cf.load(context.Background())
				if err != nil {
					return inputError(stderr, "centerline", err)
				}
				if *format == "csv" {
					return writeCenterlineCSV(stdout, c)
				}
				enc := json.NewEncoder(stdout)
				enc.SetIndent("", " ")
				if err := enc.Encode(c.Summary(true)); err != nil {
					return inputError(stderr, "centerline", err)
				}
				return exitOK
			}
		},
	}
}

// canalFlags are the flags every command that reads a canal shares.
type canalFlags struct {
	path          *string
	workingLength *float64
	scale         *float64
}

func (cf *canalFlags) register(fs *flag.FlagSet) {
	cf.path = fs.String("canal", "", "canal `file`: an STL surface (binary or ASCII) or a canal spec (JSON)")
	cf.workingLength = fs.Float64("working-length", 0, "working length in `mm` (default: the spec's, else the centerline's length)")
	cf.scale = fs.Float64("scale", 1, "multiply STL coordinates by `K` (0.001 turns micrometres into mm)")
}

func (cf *canalFlags) check(stderr io.Writer, cmd string) int {
	if *cf.path == "" {
		return usageError(stderr, cmd, "--canal is required")
	}
	if *cf.scale <= 0 {
		return usageError(stderr, cmd, "--scale must be above 0")
	}
	if *cf.workingLength < 0 {
		return usageError(stderr, cmd, "--working-length must not be negative")
	}
	return exitOK
}

func (cf *canalFlags) load(ctx context.Context) (*analysis.Canal, error) {
	return analysis.LoadCanal(ctx, *cf.path, analysis.LoadOptions{
		Scale: *cf.scale,
		Canal: analysis.CanalOptions{WorkingLength: *cf.workingLength},
	})
}

func writeCenterlineCSV(w io.Writer, c *analysis.Canal) int {
	cw := csv.NewWriter(w)
	f := func(v float64) string { return strconv.FormatFloat(v, 'f', 4, 64) }
	cw.Write([]string{"x_mm", "y_mm", "z_mm", "s_mm", "from_apex_mm", "curvature_per_mm"})
	L := c.Line.Length()
	for i, p := range c.Line.Points {
		cw.Write([]string{f(p[0]), f(p[1]), f(p[2]), f(c.Line.S[i]), f(L - c.Line.S[i]), f(c.Line.K[i])})
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		fmt.Fprintln(w, err)
		return exitBadInput
	}
	return exitOK
}
