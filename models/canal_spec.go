package models

import (
	"encoding/json"
	"fmt"
	"math"
	"reflect"
	"slices"
	"strings"
)

// CanalSpec describes a parametric canal: a chain of straight and circular segments that
// starts at the origin running down -z, with a diameter that narrows linearly from the
// orifice to the apical end. Its file is canalSpecJSON (README, "Canal spec files").
type CanalSpec struct {
	Name     string
	Segments []CanalSegment
	OrificeD float64
	ApicalD  float64
	// Oval is the ratio of the long to the short axis of the cross-section (>= 1; 0 = round).
	Oval float64
	// GivenWorkingLength is the working length from the file; 0 means the centerline length.
	GivenWorkingLength float64
	// Root is the root's outer surface around the canal (nil: not described).
	Root *RootSpec

	path canalPath // built by ParseCanalSpec or on first use
}

// CanalSegment is one piece of the centerline.
type CanalSegment struct {
	Kind   string  // "straight" or "arc"
	Length float64 // straight: mm
	Radius float64 // arc: mm
	Angle  float64 // arc: degrees
	// PlaneTurn (arc only, degrees) turns this arc's bending direction about the tangent,
	// right-handed, away from the bending direction of the previous arc carried to here
	// (for the first arc: away from +x). 0 continues the previous bend, 180 bends back
	// (an S-curve in the same plane), 90 leaves the plane.
	PlaneTurn float64
}

// canalSpecJSON is the canal spec file: the schema ParseCanalSpec reads and CanalSpec's
// MarshalJSON writes. The json tags are the one list of its fields.
type canalSpecJSON struct {
	Name          *string       `json:"name,omitempty"`
	Segments      []segmentJSON `json:"segments"`
	OrificeD      *float64      `json:"orifice_d"`
	ApicalD       *float64      `json:"apical_d"`
	Oval          *float64      `json:"oval,omitempty"`
	WorkingLength *float64      `json:"working_length,omitempty"`
	Root          *rootJSON     `json:"root,omitempty"`
}

type segmentJSON struct {
	Kind      *string  `json:"kind"`
	Length    *float64 `json:"length,omitempty"`
	Radius    *float64 `json:"radius,omitempty"`
	Angle     *float64 `json:"angle,omitempty"`
	PlaneTurn *float64 `json:"plane_turn,omitempty"`
}

// Limits that keep a spec to the size of a tooth (with room to spare), so a hostile file
// cannot make the program allocate without bound.
const (
	maxCanalSegments = 1000
	// MaxCanalLengthMM is the longest canal there is, with room to spare (a whole tooth is
	// under 35 mm long): the longest centerline a spec may describe, and the largest extent a
	// scanned surface in mm may have.
	MaxCanalLengthMM = 100.0
	minCanalLengthMM = 1.0
	// Diameters: from below what a scan resolves to wider than any tooth.
	minCanalDiamMM = 0.05
	maxCanalDiamMM = 10.0
	maxCanalOval   = 100.0
	maxArcAngleDeg = 360.0
	// MaxSpecBytes: the largest valid spec (maxCanalSegments segments) is far below this; a
	// bigger file is not a canal spec and is not read into memory.
	MaxSpecBytes = 1 << 20
)

// SpecError is a problem in a canal spec file. Line and Column are set for broken JSON and for
// a field given twice.
type SpecError struct {
	File         string
	Line, Column int
	Msg          string // names the segment (from 1) and the field
}

func (e *SpecError) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("canal spec %s: line %d, column %d: %s", e.File, e.Line, e.Column, e.Msg)
	}
	return fmt.Sprintf("canal spec %s: %s", e.File, e.Msg)
}

// LoadCanalSpec reads and parses a canal spec file.
func LoadCanalSpec(path string) (*CanalSpec, error) {
	data, err := readInput(path, MaxSpecBytes)
	if err == errTooLarge {
		return nil, &SpecError{File: path, Msg: fmt.Sprintf("more than the %d bytes a canal spec can need", MaxSpecBytes)}
	}
	if err != nil {
		return nil, err
	}
	return ParseCanalSpec(path, data)
}

// ParseCanalSpec parses a canal spec strictly: unknown fields, fields given twice, missing
// fields, wrong kinds and values out of range are errors that name the file (name), the
// segment (from 1) and the field; broken JSON is reported with its line and column.
func ParseCanalSpec(name string, data []byte) (*CanalSpec, error) {
	fail := func(format string, a ...any) error { return &SpecError{File: name, Msg: fmt.Sprintf(format, a...)} }
	if err := CheckSpecSize(name, int64(len(data))); err != nil {
		return nil, err
	}
	var f canalSpecJSON
	if err := decodeJSON(data, &f); err != nil {
		return nil, specProblem(name, err)
	}
	c := &CanalSpec{OrificeD: *f.OrificeD, ApicalD: *f.ApicalD, Oval: orDefault(f.Oval, 0),
		GivenWorkingLength: orDefault(f.WorkingLength, 0), Root: f.Root.root()}
	if f.Name != nil {
		c.Name = *f.Name
	}
	switch {
	case len(f.Segments) == 0:
		return nil, fail("field \"segments\": the list is empty")
	case len(f.Segments) > maxCanalSegments:
		return nil, fail("field \"segments\": %d segments, at most %d", len(f.Segments), maxCanalSegments)
	}
	for i, sj := range f.Segments {
		seg, err := sj.segment()
		if err != nil {
			return nil, fail("segment %d: %v", i+1, err)
		}
		c.Segments = append(c.Segments, seg)
	}
	if err := c.Validate(); err != nil {
		return nil, fail("%v", err)
	}
	c.path = buildCanalPath(c)
	return c, nil
}

// segment reads one segment: the fields its kind takes, each present.
func (j segmentJSON) segment() (CanalSegment, error) {
	s := CanalSegment{Kind: *j.Kind, Length: orDefault(j.Length, 0), Radius: orDefault(j.Radius, 0),
		Angle: orDefault(j.Angle, 0), PlaneTurn: orDefault(j.PlaneTurn, 0)}
	switch s.Kind {
	case "straight":
		for _, f := range []struct {
			name  string
			given *float64
		}{{"radius", j.Radius}, {"angle", j.Angle}, {"plane_turn", j.PlaneTurn}} {
			if f.given != nil {
				return s, fmt.Errorf("field %q does not apply to a straight segment (it takes \"length\")", f.name)
			}
		}
		if j.Length == nil {
			return s, fmt.Errorf("missing field \"length\"")
		}
	case "arc":
		if j.Length != nil {
			return s, fmt.Errorf("field \"length\" does not apply to an arc (it takes \"radius\" and \"angle\")")
		}
		if j.Radius == nil {
			return s, fmt.Errorf("missing field \"radius\"")
		}
		if j.Angle == nil {
			return s, fmt.Errorf("missing field \"angle\"")
		}
	}
	return s, s.check()
}

// MarshalJSON writes the spec in the schema ParseCanalSpec reads; zero optional values are
// left out.
func (c CanalSpec) MarshalJSON() ([]byte, error) {
	given := func(v float64) *float64 {
		if v == 0 {
			return nil
		}
		return &v
	}
	name := c.Name
	f := canalSpecJSON{Name: &name, OrificeD: &c.OrificeD, ApicalD: &c.ApicalD, Oval: given(c.Oval),
		WorkingLength: given(c.GivenWorkingLength), Segments: make([]segmentJSON, len(c.Segments)),
		Root: c.Root.toJSON()}
	for i, s := range c.Segments {
		kind := s.Kind
		f.Segments[i] = segmentJSON{Kind: &kind, Length: given(s.Length), Radius: given(s.Radius),
			Angle: given(s.Angle), PlaneTurn: given(s.PlaneTurn)}
	}
	return json.Marshal(f)
}

// specProblem words a problem the reading of a spec found.
func specProblem(file string, err error) error {
	p, ok := err.(*jsonProblem)
	if !ok {
		return &SpecError{File: file, Msg: err.Error()}
	}
	e := &SpecError{File: file}
	where := ""
	if len(p.path) >= 2 && p.path[0] == "segments" {
		where = fmt.Sprintf("segment %d: ", p.path[1].(int)+1)
	}
	field := ""
	if n := len(p.path); n > 0 {
		if k, ok := p.path[n-1].(string); ok {
			field = k
		}
	}
	if line, col, msg, ok := p.fileWords(); ok {
		e.Line, e.Column, e.Msg = line, col, msg
		return e
	}
	switch p.kind {
	case jsonUnknown:
		e.Msg = fmt.Sprintf("%sunknown field %q (known: %s)", where, p.key, strings.Join(p.known, ", "))
		if len(p.path) == 0 && slices.Contains(fieldNames(reflect.TypeFor[sequenceJSON]()), p.key) {
			e.Msg = fmt.Sprintf("this is a sequence, not a canal (it has %q); give it as the sequence", p.key)
		}
	case jsonRepeated:
		e.Line, e.Column = p.line, p.col
		e.Msg = fmt.Sprintf("%sfield %q given twice (first on line %d); a field may appear once", where, p.key, p.firstLine)
	case jsonMissing:
		e.Msg = fmt.Sprintf("%smissing field %q", where, p.key)
	case jsonWrongKind:
		switch {
		case len(p.path) == 0:
			e.Msg = "JSON, but not a canal spec: a canal spec is one JSON object {\"name\": ..., \"segments\": [...], ...}"
		case len(p.path) == 1 && field == "segments":
			e.Msg = "field \"segments\": want a list of segments"
		case len(p.path) == 2:
			e.Msg = where + "want an object {\"kind\": ...}"
		case field == "kind":
			e.Msg = where + "field \"kind\": want \"straight\" or \"arc\""
		default:
			e.Msg = fmt.Sprintf("%sfield %q: want a %s, got %s", where, field, p.want, p.got)
		}
	default:
		e.Msg = where + p.err.Error()
	}
	return e
}

// Validate checks a spec's values (also of a spec built in code); the error names the segment
// and the field.
func (c *CanalSpec) Validate() error {
	if len(c.Segments) == 0 {
		return fmt.Errorf("no segments")
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"orifice_d", c.OrificeD}, {"apical_d", c.ApicalD}} {
		if !(f.v >= minCanalDiamMM) || f.v > maxCanalDiamMM {
			return fmt.Errorf("field %q = %g: want a diameter in mm from %g to %g", f.name, f.v, minCanalDiamMM, maxCanalDiamMM)
		}
	}
	if c.Oval != 0 && (c.Oval < 1 || c.Oval > maxCanalOval) {
		return fmt.Errorf("field \"oval\" = %g: want a long-to-short axis ratio from 1 to %g", c.Oval, maxCanalOval)
	}
	total := 0.0
	for i, s := range c.Segments {
		if err := s.check(); err != nil {
			return fmt.Errorf("segment %d: %v", i+1, err)
		}
		total += s.length()
	}
	if total > MaxCanalLengthMM {
		return fmt.Errorf("centerline length %g mm is over %g mm", total, MaxCanalLengthMM)
	}
	if total < minCanalLengthMM {
		return fmt.Errorf("centerline length %g mm is under %g mm, shorter than any canal", total, minCanalLengthMM)
	}
	if c.GivenWorkingLength < 0 || math.IsNaN(c.GivenWorkingLength) || c.GivenWorkingLength > MaxCanalLengthMM {
		return fmt.Errorf("field \"working_length\" = %g: want a length in mm above 0 and at most %g", c.GivenWorkingLength, MaxCanalLengthMM)
	}
	return c.validateRoot()
}

func (s CanalSegment) check() error {
	switch s.Kind {
	case "straight":
		if s.Radius != 0 || s.Angle != 0 || s.PlaneTurn != 0 {
			return fmt.Errorf("a straight segment takes only \"length\"")
		}
		if !(s.Length > 0) || s.Length > MaxCanalLengthMM {
			return fmt.Errorf("field \"length\" = %g: want a length in mm above 0 and at most %g", s.Length, MaxCanalLengthMM)
		}
	case "arc":
		if s.Length != 0 {
			return fmt.Errorf("an arc takes \"radius\" and \"angle\", not \"length\"")
		}
		if !(s.Radius > 0) || s.Radius > MaxCanalLengthMM {
			return fmt.Errorf("field \"radius\" = %g: want a radius in mm above 0 and at most %g", s.Radius, MaxCanalLengthMM)
		}
		if !(s.Angle > 0) || s.Angle > maxArcAngleDeg {
			return fmt.Errorf("field \"angle\" = %g: want degrees above 0 and at most %g", s.Angle, maxArcAngleDeg)
		}
		if math.IsNaN(s.PlaneTurn) || math.Abs(s.PlaneTurn) > 3600 {
			return fmt.Errorf("field \"plane_turn\" = %g: want degrees", s.PlaneTurn)
		}
		if s.length() > MaxCanalLengthMM {
			return fmt.Errorf("arc length %g mm is over %g mm", s.length(), MaxCanalLengthMM)
		}
	default:
		return fmt.Errorf("field \"kind\" = %q: want \"straight\" or \"arc\"", s.Kind)
	}
	return nil
}

// length is the segment's centerline length in mm.
func (s CanalSegment) length() float64 {
	if s.Kind == "arc" {
		return s.Radius * s.Angle * math.Pi / 180
	}
	return s.Length
}

// CheckSpecSize refuses a canal spec of more than MaxSpecBytes before it is read.
func CheckSpecSize(name string, size int64) error {
	if size > MaxSpecBytes {
		return &SpecError{File: name, Msg: fmt.Sprintf("%d bytes, more than a canal spec can need (%d)", size, MaxSpecBytes)}
	}
	return nil
}
