package analysis

import (
	"strconv"
	"strings"

	"tapersweep/models"
)

// Column is one per-step figure as every output states it: its name in the JSON and the CSV,
// its words for a person, how many decimals the JSON and the CSV keep and how many a person is
// shown. The JSON's rounding, the CSV, the report, the terminal tables, the window's table and
// the planner's comparison all read the figures through these columns, so a new figure is added
// here once (see DEVELOPERS.md, "Where a change goes").
type Column struct {
	// Key names the CSV column: the JSON field, with keyed objects spelt out
	// (transportation_mm["1"] is transportation_1_mm).
	Key string
	// Label is the figure in plain words with its unit, for the report.
	Label string
	// Heading is a short heading for narrow tables; a "\n" marks where it may break.
	Heading string
	// Unit is the figure's unit ("" for counts, ratios and text).
	Unit string
	// Digits is the number of decimals the JSON and the CSV keep; -1 keeps the value as given.
	Digits int
	// Shown is the number of decimals shown to a person in tables.
	Shown int
	// ShownUpTo, when above 0, is the largest value a person is shown as a number; above it
	// tables say "over ShownUpTo" (a ratio over a load near zero only says "far from it").
	ShownUpTo float64

	get  func(m *StepMetrics) (float64, bool) // numbers: the value and whether it exists
	set  func(m *StepMetrics, v float64)      // numbers: store the rounded value
	text func(m *StepMetrics, sep string) string
}

// IsNumber reports whether the column holds a number (else text: the step, the file, advice).
func (c Column) IsNumber() bool { return c.get != nil }

// Value returns the column's number for a step; ok is false for text columns and for values
// that do not exist (null in the JSON).
func (c Column) Value(m StepMetrics) (v float64, ok bool) {
	if c.get == nil {
		return 0, false
	}
	return c.get(&m)
}

// Cell is the column as the CSV writes it: numbers as the JSON writes them, an empty cell for a
// value that does not exist, advice codes joined with ";".
func (c Column) Cell(m StepMetrics) string {
	if c.get == nil {
		return c.text(&m, ";")
	}
	v, ok := c.get(&m)
	if !ok {
		return ""
	}
	return strconv.FormatFloat(v, 'f', -1, 64)
}

// Format is the column as a person reads it: numbers with Shown decimals, "" for a value that
// does not exist (the caller picks its dash), advice codes joined with spaces.
func (c Column) Format(m StepMetrics) string {
	if c.get == nil {
		return c.text(&m, " ")
	}
	v, ok := c.get(&m)
	if !ok {
		return ""
	}
	if c.ShownUpTo > 0 && v > c.ShownUpTo {
		return "over " + strconv.FormatFloat(c.ShownUpTo, 'f', -1, 64)
	}
	return strconv.FormatFloat(v, 'f', c.Shown, 64)
}

// HeadingLine is the heading on one line, for the terminal.
func (c Column) HeadingLine() string { return strings.ReplaceAll(c.Heading, "\n", " ") }

// maxShownMargin is the largest torsional margin tables state as a number: a margin is
// capacity over the cutting torque, and over a wall barely touched the load is near zero, so
// the ratio runs into the thousands (18033 for a 0.01 mm² contact) and says only "far from
// torsional failure". The JSON and the CSV keep the value.
const maxShownMargin = 100

// withShownUpTo caps the value a person is shown (Column.ShownUpTo).
func withShownUpTo(c Column, upTo float64) Column {
	c.ShownUpTo = upTo
	return c
}

// scalar is a number that always exists.
func scalar(key, label, heading, unit string, digits, shown int, ref func(m *StepMetrics) *float64) Column {
	return Column{Key: key, Label: label, Heading: heading, Unit: unit, Digits: digits, Shown: shown,
		get: func(m *StepMetrics) (float64, bool) { return *ref(m), true },
		set: func(m *StepMetrics, v float64) { *ref(m) = v }}
}

// optional is a number that may not exist (a nil pointer, null in the JSON).
func optional(key, label, heading, unit string, digits, shown int, ref func(m *StepMetrics) **float64) Column {
	return Column{Key: key, Label: label, Heading: heading, Unit: unit, Digits: digits, Shown: shown,
		get: func(m *StepMetrics) (float64, bool) {
			if p := *ref(m); p != nil {
				return *p, true
			}
			return 0, false
		},
		set: func(m *StepMetrics, v float64) {
			// A fresh value, so that a pointer shared with another step is never changed.
			if p := ref(m); *p != nil {
				*p = &v
			}
		}}
}

func textColumn(key, label, heading string, text func(m *StepMetrics, sep string) string) Column {
	return Column{Key: key, Label: label, Heading: heading, Digits: -1, Shown: -1, text: text}
}

// levelKey is the key of a transportation level in the JSON's keyed objects ("1", "3", "5").
func levelKey(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }

// levelNumbers are one figure per transportation level, from a keyed object of the JSON;
// name(k) is the CSV key, label(k) and heading(k) its words.
func levelNumbers(name, label, heading func(k string) string, unit string, digits, shown int,
	field func(m *StepMetrics) map[string]float64) []Column {
	var out []Column
	for _, x := range transportLevels {
		k := levelKey(x)
		out = append(out, Column{Key: name(k), Label: label(k), Heading: heading(k), Unit: unit, Digits: digits, Shown: shown,
			get: func(m *StepMetrics) (float64, bool) { return field(m)[k], true },
			set: func(m *StepMetrics, v float64) {
				if f := field(m); f != nil {
					f[k] = v
				}
			}})
	}
	return out
}

// levelRatios are one ratio per transportation level that may not exist (null in the JSON).
func levelRatios(name, label, heading func(k string) string, field func(m *StepMetrics) map[string]*float64) []Column {
	var out []Column
	for _, x := range transportLevels {
		k := levelKey(x)
		out = append(out, Column{Key: name(k), Label: label(k), Heading: heading(k), Digits: 3, Shown: 2,
			get: func(m *StepMetrics) (float64, bool) {
				if p := field(m)[k]; p != nil {
					return *p, true
				}
				return 0, false
			},
			set: func(m *StepMetrics, v float64) {
				if f := field(m); f[k] != nil {
					f[k] = &v
				}
			}})
	}
	return out
}

// transportColumns state Gambill's measures at each level, keyed as in the JSON: the size, the
// signed components in and across the plane of the main curve, the centring ratios (along the
// direction of transport, in the plane, across it) and the shift of the canal's centre.
func transportColumns() []Column {
	at := func(k string) string { return " at " + k + " mm" }
	var out []Column
	out = append(out, levelNumbers(func(k string) string { return "transportation_" + k + "_mm" },
		func(k string) string { return "transportation" + at(k) + ", mm" },
		func(k string) string { return "moved mm\nat " + k + " mm" }, "mm", 4, 3,
		func(m *StepMetrics) map[string]float64 { return m.TransportationMM })...)
	out = append(out, levelRatios(func(k string) string { return "centering_ratio_" + k },
		func(k string) string { return "centring ratio" + at(k) + " (along the shift)" },
		func(k string) string { return "centring\nat " + k + " mm" },
		func(m *StepMetrics) map[string]*float64 { return m.CenteringRatio })...)
	out = append(out, levelNumbers(func(k string) string { return "transportation_in_plane_" + k + "_mm" },
		func(k string) string {
			return "transportation in the curve's plane" + at(k) + " (+ toward its inner side), mm"
		},
		func(k string) string { return "in plane\nat " + k + " mm" }, "mm", 4, 3,
		func(m *StepMetrics) map[string]float64 { return m.TransportationInPlaneMM })...)
	out = append(out, levelNumbers(func(k string) string { return "transportation_across_" + k + "_mm" },
		func(k string) string {
			return "transportation across the curve's plane" + at(k) + " (+ toward 90°), mm"
		},
		func(k string) string { return "across\nat " + k + " mm" }, "mm", 4, 3,
		func(m *StepMetrics) map[string]float64 { return m.TransportationAcrossMM })...)
	out = append(out, levelRatios(func(k string) string { return "centering_ratio_in_plane_" + k },
		func(k string) string { return "centring ratio in the curve's plane" + at(k) },
		func(k string) string { return "centring in\nplane " + k + " mm" },
		func(m *StepMetrics) map[string]*float64 { return m.CenteringRatioInPlane })...)
	out = append(out, levelRatios(func(k string) string { return "centering_ratio_across_" + k },
		func(k string) string { return "centring ratio across the curve's plane" + at(k) },
		func(k string) string { return "centring\nacross " + k + " mm" },
		func(m *StepMetrics) map[string]*float64 { return m.CenteringRatioAcross })...)
	out = append(out, levelNumbers(func(k string) string { return "centre_shift_" + k + "_mm" },
		func(k string) string { return "shift of the canal's centre" + at(k) + ", mm" },
		func(k string) string { return "centre\nshift " + k + " mm" }, "mm", 4, 3,
		func(m *StepMetrics) map[string]float64 { return m.CentreShiftMM })...)
	return out
}

// stepColumns are the CSV's columns in order; every table picks its columns from them.
var stepColumns = func() []Column {
	cols := []Column{
		textColumn("step", "step", "step", func(m *StepMetrics, _ string) string { return strconv.Itoa(m.Step) }),
		textColumn("label", "file (size/taper)", "file", func(m *StepMetrics, _ string) string { return m.Label }),
		// An alloy's name comes from the sequence file: shown printable.
		textColumn("alloy", "alloy", "alloy", func(m *StepMetrics, _ string) string {
			return models.Printable(m.Alloy, models.MaxNameRunes)
		}),
		scalar("tip_depth_mm", "tip depth from orifice, mm", "tip\nmm", "mm", 3, 2,
			func(m *StepMetrics) *float64 { return &m.TipDepthMM }),
		scalar("tip_from_apex_mm", "tip from apical end, mm", "tip to\nend mm", "mm", 3, 2,
			func(m *StepMetrics) *float64 { return &m.TipFromApexMM }),
		// The contact threshold stands beside the engaged figures, which count cuts deeper than it.
		scalar("contact_threshold_mm", "contact threshold (cuts shallower count as none), mm", "contact\nthreshold mm",
			"mm", -1, 3, func(m *StepMetrics) *float64 { return &m.ContactThresholdMM }),
		scalar("engaged_length_mm", "engaged length (cuts past the contact threshold), mm", "engaged\nmm", "mm", 3, 2,
			func(m *StepMetrics) *float64 { return &m.EngagedLengthMM }),
		scalar("engaged_area_mm2", "engaged area (cuts past the contact threshold), mm²", "area\nmm²", "mm²", 4, 2,
			func(m *StepMetrics) *float64 { return &m.EngagedAreaMM2 }),
		scalar("shank_contact_mm", "shank in contact past the flutes (cuts nothing), mm", "shank\ncontact mm", "mm", 3, 2,
			func(m *StepMetrics) *float64 { return &m.ShankContactMM }),
		scalar("removed_volume_mm3", "removed volume, mm³", "removed\nmm³", "mm³", 5, 3,
			func(m *StepMetrics) *float64 { return &m.RemovedVolumeMM3 }),
		scalar("max_depth_of_cut_mm", "deepest cut, mm", "deepest\ncut mm", "mm", 4, 3,
			func(m *StepMetrics) *float64 { return &m.MaxDepthOfCutMM }),
		scalar("untouched_wall_pct", "wall not yet touched, %", "untouched\nwall %", "%", 2, 1,
			func(m *StepMetrics) *float64 { return &m.UntouchedWallPct }),
		optional("diameter_at_max_curvature_mm", "file diameter at tightest bend, mm", "d at\nbend mm", "mm", 4, 3,
			func(m *StepMetrics) **float64 { return &m.DiameterAtMaxCurvatureMM }),
		optional("strain_at_max_curvature_pct", "strain at tightest bend, %", "strain at\nbend %", "%", 3, 2,
			func(m *StepMetrics) **float64 { return &m.StrainAtMaxCurvaturePct }),
		scalar("peak_strain_pct", "peak strain, %", "peak\nstrain %", "%", 3, 2,
			func(m *StepMetrics) *float64 { return &m.PeakStrainPct }),
		scalar("fatigue_damage", "fatigue use (1 = fracture)", "fatigue\nuse", "", 5, 3,
			func(m *StepMetrics) *float64 { return &m.FatigueDamage }),
		optional("fracture_from_tip_mm", "fracture point from tip, mm", "fracture\nfrom tip mm", "mm", 3, 2,
			func(m *StepMetrics) **float64 { return &m.FractureFromTipMM }),
		withShownUpTo(optional("torsion_margin", "torsional margin (capacity / load)", "torsion\nmargin", "", 3, 1,
			func(m *StepMetrics) **float64 { return &m.TorsionMargin }), maxShownMargin),
		scalar("peak_torque_index", "peak torque, N·cm (illustrative)", "peak torque\nN·cm", "N·cm", 4, 3,
			func(m *StepMetrics) *float64 { return &m.PeakTorqueIndex }),
	}
	cols = append(cols, transportColumns()...)
	cols = append(cols,
		scalar("foramen_shift_mm", "apical foramen shift, mm", "foramen\nshift mm", "mm", 4, 3,
			func(m *StepMetrics) *float64 { return &m.ForamenShiftMM }),
		// The wall to the root's outer surface (empty cells without a root; estimates).
		optional("thinnest_wall_mm", "thinnest wall left to the root surface, mm (estimate)", "thinnest\nwall mm", "mm", 3, 2,
			func(m *StepMetrics) **float64 { return &m.ThinnestWallMM }),
		optional("thinnest_wall_from_apex_mm", "thinnest wall from apical end, mm", "thin wall\nto end mm", "mm", 2, 1,
			func(m *StepMetrics) **float64 { return &m.ThinnestWallFromApexMM }),
		optional("thinnest_wall_toward_deg", "thinnest wall toward (0° = inner side of the main curve), °", "thin wall\ntoward °", "°", 1, 0,
			func(m *StepMetrics) **float64 { return &m.ThinnestWallTowardDeg }),
		optional("wall_under_limit_pct", "wall under the limit you keep, %", "wall under\nlimit %", "%", 2, 1,
			func(m *StepMetrics) **float64 { return &m.WallUnderLimitPct }),
		textColumn("advice", "advice", "advice", func(m *StepMetrics, sep string) string {
			codes := make([]string, len(m.Advice))
			for i, a := range m.Advice {
				codes[i] = a.Code
			}
			return strings.Join(codes, sep)
		}),
	)
	return cols
}()

// stepDetails are the figures the JSON states beside the columns (the report's step pages show
// them); they are rounded the same way but have no CSV column.
var stepDetails = []Column{
	scalar("engaged_from_tip_mm[0]", "engaged zone starts, mm from tip", "engaged\nfrom mm", "mm", 3, 2,
		func(m *StepMetrics) *float64 { return &m.EngagedFromTipMM[0] }),
	scalar("engaged_from_tip_mm[1]", "engaged zone ends, mm from tip", "engaged\nto mm", "mm", 3, 2,
		func(m *StepMetrics) *float64 { return &m.EngagedFromTipMM[1] }),
	scalar("peak_strain_from_tip_mm", "peak strain from tip, mm", "peak strain\nfrom tip mm", "mm", 3, 2,
		func(m *StepMetrics) *float64 { return &m.PeakStrainFromTipMM }),
	scalar("peak_damage_from_tip_mm", "most used point from tip, mm", "most used\nfrom tip mm", "mm", 3, 2,
		func(m *StepMetrics) *float64 { return &m.PeakDamageFromTipMM }),
	optional("fracture_time_s", "fracture after, s", "fracture\nafter s", "s", 2, 1,
		func(m *StepMetrics) **float64 { return &m.FractureTimeS }),
	optional("fracture_tip_depth_mm", "tip depth at fracture, mm", "fracture\ntip mm", "mm", 3, 2,
		func(m *StepMetrics) **float64 { return &m.FractureTipDepthMM }),
	scalar("schedule_time_s", "schedule, s", "schedule\ns", "s", 2, 1,
		func(m *StepMetrics) *float64 { return &m.ScheduleTimeS }),
	scalar("revolutions", "revolutions", "revolutions", "", 1, 0,
		func(m *StepMetrics) *float64 { return &m.Revolutions }),
	optional("torsion_margin_from_tip_mm", "weakest section from tip, mm", "weakest\nfrom tip mm", "mm", 3, 2,
		func(m *StepMetrics) **float64 { return &m.TorsionMarginFromTipMM }),
	scalar("capacity_at_3mm_ncm", "capacity 3 mm from tip, N·cm", "capacity\nN·cm", "N·cm", 4, 3,
		func(m *StepMetrics) *float64 { return &m.CapacityAt3mmNcm }),
	optional("wall_thinned_mm", "the step thinned the wall at its thinnest place by, mm", "wall\nthinned mm", "mm", 3, 2,
		func(m *StepMetrics) **float64 { return &m.WallThinnedMM }),
	// The limit is the user's own number, stated as given.
	optional("wall_limit_mm", "wall the thin-wall warning keeps, mm", "wall\nlimit mm", "mm", -1, 2,
		func(m *StepMetrics) **float64 { return &m.WallLimitMM }),
	// The motor's torque limit is the sequence's own number, stated as given.
	optional("torque_limit_ncm", "motor torque limit, N·cm", "limit\nN·cm", "N·cm", -1, 2,
		func(m *StepMetrics) **float64 { return &m.TorqueLimitNcm }),
}

// StepColumns returns the CSV's per-step columns in order (a fresh copy).
func StepColumns() []Column { return append([]Column(nil), stepColumns...) }

// StepDetails returns the per-step figures the JSON states beside the columns (a fresh copy).
func StepDetails() []Column { return append([]Column(nil), stepDetails...) }

// StepColumnKeys returns the CSV header: the keys of StepColumns.
func StepColumnKeys() []string {
	keys := make([]string, len(stepColumns))
	for i, c := range stepColumns {
		keys[i] = c.Key
	}
	return keys
}

// StepColumn returns the column or detail with the given key.
func StepColumn(key string) (Column, bool) {
	for _, list := range [][]Column{stepColumns, stepDetails} {
		for _, c := range list {
			if c.Key == key {
				return c, true
			}
		}
	}
	return Column{}, false
}

// PickColumns returns the columns with the given keys, in that order; it panics on a key that
// is not a column, which is a mistake in the program, not in its input.
func PickColumns(keys ...string) []Column {
	out := make([]Column, len(keys))
	for i, k := range keys {
		c, ok := StepColumn(k)
		if !ok {
			panic("analysis: no step column " + strconv.Quote(k))
		}
		out[i] = c
	}
	return out
}

// Row states a step's metrics as the CSV writes them, in StepColumns order.
func (m StepMetrics) Row() []string {
	out := make([]string, len(stepColumns))
	for i, c := range stepColumns {
		out[i] = c.Cell(m)
	}
	return out
}

// roundMetrics keeps outputs stable across machines: every number to its column's Digits.
func roundMetrics(m *StepMetrics) {
	for _, list := range [][]Column{stepColumns, stepDetails} {
		for _, c := range list {
			if c.get == nil || c.Digits < 0 {
				continue
			}
			if v, ok := c.get(m); ok {
				c.set(m, round(v, c.Digits))
			}
		}
	}
}

// Largest is the column's largest value over a run's steps; ok is false when no step has one.
func (c Column) Largest(r *Result) (v float64, ok bool) {
	for _, s := range r.Steps {
		if x, has := c.Value(s.Metrics); has && (!ok || x > v) {
			v, ok = x, true
		}
	}
	return v, ok
}
