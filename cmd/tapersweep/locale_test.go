package main

import (
	"os"
	"os/exec"
	"strings"
	"testing"
)

// The test binary links the window toolkit like the program, so starting it again with a
// given locale shows what every command prints before its own output.
func startupStderr(t *testing.T, env ...string) string {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^TestStartupChild$")
	for _, kv := range os.Environ() {
		if !strings.HasPrefix(kv, "LANG=") && !strings.HasPrefix(kv, "LANGUAGE=") &&
			!strings.HasPrefix(kv, "LC_ALL=") && !strings.HasPrefix(kv, "LC_MESSAGES=") {
			cmd.Env = append(cmd.Env, kv)
		}
	}
	cmd.Env = append(cmd.Env, env...)
	var stderr strings.Builder
	cmd.Stderr = &stderr
	if err := cmd.Run(); err != nil {
		t.Fatalf("%v: %v\n%s", env, err, stderr.String())
	}
	return stderr.String()
}

// LANG=C.UTF-8 is the default of servers and containers: nothing but the command's own output.
func TestNoLocaleNoiseInPlainLocale(t *testing.T) {
	for _, env := range [][]string{{"LANG=C.UTF-8"}, {"LANG=C"}, {"LC_ALL=C.utf8", "LANG=de_DE.UTF-8"}} {
		if s := startupStderr(t, env...); s != "" {
			t.Errorf("%v: start-up printed %q", env, s)
		}
	}
	// A language the toolkit cannot read is still reported (the check above can fail).
	if s := startupStderr(t, "LANG=xx_YY.UTF-8"); !strings.Contains(s, "locale") {
		t.Errorf("LANG=xx_YY.UTF-8: expected the toolkit's locale error, got %q", s)
	}
}

// TestStartupChild is the process startupStderr starts: it only lets the packages initialise.
func TestStartupChild(t *testing.T) {}
