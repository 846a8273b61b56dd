package models

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"slices"
	"sort"
	"strings"
)

// CanalSpec describes a parametric canal: a chain of straight and circular segments that
// starts at the origin running down -z, with a diameter that narrows linearly from the
// orifice to the apical end. See design.md, "Input files".
type CanalSpec struct {
	Name     string         `json:"name"`
	Segments []CanalSegment `json:"segments"`
	OrificeD float64        `json:"orifice_d"`
	ApicalD  float64        `json:"apical_d"`
	// Oval is the ratio of the long to the short axis of the cross-section (>= 1; 0 = round).
	Oval float64 `json:"oval,omitempty"`
	// GivenWorkingLength is the working length from the file; 0 means the centerline length.
	GivenWorkingLength float64 `json:"working_length,omitempty"`

	path canalPath // built by ParseCanalSpec or on first use
}

// CanalSegment is one piece of the centerline.
type CanalSegment struct {
	Kind   string  `json:"kind"`             // "straight" or "arc"
	Length float64 `json:"length,omitempty"` // straight: mm
	Radius float64 `json:"radius,omitempty"` // arc: mm
	Angle  float64 `json:"angle,omitempty"`  // arc: degrees
	// PlaneTurn (arc only, degrees) turns this arc's bending direction about the tangent,
	// right-handed, away from the bending direction of the previous arc carried to here
	// (for the first arc: away from +x). 0 continues the previous bend, 180 bends back
	// (an S-curve in the same plane), 90 leaves the plane.
	PlaneTurn float64 `json:"plane_turn,omitempty"`
}

// Limits that keep a spec to the size of a tooth (with room to spare), so a hostile file
// cannot make the program allocate without bound.
const (
	maxCanalSegments = 1000
	maxCanalLengthMM = 500.0
	maxCanalDiamMM   = 50.0
	maxCanalOval     = 100.0
	maxArcAngleDeg   = 360.0
)

var (
	canalTopFields     = []string{"name", "segments", "orifice_d", "apical_d", "oval", "working_length"}
	canalSegmentFields = []string{"kind", "length", "radius", "angle", "plane_turn"}
)

// IsCanalSpec tells a canal spec (JSON) from an STL by its first non-space byte.
func IsCanalSpec(data []byte) bool {
	t := bytes.TrimLeft(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf")), " \t\r\n")
	return len(t) > 0 && t[0] == '{'
}

// LoadCanalSpec reads and parses a canal spec file.
func LoadCanalSpec(path string) (*CanalSpec, error) {
	// The largest valid spec (maxCanalSegments segments) is far below this; a bigger file
	// is not a canal spec and is not read into memory.
	const maxSpecBytes = 1 << 20
	if st, err := os.Stat(path); err == nil && st.Size() > maxSpecBytes {
		return nil, fmt.Errorf("canal spec %s: %d bytes, more than a canal spec can need (%d)", path, st.Size(), maxSpecBytes)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("canal spec %s: %w", path, err)
	}
	return ParseCanalSpec(path, data)
}

// ParseCanalSpec parses a canal spec strictly: unknown fields, missing fields, wrong kinds
// and values out of range are errors that name the file (name), the segment (from 1) and
// the field; broken JSON is reported with its line and column.
func ParseCanalSpec(name string, data []byte) (*CanalSpec, error) {
	fail := func(format string, a ...any) error {
		return fmt.Errorf("canal spec %s: %s", name, fmt.Sprintf(format, a...))
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	var top map[string]json.RawMessage
	if err := json.Unmarshal(data, &top); err != nil {
		var syn *json.SyntaxError
		if errors.As(err, &syn) {
			line, col := canalLineColumn(data, syn.Offset)
			return nil, fail("line %d, column %d: broken JSON: %v", line, col, syn)
		}
		return nil, fail("want a JSON object {\"name\": ..., \"segments\": [...], ...}")
	}
	if err := canalCheckFields(top, canalTopFields); err != nil {
		return nil, fail("%v", err)
	}
	c := &CanalSpec{}
	if raw, ok := top["name"]; ok {
		if err := json.Unmarshal(raw, &c.Name); err != nil {
			return nil, fail("field \"name\": want a string")
		}
	}
	var err error
	if c.OrificeD, err = canalNumber(top, "orifice_d", true); err != nil {
		return nil, fail("%v", err)
	}
	if c.ApicalD, err = canalNumber(top, "apical_d", true); err != nil {
		return nil, fail("%v", err)
	}
	if c.Oval, err = canalNumber(top, "oval", false); err != nil {
		return nil, fail("%v", err)
	}
	if c.GivenWorkingLength, err = canalNumber(top, "working_length", false); err != nil {
		return nil, fail("%v", err)
	}
	rawSegs, ok := top["segments"]
	if !ok {
		return nil, fail("missing field \"segments\"")
	}
	var segs []json.RawMessage
	if err := json.Unmarshal(rawSegs, &segs); err != nil || segs == nil {
		return nil, fail("field \"segments\": want a list of segments")
	}
	if len(segs) == 0 {
		return nil, fail("field \"segments\": the list is empty")
	}
	if len(segs) > maxCanalSegments {
		return nil, fail("field \"segments\": %d segments, at most %d", len(segs), maxCanalSegments)
	}
	for i, raw := range segs {
		seg, err := parseCanalSegment(raw)
		if err != nil {
			return nil, fail("segment %d: %v", i+1, err)
		}
		c.Segments = append(c.Segments, seg)
	}
	if err := c.check(); err != nil {
		return nil, fail("%v", err)
	}
	c.path = buildCanalPath(c)
	return c, nil
}

// check validates values that span fields; it is also used for specs built in code.
func (c *CanalSpec) check() error {
	if len(c.Segments) == 0 {
		return fmt.Errorf("no segments")
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"orifice_d", c.OrificeD}, {"apical_d", c.ApicalD}} {
		if !(f.v > 0) || f.v > maxCanalDiamMM {
			return fmt.Errorf("field %q = %g: want a diameter in mm above 0 and at most %g", f.name, f.v, maxCanalDiamMM)
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
	if total > maxCanalLengthMM {
		return fmt.Errorf("centerline length %g mm is over %g mm", total, maxCanalLengthMM)
	}
	if c.GivenWorkingLength < 0 || math.IsNaN(c.GivenWorkingLength) || c.GivenWorkingLength > maxCanalLengthMM {
		return fmt.Errorf("field \"working_length\" = %g: want a length in mm above 0", c.GivenWorkingLength)
	}
	return nil
}

func (s CanalSegment) check() error {
	switch s.Kind {
	case "straight":
		if s.Radius != 0 || s.Angle != 0 || s.PlaneTurn != 0 {
			return fmt.Errorf("a straight segment takes only \"length\"")
		}
		if !(s.Length > 0) || s.Length > maxCanalLengthMM {
			return fmt.Errorf("field \"length\" = %g: want a length in mm above 0", s.Length)
		}
	case "arc":
		if s.Length != 0 {
			return fmt.Errorf("an arc takes \"radius\" and \"angle\", not \"length\"")
		}
		if !(s.Radius > 0) || s.Radius > maxCanalLengthMM {
			return fmt.Errorf("field \"radius\" = %g: want a radius in mm above 0", s.Radius)
		}
		if !(s.Angle > 0) || s.Angle > maxArcAngleDeg {
			return fmt.Errorf("field \"angle\" = %g: want degrees above 0 and at most %g", s.Angle, maxArcAngleDeg)
		}
		if math.IsNaN(s.PlaneTurn) || math.Abs(s.PlaneTurn) > 3600 {
			return fmt.Errorf("field \"plane_turn\" = %g: want degrees", s.PlaneTurn)
		}
		if s.length() > maxCanalLengthMM {
			return fmt.Errorf("arc length %g mm is over %g mm", s.length(), maxCanalLengthMM)
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

func parseCanalSegment(raw json.RawMessage) (CanalSegment, error) {
	var fields map[string]json.RawMessage
	if err := json.Unmarshal(raw, &fields); err != nil || fields == nil {
		return CanalSegment{}, fmt.Errorf("want an object {\"kind\": ...}")
	}
	if err := canalCheckFields(fields, canalSegmentFields); err != nil {
		return CanalSegment{}, err
	}
	var s CanalSegment
	kind, ok := fields["kind"]
	if !ok {
		return s, fmt.Errorf("missing field \"kind\"")
	}
	if err := json.Unmarshal(kind, &s.Kind); err != nil || string(kind) == "null" {
		return s, fmt.Errorf("field \"kind\": want \"straight\" or \"arc\"")
	}
	var err error
	switch s.Kind {
	case "straight":
		for _, f := range []string{"radius", "angle", "plane_turn"} {
			if _, ok := fields[f]; ok {
				return s, fmt.Errorf("field %q does not apply to a straight segment (it takes \"length\")", f)
			}
		}
		s.Length, err = canalNumber(fields, "length", true)
	case "arc":
		if _, ok := fields["length"]; ok {
			return s, fmt.Errorf("field \"length\" does not apply to an arc (it takes \"radius\" and \"angle\")")
		}
		if s.Radius, err = canalNumber(fields, "radius", true); err != nil {
			return s, err
		}
		if s.Angle, err = canalNumber(fields, "angle", true); err != nil {
			return s, err
		}
		s.PlaneTurn, err = canalNumber(fields, "plane_turn", false)
	default:
		return s, fmt.Errorf("field \"kind\" = %q: want \"straight\" or \"arc\"", s.Kind)
	}
	if err != nil {
		return s, err
	}
	return s, s.check()
}

// canalCheckFields reports the first unknown field in sorted order, so the message is stable.
func canalCheckFields(fields map[string]json.RawMessage, known []string) error {
	var unknown []string
	for k := range fields {
		if !slices.Contains(known, k) {
			unknown = append(unknown, k)
		}
	}
	if len(unknown) == 0 {
		return nil
	}
	sort.Strings(unknown)
	return fmt.Errorf("unknown field %q (known: %s)", unknown[0], strings.Join(known, ", "))
}

// canalNumber reads a number; a missing optional field is 0.
func canalNumber(fields map[string]json.RawMessage, name string, required bool) (float64, error) {
	raw, ok := fields[name]
	if !ok {
		if required {
			return 0, fmt.Errorf("missing field %q", name)
		}
		return 0, nil
	}
	var v float64
	if err := json.Unmarshal(raw, &v); err != nil || string(raw) == "null" {
		return 0, fmt.Errorf("field %q: want a number, got %s", name, canalClip(string(raw), 40))
	}
	return v, nil
}

func canalClip(s string, n int) string {
	if len(s) > n {
		return s[:n] + "..."
	}
	return s
}

// canalLineColumn turns a byte offset into a 1-based line and column.
func canalLineColumn(data []byte, offset int64) (line, col int) {
	offset = min(max(offset, 0), int64(len(data)))
	before := data[:offset]
	line = bytes.Count(before, []byte("\n")) + 1
	col = int(offset) - (bytes.LastIndexByte(before, '\n') + 1)
	if col == 0 {
		col = 1
	}
	return line, col
}
