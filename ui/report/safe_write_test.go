package report

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

func writeString(s string) func(io.Writer) error {
	return func(w io.Writer) error { _, err := io.WriteString(w, s); return err }
}

func leftovers(t *testing.T, dir string) []string {
	t.Helper()
	m, _ := filepath.Glob(filepath.Join(dir, ".*partial"))
	return m
}

// A write that fails part way keeps the old file whole and leaves no temporary behind.
func TestWriteFileKeepsOldFileOnFailure(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "report.pdf")
	if err := WriteFile(p, writeString("old report")); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("disk full")
	err := WriteFile(p, func(w io.Writer) error {
		io.WriteString(w, strings.Repeat("half a new report ", 10000))
		return boom
	})
	if !errors.Is(err, boom) {
		t.Fatalf("error %v", err)
	}
	if got, _ := os.ReadFile(p); string(got) != "old report" {
		t.Errorf("the old file became %d bytes", len(got))
	}
	if l := leftovers(t, dir); len(l) > 0 {
		t.Errorf("temporaries left: %v", l)
	}
	if err := WriteFile(p, writeString("new report")); err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(p); string(got) != "new report" {
		t.Errorf("got %q", got)
	}
}

// An existing file keeps its permissions; a new one gets 0666 less the umask, as any program
// would make it.
func TestWriteFileKeepsMode(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "private.csv")
	if err := os.WriteFile(p, []byte("x"), 0o600); err != nil {
		t.Fatal(err)
	}
	if err := WriteFile(p, writeString("y")); err != nil {
		t.Fatal(err)
	}
	if st, _ := os.Stat(p); st.Mode().Perm() != 0o600 {
		t.Errorf("mode %v, want 0600 kept", st.Mode().Perm())
	}
	old := syscall.Umask(0o022)
	defer syscall.Umask(old)
	q := filepath.Join(dir, "new.csv")
	if err := WriteFile(q, writeString("z")); err != nil {
		t.Fatal(err)
	}
	if st, _ := os.Stat(q); st.Mode().Perm() != 0o644 {
		t.Errorf("new file mode %v, want 0644 under umask 022", st.Mode().Perm())
	}
}

// Writing through a symlink replaces its target (the link stays a link), also when the target
// does not exist yet and when the link is relative.
func TestWriteFileThroughSymlink(t *testing.T) {
	dir := t.TempDir()
	target := filepath.Join(dir, "data", "table.csv")
	os.MkdirAll(filepath.Dir(target), 0o755)
	os.WriteFile(target, []byte("old"), 0o640)
	link := filepath.Join(dir, "link.csv")
	if err := os.Symlink("data/table.csv", link); err != nil {
		t.Fatal(err)
	}
	if err := WriteFile(link, writeString("new")); err != nil {
		t.Fatal(err)
	}
	if st, err := os.Lstat(link); err != nil || st.Mode()&os.ModeSymlink == 0 {
		t.Errorf("the link was replaced by a file")
	}
	if got, _ := os.ReadFile(target); string(got) != "new" {
		t.Errorf("target holds %q", got)
	}
	if st, _ := os.Stat(target); st.Mode().Perm() != 0o640 {
		t.Errorf("target mode %v", st.Mode().Perm())
	}
	dangling := filepath.Join(dir, "dangling.csv")
	os.Symlink("data/later.csv", dangling)
	if err := WriteFile(dangling, writeString("made")); err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(filepath.Join(dir, "data", "later.csv")); string(got) != "made" {
		t.Errorf("dangling link's target holds %q", got)
	}
	loop := filepath.Join(dir, "loop")
	os.Symlink("loop", loop)
	if err := WriteFile(loop, writeString("x")); err == nil || !strings.Contains(err.Error(), "symbolic links") {
		t.Errorf("a link loop: %v", err)
	}
}

// Devices, named pipes and folders are refused before anything is written.
func TestWriteFileRefusesNonRegular(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skip("no named pipes here:", err)
	}
	for path, say := range map[string]string{"/dev/null": "a device", fifo: "a named pipe", dir: "a folder"} {
		if err := WriteFile(path, writeString("x")); err == nil || !strings.Contains(err.Error(), say) {
			t.Errorf("%s: %v, want %q", path, err, say)
		}
		if err := CheckTarget(path); err == nil {
			t.Errorf("CheckTarget(%s) passed", path)
		}
	}
	if st, err := os.Lstat(fifo); err != nil || st.Mode()&os.ModeNamedPipe == 0 {
		t.Error("the named pipe was replaced")
	}
}

// After DiscardAllPending (a signal), open temporaries are gone and no commit lands.
func TestDiscardAllPending(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "out.pdf")
	os.WriteFile(p, []byte("old"), 0o644)
	f, err := Create(p)
	if err != nil {
		t.Fatal(err)
	}
	io.WriteString(f, "new")
	if len(leftovers(t, dir)) != 1 {
		t.Fatal("no temporary while writing")
	}
	DiscardAllPending()
	defer func() { pendingMu.Lock(); exiting = false; pendingMu.Unlock() }()
	if err := f.Commit(); err == nil {
		t.Error("a commit after the signal landed")
	}
	if got, _ := os.ReadFile(p); string(got) != "old" {
		t.Errorf("final file %q", got)
	}
	if l := leftovers(t, dir); len(l) > 0 {
		t.Errorf("left: %v", l)
	}
}
