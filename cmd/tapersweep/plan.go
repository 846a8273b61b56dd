package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"tapersweep/analysis"
	"tapersweep/analysis/plan"
	"tapersweep/models"
	"tapersweep/ui/report"
)

func planCommand() command {
	return command{
		name:    "plan",
		summary: "propose a file sequence that reaches a target size and taper at working length with the least engagement, torque and fatigue use",
		usage: "--canal PATH --target SIZE/TAPER [--instruments PATH] [--max-steps N] [--out FILE] [--compare PATH]\n" +
			"       [--max-engaged MM] [--max-fatigue F] [--weights a,b,c] [--allow-same-taper] [--working-length MM] [--scale K]\n" +
			"       [--root ROOT.stl] [--min-wall MM] [--keep-wall MM]",
		example: "tapersweep plan --canal canal.stl --target 30/.04 --instruments shelf.json --max-engaged 6 --out plan.json --compare mine.json",
		flags: func(fs *flag.FlagSet) func(stdout, stderr io.Writer) int {
			var cf canalFlags
			cf.register(fs)
			cf.registerWall(fs)
			target := fs.String("target", "", "the `SIZE/TAPER` of the last file, taken to working length (e.g. 30/.04)")
			instruments := fs.String("instruments", "", "instruments `file` (JSON list of {\"size\": 25, \"taper\": 0.04, ...}); default: the generic catalogue from size 10 up to the target size, tapers .02-.08 (and .10 from size 20)")
			maxSteps := fs.Int("max-steps", plan.DefaultMaxSteps, "at most `N` files, the target included")
			out := fs.String("out", "", "write the proposed sequence (JSON, as analyze reads it) to `FILE`; default: print it after the table")
			compare := fs.String("compare", "", "sequence `file` to compare with; default: the target file taken straight to working length")
			maxEngaged := fs.Float64("max-engaged", 0, "no file engaged over more than `MM` mm (0: no cap)")
			maxFatigue := fs.Float64("max-fatigue", 0, "no file using more than `F` of its fatigue life (0: what the target file alone uses at working length; -1: no cap below the model's fracture point, which no plan reaches)")
			weights := fs.String("weights", "1,1,1", "weights `a,b,c` of largest engaged length, peak torque and fatigue use, each relative to the target file alone")
			sameTaper := fs.Bool("allow-same-taper", false, "allow two consecutive files of the same taper")
			keepWall := fs.Float64("keep-wall", 0, "every file leaves at least `MM` mm of wall to the root's outer surface (0: no such constraint; needs the root)")
			return func(stdout, stderr io.Writer) int {
				if code := cf.check(stderr, "plan"); code != exitOK {
					return code
				}
				if *target == "" {
					return usageError(stderr, "plan", "--target is required (e.g. --target 30/.04)")
				}
				tg, err := plan.ParseTarget(*target)
				if err != nil {
					return usageError(stderr, "plan", "--target: %v", err)
				}
				w, err := parseWeights(*weights)
				if err != nil {
					return usageError(stderr, "plan", "--weights: %v", err)
				}
				if *maxSteps < 1 || *maxSteps > 12 {
					return usageError(stderr, "plan", "--max-steps must be from 1 to 12")
				}
				if *maxEngaged < 0 || math.IsNaN(*maxEngaged) {
					return usageError(stderr, "plan", "--max-engaged must not be negative")
				}
				if math.IsNaN(*maxFatigue) || *maxFatigue < 0 && *maxFatigue != -1 {
					return usageError(stderr, "plan", "--max-fatigue must be above 0, 0 (the default cap) or -1 (no cap)")
				}
				if !(*keepWall >= 0) || *keepWall > 10 {
					return usageError(stderr, "plan", "--keep-wall must be a number of mm from 0 to 10, not %g", *keepWall)
				}
				if *out != "" {
					if err := checkOutput(*out, *cf.path, *instruments, *compare); err != nil {
						return inputError(stderr, "plan", err)
					}
				}
				opt := plan.Options{Target: tg, MaxSteps: *maxSteps, MaxEngagedMM: *maxEngaged,
					MaxFatigue: *maxFatigue, AllowSameTaper: *sameTaper, Weights: w, KeepWallMM: *keepWall,
					Run: cf.runOptions(analysis.RunOptions{})}
				if *instruments != "" {
					if err := checkInput(*instruments); err != nil {
						return inputError(stderr, "plan", err)
					}
					ins, warns, err := models.LoadInstruments(*instruments)
					if err != nil {
						return inputError(stderr, "plan", err)
					}
					for _, wn := range warns {
						fmt.Fprintf(stderr, "note: %s\n", wn)
					}
					opt.Instruments = ins
				}
				var cmp *models.Sequence
				if *compare != "" {
					if cmp, err = loadSequence(*compare); err != nil {
						return inputError(stderr, "plan", err)
					}
				}
				ctx := context.Background()
				c, err := cf.load(ctx)
				if err != nil {
					return inputError(stderr, "plan", err)
				}
				printWarnings(stderr, "plan", c.Warnings)
				pl, err := plan.Propose(ctx, c, opt)
				if err != nil {
					var inf *plan.InfeasibleError
					if errors.As(err, &inf) {
						fmt.Fprintf(stderr, "tapersweep plan: %s: infeasible: %s\n", models.Printable(c.Name, models.MaxNameRunes), explain(err))
						return exitBadInput
					}
					return inputError(stderr, "plan", err)
				}
				other, otherName := pl.Baseline, tg.Label()+" alone to WL"
				if cmp != nil {
					if other, err = analysis.Run(ctx, c, cmp, cf.runOptions(analysis.RunOptions{})); err != nil {
						return inputError(stderr, "plan", err)
					}
					otherName = *compare
				}
				data, err := pl.Sequence.MarshalJSON()
				if err != nil {
					return inputError(stderr, "plan", err)
				}
				data = append(data, '\n')
				if *out != "" {
					if err := writeOutput(*out, func(w io.Writer) error { _, err := w.Write(data); return err }); err != nil {
						return inputError(stderr, "plan", err)
					}
				}
				writePlanTable(stdout, c, pl, other, otherName)
				if *out == "" {
					fmt.Fprintf(stdout, "\nproposed sequence (JSON):\n%s", data)
				} else {
					fmt.Fprintf(stdout, "\nproposed sequence written to %s\n", *out)
				}
				return exitOK
			}
		},
	}
}

// parseWeights reads "a,b,c": three weights, finite and not negative, not all zero.
func parseWeights(s string) (plan.Weights, error) {
	parts := strings.Split(s, ",")
	if len(parts) != 3 {
		return plan.Weights{}, fmt.Errorf("want three numbers a,b,c, not %q", s)
	}
	var v [3]float64
	for i, p := range parts {
		f, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || f < 0 || math.IsNaN(f) || math.IsInf(f, 0) {
			return plan.Weights{}, fmt.Errorf("%q is not a number of 0 or more", strings.TrimSpace(p))
		}
		v[i] = f
	}
	if v == [3]float64{} {
		return plan.Weights{}, fmt.Errorf("at least one weight must be above 0")
	}
	return plan.Weights{Engaged: v[0], Torque: v[1], Fatigue: v[2]}, nil
}

// writePlanTable prints the plan and the sequence it is compared with, step by step, then both
// overall, then why the plan was chosen.
func writePlanTable(w io.Writer, c *analysis.Canal, pl *plan.Plan, other *analysis.Result, otherName string) {
	fmt.Fprintf(w, "%s: working length %.2f mm\n", models.Printable(c.Name, models.MaxNameRunes), c.WorkingLength)
	compared := plan.ComparedColumns()
	cols := append(analysis.PickColumns("step", "label", "tip_depth_mm"), compared...)
	if c.Root != nil {
		// With a root, each step's thinnest wall and where: what a wall to keep is judged by.
		cols = append(cols, analysis.PickColumns("thinnest_wall_mm", "thinnest_wall_from_apex_mm", "thinnest_wall_toward_deg")...)
	}
	steps := func(title string, res *analysis.Result) {
		fmt.Fprintf(w, "\n%s\n", title)
		head, rows := report.TextRows(cols, res)
		// The step's depth as the sequence states it, beside where its tip went.
		head = slices.Insert(head, 2, "depth")
		for i, s := range res.Steps {
			depth := s.Step.Depth.String()
			if !s.Step.Depth.FromWL {
				depth += " mm"
			}
			rows[i] = slices.Insert(rows[i], 2, depth)
		}
		writeTabbed(w, append([][]string{head}, rows...))
	}
	steps("proposed plan", pl.Result)
	steps("compared with: "+otherName, other)
	fmt.Fprintln(w, "\noverall (the largest over the files)")
	overall := [][]string{{"", "plan", "compared"}}
	for _, col := range compared {
		row := []string{"largest " + col.Label}
		for _, res := range []*analysis.Result{pl.Result, other} {
			v, _ := col.Largest(res)
			row = append(row, strconv.FormatFloat(v, 'f', col.Shown, 64))
		}
		overall = append(overall, row)
	}
	if c.Root != nil {
		row := []string{"thinnest wall left to the root surface, mm (estimate)"}
		for _, res := range []*analysis.Result{pl.Result, other} {
			row = append(row, thinnestWallText(res))
		}
		overall = append(overall, row)
	}
	overall = append(overall, []string{"files", strconv.Itoa(len(pl.Result.Steps)), strconv.Itoa(len(other.Steps))})
	writeTabbed(w, overall)
	for _, d := range plan.Differences(pl.Result, other) {
		fmt.Fprintf(w, "note: %s.\n", d)
	}
	fmt.Fprintln(w)
	for _, line := range pl.Explanation {
		fmt.Fprintf(w, "%s\n", line)
	}
	fmt.Fprintf(w, "\n%s\n", analysis.Caution)
}

// thinnestWallText is the least wall any step of a run leaves to the root's surface ("-": none
// measured).
func thinnestWallText(res *analysis.Result) string {
	least := math.Inf(1)
	for _, s := range res.Steps {
		if w := s.Metrics.ThinnestWallMM; w != nil {
			least = min(least, *w)
		}
	}
	if math.IsInf(least, 1) {
		return "-"
	}
	return strconv.FormatFloat(least, 'f', 3, 64)
}
