package plan

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"

	"tapersweep/models"
)

// Bounds that keep a hostile instruments file from costing more than it is worth.
const (
	maxInstrumentsBytes = 1 << 20
	maxInstruments      = 1000
)

// instrumentFields are the fields an instrument may have: those of a sequence step that
// describe the file itself (same names, same meaning, same defaults).
var instrumentFields = []string{"size", "taper", "tapers", "alloy", "section", "cutting_length", "max_flute_d"}

// LoadInstruments reads the files on the shelf from a JSON file; see ParseInstruments.
func LoadInstruments(path string) ([]models.Instrument, []string, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", path, err)
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, maxInstrumentsBytes+1))
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", path, err)
	}
	if len(data) > maxInstrumentsBytes {
		return nil, nil, fmt.Errorf("%s: larger than %d MB: not an instruments file", path, maxInstrumentsBytes>>20)
	}
	return ParseInstruments(path, data)
}

// ParseInstruments reads a list of files, either a bare JSON list or an object
// {"alloys": {...}, "instruments": [...]}. Each instrument takes the fields of a sequence step
// that describe the file: size and taper (or tapers, [[mm from tip, taper], ...]), and
// optionally alloy, section, cutting_length, max_flute_d; "alloys" defines alloys as in a
// sequence file. Errors name the file, the instrument (from 1) and the field. The warnings
// note sizes off the ISO list and repeated entries (dropped).
func ParseInstruments(name string, data []byte) ([]models.Instrument, []string, error) {
	fail := func(format string, a ...any) error { return fmt.Errorf("%s: %s", name, fmt.Sprintf(format, a...)) }
	if !json.Valid(data) {
		var v any
		err := json.Unmarshal(data, &v)
		var se *json.SyntaxError
		if errors.As(err, &se) {
			line, col := lineColumn(data, se.Offset-1)
			return nil, nil, fmt.Errorf("%s:%d:%d: broken JSON: %v", name, line, col, se)
		}
		return nil, nil, fail("broken JSON: %v", err)
	}
	trimmed := bytes.TrimSpace(data)
	var list []json.RawMessage
	alloys := json.RawMessage(nil)
	switch {
	case len(trimmed) > 0 && trimmed[0] == '[':
		if err := json.Unmarshal(trimmed, &list); err != nil {
			return nil, nil, fail("must be a list of instruments")
		}
	case len(trimmed) > 0 && trimmed[0] == '{':
		var top map[string]json.RawMessage
		if err := json.Unmarshal(trimmed, &top); err != nil {
			return nil, nil, fail("must be a JSON object")
		}
		for k := range top {
			if k != "instruments" && k != "alloys" {
				return nil, nil, fail("%q: unknown field (known: instruments, alloys)", k)
			}
		}
		raw, ok := top["instruments"]
		if !ok {
			return nil, nil, fail("instruments: missing (a list of instruments is required)")
		}
		if err := json.Unmarshal(raw, &list); err != nil || !bytes.HasPrefix(bytes.TrimSpace(raw), []byte("[")) {
			return nil, nil, fail("instruments: must be a list of instruments")
		}
		alloys = top["alloys"]
	default:
		return nil, nil, fail("must be a list of instruments or an object with \"instruments\"")
	}
	if len(list) == 0 {
		return nil, nil, fail("lists no instruments")
	}
	if len(list) > maxInstruments {
		return nil, nil, fail("lists %d instruments, more than %d", len(list), maxInstruments)
	}
	// Each entry becomes a step of a sequence taken to working length, so the sequence reader
	// checks every field with its own rules and messages.
	steps := make([]json.RawMessage, len(list))
	for i, raw := range list {
		var m map[string]json.RawMessage
		if !bytes.HasPrefix(bytes.TrimSpace(raw), []byte("{")) || json.Unmarshal(raw, &m) != nil {
			return nil, nil, fail("instrument %d: must be a JSON object such as {\"size\": 25, \"taper\": 0.04}", i+1)
		}
		for k := range m {
			if !known(k) {
				return nil, nil, fail("instrument %d: %q: unknown field (known: %s)", i+1, k, strings.Join(instrumentFields, ", "))
			}
		}
		m["depth"] = json.RawMessage(`"WL"`)
		steps[i], _ = json.Marshal(m)
	}
	doc := map[string]json.RawMessage{}
	doc["steps"], _ = json.Marshal(steps)
	if alloys != nil {
		doc["alloys"] = alloys
	}
	synthetic, _ := json.Marshal(doc)
	seq, err := models.ParseSequence(name, synthetic)
	if err != nil {
		var se *models.SequenceError
		if errors.As(err, &se) {
			where := ""
			if se.Step > 0 {
				where = fmt.Sprintf("instrument %d: ", se.Step)
			}
			if se.Field != "" {
				where += se.Field + ": "
			}
			return nil, nil, fail("%s%s", where, se.Msg)
		}
		return nil, nil, err
	}
	var out []models.Instrument
	var warnings []string
	seen := map[string]int{}
	for i, st := range seq.Steps {
		in := st.Instrument
		if !models.IsISOSize(in.Size) {
			warnings = append(warnings, fmt.Sprintf("%s: instrument %d: size %d is not on the ISO 3630-1 size list", name, i+1, in.Size))
		}
		key := instrumentKey(in)
		if j, dup := seen[key]; dup {
			warnings = append(warnings, fmt.Sprintf("%s: instrument %d repeats instrument %d (%s); the repeat is left out", name, i+1, j, in.Label()))
			continue
		}
		seen[key] = i + 1
		out = append(out, in)
	}
	return out, warnings, nil
}

func known(field string) bool {
	for _, f := range instrumentFields {
		if f == field {
			return true
		}
	}
	return false
}

// instrumentKey tells identical files apart from different ones.
func instrumentKey(in models.Instrument) string {
	return fmt.Sprintf("%d|%v|%v|%g|%g|%g|%s|%+v", in.Size, in.Taper, in.Tapers, in.CuttingLength, in.MaxFluteD,
		in.ShaftD, in.Section.Name, in.Alloy)
}

// lineColumn gives the 1-based line and column (in bytes) of data[off].
func lineColumn(data []byte, off int64) (line, col int) {
	off = max(0, min(off, int64(len(data))))
	before := data[:off]
	line = 1 + bytes.Count(before, []byte{'\n'})
	col = int(off) - (bytes.LastIndexByte(before, '\n') + 1) + 1
	return line, col
}

// ParseTarget reads a target such as "30/.04", "30/0.04" or "30/04" (taper in hundredths).
func ParseTarget(s string) (Target, error) {
	size, taper, ok := strings.Cut(strings.TrimSpace(s), "/")
	if !ok {
		return Target{}, fmt.Errorf("target %q: want SIZE/TAPER such as 30/.04", s)
	}
	n, err := strconv.Atoi(strings.TrimSpace(size))
	if err != nil || n <= 0 || n > 999 {
		return Target{}, fmt.Errorf("target %q: the size must be a whole number from 1 to 999", s)
	}
	taper = strings.TrimSpace(taper)
	t, err := strconv.ParseFloat(taper, 64)
	if err != nil || strings.ContainsAny(taper, "eEnNiIxX+-_") {
		return Target{}, fmt.Errorf("target %q: the taper must be a number such as .04", s)
	}
	if !strings.Contains(taper, ".") {
		t /= 100 // "30/04": hundredths, as the trade writes sizes
	}
	if !(t > 0) || t > 1 || math.IsInf(t, 0) {
		return Target{}, fmt.Errorf("target %q: the taper must be above 0 and at most 1 mm per mm", s)
	}
	return Target{Size: n, Taper: t}, nil
}
