package main

import (
	"context"
	"math"
	"strings"

	"encoding/csv"
	"encoding/json"
	"flag"
	"fmt"
	"github.com/go-gl/mathgl/mgl64"
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
				printWarnings(stderr, "centerline", c.Warnings)
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
	shell         *int
	orifice, apex *string
	force         *bool
	scan          scanFlags
	root          *string
	minWall       *float64 // nil for commands that run no sequence
}

func (cf *canalFlags) register(fs *flag.FlagSet) {
	cf.path = fs.String("canal", "", "canal `file`: an STL surface (binary or ASCII) or a canal spec (JSON)")
	cf.workingLength = fs.Float64("working-length", 0, "working length in `mm` (default: the spec's, else the centerline's length)")
	cf.scale = fs.Float64("scale", 1, "multiply STL coordinates by `K` (0.001 turns micrometres into mm)")
	cf.shell = fs.Int("shell", 0, "keep only separate surface `N` of an STL (1 = the largest); default: all")
	cf.orifice = fs.String("orifice", "", "a point `X,Y,Z` near the coronal end, in the file's coordinates (default: the wider end)")
	cf.apex = fs.String("apical-end", "", "a point `X,Y,Z` near the apical end, in the file's coordinates (default: the narrower end)")
	cf.force = fs.Bool("force", false, "measure a surface whose measures cannot be trusted (not closed, most triangles removed) instead of stopping")
	cf.root = fs.String("root", "", "the root's outer surface around the canal: an STL `file` in the canal's coordinates (default: a surface of the canal's file that encloses it, the spec's root, the scan's)")
	cf.scan.register(fs)
}

// registerWall adds --min-wall, for the commands that run a sequence.
func (cf *canalFlags) registerWall(fs *flag.FlagSet) {
	cf.minWall = fs.Float64("min-wall", analysis.DefaultMinWallMM, "the least wall to the root's outer surface, `mm`, under which a step is warned about "+
		"(default after Lim and Stock 1987, from memory; used only when the root is known)")
}

// runOptions are opt with the wall limit given on the command line.
func (cf *canalFlags) runOptions(opt analysis.RunOptions) analysis.RunOptions {
	if cf.minWall != nil {
		opt.MinWallMM = *cf.minWall
	}
	return opt
}

// point reads "x,y,z".
func point(s string) (*mgl64.Vec3, error) {
	if s == "" {
		return nil, nil
	}
	f := strings.Split(s, ",")
	if len(f) != 3 {
		return nil, fmt.Errorf("%q is not X,Y,Z", s)
	}
	var p mgl64.Vec3
	for k := range f {
		v, err := strconv.ParseFloat(strings.TrimSpace(f[k]), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%q is not X,Y,Z", s)
		}
		p[k] = v
	}
	return &p, nil
}

// scaleFlagError words a --scale no surface can use (flag.Float64 also takes NaN and Inf).
func scaleFlagError(k float64) string {
	if !(k > 0) || math.IsInf(k, 0) {
		return fmt.Sprintf("--scale must be a number above 0, not %g", k)
	}
	return ""
}

// workingLengthFlagError words a --working-length that is not a length (0 is the default).
func workingLengthFlagError(mm float64) string {
	switch {
	case math.IsNaN(mm) || math.IsInf(mm, 0):
		return fmt.Sprintf("--working-length must be a number of mm, not %g", mm)
	case mm < 0:
		return "--working-length must not be negative"
	}
	return ""
}

func (cf *canalFlags) check(stderr io.Writer, cmd string) int {
	switch {
	case *cf.path == "" && !cf.scan.set():
		return usageError(stderr, cmd, "--canal is required (or --scan, with --orifice and --apical-end)")
	case *cf.path != "" && cf.scan.set():
		return usageError(stderr, cmd, "give --canal or --scan, not both")
	case cf.scan.set() && (*cf.orifice == "" || *cf.apex == ""):
		return usageError(stderr, cmd, "--scan needs --orifice and --apical-end (the canal's two ends in the scan's coordinates, mm)")
	case cf.scan.set() && (*cf.scale != 1 || *cf.shell != 0):
		return usageError(stderr, cmd, "--scale and --shell apply to STL surfaces, not to --scan")
	}
	if code := cf.scan.check(stderr, cmd); code != exitOK {
		return code
	}
	if msg := scaleFlagError(*cf.scale); msg != "" {
		return usageError(stderr, cmd, "%s", msg)
	}
	if msg := workingLengthFlagError(*cf.workingLength); msg != "" {
		return usageError(stderr, cmd, "%s", msg)
	}
	if *cf.shell < 0 {
		return usageError(stderr, cmd, "--shell counts from 1")
	}
	if cf.minWall != nil && (!(*cf.minWall > 0) || *cf.minWall > 10) {
		return usageError(stderr, cmd, "--min-wall must be a number of mm above 0 and at most 10, not %g", *cf.minWall)
	}
	if _, err := point(*cf.orifice); err != nil {
		return usageError(stderr, cmd, "--orifice: %v", err)
	}
	if _, err := point(*cf.apex); err != nil {
		return usageError(stderr, cmd, "--apical-end: %v", err)
	}
	return exitOK
}

func (cf *canalFlags) load(ctx context.Context) (*analysis.Canal, error) {
	orifice, _ := point(*cf.orifice)
	apex, _ := point(*cf.apex)
	opt := analysis.CanalOptions{WorkingLength: *cf.workingLength}
	if *cf.root != "" {
		scale := *cf.scale
		if cf.scan.set() {
			scale = 1
		}
		root, err := analysis.LoadRoot(ctx, *cf.root, scale, 0)
		if err != nil {
			return nil, err
		}
		opt.Root, opt.RootSource = root, *cf.root
	}
	if cf.scan.set() {
		return loadScanCanal(ctx, &cf.scan, orifice, apex, opt)
	}
	opt.Extract = analysis.ExtractOptions{Orifice: orifice, Apex: apex}
	return analysis.LoadCanal(ctx, *cf.path, analysis.LoadOptions{
		Scale: *cf.scale,
		Shell: *cf.shell,
		Force: *cf.force,
		Canal: opt,
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
	// A write error (a full disk) is caught by the command's checked standard output.
	return exitOK
}
