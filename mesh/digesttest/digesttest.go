// Package digesttest is for tests that prove speed work left every output as it was: a test
// digests its outputs line by line, writes them with the code before a change
// (-NAME-write FILE) and checks them after it (-NAME-check FILE). The digests belong to one
// machine's build, not the repo, so such a test is off unless a flag is given.
package digesttest

import (
	"bufio"
	"flag"
	"os"
	"strings"
	"testing"
)

// Files are the files a digest test writes and checks, from its two flags.
type Files struct {
	name         string
	write, check *string
}

// Flags registers -name-write and -name-check; of says whose digests they are.
func Flags(name, of string) *Files {
	return &Files{
		name:  name,
		write: flag.String(name+"-write", "", "write the digests of "+of+" to this file"),
		check: flag.String(name+"-check", "", "check the digests of "+of+" against this file"),
	}
}

// Skip skips t unless a flag names a file.
func (f *Files) Skip(t testing.TB) {
	t.Helper()
	if *f.write == "" && *f.check == "" {
		t.Skipf("needs -%s-write FILE or -%s-check FILE", f.name, f.name)
	}
}

// Match writes lines to the -write file, if given, and compares them one by one with the
// -check file, if given.
func (f *Files) Match(t testing.TB, lines []string) {
	t.Helper()
	write, check := *f.write, *f.check
	if write != "" {
		if err := os.WriteFile(write, []byte(strings.Join(lines, "\n")+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if check == "" {
		return
	}
	file, err := os.Open(check)
	if err != nil {
		t.Fatal(err)
	}
	defer file.Close()
	var want []string
	for sc := bufio.NewScanner(file); sc.Scan(); {
		want = append(want, sc.Text())
	}
	if len(want) != len(lines) {
		t.Fatalf("%d digests, %s holds %d", len(lines), check, len(want))
	}
	for i := range lines {
		if lines[i] != want[i] {
			t.Errorf("changed:\n got %s\nwant %s", lines[i], want[i])
		}
	}
}
