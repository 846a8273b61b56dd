package volume

import (
	"context"
	"encoding/binary"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// A corrupt length (an element claiming more bytes than the file holds) is refused before the
// parser allocates for it, with the element and the byte named.
func TestHostileDICOMLengthDoesNotAllocate(t *testing.T) {
	seed, err := os.ReadFile(filepath.Join("testdata", "seed-multiframe.dcm"))
	if err != nil {
		t.Fatal(err)
	}
	// Rows (0028,0010) US in explicit VR little endian: tag, "US", 2-byte length. Find the
	// pixel data element (7FE0,0010) OW instead: its 4-byte length follows 2 reserved bytes.
	i := strings.Index(string(seed), "\xe0\x7f\x10\x00OW")
	if i < 0 {
		t.Fatal("no pixel data element in the seed")
	}
	data := append([]byte(nil), seed...)
	binary.LittleEndian.PutUint32(data[i+8:], 0xF0000000)
	file := filepath.Join(t.TempDir(), "x.dcm")
	if err := os.WriteFile(file, data, 0o644); err != nil {
		t.Fatal(err)
	}
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	_, err = Open(context.Background(), file, Options{})
	runtime.ReadMemStats(&after)
	if err == nil || !strings.Contains(err.Error(), "(7FE0,0010)") || !strings.Contains(err.Error(), "claims") {
		t.Fatalf("error %v", err)
	}
	if grew := after.TotalAlloc - before.TotalAlloc; grew > 16<<20 {
		t.Errorf("allocated %d MB for a 2 kB file", grew>>20)
	}
}
