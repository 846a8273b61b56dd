package volume

import (
	"context"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strings"
	"sync"
	"testing"
)

// debianPython is the system interpreter, which sees Debian's python3-pydicom, python3-nibabel,
// python3-pil and python3-scipy (a python on PATH may be another one).
const debianPython = "/usr/bin/python3"

// needPython skips (or, under CI, fails) when the reference libraries are missing.
func needPython(t testing.TB, modules ...string) {
	t.Helper()
	args := []string{"-c", "import " + strings.Join(modules, ", ")}
	if out, err := exec.Command(debianPython, args...).CombinedOutput(); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("%s with %v is needed (Debian python3-pydicom python3-nibabel python3-pil python3-scipy): %v %s", debianPython, modules, err, out)
		}
		t.Skipf("%v not installed: %s", modules, out)
	}
}

// PhantomScript writes synthetic scans from exactly known geometry (see its doc string).
func phantomScript() string {
	_, file, _, _ := runtime.Caller(0)
	return filepath.Join(filepath.Dir(file), "testdata", "phantom.py")
}

var phantomCache sync.Map // key -> *phantomResult

type phantomResult struct {
	once sync.Once
	dir  string
	err  error
	out  string
}

// The made-up patient in the privacy checks: no real person.
const madeUpPatient = "ZEBULON^QUARTERMAINE|ZQ-4471-0093|19010203|Quarry Hill Invented Clinic"

// phantom generates (once per test binary) the scans named by args in a folder of its own.
func phantom(t testing.TB, args ...string) string {
	t.Helper()
	needPython(t, "pydicom", "nibabel", "PIL", "scipy")
	key := strings.Join(args, " ")
	v, _ := phantomCache.LoadOrStore(key, &phantomResult{})
	r := v.(*phantomResult)
	r.once.Do(func() {
		r.dir, r.err = os.MkdirTemp("", "phantom-")
		if r.err != nil {
			return
		}
		cmd := exec.Command(debianPython, append([]string{phantomScript(), "--out", r.dir}, args...)...)
		out, err := cmd.CombinedOutput()
		r.err, r.out = err, string(out)
	})
	if r.err != nil {
		t.Fatalf("phantom %v: %v\n%s", args, r.err, r.out)
	}
	return r.dir
}

func TestMain(m *testing.M) {
	code := m.Run()
	phantomCache.Range(func(_, v any) bool {
		if r := v.(*phantomResult); r.dir != "" {
			os.RemoveAll(r.dir)
		}
		return true
	})
	os.Exit(code)
}

// pythonJSON runs a script with the reference libraries and decodes what it prints.
func pythonJSON(t *testing.T, script string, out any, args ...string) {
	t.Helper()
	cmd := exec.Command(debianPython, append([]string{"-c", script}, args...)...)
	b, err := cmd.Output()
	if err != nil {
		msg := ""
		if ee, ok := err.(*exec.ExitError); ok {
			msg = string(ee.Stderr)
		}
		t.Fatalf("reference script: %v\n%s", err, msg)
	}
	if err := json.Unmarshal(b, out); err != nil {
		t.Fatalf("reference script output: %v\n%s", err, b)
	}
}

func open(t *testing.T, path string, opt Options) *Volume {
	t.Helper()
	v, err := Open(context.Background(), path, opt)
	if err != nil {
		t.Fatal(err)
	}
	return v
}
