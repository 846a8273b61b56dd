package models

import (
	"fmt"
	"os"
	"reflect"
	"regexp"
	"strings"
	"testing"
)

// filesYouWrite is the README's section on the files a person writes, by subsection.
func filesYouWrite(t *testing.T) map[string]string {
	data, err := os.ReadFile("../README.md")
	if err != nil {
		t.Fatal(err)
	}
	s := string(data)
	start := strings.Index(s, "\n## Files you write")
	if start < 0 {
		t.Fatal(`the README has no section "Files you write"`)
	}
	s = s[start+1:]
	if end := strings.Index(s[3:], "\n## "); end >= 0 {
		s = s[:end+3]
	}
	out := map[string]string{}
	for _, part := range strings.Split(s, "\n### ")[1:] {
		title, body, _ := strings.Cut(part, "\n")
		out[title] = body
	}
	return out
}

var jsonBlock = regexp.MustCompile("(?s)```json\n(.*?)```")

// TestReadmeDocumentsEveryField: the README's description of the files a person writes names
// every field of each format's schema and states the limits the reader enforces, and its
// examples read without a warning. A field added to a schema without its documentation fails here.
func TestReadmeDocumentsEveryField(t *testing.T) {
	sec := filesYouWrite(t)
	for title, types := range map[string][]reflect.Type{
		"Sequence files":    {reflect.TypeFor[sequenceJSON](), reflect.TypeFor[stepJSON](), reflect.TypeFor[Alloy]()},
		"Canal spec files":  {reflect.TypeFor[canalSpecJSON](), reflect.TypeFor[segmentJSON](), reflect.TypeFor[rootJSON](), reflect.TypeFor[concavityJSON]()},
		"Instruments lists": {reflect.TypeFor[instrumentsJSON]()},
	} {
		body, ok := sec[title]
		if !ok {
			t.Errorf("no subsection %q", title)
			continue
		}
		for _, typ := range types {
			for _, name := range fieldNames(typ) {
				if !strings.Contains(body, "`"+name+"`") {
					t.Errorf("%s: the field %q is not described", title, name)
				}
			}
		}
	}
	for _, name := range instrumentFieldNames() {
		if !strings.Contains(sec["Instruments lists"], "`"+name+"`") {
			t.Errorf("Instruments lists: the field %q is not named", name)
		}
	}
	for title, facts := range map[string][]string{
		"Sequence files":   {fmt.Sprintf("1 to %d steps", MaxSteps), fmt.Sprintf("at most %.2f", MaxTaper), fmt.Sprintf("above %.2f draws a warning", CommonMaxTaper)},
		"Canal spec files": {fmt.Sprintf("1 to %g mm in all", MaxCanalLengthMM), fmt.Sprintf("%g to %g", minCanalDiamMM, maxCanalDiamMM)},
	} {
		for _, f := range facts {
			if !strings.Contains(sec[title], f) {
				t.Errorf("%s does not state %q", title, f)
			}
		}
	}
	example := func(title string) []byte {
		m := jsonBlock.FindStringSubmatch(sec[title])
		if m == nil {
			t.Fatalf("%s: no example", title)
		}
		return []byte(m[1])
	}
	if seq, err := ParseSequence("README", example("Sequence files")); err != nil || len(seq.Warnings) > 0 {
		t.Errorf("the sequence example: %v %q", err, seq.Warnings)
	}
	if _, err := ParseCanalSpec("README", example("Canal spec files")); err != nil {
		t.Errorf("the canal spec example: %v", err)
	} else if got := example("Canal spec files"); string(got) != string(DemoCanalJSON()) {
		t.Errorf("the canal spec example is no longer the demo canal")
	}
	if _, warns, err := ParseInstruments("README", example("Instruments lists")); err != nil || len(warns) > 0 {
		t.Errorf("the instruments example: %v %q", err, warns)
	}
}
