package models

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strings"
)

// Sequence is a planned series of files, read from or written to the sequence JSON.
type Sequence struct {
	Steps []Step
	// Alloys holds the alloys the file defines (adding to or overriding the built-ins).
	Alloys map[string]Alloy
	// PathModel is PathCentred (the default) or PathElastic.
	PathModel string
	// Warnings are problems worth showing that do not stop the sequence (a size off the ISO list).
	Warnings []string
	// Name is the file the sequence came from, for messages; empty when built in code.
	Name string
}

// Step is one file of a sequence and how it is used.
type Step struct {
	Instrument     Instrument
	Depth          Depth
	RPM            float64
	PeckMM         float64 // advance past the deepest point reached, per insertion
	RetractMM      float64 // withdrawal between insertions
	AdvanceMMs     float64 // advance speed, mm/s
	TorqueLimitNcm float64 // motor torque limit, N*cm; 0 = none
	AlloyName      string
	SectionName    string
}

// Path models.
const (
	PathCentred = "centred"
	PathElastic = "elastic"
)

// Step defaults (common practice: advance about 1 mm per insertion at about 1.5 mm/s).
const (
	DefaultRPM        = 400.0
	DefaultPeckMM     = 1.0
	DefaultRetractMM  = 2.0
	DefaultAdvanceMMs = 1.5
)

// Bounds that catch typos and keep the insertion schedule a sensible size.
const (
	maxSequenceBytes = 4 << 20
	maxStepSize      = 999
	maxTaper         = 1.0
	maxRPM           = 20000.0
	minPeckMM        = 0.01
	maxStrokeMM      = 50.0 // peck, retract, cutting length
	minAdvanceMMs    = 0.01
	maxAdvanceMMs    = 100.0
	maxTorqueNcm     = 100.0
	maxFluteDMM      = 10.0
	maxTaperSegments = 64
)

// NewStep returns a step with the default rpm, peck, retraction and advance for an instrument,
// naming its alloy and section (the defaults when the instrument leaves them empty).
func NewStep(in Instrument, depth Depth) Step {
	st := Step{Instrument: in, Depth: depth, RPM: DefaultRPM, PeckMM: DefaultPeckMM,
		RetractMM: DefaultRetractMM, AdvanceMMs: DefaultAdvanceMMs,
		AlloyName: in.Alloy.Name, SectionName: in.Section.Name}
	if st.AlloyName == "" {
		st.AlloyName = AlloyNiTiSuperelastic
		st.Instrument.Alloy, _ = BuiltinAlloy(AlloyNiTiSuperelastic)
	}
	if st.SectionName == "" {
		st.SectionName = SectionRound
		st.Instrument.Section = Section{Name: SectionRound}
	}
	return st
}

// SequenceError is a problem in a sequence file. Step counts from 1 (0: not in a step); Line and
// Column are set for broken JSON.
type SequenceError struct {
	File         string
	Line, Column int
	Step         int
	Field        string
	Msg          string
}

func (e *SequenceError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d:%d", e.Line, e.Column)
	}
	b.WriteString(": ")
	if e.Step > 0 {
		fmt.Fprintf(&b, "step %d: ", e.Step)
	}
	if e.Field != "" {
		b.WriteString(e.Field)
		b.WriteString(": ")
	}
	b.WriteString(e.Msg)
	return b.String()
}

// LoadSequence reads and checks a sequence file.
func LoadSequence(path string) (*Sequence, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, maxSequenceBytes+1))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if len(data) > maxSequenceBytes {
		return nil, &SequenceError{File: path, Msg: fmt.Sprintf("larger than %d MB: not a sequence file", maxSequenceBytes>>20)}
	}
	return ParseSequence(path, data)
}

// ParseSequence reads a sequence from JSON. Unknown fields, missing required fields and values out
// of range are errors naming the file, the step (from 1) and the field; a size off the ISO list is
// a warning.
func ParseSequence(name string, data []byte) (*Sequence, error) {
	p := seqParser{file: name}
	top, err := p.object(data, 0, "")
	if err != nil {
		return nil, err
	}
	if err := p.unknownFields(top, 0, "", "steps", "alloys", "path_model"); err != nil {
		return nil, err
	}
	seq := &Sequence{PathModel: PathCentred, Name: name}
	if raw, ok := top["path_model"]; ok {
		s, err := p.str(raw, 0, "path_model")
		if err != nil {
			return nil, err
		}
		if s != PathCentred && s != PathElastic {
			return nil, p.fail(0, "path_model", "want %q or %q, not %q", PathCentred, PathElastic, s)
		}
		seq.PathModel = s
	}
	if raw, ok := top["alloys"]; ok {
		if seq.Alloys, err = p.alloys(raw, seq); err != nil {
			return nil, err
		}
	}
	raw, ok := top["steps"]
	if !ok {
		return nil, p.fail(0, "steps", "missing (a list of steps is required)")
	}
	var steps []json.RawMessage
	if !seqStartsWith(raw, '[') || json.Unmarshal(raw, &steps) != nil {
		return nil, p.fail(0, "steps", "must be a list of steps")
	}
	if len(steps) == 0 {
		return nil, p.fail(0, "steps", "must list at least one step")
	}
	seq.Steps = make([]Step, 0, len(steps))
	for i, rs := range steps {
		st, err := p.step(rs, i+1, seq)
		if err != nil {
			return nil, err
		}
		seq.Steps = append(seq.Steps, st)
	}
	return seq, nil
}

// Alloy returns the alloy a name stands for in this sequence: the file's own, else a built-in.
func (s *Sequence) Alloy(name string) (Alloy, bool) {
	if a, ok := s.Alloys[name]; ok {
		return a, true
	}
	return BuiltinAlloy(name)
}

// CheckDepths checks every step's depth against a canal: it must lie below the orifice and not
// beyond the canal's apical end (canalLength mm from the orifice). Working length wl resolves
// "WL" depths.
func (s *Sequence) CheckDepths(canalLength float64, wl float64) error {
	file := s.Name
	if file == "" {
		file = "sequence"
	}
	if !(canalLength > 0) || math.IsInf(canalLength, 0) {
		return &SequenceError{File: file, Msg: fmt.Sprintf("canal length %g mm is not usable", canalLength)}
	}
	if !(wl > 0) || math.IsInf(wl, 0) {
		return &SequenceError{File: file, Msg: fmt.Sprintf("working length %g mm is not usable", wl)}
	}
	const tol = 1e-9 // a depth equal to the canal length, give or take rounding, is allowed
	for i, st := range s.Steps {
		d := st.Depth.Resolve(wl)
		switch {
		case math.IsNaN(d) || d <= 0:
			return &SequenceError{File: file, Step: i + 1, Field: "depth",
				Msg: fmt.Sprintf("%s resolves to %.2f mm, not below the orifice", st.Depth, d)}
		case d > canalLength+tol:
			return &SequenceError{File: file, Step: i + 1, Field: "depth",
				Msg: fmt.Sprintf("%s reaches %.2f mm from the orifice, beyond the canal's apical end at %.2f mm",
					st.Depth, d, canalLength)}
		}
	}
	return nil
}

// seqParser reads the sequence JSON field by field so that every error can name its place.
type seqParser struct {
	file string
}

func (p *seqParser) fail(step int, field, format string, args ...any) error {
	return &SequenceError{File: p.file, Step: step, Field: field, Msg: fmt.Sprintf(format, args...)}
}

// syntax turns broken JSON into an error with line:column.
func (p *seqParser) syntax(data []byte, err error) error {
	var se *json.SyntaxError
	if errors.As(err, &se) {
		line, col := seqLineColumn(data, se.Offset-1)
		return &SequenceError{File: p.file, Line: line, Column: col, Msg: "broken JSON: " + se.Error()}
	}
	return &SequenceError{File: p.file, Msg: "broken JSON: " + err.Error()}
}

// seqLineColumn gives the 1-based line and column (in bytes) of data[off].
func seqLineColumn(data []byte, off int64) (line, col int) {
	if off < 0 {
		off = 0
	}
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	before := data[:off]
	line = 1 + bytes.Count(before, []byte{'\n'})
	col = int(off) - (bytes.LastIndexByte(before, '\n') + 1) + 1
	return line, col
}

func seqStartsWith(raw []byte, c byte) bool {
	t := bytes.TrimLeft(raw, " \t\r\n")
	return len(t) > 0 && t[0] == c
}

func seqIsNull(raw []byte) bool {
	return string(bytes.TrimSpace(raw)) == "null"
}

// object decodes a JSON object into its raw fields. At the top level (field "") broken JSON is
// reported with line:column.
func (p *seqParser) object(raw []byte, step int, field string) (map[string]json.RawMessage, error) {
	if field == "" && step == 0 {
		if !json.Valid(raw) {
			var v any
			return nil, p.syntax(raw, json.Unmarshal(raw, &v))
		}
		if !seqStartsWith(raw, '{') {
			return nil, p.fail(0, "", "the top level must be a JSON object with \"steps\"")
		}
	} else if !seqStartsWith(raw, '{') {
		return nil, p.fail(step, field, "must be a JSON object")
	}
	var m map[string]json.RawMessage
	if err := json.Unmarshal(raw, &m); err != nil {
		return nil, p.fail(step, field, "must be a JSON object")
	}
	return m, nil
}

// unknownFields reports the first field (in sorted order) that is not allowed.
func (p *seqParser) unknownFields(m map[string]json.RawMessage, step int, where string, allowed ...string) error {
	var unknown []string
	for k := range m {
		known := false
		for _, a := range allowed {
			if k == a {
				known = true
				break
			}
		}
		if !known {
			unknown = append(unknown, k)
		}
	}
	if len(unknown) == 0 {
		return nil
	}
	sort.Strings(unknown)
	field := fmt.Sprintf("%q", unknown[0])
	if where != "" {
		field = where + ": " + field
	}
	return p.fail(step, field, "unknown field (known: %s)", strings.Join(allowed, ", "))
}

func (p *seqParser) number(raw []byte, step int, field string) (float64, error) {
	var f float64
	if seqIsNull(raw) || json.Unmarshal(raw, &f) != nil {
		return 0, p.fail(step, field, "must be a number, not %s", seqClip(raw))
	}
	return f, nil
}

func (p *seqParser) str(raw []byte, step int, field string) (string, error) {
	var s string
	if seqIsNull(raw) || json.Unmarshal(raw, &s) != nil {
		return "", p.fail(step, field, "must be a string, not %s", seqClip(raw))
	}
	return s, nil
}

// clip shortens a raw value for a message.
func seqClip(raw []byte) string {
	s := string(bytes.TrimSpace(raw))
	if len(s) > 24 {
		s = s[:24] + "..."
	}
	return s
}

// ranged reads an optional number field within [lo, hi] (lo excluded when loOpen), or returns def.
func (p *seqParser) ranged(m map[string]json.RawMessage, step int, field string, def, lo, hi float64, loOpen bool) (float64, error) {
	raw, ok := m[field]
	if !ok {
		return def, nil
	}
	v, err := p.number(raw, step, field)
	if err != nil {
		return 0, err
	}
	if loOpen && v <= lo {
		return 0, p.fail(step, field, "must be above %g (got %g)", lo, v)
	}
	if !loOpen && v < lo {
		return 0, p.fail(step, field, "must be at least %g (got %g)", lo, v)
	}
	if v > hi {
		return 0, p.fail(step, field, "must be at most %g (got %g)", hi, v)
	}
	return v, nil
}

// seqAlloyFields are an alloy's required fields; low_cycle_b is optional (DefaultLowCycleB) and
// cycles_above_limit, of older files, is read and set aside with a note.
var seqAlloyFields = []string{"elastic_modulus_gpa", "shear_ultimate_mpa", "recoverable_strain",
	"strain_life_c", "strain_life_b"}

func (p *seqParser) alloys(raw []byte, seq *Sequence) (map[string]Alloy, error) {
	m, err := p.object(raw, 0, "alloys")
	if err != nil {
		return nil, err
	}
	names := make([]string, 0, len(m))
	for k := range m {
		names = append(names, k)
	}
	sort.Strings(names)
	out := make(map[string]Alloy, len(m))
	for _, name := range names {
		where := fmt.Sprintf("alloys: %q", name)
		if strings.TrimSpace(name) == "" {
			return nil, p.fail(0, where, "an alloy needs a name")
		}
		fields, err := p.object(m[name], 0, where)
		if err != nil {
			return nil, err
		}
		if err := p.unknownFields(fields, 0, where, append(seqAlloyFields, "low_cycle_b", "cycles_above_limit")...); err != nil {
			return nil, err
		}
		vals := make([]float64, len(seqAlloyFields))
		for i, f := range seqAlloyFields {
			rf, ok := fields[f]
			if !ok {
				return nil, p.fail(0, where+": "+f, "missing")
			}
			if vals[i], err = p.number(rf, 0, where+": "+f); err != nil {
				return nil, err
			}
		}
		a := Alloy{Name: name, ElasticModulusGPa: vals[0], ShearUltimateMPa: vals[1], RecoverableStrain: vals[2],
			StrainLifeC: vals[3], StrainLifeB: vals[4], LowCycleB: DefaultLowCycleB}
		if rf, ok := fields["low_cycle_b"]; ok {
			if a.LowCycleB, err = p.number(rf, 0, where+": low_cycle_b"); err != nil {
				return nil, err
			}
		}
		if rf, ok := fields["cycles_above_limit"]; ok {
			if _, err := p.number(rf, 0, where+": cycles_above_limit"); err != nil {
				return nil, err
			}
			seq.Warnings = append(seq.Warnings, fmt.Sprintf("%s: %s: %s (%g here)", p.file, where, LegacyCyclesAboveLimitNote, a.LowCycleB))
		}
		if field, msg := a.invalidField(); field != "" {
			return nil, p.fail(0, where+": "+field, "%s", msg)
		}
		out[name] = a
	}
	return out, nil
}

var seqStepFields = []string{"size", "taper", "tapers", "depth", "rpm", "peck_mm", "retract_mm", "advance_mm_s",
	"torque_limit_ncm", "alloy", "section", "cutting_length", "max_flute_d"}

func (p *seqParser) step(raw []byte, n int, seq *Sequence) (Step, error) {
	m, err := p.object(raw, n, "")
	if err != nil {
		return Step{}, err
	}
	if err := p.unknownFields(m, n, "", seqStepFields...); err != nil {
		return Step{}, err
	}
	var in Instrument

	// size: required, a whole number.
	rs, ok := m["size"]
	if !ok {
		return Step{}, p.fail(n, "size", "missing (the ISO size, e.g. 25)")
	}
	size, err := p.number(rs, n, "size")
	if err != nil {
		return Step{}, err
	}
	if size != math.Trunc(size) {
		return Step{}, p.fail(n, "size", "must be a whole number (got %g)", size)
	}
	if size <= 0 || size > maxStepSize {
		return Step{}, p.fail(n, "size", "must be from 1 to %d (got %g)", maxStepSize, size)
	}
	in.Size = int(size)
	if !IsISOSize(in.Size) {
		seq.Warnings = append(seq.Warnings, fmt.Sprintf("%s: step %d: size %d is not on the ISO 3630-1 size list",
			p.file, n, in.Size))
	}

	// taper and/or tapers: at least one.
	rt, hasTaper := m["taper"]
	rts, hasTapers := m["tapers"]
	if !hasTaper && !hasTapers {
		return Step{}, p.fail(n, "taper", "missing (a taper such as 0.04, or tapers)")
	}
	if hasTaper {
		if in.Taper, err = p.number(rt, n, "taper"); err != nil {
			return Step{}, err
		}
		if err := checkStepTaper(in.Taper); err != "" {
			return Step{}, p.fail(n, "taper", "%s", err)
		}
	}
	if hasTapers {
		if in.Tapers, err = p.tapers(rts, n); err != nil {
			return Step{}, err
		}
		tip := in.Tapers[0].Taper
		if hasTaper && in.Taper != tip {
			return Step{}, p.fail(n, "taper", "%g differs from the tip taper %g given in tapers", in.Taper, tip)
		}
		in.Taper = tip
	}

	// depth: required.
	rd, ok := m["depth"]
	if !ok {
		return Step{}, p.fail(n, "depth", "missing (mm from the orifice, or WL, WL-1.5, WL+0.5)")
	}
	var depth Depth
	if err := depth.UnmarshalJSON(rd); err != nil {
		return Step{}, p.fail(n, "depth", "%v", err)
	}

	st := Step{Depth: depth}
	if st.RPM, err = p.ranged(m, n, "rpm", DefaultRPM, 0, maxRPM, true); err != nil {
		return Step{}, err
	}
	if st.PeckMM, err = p.ranged(m, n, "peck_mm", DefaultPeckMM, minPeckMM, maxStrokeMM, false); err != nil {
		return Step{}, err
	}
	if st.RetractMM, err = p.ranged(m, n, "retract_mm", DefaultRetractMM, 0, maxStrokeMM, false); err != nil {
		return Step{}, err
	}
	if st.AdvanceMMs, err = p.ranged(m, n, "advance_mm_s", DefaultAdvanceMMs, minAdvanceMMs, maxAdvanceMMs, false); err != nil {
		return Step{}, err
	}
	if st.TorqueLimitNcm, err = p.ranged(m, n, "torque_limit_ncm", 0, 0, maxTorqueNcm, false); err != nil {
		return Step{}, err
	}

	st.AlloyName = AlloyNiTiSuperelastic
	if ra, ok := m["alloy"]; ok {
		if st.AlloyName, err = p.str(ra, n, "alloy"); err != nil {
			return Step{}, err
		}
	}
	alloy, ok := seq.Alloy(st.AlloyName)
	if !ok {
		return Step{}, p.fail(n, "alloy", "unknown alloy %q (known: %s)", st.AlloyName, strings.Join(knownAlloyNames(seq), ", "))
	}
	in.Alloy = alloy

	st.SectionName = SectionRound
	if rs, ok := m["section"]; ok {
		if st.SectionName, err = p.str(rs, n, "section"); err != nil {
			return Step{}, err
		}
	}
	if in.Section, err = SectionByName(st.SectionName); err != nil {
		return Step{}, p.fail(n, "section", "%v", err)
	}

	if in.CuttingLength, err = p.ranged(m, n, "cutting_length", DefaultCuttingLength, 0, maxStrokeMM, true); err != nil {
		return Step{}, err
	}
	if in.MaxFluteD, err = p.ranged(m, n, "max_flute_d", DefaultMaxFluteFor(in.Size), 0, maxFluteDMM, true); err != nil {
		return Step{}, err
	}
	if in.MaxFluteD < in.TipDiameter() {
		return Step{}, p.fail(n, "max_flute_d", "%g mm is below the tip diameter %g mm", in.MaxFluteD, in.TipDiameter())
	}
	st.Instrument = in
	return st, nil
}

func checkStepTaper(t float64) string {
	switch {
	case t <= 0:
		return fmt.Sprintf("must be above 0 (got %g)", t)
	case t > maxTaper:
		return fmt.Sprintf("must be at most %g mm per mm (got %g)", maxTaper, t)
	}
	return ""
}

// tapers reads [[u, taper], ...]: u from 0 at the tip, strictly increasing.
func (p *seqParser) tapers(raw []byte, n int) ([]TaperSegment, error) {
	var rows []json.RawMessage
	if !seqStartsWith(raw, '[') || json.Unmarshal(raw, &rows) != nil {
		return nil, p.fail(n, "tapers", "must be a list of [mm from tip, taper] pairs")
	}
	if len(rows) == 0 {
		return nil, p.fail(n, "tapers", "must list at least one [mm from tip, taper] pair")
	}
	if len(rows) > maxTaperSegments {
		return nil, p.fail(n, "tapers", "more than %d segments", maxTaperSegments)
	}
	out := make([]TaperSegment, 0, len(rows))
	for i, r := range rows {
		field := fmt.Sprintf("tapers[%d]", i)
		var pair []float64
		if !seqStartsWith(r, '[') || json.Unmarshal(r, &pair) != nil || len(pair) != 2 {
			return nil, p.fail(n, field, "must be a pair [mm from tip, taper], not %s", seqClip(r))
		}
		u, t := pair[0], pair[1]
		switch {
		case i == 0 && u != 0:
			return nil, p.fail(n, field, "the first segment must start at the tip (0), not %g", u)
		case i > 0 && u <= out[i-1].FromTip:
			return nil, p.fail(n, field, "starts at %g mm, not after the previous segment's %g mm", u, out[i-1].FromTip)
		case u > maxStrokeMM:
			return nil, p.fail(n, field, "starts at %g mm, more than %g mm from the tip", u, maxStrokeMM)
		}
		if msg := checkStepTaper(t); msg != "" {
			return nil, p.fail(n, field, "taper %s", msg)
		}
		out = append(out, TaperSegment{FromTip: u, Taper: t})
	}
	return out, nil
}

func knownAlloyNames(seq *Sequence) []string {
	var names []string
	for _, a := range builtinAlloys {
		names = append(names, a.Name)
	}
	for k := range seq.Alloys {
		if _, builtin := BuiltinAlloy(k); !builtin {
			names = append(names, k)
		}
	}
	sort.Strings(names)
	return names
}

// The written form: the same schema ParseSequence reads, every step field spelt out.
type sequenceJSON struct {
	PathModel string           `json:"path_model,omitempty"`
	Alloys    map[string]Alloy `json:"alloys,omitempty"`
	Steps     []stepJSON       `json:"steps"`
}

type stepJSON struct {
	Size           int          `json:"size"`
	Taper          float64      `json:"taper"`
	Tapers         [][2]float64 `json:"tapers,omitempty"`
	Depth          Depth        `json:"depth"`
	RPM            float64      `json:"rpm"`
	PeckMM         float64      `json:"peck_mm"`
	RetractMM      float64      `json:"retract_mm"`
	AdvanceMMs     float64      `json:"advance_mm_s"`
	TorqueLimitNcm float64      `json:"torque_limit_ncm,omitempty"`
	Alloy          string       `json:"alloy"`
	Section        string       `json:"section"`
	CuttingLength  float64      `json:"cutting_length"`
	MaxFluteD      float64      `json:"max_flute_d"`
}

// MarshalJSON writes the sequence in the schema ParseSequence reads, so that a planned sequence
// can be saved and read again. A step whose alloy is neither in Alloys nor an unchanged built-in
// has its alloy written into "alloys".
func (s *Sequence) MarshalJSON() ([]byte, error) {
	out := sequenceJSON{PathModel: s.PathModel, Steps: make([]stepJSON, 0, len(s.Steps))}
	alloys := make(map[string]Alloy, len(s.Alloys))
	for k, a := range s.Alloys {
		alloys[k] = a
	}
	for i, st := range s.Steps {
		in := st.Instrument
		j := stepJSON{Size: in.Size, Taper: in.Taper, Depth: st.Depth, RPM: st.RPM, PeckMM: st.PeckMM,
			RetractMM: st.RetractMM, AdvanceMMs: st.AdvanceMMs, TorqueLimitNcm: st.TorqueLimitNcm,
			Alloy: st.AlloyName, Section: st.SectionName, CuttingLength: in.CuttingLength, MaxFluteD: in.MaxFluteD}
		if len(in.Tapers) > 0 {
			j.Taper = in.Tapers[0].Taper
			for _, seg := range in.Tapers {
				j.Tapers = append(j.Tapers, [2]float64{seg.FromTip, seg.Taper})
			}
		}
		if j.Alloy == "" {
			j.Alloy = in.Alloy.Name
		}
		if j.Alloy == "" {
			return nil, fmt.Errorf("step %d: no alloy name", i+1)
		}
		if _, listed := alloys[j.Alloy]; !listed && in.Alloy.Name == j.Alloy {
			if b, ok := BuiltinAlloy(j.Alloy); !ok || !sameAlloyParams(b, in.Alloy) {
				alloys[j.Alloy] = in.Alloy
			}
		}
		if j.Section == "" {
			j.Section = in.Section.Name
		}
		if j.Section == "" {
			j.Section = SectionRound
		}
		out.Steps = append(out.Steps, j)
	}
	if len(alloys) > 0 {
		out.Alloys = alloys
	}
	return json.MarshalIndent(out, "", "  ")
}

func sameAlloyParams(a, b Alloy) bool {
	return a.ElasticModulusGPa == b.ElasticModulusGPa && a.ShearUltimateMPa == b.ShearUltimateMPa &&
		a.RecoverableStrain == b.RecoverableStrain && a.StrainLifeC == b.StrainLifeC &&
		a.StrainLifeB == b.StrainLifeB && a.LowCycleB == b.LowCycleB
}
