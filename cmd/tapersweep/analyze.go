package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"tapersweep/analysis"
	"tapersweep/models"
	"tapersweep/ui/report"
)

func analyzeCommand() command {
	return command{
		name:    "analyze",
		summary: "run a file sequence through a canal and state, per step, engagement, strain, fatigue use, torsional margin and transportation",
		usage:   "--canal PATH --sequence PATH [--format json|csv|table] [--path-model centred|elastic] [--working-length MM] [--scale K] [--root ROOT.stl] [--min-wall MM]",
		example: "tapersweep analyze --canal canal.stl --sequence plan.json --format table",
		flags: func(fs *flag.FlagSet) func(stdout, stderr io.Writer) int {
			var cf canalFlags
			cf.register(fs)
			cf.registerWall(fs)
			seqPath := fs.String("sequence", "", "sequence `file` (JSON)")
			format := fs.String("format", "json", "output `format`: json, csv or table")
			pathModel := fs.String("path-model", "", "file path `model`: centred (files follow the centerline) or elastic (files straighten as beams); overrides the sequence file")
			return func(stdout, stderr io.Writer) int {
				if *format != "json" && *format != "csv" && *format != "table" {
					return usageError(stderr, "analyze", "--format must be json, csv or table, not %q", *format)
				}
				if code := cf.check(stderr, "analyze"); code != exitOK {
					return code
				}
				if *seqPath == "" {
					return usageError(stderr, "analyze", "--sequence is required")
				}
				if *pathModel != "" && *pathModel != models.PathCentred && *pathModel != models.PathElastic {
					return usageError(stderr, "analyze", "--path-model must be %s or %s, not %q", models.PathCentred, models.PathElastic, *pathModel)
				}
				res, err := analyzeFiles(context.Background(), &cf, *seqPath, cf.runOptions(analysis.RunOptions{PathModel: *pathModel}))
				if err != nil {
					return inputError(stderr, "analyze", err)
				}
				printWarnings(stderr, "analyze", runWarnings(res))
				switch *format {
				case "csv":
					if err := report.WriteCSV(stdout, res); err != nil {
						return inputError(stderr, "analyze", err)
					}
					return exitOK
				case "table":
					writeStepsTable(stdout, res)
					return exitOK
				}
				enc := json.NewEncoder(stdout)
				enc.SetIndent("", " ")
				if err := enc.Encode(res.Summary()); err != nil {
					return inputError(stderr, "analyze", err)
				}
				return exitOK
			}
		},
	}
}

// analyzeFiles loads a canal and a sequence and runs one through the other.
func analyzeFiles(ctx context.Context, cf *canalFlags, seqPath string, opts ...analysis.RunOptions) (*analysis.Result, error) {
	var opt analysis.RunOptions
	if len(opts) > 0 {
		opt = opts[0]
	}
	seq, err := loadSequence(seqPath)
	if err != nil {
		return nil, err
	}
	c, err := cf.load(ctx)
	if err != nil {
		return nil, err
	}
	return analysis.Run(ctx, c, seq, opt)
}

// runWarnings are the canal's warnings and the run's.
func runWarnings(res *analysis.Result) []string {
	return append(append([]string{}, res.Canal.Warnings...), res.Warnings...)
}

// tableColumns are the step figures `analyze --format table` shows.
var tableColumns = []string{"step", "label", "tip_depth_mm", "engaged_length_mm", "engaged_area_mm2",
	"diameter_at_max_curvature_mm", "strain_at_max_curvature_pct", "fatigue_damage", "torsion_margin",
	"transportation_1_mm", "advice"}

// wallTableColumns join the table (before the advice) when the root is known.
var wallTableColumns = []string{"thinnest_wall_mm", "thinnest_wall_from_apex_mm", "thinnest_wall_toward_deg", "wall_under_limit_pct"}

// writeTabbed prints rows of cells in right-aligned columns.
func writeTabbed(w io.Writer, rows [][]string) {
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', tabwriter.AlignRight)
	for _, r := range rows {
		fmt.Fprintln(tw, strings.Join(r, "\t")+"\t")
	}
	tw.Flush()
}

// writeStepsTable prints the steps for a person at a terminal.
func writeStepsTable(w io.Writer, res *analysis.Result) {
	sum := res.Canal.Summary(false)
	fmt.Fprintf(w, "%s: length %.2f mm, working length %.2f mm", models.Printable(sum.Name, models.MaxNameRunes), sum.LengthMM, sum.WorkingLengthMM)
	// Each measure of the bend with its band (low–high), as the window and the report.
	if sum.MaxCurvature.RadiusMM != nil {
		fmt.Fprintf(w, ", tightest bend r %s at %s", sum.RadiusText(), sum.PlaceText())
	}
	fmt.Fprintf(w, ", Schneider angle %s\n\n", sum.SchneiderText())
	keys := tableColumns
	if res.Canal.Root != nil {
		keys = append(append(append([]string{}, keys[:len(keys)-1]...), wallTableColumns...), keys[len(keys)-1])
	}
	head, rows := report.TextRows(analysis.PickColumns(keys...), res)
	writeTabbed(w, append([][]string{head}, rows...))
	mv := res.Moved
	fmt.Fprintf(w, "\nEngaged figures count cuts deeper than the contact threshold, %g mm.", res.Options.ContactThreshold)
	if res.Canal.BendUncertain() {
		fmt.Fprintf(w, "\nThe scan does not pin the tightest bend down well: %s.", analysis.BendInheritNote(""))
	}
	if res.Canal.Root != nil {
		fmt.Fprintf(w, "\nWall to the root's outer surface (%s): estimates from the two surfaces; the thin-wall warning keeps %g mm.",
			models.Printable(res.Canal.Root.Source, models.MaxNameRunes), res.Options.MinWallMM)
		if t := res.ScannedWall.ThinnestWallMM; t != nil {
			fmt.Fprintf(w, " As scanned the thinnest wall is %.2f mm, %.1f mm from the apical end toward %.0f°.", *t,
				*res.ScannedWall.ThinnestWallFromApexMM, *res.ScannedWall.ThinnestWallTowardDeg)
		}
	}
	fmt.Fprintf(w, "\nFile path model: %s. The whole sequence moved the canal %.3f mm at 1 mm, %.3f mm at 3 mm and %.3f mm at 5 mm from the apical end; the foramen by %.3f mm.\n",
		res.Options.PathModel, mv.TransportationMM["1"], mv.TransportationMM["3"], mv.TransportationMM["5"], mv.ForamenShiftMM)
	for _, s := range res.Steps {
		for _, a := range s.Metrics.Advice {
			fmt.Fprintf(w, "\nstep %d, %s: %s", s.Number, a.Code, a.Text)
		}
	}
	for _, warn := range append(sum.Warnings, res.Warnings...) {
		fmt.Fprintf(w, "\nnote: %s", models.Printable(warn, models.MaxMessageRunes))
	}
	fmt.Fprintf(w, "\n\n%s\n", analysis.Caution)
}
