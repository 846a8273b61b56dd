// Package volumetest writes synthetic scans for tests: volumetest/phantom.py draws a tooth
// root and its canal from exactly known geometry and writes them with the reference libraries
// (pydicom, nibabel, Pillow). Scans are kept in a cache folder keyed by the script and its
// arguments, so every test package and run shares them.
package volumetest

import (
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// Python is the system interpreter, which sees Debian's python3-pydicom, python3-nibabel,
// python3-pil and python3-scipy (a python first on PATH may be another one).
const Python = "/usr/bin/python3"

// MadeUpPatient is the invented patient of the privacy checks (no real person):
// name|ID|birth date|institution.
const MadeUpPatient = "ZEBULON^QUARTERMAINE|ZQ-4471-0093|19010203|Quarry Hill Invented Clinic"

// NeedPython skips the test, or fails it under CI, when the reference libraries are missing.
func NeedPython(t testing.TB, modules ...string) {
	t.Helper()
	if out, err := exec.Command(Python, "-c", "import "+strings.Join(modules, ", ")).CombinedOutput(); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("%s with %v is needed (Debian python3-pydicom python3-nibabel python3-pil python3-scipy): %v %s", Python, modules, err, out)
		}
		t.Skipf("%v not installed: %s", modules, out)
	}
}

// Script is the path of phantom.py.
func Script() string {
	_, file, _, _ := runtime.Caller(0)
	return filepath.Join(filepath.Dir(file), "phantom.py")
}

// Phantom returns a folder holding the scans phantom.py writes for args (see its --help),
// writing them first if the cache does not have them.
func Phantom(t testing.TB, args ...string) string {
	t.Helper()
	NeedPython(t, "pydicom", "nibabel", "PIL", "scipy")
	script, err := os.ReadFile(Script())
	if err != nil {
		t.Fatal(err)
	}
	h := sha256.New()
	h.Write(script)
	fmt.Fprintf(h, "%q", args)
	key := hex.EncodeToString(h.Sum(nil))[:20]
	root := filepath.Join(os.TempDir(), "tapersweep-phantoms")
	dir := filepath.Join(root, key)
	if _, err := os.Stat(filepath.Join(dir, "exact.json")); err == nil {
		return dir
	}
	if err := os.MkdirAll(root, 0o755); err != nil {
		t.Fatal(err)
	}
	tmp, err := os.MkdirTemp(root, key+".partial-")
	if err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(Python, append([]string{Script(), "--out", tmp}, args...)...).CombinedOutput()
	if err != nil {
		os.RemoveAll(tmp)
		t.Fatalf("phantom %v: %v\n%s", args, err, out)
	}
	// Another test binary may have written the same scans meanwhile: keep theirs.
	if err := os.Rename(tmp, dir); err != nil {
		os.RemoveAll(tmp)
		if _, err2 := os.Stat(filepath.Join(dir, "exact.json")); err2 != nil {
			t.Fatalf("phantom %v: %v", args, err)
		}
	}
	return dir
}

// Ends are the exact orifice and apical end of the phantom's canal in a folder Phantom wrote
// (the first and last station of its exact.json), in the scan's coordinates (mm).
func Ends(t testing.TB, dir string) (orifice, apex mgl64.Vec3) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "exact.json"))
	if err != nil {
		t.Fatal(err)
	}
	var e struct {
		Stations [][6]float64 `json:"stations"` // s, x, y, z, a, b
	}
	if err := json.Unmarshal(b, &e); err != nil || len(e.Stations) < 2 {
		t.Fatalf("%s: %v", dir, err)
	}
	at := func(st [6]float64) mgl64.Vec3 { return mgl64.Vec3{st[1], st[2], st[3]} }
	return at(e.Stations[0]), at(e.Stations[len(e.Stations)-1])
}
