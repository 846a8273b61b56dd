package ui

import (
	"errors"
	"os"
	"path/filepath"
	"testing"

	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/test"
)

// The save dialogs write through the toolkit's storage.Writer; once the window is open that
// writer is the safe one: nothing changes on disk until Close, an aborted save keeps the old
// file whole and leaves no temporary, and listing a folder still works.
func TestSaveDialogWriterIsSafe(t *testing.T) {
	test.NewApp()
	useSafeFileWriter()
	useSafeFileWriter() // wrapping twice is harmless
	dir := t.TempDir()
	p := filepath.Join(dir, "report.pdf")
	os.WriteFile(p, []byte("the old report"), 0o600)
	uri := storage.NewFileURI(p)

	wc, err := storage.Writer(uri)
	if err != nil {
		t.Fatal(err)
	}
	wc.Write([]byte("half of a new rep"))
	if got, _ := os.ReadFile(p); string(got) != "the old report" {
		t.Fatalf("opening the writer changed the file to %q", got)
	}
	a, ok := wc.(interface{ Abort() })
	if !ok {
		t.Fatal("the file writer is not the safe writer")
	}
	a.Abort()
	if got, _ := os.ReadFile(p); string(got) != "the old report" {
		t.Errorf("an aborted save left %q", got)
	}
	if m, _ := filepath.Glob(filepath.Join(dir, ".*partial")); len(m) > 0 {
		t.Errorf("temporaries left: %v", m)
	}

	wc, _ = storage.Writer(uri)
	wc.Write([]byte("the new report"))
	if err := wc.Close(); err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(p); string(got) != "the new report" {
		t.Errorf("after Close the file holds %q", got)
	}
	if st, _ := os.Stat(p); st.Mode().Perm() != 0o600 {
		t.Errorf("mode %v, want the old 0600", st.Mode().Perm())
	}
	list, err := storage.List(storage.NewFileURI(dir))
	if err != nil || len(list) != 1 {
		t.Errorf("listing the folder: %v %v", list, err)
	}
	if _, err := storage.Writer(storage.NewFileURI("/dev/null")); err == nil || errors.Is(err, os.ErrNotExist) {
		t.Errorf("a device as save target: %v", err)
	}
}
