// Package quietlog keeps the DICOM reader's own log lines off the terminal.
//
// The reader (github.com/suyashkumar/dicom) prints through the standard log package when an
// element does not parse ("error reading value ...") and then returns the same problem as an
// error, which every command states once with the file's name. The standard logger is shared
// with the window toolkit, whose lines must still show, so the lines are told apart by the
// source file that logged them: Install asks the logger for it and drops the reader's lines;
// every other line is written as the logger would have written it (date, time, message).
package quietlog

import (
	"bytes"
	"io"
	"log"
	"sync"
	"time"
)

// quietSources are the import paths whose log lines are dropped.
var quietSources = [][]byte{[]byte("github.com/suyashkumar/dicom")}

// Install routes the standard logger through the filter to w.
func Install(w io.Writer) {
	log.SetFlags(log.Llongfile)
	log.SetOutput(&filter{out: w})
}

// filter receives one whole log line per Write: "/path/to/file.go:123: message\n".
type filter struct {
	mu  sync.Mutex
	out io.Writer
}

func (f *filter) Write(p []byte) (int, error) {
	source, msg := split(p)
	for _, q := range quietSources {
		if bytes.Contains(source, q) {
			return len(p), nil
		}
	}
	line := append([]byte(time.Now().Format("2006/01/02 15:04:05 ")), msg...)
	f.mu.Lock()
	defer f.mu.Unlock()
	if _, err := f.out.Write(line); err != nil {
		return 0, err
	}
	return len(p), nil
}

// split cuts a line into the source ("file.go:123") and the message; a line without a source
// is all message.
func split(p []byte) (source, msg []byte) {
	i := bytes.Index(p, []byte(".go:"))
	if i < 0 {
		return nil, p
	}
	j := bytes.Index(p[i:], []byte(": "))
	if j < 0 {
		return nil, p
	}
	return p[:i+j], p[i+j+2:]
}
