package main

import (
	"context"
	"encoding/csv"
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"sync"
	"time"

	"tapersweep/analysis"
	"tapersweep/models"
	"tapersweep/ui/report"
)

func batchCommand() command {
	return command{
		name: "batch",
		summary: "run one sequence through every canal file (*.stl, *.json) in a folder, not its subfolders, or every canal a " +
			"manifest lists (canal files, or canals found in scans), into one CSV row per canal and step; a canal that fails gets a row with its error, the run goes " +
			"on and the command exits 1",
		usage:   "--canals DIR|--manifest FILE.csv --sequence PATH --out FILE.csv [--jobs N] [--shard I/N] [--working-length MM] [--scale K] [--force]",
		example: "tapersweep batch --canals scans/ --sequence plan.json --out results.csv --jobs 4 --shard 2/10",
		flags: func(fs *flag.FlagSet) func(stdout, stderr io.Writer) int {
			dir := fs.String("canals", "", "`folder` of canal files: STL surfaces and canal specs (JSON), not searched recursively")
			seqPath := fs.String("sequence", "", "sequence `file` (JSON)")
			out := fs.String("out", "", "CSV `file` to write, - for standard output")
			jobs := fs.Int("jobs", runtime.NumCPU(), "canals to run at once (`N`); the run uses at most N cores, so on a shared machine or an array job it stays within the cores it was given")
			shard := fs.String("shard", "1/1", "take shard `I/N` of the sorted canal files: those whose index k (from 0) has k mod N = I-1; shards count from 1")
			wl := fs.Float64("working-length", 0, "working length in `mm` for every canal (default: each spec's, else its centerline's length)")
			scale := fs.Float64("scale", 1, "multiply STL coordinates by `K` (0.001 turns micrometres into mm)")
			manifest := fs.String("manifest", "", "CSV `file` naming the canals, one per row, each with its own settings "+
				"(columns file or scan, orifice, apical_end, working_length_mm, scale, voxel_mm, label; see the README); instead of --canals")
			force := fs.Bool("force", false, "measure surfaces whose measures cannot be trusted (not closed, most triangles "+
				"removed) instead of failing them")
			minWall := fs.Float64("min-wall", analysis.DefaultMinWallMM, "the least wall to the root's outer surface, `mm`, under which a step is warned about "+
				"(for canals whose root is known: a spec's root, or a surface of the canal's file that encloses it)")
			return func(stdout, stderr io.Writer) int {
				switch {
				case *dir == "" && *manifest == "":
					return usageError(stderr, "batch", "--canals is required (or --manifest)")
				case *dir != "" && *manifest != "":
					return usageError(stderr, "batch", "give --canals or --manifest, not both")
				case *seqPath == "":
					return usageError(stderr, "batch", "--sequence is required")
				case *out == "":
					return usageError(stderr, "batch", "--out is required")
				case *jobs < 1:
					return usageError(stderr, "batch", "--jobs must be at least 1")
				case scaleFlagError(*scale) != "":
					return usageError(stderr, "batch", "%s", scaleFlagError(*scale))
				case workingLengthFlagError(*wl) != "":
					return usageError(stderr, "batch", "%s", workingLengthFlagError(*wl))
				case !(*minWall > 0) || *minWall > 10:
					return usageError(stderr, "batch", "--min-wall must be a number of mm above 0 and at most 10, not %g", *minWall)
				}
				si, sn, err := parseShard(*shard)
				if err != nil {
					return usageError(stderr, "batch", "--shard: %v", err)
				}
				seq, err := loadSequence(*seqPath)
				if err != nil {
					return inputError(stderr, "batch", err)
				}
				load := analysis.LoadOptions{Scale: *scale, Force: *force,
					Canal: analysis.CanalOptions{WorkingLength: *wl}}
				var canals []batchCanalFile
				if *manifest != "" {
					canals, err = readManifest(*manifest, load)
				} else {
					canals, err = folderCanals(*dir, load)
				}
				if err != nil {
					return inputError(stderr, "batch", err)
				}
				if *out != "-" {
					inputs := []string{*seqPath, *manifest}
					for _, c := range canals {
						inputs = append(inputs, c.path)
					}
					if err := checkOutput(*out, inputs...); err != nil {
						return inputError(stderr, "batch", err)
					}
				}
				canals = shardFiles(canals, si, sn)
				opt := batchOptions{Jobs: *jobs, Run: analysis.RunOptions{MinWallMM: *minWall}}
				return writeBatch(context.Background(), stdout, stderr, *out, canals, seq, opt)
			}
		},
	}
}

// parseShard reads "I/N" with 1 <= I <= N.
func parseShard(s string) (i, n int, err error) {
	a, b, ok := strings.Cut(s, "/")
	if ok {
		i, err = strconv.Atoi(strings.TrimSpace(a))
		if err == nil {
			n, err = strconv.Atoi(strings.TrimSpace(b))
		}
	}
	if !ok || err != nil || n < 1 || i < 1 || i > n {
		return 0, 0, fmt.Errorf("want I/N with 1 <= I <= N, like 3/10; got %q", s)
	}
	return i, n, nil
}

// batchCanalFile is one canal of a batch: its name in the table, where it is, how to load it.
type batchCanalFile struct {
	file, path string
	load       analysis.LoadOptions
	scan       *scanFlags // set when the canal is to be found in a scan at path
}

// folderCanals lists the canal files directly in dir, sorted by name, all loaded alike.
func folderCanals(dir string, load analysis.LoadOptions) ([]batchCanalFile, error) {
	names, err := canalFiles(dir)
	if err != nil {
		return nil, err
	}
	out := make([]batchCanalFile, len(names))
	for i, n := range names {
		out[i] = batchCanalFile{file: n, path: filepath.Join(dir, n), load: load}
	}
	return out, nil
}

// canalFiles lists the *.stl and *.json files directly in dir, sorted by name.
func canalFiles(dir string) ([]string, error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	var out []string
	for _, e := range entries {
		ext := strings.ToLower(filepath.Ext(e.Name()))
		if (ext == ".stl" || ext == ".json") && e.Type().IsRegular() {
			out = append(out, e.Name())
		}
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%s: no canal files (*.stl, *.json) in this folder (subfolders are not searched)", dir)
	}
	sort.Strings(out)
	return out, nil
}

// shardFiles keeps the files whose sorted index k satisfies k % n == i-1.
func shardFiles[T any](files []T, i, n int) []T {
	var out []T
	for k, f := range files {
		if k%n == i-1 {
			out = append(out, f)
		}
	}
	return out
}

// batchCanalColumns describe the canal on every row; then come analysis.StepColumns, the
// warnings and the error.
var batchCanalColumns = []string{"canal_file", "canal_name", "length_mm", "working_length_mm",
	"tightest_bend_radius_mm", "tightest_bend_from_apex_mm", "schneider_angle_deg", "arc_angle_deg",
	"tightest_bend_radius_low_mm", "tightest_bend_radius_high_mm", "tightest_bend_from_apex_low_mm",
	"tightest_bend_from_apex_high_mm", "schneider_angle_low_deg", "schneider_angle_high_deg"}

func batchColumns() []string {
	cols := append(append([]string{}, batchCanalColumns...), analysis.StepColumnKeys()...)
	return append(cols, "warnings", "error")
}

type batchOptions struct {
	Jobs int
	// Run is the model's settings for every canal (the thin-wall limit).
	Run analysis.RunOptions
	// Progress is told of each canal as it finishes, in the order they finish.
	Progress func(done, total, failed int, file string, err error)
}

// writeBatch runs the batch into the named file (written beside it first and renamed when
// complete, so an interrupted run leaves no table that looks whole) or standard output.
func writeBatch(ctx context.Context, stdout, stderr io.Writer, out string, files []batchCanalFile, seq *models.Sequence, opt batchOptions) int {
	opt.Progress = newProgress(stderr, isTerminal(stderr))
	if out == "-" {
		failed, err := runBatch(ctx, stdout, files, seq, opt)
		return batchDone(stderr, len(files), failed, err)
	}
	f, err := report.Create(out)
	if err != nil {
		return inputError(stderr, "batch", err)
	}
	defer f.Discard()
	failed, err := runBatch(ctx, f, files, seq, opt)
	if err == nil {
		err = f.Commit()
	}
	return batchDone(stderr, len(files), failed, err)
}

func batchDone(stderr io.Writer, total, failed int, err error) int {
	if err != nil {
		return inputError(stderr, "batch", err)
	}
	if failed > 0 {
		fmt.Fprintf(stderr, "tapersweep batch: %d of %d canals failed; their rows carry the error\n", failed, total)
		return exitBadInput
	}
	return exitOK
}

// runBatch analyses the canals up to opt.Jobs at once and writes the table in file order as
// soon as each leading canal is done, so the output is the same whatever the number of jobs.
func runBatch(ctx context.Context, w io.Writer, files []batchCanalFile, seq *models.Sequence, opt batchOptions) (failed int, err error) {
	cw := csv.NewWriter(w)
	if err := cw.Write(batchColumns()); err != nil {
		return 0, err
	}
	type done struct {
		k    int
		rows [][]string
		err  error
	}
	jobs := max(1, min(opt.Jobs, len(files)))
	// --jobs bounds the cores the run uses, not only the canals in flight: each canal's own
	// parallel parts get their share of those cores (passed down, not set for the process),
	// and one job means one core.
	cores := max(1, min(opt.Jobs, runtime.NumCPU()))
	workers := max(1, cores/jobs)
	next := make(chan int)
	results := make(chan done, jobs)
	var wg sync.WaitGroup
	for range jobs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range next {
				load := files[k].load
				load.Canal.Workers = workers
				rows, err := batchCanal(ctx, files[k], seq, load, opt.Run)
				results <- done{k, rows, err}
			}
		}()
	}
	go func() {
		defer close(next)
		for k := range files {
			select {
			case next <- k:
			case <-ctx.Done():
				return
			}
		}
	}()
	go func() { wg.Wait(); close(results) }()

	pending := map[int][][]string{}
	written, finished := 0, 0
	for r := range results {
		finished++
		if r.err != nil {
			failed++
		}
		if opt.Progress != nil {
			opt.Progress(finished, len(files), failed, files[r.k].file, r.err)
		}
		pending[r.k] = r.rows
		for rows, ok := pending[written]; ok; rows, ok = pending[written] {
			delete(pending, written)
			written++
			if err == nil {
				err = cw.WriteAll(rows)
			}
		}
	}
	if err == nil && ctx.Err() != nil {
		err = fmt.Errorf("stopped after %d of %d canals: %w", written, len(files), ctx.Err())
	}
	if err == nil {
		cw.Flush()
		err = cw.Error()
	}
	return failed, err
}

// batchCanal runs the sequence through one canal and returns its rows: one per step, or one
// row carrying the error. A failure in one canal, even a crash in the analysis, stays in its row.
func batchCanal(ctx context.Context, src batchCanalFile, seq *models.Sequence, opt analysis.LoadOptions, run analysis.RunOptions) (rows [][]string, err error) {
	path, file := src.path, src.file
	width := len(batchColumns())
	errorRow := func(e error) [][]string {
		row := make([]string, width)
		row[0] = models.Printable(file, models.MaxNameRunes)
		row[width-1] = oneLine(explain(e))
		return [][]string{row}
	}
	defer func() {
		if p := recover(); p != nil {
			err = fmt.Errorf("%s: internal error, please report it: %v", path, p)
			rows = errorRow(err)
		}
	}()
	var c *analysis.Canal
	if src.scan != nil {
		c, err = loadScanCanal(ctx, src.scan, opt.Canal.Extract.Orifice, opt.Canal.Extract.Apex, opt.Canal)
	} else {
		c, err = analysis.LoadCanal(ctx, path, opt)
	}
	if err == nil {
		var res *analysis.Result
		if res, err = analysis.Run(ctx, c, seq, run); err == nil {
			return canalRows(file, res), nil
		}
	}
	if !strings.Contains(err.Error(), path) {
		err = fmt.Errorf("%s: %w", path, err)
	}
	return errorRow(err), err
}

// canalRows states each step of a run with the canal's own columns in front.
func canalRows(file string, res *analysis.Result) [][]string {
	sum := res.Canal.Summary(false)
	f := func(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
	p := func(v *float64) string {
		if v == nil {
			return ""
		}
		return f(*v)
	}
	mc := sum.MaxCurvature
	name := func(v string) string { return models.Printable(v, models.MaxNameRunes) }
	canal := []string{name(file), name(sum.Name), f(sum.LengthMM), f(sum.WorkingLengthMM), p(mc.RadiusMM),
		f(mc.FromApexMM), f(sum.SchneiderDeg), f(sum.Arc.AngleDeg),
		p(mc.RadiusRangeMM[0]), p(mc.RadiusRangeMM[1]), f(mc.FromApexRangeMM[0]), f(mc.FromApexRangeMM[1]),
		f(sum.SchneiderRangeDeg[0]), f(sum.SchneiderRangeDeg[1])}
	var notes []string
	for _, w := range append(sum.Warnings, res.Warnings...) {
		notes = append(notes, models.Printable(w, models.MaxMessageRunes))
	}
	warnings := oneLine(strings.Join(notes, " | "))
	var rows [][]string
	for _, st := range res.Steps {
		row := append(append([]string{}, canal...), st.Metrics.Row()...)
		rows = append(rows, append(row, warnings, ""))
	}
	return rows
}

// oneLine keeps a message on one CSV line.
func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

// isTerminal tells whether w is a terminal (stderr at a shell prompt, not a log file).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}

// newProgress reports progress as a bar redrawn in place on a terminal, and as one plain line
// per canal otherwise (logs of a batch scheduler).
func newProgress(w io.Writer, terminal bool) func(done, total, failed int, file string, err error) {
	start := time.Now()
	return func(done, total, failed int, file string, err error) {
		if !terminal {
			status := "ok"
			if err != nil {
				status = "failed: " + oneLine(explain(err))
			}
			fmt.Fprintf(w, "batch: %d/%d %s %s\n", done, total, models.Printable(file, models.MaxNameRunes), status)
			return
		}
		const width = 30
		fill := width * done / max(total, 1)
		bar := strings.Repeat("#", fill) + strings.Repeat(".", width-fill)
		elapsed := time.Since(start)
		left := ""
		if done < total {
			eta := time.Duration(float64(elapsed) / float64(done) * float64(total-done))
			left = ", about " + eta.Round(time.Second).String() + " left"
		}
		fmt.Fprintf(w, "\r[%s] %d/%d canals, %d failed, %s%s\x1b[K", bar, done, total, failed,
			elapsed.Round(time.Second), left)
		if done == total {
			fmt.Fprintln(w)
		}
	}
}
