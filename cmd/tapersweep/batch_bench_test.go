package main

import (
	"context"
	"fmt"
	"io"
	"path/filepath"
	"testing"

	"tapersweep/analysis"
	"tapersweep/mesh"
	"tapersweep/models"
)

// batchBenchCanals writes 20 canals of about 100k triangles each (the invented example curves,
// meshed finely) to dir.
func batchBenchCanals(b *testing.B, dir string) []string {
	b.Helper()
	var files []string
	var specs []*models.CanalSpec
	for _, ex := range models.ExampleCanals() {
		if !ex.ScanLike {
			specs = append(specs, ex.Spec)
		}
	}
	for k := 0; len(files) < 20; k++ {
		spec := specs[k%len(specs)]
		around := 96 + 8*(k/len(specs)) // repeats differ in their meshing
		// Triangles grow as 1/ds: one coarse mesh gives the ds for 100k.
		coarse := spec.Mesh(0.1, around)
		ds := 0.1 * float64(len(coarse.Triangles)) / 100000
		m := spec.Mesh(ds, around)
		name := fmt.Sprintf("canal%02d.stl", k)
		if err := mesh.WriteSTLFile(filepath.Join(dir, name), m); err != nil {
			b.Fatal(err)
		}
		if n := len(m.Triangles); n < 95000 || n > 110000 {
			b.Fatalf("%s has %d triangles, want about 100k", name, n)
		}
		files = append(files, name)
	}
	return files
}

// BenchmarkBatch runs the demo sequence through 20 canals of 100k triangles with 1 and 2 jobs;
// throughput with 2 jobs should be at least 1.7 times that with 1 on two cores.
func BenchmarkBatch(b *testing.B) {
	dir := b.TempDir()
	written := batchBenchCanals(b, dir)
	files, err := folderCanals(dir, analysis.LoadOptions{})
	if err != nil || len(files) != len(written) {
		b.Fatal(err)
	}
	seq, err := models.ParseSequence("demo sequence", models.DemoSequenceJSON())
	if err != nil {
		b.Fatal(err)
	}
	for _, jobs := range []int{1, 2} {
		b.Run(fmt.Sprintf("jobs=%d", jobs), func(b *testing.B) {
			opt := batchOptions{Jobs: jobs}
			for b.Loop() {
				failed, err := runBatch(context.Background(), io.Discard, files, seq, opt)
				if err != nil || failed > 0 {
					b.Fatalf("%d failed, %v", failed, err)
				}
			}
			b.ReportMetric(float64(len(files)*b.N)/b.Elapsed().Seconds(), "canals/s")
		})
	}
}
