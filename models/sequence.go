package models

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"tapersweep/mesh"
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
	// legacyNotes are what reading found of older files' fields (cycles_above_limit).
	legacyNotes []string
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
	// MaxSteps is the most steps a sequence may hold: far more files than go into one canal,
	// and few enough that a sequence runs in seconds and a few hundred MB.
	MaxSteps         = 100
	maxStepSize      = 999
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

// SequenceError is a problem in a sequence file (or an instruments file, whose entries are
// numbered as instruments). Step counts from 1 (0: not in a step); Line and Column are set for
// broken JSON and for a field given twice.
type SequenceError struct {
	File         string
	Line, Column int
	Item         string // what Step counts: "step" (the default) or "instrument"
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
		item := e.Item
		if item == "" {
			item = "step"
		}
		fmt.Fprintf(&b, "%s %d: ", item, e.Step)
	}
	if e.Field != "" {
		b.WriteString(e.Field)
		b.WriteString(": ")
	}
	b.WriteString(e.Msg)
	return b.String()
}

// sequenceJSON is the sequence file: the schema ParseSequence reads and MarshalJSON writes.
// The json tags are the one list of its fields (README, "Sequence files").
type sequenceJSON struct {
	PathModel *string              `json:"path_model,omitempty"`
	Alloys    map[string]alloyJSON `json:"alloys,omitempty"`
	Steps     []stepJSON           `json:"steps" doc:"a list of steps is required"`
}

// stepJSON is one step of a sequence file. Fields marked use:"step" say how the file is used;
// the others describe the file itself and make up an entry of an instruments file.
type stepJSON struct {
	Size           *float64    `json:"size" doc:"the ISO size, e.g. 25"`
	Taper          *float64    `json:"taper,omitempty"`
	Tapers         [][]float64 `json:"tapers,omitempty"`
	Depth          *Depth      `json:"depth,omitempty" use:"step"`
	RPM            *float64    `json:"rpm,omitempty" use:"step"`
	PeckMM         *float64    `json:"peck_mm,omitempty" use:"step"`
	RetractMM      *float64    `json:"retract_mm,omitempty" use:"step"`
	AdvanceMMs     *float64    `json:"advance_mm_s,omitempty" use:"step"`
	TorqueLimitNcm *float64    `json:"torque_limit_ncm,omitempty" use:"step"`
	Alloy          *string     `json:"alloy,omitempty"`
	Section        *string     `json:"section,omitempty"`
	CuttingLength  *float64    `json:"cutting_length,omitempty"`
	MaxFluteD      *float64    `json:"max_flute_d,omitempty"`
}

// LoadSequence reads and checks a sequence file.
func LoadSequence(path string) (*Sequence, error) {
	data, err := readInput(path, maxSequenceBytes)
	if err == errTooLarge {
		return nil, &SequenceError{File: path, Msg: fmt.Sprintf("larger than %d MB: not a sequence file", maxSequenceBytes>>20)}
	}
	if err != nil {
		return nil, err
	}
	return ParseSequence(path, data)
}

var errTooLarge = errors.New("larger than a file of this kind can be")

// readInput reads a file a person wrote: a regular file (a pipe or a device is refused, not
// waited on), of at most limit bytes (errTooLarge, unread beyond). Other errors name the file.
func readInput(path string, limit int64) ([]byte, error) {
	f, _, err := mesh.OpenInput(path, 0)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	data, err := io.ReadAll(io.LimitReader(f, limit+1))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if int64(len(data)) > limit {
		return nil, errTooLarge
	}
	return data, nil
}

// ParseSequence reads a sequence from JSON. Unknown fields, fields given twice, missing required
// fields and values out of range are errors naming the file, the step (from 1) and the field; a
// size off the ISO list or an unusually steep taper is a warning.
func ParseSequence(name string, data []byte) (*Sequence, error) {
	var f sequenceJSON
	if err := decodeJSON(data, &f); err != nil {
		return nil, listProblem(name, "step", "steps", err)
	}
	seq := &Sequence{PathModel: PathCentred, Name: name}
	if f.PathModel != nil {
		seq.PathModel = *f.PathModel
	}
	if err := seq.validatePathModel(); err != nil {
		return nil, err
	}
	if err := seq.takeAlloys(f.Alloys); err != nil {
		return nil, err
	}
	if len(f.Steps) == 0 {
		return nil, seq.fail(0, "steps", "must list at least one step")
	}
	if len(f.Steps) > MaxSteps {
		return nil, seq.fail(0, "steps", "%d steps, more than the %d a sequence may hold", len(f.Steps), MaxSteps)
	}
	seq.Steps = make([]Step, 0, len(f.Steps))
	for i, sj := range f.Steps {
		st, err := sj.step(seq, i+1)
		if err != nil {
			return nil, err
		}
		seq.Steps = append(seq.Steps, st)
	}
	seq.Warnings = seq.Notes()
	return seq, nil
}

// takeAlloys adds a file's alloys, each checked and named by its key.
func (s *Sequence) takeAlloys(alloys map[string]alloyJSON) error {
	names := make([]string, 0, len(alloys))
	for k := range alloys {
		names = append(names, k)
	}
	sort.Strings(names)
	for _, k := range names {
		a, legacy := alloys[k].alloy(k)
		if legacy {
			s.legacyNotes = append(s.legacyNotes, fmt.Sprintf("%s: alloys: %q: %s (%g here)", s.file(), k, LegacyCyclesAboveLimitNote, a.LowCycleB))
		}
		if err := s.checkAlloy(a); err != nil {
			return err
		}
		if s.Alloys == nil {
			s.Alloys = map[string]Alloy{}
		}
		s.Alloys[k] = a
	}
	return nil
}

func (s *Sequence) checkAlloy(a Alloy) error {
	where := fmt.Sprintf("alloys: %q", a.Name)
	if strings.TrimSpace(a.Name) == "" {
		return s.fail(0, where, "an alloy needs a name")
	}
	if field, msg := a.invalidField(); field != "" {
		return s.fail(0, where+": "+field, "%s", msg)
	}
	return nil
}

func (s *Sequence) validatePathModel() error {
	if s.PathModel != PathCentred && s.PathModel != PathElastic {
		return s.fail(0, "path_model", "want %q or %q, not %q", PathCentred, PathElastic, s.PathModel)
	}
	return nil
}

// Validate checks a sequence built or changed in code with the rules and messages of the file:
// the path model, the file's alloys, and every step's numbers.
func (s *Sequence) Validate() error {
	if err := s.validatePathModel(); err != nil {
		return err
	}
	names := make([]string, 0, len(s.Alloys))
	for k := range s.Alloys {
		names = append(names, k)
	}
	sort.Strings(names)
	for _, k := range names {
		a := s.Alloys[k]
		a.Name = k
		if err := s.checkAlloy(a); err != nil {
			return err
		}
	}
	if len(s.Steps) == 0 {
		return s.fail(0, "steps", "must list at least one step")
	}
	if len(s.Steps) > MaxSteps {
		return s.fail(0, "steps", "%d steps, more than the %d a sequence may hold", len(s.Steps), MaxSteps)
	}
	for i, st := range s.Steps {
		if err := s.validateStep(st, i+1); err != nil {
			return err
		}
	}
	return nil
}

// Notes are the sequence's plausibility warnings: sizes off the ISO list, tapers steeper than
// files are made.
func (s *Sequence) Notes() []string {
	out := append([]string(nil), s.legacyNotes...)
	for i, st := range s.Steps {
		out = append(out, instrumentNotes(s.file(), "step", i+1, st.Instrument)...)
	}
	return out
}

// instrumentNotes are the warnings about one file of a sequence or an instruments list.
func instrumentNotes(file, item string, n int, in Instrument) []string {
	var out []string
	if !IsISOSize(in.Size) {
		out = append(out, fmt.Sprintf("%s: %s %d: size %d is not on the ISO 3630-1 size list", file, item, n, in.Size))
	}
	steepest := in.Taper
	for _, t := range in.Tapers {
		steepest = max(steepest, t.Taper)
	}
	if steepest > CommonMaxTaper {
		out = append(out, fmt.Sprintf("%s: %s %d: taper %g is steeper than the %s files are made with; "+
			"a taper is mm per mm (.06 is written 0.06)", file, item, n, steepest, TaperLabel(CommonMaxTaper)))
	}
	return out
}

func (s *Sequence) file() string {
	if s.Name == "" {
		return "sequence"
	}
	return s.Name
}

func (s *Sequence) fail(step int, field, format string, args ...any) error {
	return &SequenceError{File: s.file(), Step: step, Field: field, Msg: fmt.Sprintf(format, args...)}
}

// step turns a step of the file into a Step: required fields, defaults, the alloy and section
// by name; then checks it as Validate does.
func (j stepJSON) step(seq *Sequence, n int) (Step, error) {
	in, err := j.instrument(seq, n)
	if err != nil {
		return Step{}, err
	}
	if j.Depth == nil {
		return Step{}, seq.fail(n, "depth", "missing (mm from the orifice, or WL, WL-1.5, WL+0.5)")
	}
	st := Step{Instrument: in, Depth: *j.Depth, RPM: orDefault(j.RPM, DefaultRPM), PeckMM: orDefault(j.PeckMM, DefaultPeckMM),
		RetractMM: orDefault(j.RetractMM, DefaultRetractMM), AdvanceMMs: orDefault(j.AdvanceMMs, DefaultAdvanceMMs),
		TorqueLimitNcm: orDefault(j.TorqueLimitNcm, 0), AlloyName: in.Alloy.Name, SectionName: in.Section.Name}
	if err := seq.validateStep(st, n); err != nil {
		return Step{}, err
	}
	return st, nil
}

// instrument reads the fields that describe the file itself.
func (j stepJSON) instrument(seq *Sequence, n int) (Instrument, error) {
	var in Instrument
	size := *j.Size // required: the walk has checked it is there
	if size != math.Trunc(size) {
		return in, seq.fail(n, "size", "must be a whole number (got %g)", size)
	}
	if size <= 0 || size > maxStepSize {
		return in, seq.fail(n, "size", "must be from 1 to %d (got %g)", maxStepSize, size)
	}
	in.Size = int(size)
	if j.Taper == nil && j.Tapers == nil {
		return in, seq.fail(n, "taper", "missing (a taper such as 0.04, or tapers)")
	}
	if j.Taper != nil {
		in.Taper = *j.Taper
		if msg := checkTaper(in.Taper); msg != "" {
			return in, seq.fail(n, "taper", "%s", msg)
		}
	}
	if j.Tapers != nil {
		if len(j.Tapers) == 0 {
			return in, seq.fail(n, "tapers", "must list at least one [mm from tip, taper] pair")
		}
		if len(j.Tapers) > maxTaperSegments {
			return in, seq.fail(n, "tapers", "more than %d segments", maxTaperSegments)
		}
		for i, pair := range j.Tapers {
			if len(pair) != 2 {
				return in, seq.fail(n, fmt.Sprintf("tapers[%d]", i), "must be a pair [mm from tip, taper], not %s", numberList(pair))
			}
			in.Tapers = append(in.Tapers, TaperSegment{FromTip: pair[0], Taper: pair[1]})
		}
		if msg, at := checkTapers(in.Tapers); msg != "" {
			return in, seq.fail(n, fmt.Sprintf("tapers[%d]", at), "%s", msg)
		}
		tip := in.Tapers[0].Taper
		if j.Taper != nil && in.Taper != tip {
			return in, seq.fail(n, "taper", "%g differs from the tip taper %g given in tapers", in.Taper, tip)
		}
		in.Taper = tip
	}
	alloyName := AlloyNiTiSuperelastic
	if j.Alloy != nil {
		alloyName = *j.Alloy
	}
	alloy, ok := seq.Alloy(alloyName)
	if !ok {
		return in, seq.fail(n, "alloy", "unknown alloy %q (known: %s)", alloyName, strings.Join(knownAlloyNames(seq), ", "))
	}
	in.Alloy = alloy
	sectionName := SectionRound
	if j.Section != nil {
		sectionName = *j.Section
	}
	sec, err := SectionByName(sectionName)
	if err != nil {
		return in, seq.fail(n, "section", "%v", err)
	}
	in.Section = sec
	in.CuttingLength = orDefault(j.CuttingLength, DefaultCuttingLength)
	in.MaxFluteD = orDefault(j.MaxFluteD, DefaultMaxFluteFor(in.Size))
	return in, nil
}

func orDefault(v *float64, def float64) float64 {
	if v == nil {
		return def
	}
	return *v
}

// numberList writes numbers as a JSON list, for messages.
func numberList(v []float64) string {
	parts := make([]string, len(v))
	for i, x := range v {
		parts[i] = strconv.FormatFloat(x, 'g', -1, 64)
	}
	return "[" + strings.Join(parts, ", ") + "]"
}

// validateStep checks a step's numbers in the order the file lists them.
func (s *Sequence) validateStep(st Step, n int) error {
	in := st.Instrument
	if in.Size <= 0 || in.Size > maxStepSize {
		return s.fail(n, "size", "must be from 1 to %d (got %d)", maxStepSize, in.Size)
	}
	if len(in.Tapers) == 0 {
		if msg := checkTaper(in.Taper); msg != "" {
			return s.fail(n, "taper", "%s", msg)
		}
	} else if msg, at := checkTapers(in.Tapers); msg != "" {
		return s.fail(n, fmt.Sprintf("tapers[%d]", at), "%s", msg)
	}
	if err := st.Depth.Validate(); err != nil {
		return s.fail(n, "depth", "%v", err)
	}
	for _, r := range []struct {
		field   string
		v       float64
		lo, hi  float64
		openLow bool
	}{
		{"rpm", st.RPM, 0, maxRPM, true},
		{"peck_mm", st.PeckMM, minPeckMM, maxStrokeMM, false},
		{"retract_mm", st.RetractMM, 0, maxStrokeMM, false},
		{"advance_mm_s", st.AdvanceMMs, minAdvanceMMs, maxAdvanceMMs, false},
		{"torque_limit_ncm", st.TorqueLimitNcm, 0, maxTorqueNcm, false},
	} {
		if msg := checkRange(r.v, r.lo, r.hi, r.openLow); msg != "" {
			return s.fail(n, r.field, "%s", msg)
		}
	}
	// The alloy by its name: the file's own or a built-in, or the step's own alloy, which
	// MarshalJSON writes into "alloys".
	name := st.AlloyName
	if name == "" {
		name = in.Alloy.Name
	}
	if _, known := s.Alloy(name); !known && in.Alloy.Name != name {
		return s.fail(n, "alloy", "unknown alloy %q (known: %s)", name, strings.Join(knownAlloyNames(s), ", "))
	}
	if err := in.Alloy.Validate(); err != nil {
		return s.fail(n, "alloy", "%q: %v", in.Alloy.Name, err)
	}
	if in.Section.kind() == "" {
		_, err := SectionByName(in.Section.Name)
		return s.fail(n, "section", "%v", err)
	}
	return checkFileLengths(in, func(field, format string, args ...any) error { return s.fail(n, field, format, args...) })
}

// checkFileLengths checks the cutting length and the flute cap of a file.
func checkFileLengths(in Instrument, fail func(field, format string, args ...any) error) error {
	if msg := checkRange(in.CuttingLength, 0, maxStrokeMM, true); msg != "" {
		return fail("cutting_length", "%s", msg)
	}
	if msg := checkRange(in.MaxFluteD, 0, maxFluteDMM, true); msg != "" {
		return fail("max_flute_d", "%s", msg)
	}
	if in.MaxFluteD < in.TipDiameter() {
		return fail("max_flute_d", "%g mm is below the tip diameter %g mm", in.MaxFluteD, in.TipDiameter())
	}
	return nil
}

// checkRange words a number outside [lo, hi] (lo excluded when openLow).
func checkRange(v, lo, hi float64, openLow bool) string {
	switch {
	case math.IsNaN(v) || math.IsInf(v, 0):
		return "must be a finite number"
	case openLow && v <= lo:
		return fmt.Sprintf("must be above %g (got %g)", lo, v)
	case !openLow && v < lo:
		return fmt.Sprintf("must be at least %g (got %g)", lo, v)
	case v > hi:
		return fmt.Sprintf("must be at most %g (got %g)", hi, v)
	}
	return ""
}

// checkTaper words a taper no file has.
func checkTaper(t float64) string {
	switch {
	case math.IsNaN(t) || math.IsInf(t, 0):
		return "must be a finite number"
	case t <= 0:
		return fmt.Sprintf("must be above 0 (got %g)", t)
	case t > MaxTaper:
		return fmt.Sprintf("must be at most %g mm per mm (got %g): no file is made that steep; .06 is written 0.06", MaxTaper, t)
	}
	return ""
}

// checkTapers checks [u, taper] segments: u from 0 at the tip, strictly increasing; at is the
// segment at fault.
func checkTapers(segs []TaperSegment) (msg string, at int) {
	if len(segs) > maxTaperSegments {
		return fmt.Sprintf("more than %d segments", maxTaperSegments), maxTaperSegments
	}
	for i, seg := range segs {
		u := seg.FromTip
		switch {
		case math.IsNaN(u) || math.IsInf(u, 0):
			return "must be a finite number", i
		case i == 0 && u != 0:
			return fmt.Sprintf("the first segment must start at the tip (0), not %g", u), i
		case i > 0 && u <= segs[i-1].FromTip:
			return fmt.Sprintf("starts at %g mm, not after the previous segment's %g mm", u, segs[i-1].FromTip), i
		case u > maxStrokeMM:
			return fmt.Sprintf("starts at %g mm, more than %g mm from the tip", u, maxStrokeMM), i
		}
		if m := checkTaper(seg.Taper); m != "" {
			return "taper " + m, i
		}
	}
	return "", 0
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
	if !(canalLength > 0) || math.IsInf(canalLength, 0) {
		return s.fail(0, "", "canal length %g mm is not usable", canalLength)
	}
	if !(wl > 0) || math.IsInf(wl, 0) {
		return s.fail(0, "", "working length %g mm is not usable", wl)
	}
	for i, st := range s.Steps {
		d := st.Depth.Resolve(wl)
		switch {
		case math.IsNaN(d) || d <= 0:
			return s.fail(i+1, "depth", "%s resolves to %.2f mm, not below the orifice", st.Depth, d)
		case d > canalLength+LengthTolerance:
			return s.fail(i+1, "depth", "%s reaches %.2f mm from the orifice, beyond the canal's apical end at %.2f mm",
				st.Depth, d, canalLength)
		}
	}
	return nil
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

// MarshalJSON writes the sequence in the schema ParseSequence reads, so that a planned sequence
// can be saved and read again. A step whose alloy is neither in Alloys nor an unchanged built-in
// has its alloy written into "alloys".
func (s *Sequence) MarshalJSON() ([]byte, error) {
	out := sequenceJSON{Steps: make([]stepJSON, 0, len(s.Steps))}
	if s.PathModel != "" {
		out.PathModel = &s.PathModel
	}
	alloys := make(map[string]alloyJSON, len(s.Alloys))
	for k, a := range s.Alloys {
		alloys[k] = a.fileForm()
	}
	num := func(v float64) *float64 { return &v }
	str := func(v string) *string { return &v }
	for i, st := range s.Steps {
		in := st.Instrument
		depth := st.Depth
		j := stepJSON{Size: num(float64(in.Size)), Taper: num(in.Taper), Depth: &depth, RPM: num(st.RPM),
			PeckMM: num(st.PeckMM), RetractMM: num(st.RetractMM), AdvanceMMs: num(st.AdvanceMMs),
			CuttingLength: num(in.CuttingLength), MaxFluteD: num(in.MaxFluteD)}
		if st.TorqueLimitNcm != 0 {
			j.TorqueLimitNcm = num(st.TorqueLimitNcm)
		}
		if len(in.Tapers) > 0 {
			j.Taper = num(in.Tapers[0].Taper)
			for _, seg := range in.Tapers {
				j.Tapers = append(j.Tapers, []float64{seg.FromTip, seg.Taper})
			}
		}
		alloy := st.AlloyName
		if alloy == "" {
			alloy = in.Alloy.Name
		}
		if alloy == "" {
			return nil, fmt.Errorf("step %d: no alloy name", i+1)
		}
		j.Alloy = str(alloy)
		if _, listed := alloys[alloy]; !listed && in.Alloy.Name == alloy {
			if b, ok := BuiltinAlloy(alloy); !ok || !sameAlloyParams(b, in.Alloy) {
				alloys[alloy] = in.Alloy.fileForm()
			}
		}
		section := st.SectionName
		if section == "" {
			section = in.Section.Name
		}
		if section == "" {
			section = SectionRound
		}
		j.Section = str(section)
		out.Steps = append(out.Steps, j)
	}
	if len(alloys) > 0 {
		out.Alloys = alloys
	}
	return json.MarshalIndent(out, "", "  ")
}

func sameAlloyParams(a, b Alloy) bool {
	a.Name, a.Illustrative, b.Name, b.Illustrative = "", false, "", false
	return a == b
}

// listProblem words a problem of a file whose entries are numbered items (the steps of a
// sequence under "steps", the entries of an instruments file under "instruments" or at the top).
func listProblem(file, item, listKey string, err error) error {
	p, ok := err.(*jsonProblem)
	if !ok {
		return &SequenceError{File: file, Msg: err.Error()}
	}
	e := &SequenceError{File: file, Item: item}
	path := p.path
	// The item the problem lies in, and the path inside it.
	if listKey != "" && len(path) >= 2 && path[0] == listKey {
		path = path[1:]
	}
	if listKey == "" || len(p.path) >= 2 && p.path[0] == listKey {
		if len(path) > 0 {
			if i, isItem := path[0].(int); isItem {
				e.Step, path = i+1, path[1:]
			}
		}
	}
	where := fieldWords(path)
	join := func(a, b string) string {
		if a == "" {
			return b
		}
		return a + ": " + b
	}
	if line, col, msg, ok := p.fileWords(); ok {
		e.Line, e.Column, e.Msg = line, col, msg
		return e
	}
	switch p.kind {
	case jsonUnknown:
		e.Field, e.Msg = join(where, strconv.Quote(p.key)), "unknown field (known: "+strings.Join(p.known, ", ")+")"
	case jsonRepeated:
		e.Line, e.Column = p.line, p.col
		e.Field, e.Msg = join(where, strconv.Quote(p.key)), fmt.Sprintf("given twice (first on line %d); a field may appear once", p.firstLine)
	case jsonMissing:
		e.Field, e.Msg = join(where, p.key), "missing"
		if p.doc != "" {
			e.Msg += " (" + p.doc + ")"
		}
	case jsonBadValue:
		e.Field, e.Msg = where, p.err.Error()
	case jsonWrongKind:
		e.Field = where
		switch {
		case len(p.path) == 0:
			e.Msg = "the top level must be a JSON object with \"" + listKey + "\""
		case len(p.path) == 1 && p.path[0] == listKey:
			e.Msg = "must be a list of " + listKey
		case e.Step > 0 && len(path) == 0:
			e.Msg = "must be a JSON object"
		case len(path) == 1 && path[0] == "tapers":
			e.Msg = "must be a list of [mm from tip, taper] pairs"
		case len(path) >= 2 && path[0] == "tapers":
			e.Msg = "must be a pair [mm from tip, taper], not " + p.got
		case p.want == "object":
			e.Msg = "must be a JSON object"
		default:
			e.Msg = "must be a " + p.want + ", not " + p.got
		}
	}
	return e
}

// fieldWords names a place inside a sequence or one of its steps as the messages do:
// rpm, tapers[1], alloys: "x": strain_life_b.
func fieldWords(path []any) string {
	var parts []string
	for i := 0; i < len(path); i++ {
		switch e := path[i].(type) {
		case string:
			if e == "tapers" && i+1 < len(path) {
				parts = append(parts, fmt.Sprintf("tapers[%d]", path[i+1]))
				return strings.Join(parts, ": ")
			}
			if i > 0 && path[0] == "alloys" && i == 1 {
				e = strconv.Quote(e)
			}
			parts = append(parts, e)
		case int:
			parts = append(parts, fmt.Sprintf("[%d]", e))
		}
	}
	return strings.Join(parts, ": ")
}
