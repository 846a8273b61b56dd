package main

import (
	"context"
	"flag"
	"io"
	"strings"

	"tapersweep/analysis"
	"tapersweep/models"
	"tapersweep/ui/report"
	"tapersweep/ui/scene"
)

func reportCommand() command {
	return command{
		name:    "report",
		summary: "write a PDF report of a sequence run through a canal: a summary page, then a page per step",
		usage:   "--canal PATH --sequence PATH --out FILE.pdf [--view NAME] [--title TEXT] [--path-model centred|elastic] [--working-length MM] [--scale K]",
		example: "tapersweep report --canal canal.stl --sequence plan.json --out case.pdf --view side",
		flags: func(fs *flag.FlagSet) func(stdout, stderr io.Writer) int {
			var cf canalFlags
			cf.register(fs)
			cf.registerWall(fs)
			seqPath := fs.String("sequence", "", "sequence `file` (JSON)")
			out := fs.String("out", "", "PDF `file` to write")
			view := fs.String("view", scene.DefaultView, "named `view` of the step pictures: "+strings.Join(scene.ViewNames(), ", "))
			title := fs.String("title", "", "heading of the first page (default: the canal's name)")
			pathModel := fs.String("path-model", "", "file path `model`: centred (files follow the centerline) or elastic (files straighten as beams); overrides the sequence file")
			return func(stdout, stderr io.Writer) int {
				if code := cf.check(stderr, "report"); code != exitOK {
					return code
				}
				if *seqPath == "" {
					return usageError(stderr, "report", "--sequence is required")
				}
				if *out == "" {
					return usageError(stderr, "report", "--out is required")
				}
				if !isView(*view) {
					return usageError(stderr, "report", "--view must be one of %s", strings.Join(scene.ViewNames(), ", "))
				}
				if *pathModel != "" && *pathModel != models.PathCentred && *pathModel != models.PathElastic {
					return usageError(stderr, "report", "--path-model must be %s or %s, not %q", models.PathCentred, models.PathElastic, *pathModel)
				}
				if err := checkOutput(*out, *cf.path, *seqPath); err != nil {
					return inputError(stderr, "report", err)
				}
				res, err := analyzeFiles(context.Background(), &cf, *seqPath, cf.runOptions(analysis.RunOptions{PathModel: *pathModel}))
				if err != nil {
					return inputError(stderr, "report", err)
				}
				printWarnings(stderr, "report", runWarnings(res))
				canalFile := *cf.path
				if cf.scan.set() {
					canalFile = res.Canal.Name // the scan's label, not a path that may name the patient
				}
				err = writeOutput(*out, func(w io.Writer) error {
					return report.WritePDF(w, res, report.Options{Title: *title, CanalFile: canalFile,
						SequenceFile: *seqPath, View: *view, Patient: cf.scan.patient})
				})
				if err != nil {
					return inputError(stderr, "report", err)
				}
				return exitOK
			}
		},
	}
}

func isView(name string) bool {
	for _, v := range scene.ViewNames() {
		if v == name {
			return true
		}
	}
	return false
}
