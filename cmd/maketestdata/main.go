// Command maketestdata writes the invented test canals (models.ExampleCanals) into the
// testdata folder: each canal's spec as JSON and its surface as binary STL. The output is
// deterministic; a test in models checks the committed files against it.
//
//	go run ./cmd/maketestdata            (from the repository root)
//	go run ./cmd/maketestdata -dir DIR
package main

import (
	"flag"
	"fmt"
	"os"
	"path/filepath"

	"tapersweep/mesh"
	"tapersweep/models"
)

func main() {
	dir := flag.String("dir", "testdata", "folder to write the fixtures into")
	flag.Parse()
	if err := write(*dir); err != nil {
		fmt.Fprintln(os.Stderr, "maketestdata:", err)
		os.Exit(1)
	}
}

func write(dir string) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for _, ex := range models.ExampleCanals() {
		spec, err := ex.SpecJSON()
		if err != nil {
			return fmt.Errorf("%s: %w", ex.File, err)
		}
		if err := os.WriteFile(filepath.Join(dir, ex.File+".json"), spec, 0o644); err != nil {
			return err
		}
		m, err := ex.Mesh()
		if err != nil {
			return fmt.Errorf("%s: %w", ex.File, err)
		}
		stlPath := filepath.Join(dir, ex.File+".stl")
		if err := mesh.WriteSTLFile(stlPath, m); err != nil {
			return err
		}
		fmt.Printf("%-22s %7d triangles\n", ex.File+".stl", len(m.Triangles))
	}
	return nil
}
