package main

import (
	"bytes"
	"encoding/binary"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// malformedSequenceSlice is the repository's seed DICOM slice with a sequence of undefined
// length inserted before the pixel data whose first element is not an Item (FFFE,E000), which
// DICOM PS3.5 section 7.5 requires of every element directly in a sequence. The DICOM reader
// logs two lines about it through the standard logger before it returns the error.
func malformedSequenceSlice(t *testing.T) []byte {
	t.Helper()
	seed, err := os.ReadFile(filepath.Join("..", "..", "mesh", "volume", "testdata", "seed-slice.dcm"))
	if err != nil {
		t.Fatal(err)
	}
	at := bytes.Index(seed, []byte{0xe0, 0x7f, 0x10, 0x00}) // (7FE0,0010) Pixel Data
	if at < 0 {
		t.Fatal("the seed slice has no pixel data")
	}
	var b bytes.Buffer
	le := binary.LittleEndian
	b.Write(seed[:at])
	b.Write(le.AppendUint16(le.AppendUint16(nil, 0x0008), 0x1140)) // Referenced Image Sequence
	b.WriteString("SQ\x00\x00")
	b.Write(le.AppendUint32(nil, 0xffffffff)) // undefined length
	b.Write(le.AppendUint16(le.AppendUint16(nil, 0x0008), 0x0016))
	b.WriteString("UI")
	b.Write(le.AppendUint16(nil, 2))
	b.WriteString("1\x00")
	b.Write(le.AppendUint32(le.AppendUint16(le.AppendUint16(nil, 0xfffe), 0xe0dd), 0)) // sequence end
	b.Write(seed[at:])
	return b.Bytes()
}

// commandStderr runs the command in a child process (the test binary, see TestCommandChild),
// with the log set up as main sets it when quiet, and returns what it wrote on stderr.
func commandStderr(t *testing.T, quiet bool, args ...string) string {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^TestCommandChild$")
	cmd.Env = append(os.Environ(), "TAPERSWEEP_CHILD_ARGS="+strings.Join(args, "\x1f"))
	if quiet {
		cmd.Env = append(cmd.Env, "TAPERSWEEP_CHILD_QUIET=1")
	}
	var stderr strings.Builder
	cmd.Stderr = &stderr
	err := cmd.Run()
	if _, ok := err.(*exec.ExitError); err != nil && !ok {
		t.Fatal(err)
	}
	return stderr.String()
}

// A scan the DICOM reader complains about: stderr holds our one line naming the file, none of
// the reader's own.
func TestDICOMReaderLogStaysOffStderr(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "series")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "a.dcm"), malformedSequenceSlice(t), 0o644); err != nil {
		t.Fatal(err)
	}
	args := []string{"segment", "--scan", dir, "--orifice", "0,0,0", "--apical-end", "0,0,5",
		"--out", filepath.Join(t.TempDir(), "canal.stl")}
	// Without the filter the reader's lines show: the input does make it log.
	if loud := commandStderr(t, false, args...); !strings.Contains(loud, "error reading value") {
		t.Fatalf("the reader no longer logs on this input, so the check below proves nothing; stderr:\n%s", loud)
	}
	quiet := commandStderr(t, true, args...)
	lines := strings.Split(strings.TrimSpace(quiet), "\n")
	if len(lines) != 1 || !strings.HasPrefix(lines[0], "tapersweep segment: ") || !strings.Contains(lines[0], "a.dcm") {
		t.Errorf("stderr holds more than our own error naming the file:\n%s", quiet)
	}
}

// TestCommandChild is the process commandStderr starts: it runs one command as main does.
func TestCommandChild(t *testing.T) {
	args := os.Getenv("TAPERSWEEP_CHILD_ARGS")
	if args == "" {
		return
	}
	if os.Getenv("TAPERSWEEP_CHILD_QUIET") == "1" {
		quietLibraries()
	}
	os.Exit(run(strings.Split(args, "\x1f"), os.Stdout, os.Stderr))
}
