package mesh

import (
	"context"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"sync"
	"testing"
)

var loadBenchTriangles int

// loadBenchFiles writes a closed canal-like tube of 1,025,020 triangles as binary STL twice:
// in the order the tube is built (neighbours close together, as most exporters write) and
// with the triangles shuffled (as some segmentation tools write them).
var loadBenchFiles = sync.OnceValues(func() (ordered, scattered string) {
	m := shapeCanalLike(512, 1000)
	loadBenchTriangles = len(m.Triangles)
	// One folder reused by every run, so runs do not pile up 100 MB each.
	dir := filepath.Join(os.TempDir(), "tapersweep-loadbench")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		panic(err)
	}
	ordered = filepath.Join(dir, "ordered.stl")
	scattered = filepath.Join(dir, "scattered.stl")
	writeWhole(ordered, m)
	rng := rand.New(rand.NewPCG(7, 7))
	rng.Shuffle(len(m.Triangles), func(i, j int) { m.Triangles[i], m.Triangles[j] = m.Triangles[j], m.Triangles[i] })
	writeWhole(scattered, m)
	return ordered, scattered
})

// writeWhole writes beside path and renames, so another benchmark process reading the shared
// file meanwhile never sees it half written.
func writeWhole(path string, m *Mesh) {
	f, err := os.CreateTemp(filepath.Dir(path), ".part-*")
	if err != nil {
		panic(err)
	}
	f.Close()
	if err := WriteSTLFile(f.Name(), m); err != nil {
		os.Remove(f.Name())
		panic(err)
	}
	if err := os.Rename(f.Name(), path); err != nil {
		os.Remove(f.Name())
		panic(err)
	}
}

// BenchmarkLoadVsAdmesh reads, welds and checks the same 1M-triangle binary STL as admesh
// (Debian package admesh, run as `admesh FILE`: read, match edges, check) in one run, in both
// triangle orders; compare the MB/s lines. Target: at least twice admesh's rate, and the
// scattered file no slower than the ordered one. Skips without admesh except under CI.
// Each line also reports cpu-ms/op, the CPU time of the load (all its goroutines) or of the
// admesh process: on a shared machine, where the wall clock counts waits for a core, compare
// those (admesh uses one core; the load may use two).
//
//	go test ./mesh -run XXX -bench LoadVsAdmesh -benchtime 3x
func BenchmarkLoadVsAdmesh(b *testing.B) {
	bin := admeshPath(b)
	ordered, scattered := loadBenchFiles()
	st, err := os.Stat(ordered)
	if err != nil {
		b.Fatal(err)
	}
	for _, f := range []struct{ name, path string }{{"ordered", ordered}, {"scattered", scattered}} {
		b.Run("tapersweep/"+f.name, func(b *testing.B) {
			b.SetBytes(st.Size())
			cpu0 := cpuTime(cpuSelf)
			for b.Loop() {
				m, _, err := LoadFile(context.Background(), f.path, LoadOptions{})
				if err != nil || len(m.Triangles) != loadBenchTriangles {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(cpuTime(cpuSelf)-cpu0)/1e6/float64(b.N), "cpu-ms/op")
		})
		b.Run("admesh/"+f.name, func(b *testing.B) {
			b.SetBytes(st.Size())
			cpu0 := cpuTime(cpuChildren)
			for b.Loop() {
				if out, err := exec.Command(bin, f.path).CombinedOutput(); err != nil {
					b.Fatalf("%v\n%s", err, out)
				}
			}
			b.ReportMetric(float64(cpuTime(cpuChildren)-cpu0)/1e6/float64(b.N), "cpu-ms/op")
		})
	}
}
