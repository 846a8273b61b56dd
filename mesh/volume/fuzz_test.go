package volume

import (
	"context"
	"io"
	"log"
	"os"
	"path/filepath"
	"runtime"
	"testing"
)

// fuzzLimit keeps hostile sizes from allocating: anything bigger is refused as too large.
const fuzzLimit = 64 << 20

func addSeeds(f *testing.F, names ...string) {
	for _, n := range names {
		b, err := os.ReadFile(filepath.Join("testdata", n))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
}

// FuzzDICOM: any bytes as a DICOM file, opened as a multi-frame file and as a folder of
// slices, give a volume or an error naming the file; never a panic or a hang.
func FuzzDICOM(f *testing.F) {
	// The DICOM parser logs every malformed element; thousands of lines a second slow the
	// fuzzer down and say nothing the returned error does not.
	log.SetOutput(io.Discard)
	f.Cleanup(func() { log.SetOutput(os.Stderr) })
	addSeeds(f, "seed-slice.dcm", "seed-multiframe.dcm")
	f.Fuzz(func(t *testing.T, data []byte) {
		dir := t.TempDir()
		file := filepath.Join(dir, "x.dcm")
		if err := os.WriteFile(file, data, 0o644); err != nil {
			t.Fatal(err)
		}
		check := func(path string) {
			var before, after runtime.MemStats
			runtime.ReadMemStats(&before)
			v, err := Open(context.Background(), path, Options{MemoryLimit: fuzzLimit})
			runtime.ReadMemStats(&after)
			// A hostile length must not allocate: what one open may take is bounded by the file.
			if grew := after.TotalAlloc - before.TotalAlloc; grew > 16<<20+64*uint64(len(data)) {
				t.Fatalf("opening %d bytes allocated %d MB", len(data), grew>>20)
			}
			if err == nil {
				if len(v.Data) != v.NX*v.NY*v.NZ || v.checkGeometry(path) != nil {
					t.Fatalf("inconsistent volume %d x %d x %d, %d values", v.NX, v.NY, v.NZ, len(v.Data))
				}
			}
		}
		check(file)
		check(dir)
	})
}

// FuzzNIfTI: any bytes as a .nii file give a volume or an error; never a panic or a hang.
func FuzzNIfTI(f *testing.F) {
	addSeeds(f, "seed.nii", "seed.nii.gz")
	f.Fuzz(func(t *testing.T, data []byte) {
		file := filepath.Join(t.TempDir(), "x.nii")
		if err := os.WriteFile(file, data, 0o644); err != nil {
			t.Fatal(err)
		}
		v, err := Open(context.Background(), file, Options{MemoryLimit: fuzzLimit})
		if err == nil && len(v.Data) != v.NX*v.NY*v.NZ {
			t.Fatalf("inconsistent volume")
		}
	})
}

// FuzzStack: any bytes as the slices of a TIFF, PNG or BMP stack give a volume or an error.
func FuzzStack(f *testing.F) {
	addSeeds(f, "seed.tif", "seed.png", "seed.bmp")
	f.Fuzz(func(t *testing.T, data []byte) {
		if len(data) == 0 {
			return
		}
		ext := [...]string{".tif", ".png", ".bmp"}[int(data[0])%3]
		if string(data[:min(4, len(data))]) == "\x89PNG" {
			ext = ".png"
		} else if string(data[:min(2, len(data))]) == "BM" {
			ext = ".bmp"
		}
		dir := t.TempDir()
		for k := range 3 {
			if err := os.WriteFile(filepath.Join(dir, "s"+string(rune('0'+k))+ext), data, 0o644); err != nil {
				t.Fatal(err)
			}
		}
		v, err := Open(context.Background(), dir, Options{Voxel: 0.1, MemoryLimit: fuzzLimit})
		if err == nil && len(v.Data) != v.NX*v.NY*v.NZ {
			t.Fatalf("inconsistent volume")
		}
	})
}
