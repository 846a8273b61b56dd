package main

import (
	"bytes"
	"context"
	"flag"
	"os"
	"os/exec"
	"syscall"
	"testing"
	"time"
)

// hostileTimeLimit is how long one case may run before it counts as a hang.
var hostileTimeLimit = flag.Duration("hostile.timeout", 10*time.Minute, "how long one hostile case may run before it counts as a hang")

// hostileRunProcess runs a case as a process of the -hostile.exec binary and measures its peak
// memory (resident set, from the kernel's accounting of the child). The figure is an upper
// bound: the child starts as a copy of this test process (Linux counts that memory until the
// exec), so a quick refusal shows the test's own size.
func hostileRunProcess(t *testing.T, c hostileCase) hostileResult {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), *hostileTimeLimit)
	defer cancel()
	cmd := exec.CommandContext(ctx, *hostileExec, c.args...)
	var out, errOut bytes.Buffer
	cmd.Stderr = &errOut
	cmd.Stdout = &out
	if c.stdout != "" {
		f, err := os.OpenFile(c.stdout, os.O_WRONLY|os.O_TRUNC|os.O_CREATE, 0o644)
		if err != nil {
			t.Skipf("%s: %v", c.stdout, err)
		}
		defer f.Close()
		cmd.Stdout = f
	}
	err := cmd.Run()
	if ctx.Err() != nil {
		t.Fatalf("no answer within %v: a hang", *hostileTimeLimit)
	}
	code := 0
	if ee, ok := err.(*exec.ExitError); ok {
		code = ee.ExitCode()
	} else if err != nil {
		t.Fatal(err)
	}
	var rss int64
	if ru, ok := cmd.ProcessState.SysUsage().(*syscall.Rusage); ok {
		rss = ru.Maxrss << 10 // kB on Linux
	}
	return hostileResult{code: code, stdout: out.String(), stderr: errOut.String(), maxRSS: rss}
}
