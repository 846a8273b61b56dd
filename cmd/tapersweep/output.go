package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"

	"tapersweep/mesh"
	"tapersweep/models"
	"tapersweep/ui/report"
)

// checkInput refuses an input that is not a regular file before a reader opens it: opening a
// named pipe blocks until someone writes to it, and a device never ends.
func checkInput(path string) error {
	f, _, err := mesh.OpenInput(path, 0)
	if err != nil {
		return err
	}
	return f.Close()
}

// loadSequence reads a sequence file after checking it is a regular file.
func loadSequence(path string) (*models.Sequence, error) {
	if err := checkInput(path); err != nil {
		return nil, err
	}
	return models.LoadSequence(path)
}

// checkOutput refuses an output path that names one of the command's inputs (through any
// link) or something that is not a regular file, before any work is done.
func checkOutput(out string, inputs ...string) error {
	if err := report.CheckTarget(out); err != nil {
		return err
	}
	ost, err := os.Stat(out)
	if err != nil {
		return nil // a new file is no input
	}
	for _, in := range inputs {
		if in == "" {
			continue
		}
		if ist, err := os.Stat(in); err == nil && os.SameFile(ost, ist) {
			return fmt.Errorf("%s: the output would replace the input %s; choose another --out", out, in)
		}
	}
	return nil
}

// writeOutput writes a file through the safe writer (temporary beside it, synced, renamed).
func writeOutput(path string, write func(io.Writer) error) error {
	return report.WriteFile(path, write)
}

// stopOnSignal removes the temporaries of unfinished outputs when the program is interrupted
// (Ctrl-C) or told to stop (a scheduler's time limit sends SIGTERM), then exits.
func stopOnSignal(stderr io.Writer) {
	ch := make(chan os.Signal, 1)
	signal.Notify(ch, os.Interrupt, syscall.SIGTERM)
	go func() {
		sig := <-ch
		if n := report.DiscardAllPending(); n > 0 {
			fmt.Fprintf(stderr, "tapersweep: stopped (%v); %d unfinished output files were removed, the old ones stay\n", sig, n)
		} else {
			fmt.Fprintf(stderr, "tapersweep: stopped (%v)\n", sig)
		}
		code := 130
		if sig == syscall.SIGTERM {
			code = 143
		}
		os.Exit(code)
	}()
}

// checkedWriter remembers the first write error on standard output (a full disk, a closed
// pipe), so a command that printed a truncated result does not exit 0.
type checkedWriter struct {
	w   io.Writer
	err error
}

func (c *checkedWriter) Write(p []byte) (int, error) {
	if c.err != nil {
		return 0, c.err
	}
	n, err := c.w.Write(p)
	if err == nil && n < len(p) {
		err = io.ErrShortWrite
	}
	c.err = err
	return n, err
}

// outputFailed reports a write error on standard output.
func outputFailed(stderr io.Writer, cmd string, err error) int {
	if errors.Is(err, syscall.EPIPE) {
		return exitBadInput // the reader went away; nobody is left to read a message on stdout
	}
	fmt.Fprintf(stderr, "tapersweep %s: writing the output failed: %v\n", cmd, err)
	return exitBadInput
}
