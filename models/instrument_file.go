package models

import (
	"bytes"
	"errors"
	"fmt"
	"reflect"
	"strings"
)

// Bounds that keep a hostile instruments file from costing more than it is worth.
const (
	maxInstrumentsBytes = 1 << 20
	// MaxInstruments is the most entries an instruments file may list.
	MaxInstruments = 1000
)

// instrumentsJSON is the object form of an instruments file; the bare form is a list of its
// entries. An entry takes the fields of a sequence step that describe the file itself (those
// of stepJSON without use:"step"), with the same meaning and defaults.
type instrumentsJSON struct {
	Instruments []stepJSON           `json:"instruments" doc:"a list of instruments is required"`
	Alloys      map[string]alloyJSON `json:"alloys,omitempty"`
}

// instrumentFieldNames are the fields an entry of an instruments file may have.
func instrumentFieldNames() []string {
	var out []string
	for _, f := range jsonFields(reflect.TypeFor[stepJSON]()) {
		if !f.stepUse {
			out = append(out, f.name)
		}
	}
	return out
}

// LoadInstruments reads the files on a shelf from a JSON file; see ParseInstruments.
func LoadInstruments(path string) ([]Instrument, []string, error) {
	data, err := readInput(path, maxInstrumentsBytes)
	if err == errTooLarge {
		return nil, nil, &SequenceError{File: path, Msg: fmt.Sprintf("larger than %d MB: not an instruments file", maxInstrumentsBytes>>20)}
	}
	if err != nil {
		return nil, nil, err
	}
	return ParseInstruments(path, data)
}

// ParseInstruments reads a list of files, either a bare JSON list or an object
// {"alloys": {...}, "instruments": [...]}. Each instrument takes the fields of a sequence step
// that describe the file: size and taper (or tapers, [[mm from tip, taper], ...]), and
// optionally alloy, section, cutting_length, max_flute_d; "alloys" defines alloys as in a
// sequence file. Errors name the file, the instrument (from 1) and the field. The warnings
// note sizes off the ISO list, steep tapers and repeated entries (dropped).
func ParseInstruments(name string, data []byte) ([]Instrument, []string, error) {
	fail := func(format string, a ...any) error { return &SequenceError{File: name, Msg: fmt.Sprintf(format, a...)} }
	var f instrumentsJSON
	var err error
	listKey := "instruments"
	switch t := bytes.TrimLeft(bytes.TrimPrefix(data, utf8BOM), " \t\r\n"); {
	case isUTF16(data) || len(t) == 0 || t[0] == '{':
		err = decodeJSON(data, &f)
	case t[0] == '[':
		listKey = ""
		err = decodeJSON(data, &f.Instruments)
	default:
		if p := walkJSON(t, reflect.TypeFor[any]()); p != nil {
			err = p
			break
		}
		return nil, nil, fail("must be a list of instruments or an object with \"instruments\"")
	}
	if err != nil {
		var p *jsonProblem
		if errors.As(err, &p) && p.kind == jsonUnknown && len(p.path) > 0 {
			p.known = instrumentFieldNames()
		}
		return nil, nil, itemsAreInstruments(listProblem(name, "instrument", listKey, err))
	}
	switch n := len(f.Instruments); {
	case n == 0:
		return nil, nil, fail("lists no instruments")
	case n > MaxInstruments:
		return nil, nil, fail("lists %d instruments, more than %d", n, MaxInstruments)
	}
	shelf := &Sequence{Name: name}
	if err := shelf.takeAlloys(f.Alloys); err != nil {
		return nil, nil, err
	}
	var out []Instrument
	warnings := shelf.legacyNotes
	seen := map[string]int{}
	for i, j := range f.Instruments {
		if field := j.stepUseGiven(); field != "" {
			return nil, nil, &SequenceError{File: name, Item: "instrument", Step: i + 1, Field: fmt.Sprintf("%q", field),
				Msg: fmt.Sprintf("unknown field (known: %s)", strings.Join(instrumentFieldNames(), ", "))}
		}
		in, err := j.instrument(shelf, i+1)
		if err == nil {
			err = checkFileLengths(in, func(field, format string, args ...any) error { return shelf.fail(i+1, field, format, args...) })
		}
		if err != nil {
			return nil, nil, itemsAreInstruments(err)
		}
		warnings = append(warnings, instrumentNotes(name, "instrument", i+1, in)...)
		key := in.Identity()
		if k, dup := seen[key]; dup {
			warnings = append(warnings, fmt.Sprintf("%s: instrument %d repeats instrument %d (%s); the repeat is left out", name, i+1, k, in.Label()))
			continue
		}
		seen[key] = i + 1
		out = append(out, in)
	}
	return out, warnings, nil
}

// itemsAreInstruments words the errors of step fields as errors of instruments.
func itemsAreInstruments(err error) error {
	var se *SequenceError
	if errors.As(err, &se) {
		se.Item = "instrument"
	}
	return err
}

// stepUseGiven names the first field given that says how a step uses its file (not allowed in
// an instruments file), or "".
func (j stepJSON) stepUseGiven() string {
	v := reflect.ValueOf(j)
	for _, f := range jsonFields(v.Type()) {
		if f.stepUse && !v.FieldByIndex(f.index).IsNil() {
			return f.name
		}
	}
	return ""
}

// Identity tells identical files apart from different ones: two instruments with the same
// identity have the same geometry, section and alloy.
func (in Instrument) Identity() string {
	return fmt.Sprintf("%d|%v|%v|%g|%g|%g|%s|%+v", in.Size, in.Taper, in.Tapers, in.CuttingLength, in.MaxFluteD,
		in.ShaftD, in.Section.Name, in.Alloy)
}
