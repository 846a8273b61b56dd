package quietlog

import (
	"bytes"
	"log"
	"os"
	"regexp"
	"testing"
)

// A line logged from anywhere but the DICOM reader is written as the standard logger writes
// it by default (date, time, message), without the source the filter asks for.
func TestOtherLinesPassAsTheLoggerWritesThem(t *testing.T) {
	var out bytes.Buffer
	Install(&out)
	t.Cleanup(func() { log.SetFlags(log.LstdFlags); log.SetOutput(os.Stderr) })
	log.Printf("Fyne error: %s", "something: with a colon")
	if !regexp.MustCompile(`^\d{4}/\d\d/\d\d \d\d:\d\d:\d\d Fyne error: something: with a colon\n$`).Match(out.Bytes()) {
		t.Errorf("the line came out as %q", out.String())
	}
	// The reader's lines carry its import path in their source.
	out.Reset()
	f := &filter{out: &out}
	f.Write([]byte("/root/go/pkg/mod/github.com/suyashkumar/dicom@v1.0.7/read.go:768: error reading value  EOF\n"))
	f.Write([]byte("github.com/suyashkumar/dicom@v1.0.7/read.go:512: error reading subitem\n")) // -trimpath
	if out.Len() != 0 {
		t.Errorf("the reader's lines were written: %q", out.String())
	}
}
