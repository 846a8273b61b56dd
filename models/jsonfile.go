package models

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"reflect"
	"strconv"
	"strings"
	"unicode/utf8"
)

// The input files a person writes (sequences, canal specs, instrument lists) are read in two
// passes over one schema: a Go type whose json tags name the fields. The first pass walks the
// file's tokens beside the type and finds what encoding/json accepts silently or reports without
// a place: a key given twice (the last would win), a key in the wrong case (encoding/json matches
// keys case-insensitively), a null (it would leave the default), a list where a number belongs.
// Every problem carries its path and byte offset, turned into a line and column once
// (lineColumn). The second pass decodes with encoding/json (DisallowUnknownFields), and each
// format's validate method checks ranges. A field is required when its tag has no omitempty;
// a `doc` tag says what a missing field should hold.

// jsonProblemKind tells what is wrong at a place of an input file.
type jsonProblemKind int

const (
	jsonSyntax    jsonProblemKind = iota // not JSON
	jsonEncoding                         // UTF-16 or other text that is not UTF-8
	jsonUnknown                          // a key the format does not have
	jsonRepeated                         // a key given twice in one object
	jsonWrongKind                        // a string where a number belongs, a null, ...
	jsonMissing                          // a required key is absent
	jsonBadValue                         // a value its own reader refuses (a depth such as "WL*2")
)

// jsonProblem is one thing wrong in an input file, found before any value is used.
type jsonProblem struct {
	kind   jsonProblemKind
	path   []any  // object keys (string) and list indexes (int) from the top
	offset int64  // byte offset of the value, or of the key for unknown and repeated keys
	key    string // the key for unknown, repeated and missing keys
	known  []string
	doc    string // what a missing key should hold (its `doc` tag)
	want   string // "number", "string", "list", "object" (wrong kind)
	got    string // the value as written, shortened (wrong kind)
	first  int64  // offset of the first occurrence (repeated key)
	err    error  // the syntax error, or what a value's own reader said

	line, col int // of offset, from 1
	firstLine int // of first
}

// at names the path for a developer (tests, panics): steps[1].size.
func (p *jsonProblem) at() string {
	var b strings.Builder
	for _, e := range p.path {
		switch e := e.(type) {
		case int:
			fmt.Fprintf(&b, "[%d]", e)
		case string:
			if b.Len() > 0 {
				b.WriteByte('.')
			}
			b.WriteString(e)
		}
	}
	return b.String()
}

// fileWords words the problems that belong to the whole file (not JSON, not UTF-8), the same
// in every format; ok is false for the others.
func (p *jsonProblem) fileWords() (line, col int, msg string, ok bool) {
	switch {
	case p.kind == jsonSyntax:
		return p.line, p.col, "broken JSON: " + p.err.Error(), true
	case p.kind == jsonEncoding && p.offset == 0:
		return 0, 0, "UTF-16 text: save the file as UTF-8", true
	case p.kind == jsonEncoding:
		return p.line, p.col, "not UTF-8 text: save the file as UTF-8", true
	}
	return 0, 0, "", false
}

func (p *jsonProblem) Error() string { return p.at() + ": problem " + strconv.Itoa(int(p.kind)) }

// utf8BOM starts some files written on Windows; it is not part of the JSON.
var utf8BOM = []byte("\xef\xbb\xbf")

// isUTF16 reports text in UTF-16: a byte-order mark, or a zero byte beside each of the first
// ASCII characters (JSON starts with ASCII).
func isUTF16(data []byte) bool {
	if bytes.HasPrefix(data, []byte{0xFE, 0xFF}) || bytes.HasPrefix(data, []byte{0xFF, 0xFE}) {
		return true
	}
	return len(data) >= 4 && (data[0] == 0 && data[1] != 0 && data[2] == 0 && data[3] != 0 ||
		data[0] != 0 && data[1] == 0 && data[2] != 0 && data[3] == 0)
}

// LooksLikeJSON tells a JSON input (a canal spec, a sequence, even a broken or misplaced one:
// a list, null, UTF-16 text) from an STL surface by its first bytes, so that it is answered
// as JSON and not as a broken STL. An ASCII STL starts with "solid"; a binary STL's 80-byte
// header is free text, but one that opens like JSON and is not valid STL would be a broken
// STL either way.
func LooksLikeJSON(data []byte) bool {
	if isUTF16(data) {
		return true
	}
	t := bytes.TrimLeft(bytes.TrimPrefix(data, utf8BOM), " \t\r\n")
	if len(t) == 0 {
		return false
	}
	switch t[0] {
	case '{', '[', '"':
		return true
	}
	for _, lit := range []string{"null", "true", "false"} {
		if rest, ok := bytes.CutPrefix(t, []byte(lit)); ok && len(bytes.TrimSpace(rest)) == 0 {
			return true
		}
	}
	// A bare number is JSON too; it is short, where an STL is at least 84 bytes.
	return len(t) < 84 && json.Valid(t)
}

// lineColumn gives the 1-based line and column (in bytes) of data[off].
func lineColumn(data []byte, off int64) (line, col int) {
	off = max(0, min(off, int64(len(data))))
	before := data[:off]
	line = 1 + bytes.Count(before, []byte{'\n'})
	col = int(off) - (bytes.LastIndexByte(before, '\n') + 1) + 1
	return line, col
}

// decodeJSON reads data into v (a pointer to a schema type) or returns the first problem as a
// *jsonProblem. A UTF-8 byte-order mark is skipped; offsets count from after it, and from the
// data given.
func decodeJSON(data []byte, v any) error {
	if isUTF16(data) {
		return &jsonProblem{kind: jsonEncoding, line: 1, col: 1}
	}
	data = bytes.TrimPrefix(data, utf8BOM)
	p := walkJSON(data, reflect.TypeOf(v).Elem())
	if p != nil {
		p.line, p.col = lineColumn(data, p.offset)
		p.firstLine, _ = lineColumn(data, p.first)
		return p
	}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		// The walk finds every problem of shape and value; should a schema hold a type it does
		// not check, the problem is still stated, without its place.
		return &jsonProblem{kind: jsonBadValue, err: err}
	}
	return nil
}

// walkJSON finds the first problem of data read as t.
func walkJSON(data []byte, t reflect.Type) *jsonProblem {
	if err := json.Unmarshal(data, new(json.RawMessage)); err != nil {
		var se *json.SyntaxError
		if errors.As(err, &se) {
			return &jsonProblem{kind: jsonSyntax, offset: se.Offset - 1, err: se}
		}
		return &jsonProblem{kind: jsonSyntax, err: err}
	}
	if !utf8.Valid(data) {
		return &jsonProblem{kind: jsonEncoding, offset: int64(invalidUTF8At(data))}
	}
	w := jsonWalker{data: data, dec: json.NewDecoder(bytes.NewReader(data))}
	w.dec.UseNumber()
	return w.value(t, nil)
}

func invalidUTF8At(data []byte) int {
	for i := 0; i < len(data); {
		r, n := utf8.DecodeRune(data[i:])
		if r == utf8.RuneError && n == 1 {
			return i
		}
		i += n
	}
	return len(data)
}

// jsonWalker walks valid JSON beside a Go type.
type jsonWalker struct {
	data []byte
	dec  *json.Decoder
}

var unmarshalerType = reflect.TypeFor[json.Unmarshaler]()

// next returns the next token and the offset where it starts.
func (w *jsonWalker) next() (json.Token, int64) {
	off := w.dec.InputOffset()
	for off < int64(len(w.data)) && strings.IndexByte(" \t\r\n,:", w.data[off]) >= 0 {
		off++
	}
	tok, err := w.dec.Token()
	if err != nil {
		// The data was checked as valid JSON first.
		panic("models: walking valid JSON: " + err.Error())
	}
	return tok, off
}

// key reads an object's next key, refusing one already in seen (the offsets of the keys so far).
func (w *jsonWalker) key(path []any, seen map[string]int64) (string, *jsonProblem) {
	k, off := w.next()
	key := k.(string)
	if first, dup := seen[key]; dup {
		return key, &jsonProblem{kind: jsonRepeated, path: path, key: key, offset: off, first: first}
	}
	seen[key] = off
	return key, nil
}

// skip consumes the rest of a value that opened with tok, still refusing repeated keys.
func (w *jsonWalker) skip(tok json.Token, path []any) *jsonProblem {
	d, ok := tok.(json.Delim)
	if !ok {
		return nil
	}
	seen := map[string]int64{}
	for i := 0; w.dec.More(); i++ {
		if d == '{' {
			key, p := w.key(path, seen)
			if p != nil {
				return p
			}
			t, _ := w.next()
			if p := w.skip(t, with(path, key)); p != nil {
				return p
			}
			continue
		}
		t, _ := w.next()
		if p := w.skip(t, with(path, i)); p != nil {
			return p
		}
	}
	w.next() // the closing delimiter
	return nil
}

// with is path and one more step, in a slice of its own (problems keep their paths).
func with(path []any, e any) []any { return append(path[:len(path):len(path)], e) }

// kindName is the JSON kind a Go type is read from, for messages.
func kindName(t reflect.Type) string {
	switch t.Kind() {
	case reflect.Float32, reflect.Float64, reflect.Int, reflect.Int64, reflect.Int32:
		return "number"
	case reflect.String:
		return "string"
	case reflect.Bool:
		return "true or false"
	case reflect.Slice, reflect.Array:
		return "list"
	}
	return "object"
}

// value checks the next value against t.
func (w *jsonWalker) value(t reflect.Type, path []any) *jsonProblem {
	tok, off := w.next()
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	if t.Kind() == reflect.Interface {
		return w.skip(tok, path)
	}
	if reflect.PointerTo(t).Implements(unmarshalerType) {
		// The type reads itself: let it read here, so that its refusal has a place.
		if p := w.skip(tok, path); p != nil {
			return p
		}
		raw := w.data[off:w.dec.InputOffset()]
		if err := reflect.New(t).Interface().(json.Unmarshaler).UnmarshalJSON(raw); err != nil {
			return &jsonProblem{kind: jsonBadValue, path: path, offset: off, err: err}
		}
		return nil
	}
	wrong := func() *jsonProblem {
		got := "null"
		switch tok := tok.(type) {
		case json.Delim:
			if p := w.skip(tok, path); p != nil {
				return p
			}
			got = strings.TrimSpace(string(w.data[off:w.dec.InputOffset()]))
		case nil:
		default:
			got = string(w.data[off:w.dec.InputOffset()])
		}
		if len(got) > 24 {
			got = got[:24] + "..."
		}
		return &jsonProblem{kind: jsonWrongKind, path: path, offset: off, want: kindName(t), got: got}
	}
	switch t.Kind() {
	case reflect.Struct:
		if tok != json.Delim('{') {
			return wrong()
		}
		return w.object(t, path, off)
	case reflect.Map:
		if tok != json.Delim('{') {
			return wrong()
		}
		seen := map[string]int64{}
		for w.dec.More() {
			key, p := w.key(path, seen)
			if p == nil {
				p = w.value(t.Elem(), with(path, key))
			}
			if p != nil {
				return p
			}
		}
		w.next()
	case reflect.Slice, reflect.Array:
		if tok != json.Delim('[') {
			return wrong()
		}
		for i := 0; w.dec.More(); i++ {
			if p := w.value(t.Elem(), with(path, i)); p != nil {
				return p
			}
		}
		w.next()
	case reflect.Float32, reflect.Float64, reflect.Int, reflect.Int64, reflect.Int32:
		n, ok := tok.(json.Number)
		if !ok {
			return wrong()
		}
		if _, err := strconv.ParseFloat(string(n), 64); err != nil {
			return wrong() // beyond the range of a float64
		}
	case reflect.String:
		if _, ok := tok.(string); !ok {
			return wrong()
		}
	case reflect.Bool:
		if _, ok := tok.(bool); !ok {
			return wrong()
		}
	}
	return nil
}

// jsonField is one field of a schema struct.
type jsonField struct {
	name     string
	index    []int
	typ      reflect.Type
	required bool
	doc      string // what a missing field should hold (`doc` tag)
	stepUse  bool   // says how a sequence step uses its file (`use:"step"`)
}

// jsonFields lists a struct's JSON fields in declaration order (embedded structs flattened).
func jsonFields(t reflect.Type) []jsonField {
	var out []jsonField
	for _, f := range reflect.VisibleFields(t) {
		if f.Anonymous || !f.IsExported() {
			continue
		}
		tag := f.Tag.Get("json")
		if tag == "-" {
			continue
		}
		name, opts, _ := strings.Cut(tag, ",")
		if name == "" {
			name = f.Name
		}
		out = append(out, jsonField{name: name, index: f.Index, typ: f.Type,
			required: !strings.Contains(","+opts+",", ",omitempty,"), doc: f.Tag.Get("doc"),
			stepUse: f.Tag.Get("use") == "step"})
	}
	return out
}

// fieldNames are the JSON names of a schema struct's fields, in order.
func fieldNames(t reflect.Type) []string {
	var out []string
	for _, f := range jsonFields(t) {
		out = append(out, f.name)
	}
	return out
}

func (w *jsonWalker) object(t reflect.Type, path []any, open int64) *jsonProblem {
	fields := jsonFields(t)
	seen := map[string]int64{}
	for w.dec.More() {
		key, p := w.key(path, seen)
		if p != nil {
			return p
		}
		var field *jsonField
		for i := range fields {
			if fields[i].name == key { // exact case, unlike encoding/json
				field = &fields[i]
				break
			}
		}
		if field == nil {
			return &jsonProblem{kind: jsonUnknown, path: path, key: key, offset: seen[key], known: fieldNames(t)}
		}
		if p := w.value(field.typ, with(path, key)); p != nil {
			return p
		}
	}
	w.next()
	for _, f := range fields {
		if _, ok := seen[f.name]; f.required && !ok {
			return &jsonProblem{kind: jsonMissing, path: path, key: f.name, offset: open, doc: f.doc}
		}
	}
	return nil
}
