package main

import (
	"flag"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"tapersweep/analysis"
	"tapersweep/mesh"
	"tapersweep/models"
)

// Files the demo command writes.
const (
	demoCanalSpecFile = "demo-canal.json"
	demoCanalSTLFile  = "demo-canal.stl"
	demoSequenceFile  = "demo-sequence.json"
)

func demoCommand() command {
	return command{
		name: "demo",
		summary: "write the built-in demo (an invented canal as a spec and as an STL, and an invented sequence) " +
			"to a folder; files of the same names there are replaced",
		usage:   "--out DIR",
		example: "tapersweep demo --out demo && tapersweep report --canal demo/demo-canal.stl --sequence demo/demo-sequence.json --out demo/demo.pdf",
		flags: func(fs *flag.FlagSet) func(stdout, stderr io.Writer) int {
			out := fs.String("out", "", "`folder` to write into (created when missing)")
			return func(stdout, stderr io.Writer) int {
				if *out == "" {
					return usageError(stderr, "demo", "--out is required")
				}
				if err := writeDemo(*out); err != nil {
					return inputError(stderr, "demo", err)
				}
				for _, f := range []string{demoCanalSpecFile, demoCanalSTLFile, demoSequenceFile} {
					fmt.Fprintln(stdout, filepath.Join(*out, f))
				}
				return exitOK
			}
		},
	}
}

// writeDemo writes the demo files. The STL is meshed as a canal spec is meshed for analysis,
// so both canal files give the same centerline.
func writeDemo(dir string) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	bytesOf := func(data []byte) func(io.Writer) error {
		return func(w io.Writer) error { _, err := w.Write(data); return err }
	}
	if err := writeOutput(filepath.Join(dir, demoCanalSpecFile), bytesOf(models.DemoCanalJSON())); err != nil {
		return err
	}
	m := models.DemoCanal().Mesh(analysis.StationSpacing, 96)
	if err := writeOutput(filepath.Join(dir, demoCanalSTLFile), func(w io.Writer) error {
		return mesh.WriteSTL(w, m, "tapersweep "+demoCanalSTLFile)
	}); err != nil {
		return err
	}
	return writeOutput(filepath.Join(dir, demoSequenceFile), bytesOf(models.DemoSequenceJSON()))
}
