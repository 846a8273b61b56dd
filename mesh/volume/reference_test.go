package volume

import (
	"context"
	"encoding/json"
	"os/exec"
	"testing"

	"tapersweep/mesh/volume/volumetest"
)

const debianPython = volumetest.Python

func needPython(t testing.TB, modules ...string) { volumetest.NeedPython(t, modules...) }

func phantom(t testing.TB, args ...string) string { return volumetest.Phantom(t, args...) }

const madeUpPatient = volumetest.MadeUpPatient

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
