package analysis

import (
	"encoding/json"
	"math"
	"reflect"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// fullMetrics is a step whose every figure exists and carries more decimals than any output keeps.
func fullMetrics() StepMetrics {
	v := func(x float64) *float64 { return &x }
	m := StepMetrics{Step: 2, Label: "25/.04", Alloy: "niti-superelastic",
		Transport: Transport{TransportationMM: map[string]float64{}, TransportationInPlaneMM: map[string]float64{},
			TransportationAcrossMM: map[string]float64{}, CentreShiftMM: map[string]float64{},
			CenteringRatio: map[string]*float64{}, CenteringRatioInPlane: map[string]*float64{},
			CenteringRatioAcross: map[string]*float64{}},
		Advice: []Advice{{Code: "same-taper", Text: "a"}, {Code: "long-peck", Text: "b"}}}
	for _, x := range TransportLevels() {
		k := levelKey(x)
		m.CenteringRatio[k], m.CenteringRatioInPlane[k], m.CenteringRatioAcross[k] = v(0), v(0), v(0)
	}
	// Every optional figure exists (reflect, so that a field added later is covered too).
	for _, rv := range []reflect.Value{reflect.ValueOf(&m).Elem(), reflect.ValueOf(&m.Wall).Elem()} {
		for i := 0; i < rv.NumField(); i++ {
			if f := rv.Field(i); f.Type() == reflect.TypeFor[*float64]() {
				f.Set(reflect.ValueOf(v(0)))
			}
		}
	}
	m.TorqueLimitNcm = v(2.123456789)
	for i, c := range append(StepColumns(), StepDetails()...) {
		switch {
		case !c.IsNumber():
		case c.Digits < 0:
			c.set(&m, 2.123456789) // kept as given
		case strings.HasPrefix(c.Key, "centering_ratio"):
			c.set(&m, 0.987654321)
		case strings.HasPrefix(c.Key, "transportation_") || strings.HasPrefix(c.Key, "centre_shift_"):
			c.set(&m, 0.123456789)
		default:
			c.set(&m, 10+float64(i)+0.123456789)
		}
	}
	return m
}

// TestColumnsNameEveryFigureOfTheJSON: the column list is the one description of a step's
// figures, so every number `analyze --format json` writes for a step has a column or a detail
// (keyed objects spelt out as the CSV spells them), and every column names a JSON field. A field
// added to StepMetrics without a column fails here.
func TestColumnsNameEveryFigureOfTheJSON(t *testing.T) {
	m := fullMetrics()
	js, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	var obj map[string]any
	if err := json.Unmarshal(js, &obj); err != nil {
		t.Fatal(err)
	}
	keys := map[string]bool{}
	for _, c := range append(StepColumns(), StepDetails()...) {
		if keys[c.Key] {
			t.Errorf("column %s listed twice", c.Key)
		}
		keys[c.Key] = true
	}
	// The JSON's names, flattened the way the CSV flattens them.
	var names []string
	for k, v := range obj {
		switch v := v.(type) {
		case map[string]any:
			if k == "largest_transportation" {
				continue // rounded with the transport it belongs to (transport.go)
			}
			for level := range v {
				// The level goes before a trailing unit: transportation_mm["1"] is
				// transportation_1_mm, centering_ratio["1"] centering_ratio_1.
				if strings.HasSuffix(k, "_mm") {
					names = append(names, strings.TrimSuffix(k, "_mm")+"_"+level+"_mm")
				} else {
					names = append(names, k+"_"+level)
				}
			}
		case []any:
			if k == "advice" {
				names = append(names, k)
				continue
			}
			for i := range v {
				names = append(names, k+"["+strconv.Itoa(i)+"]")
			}
		default:
			names = append(names, k)
		}
	}
	sort.Strings(names)
	for _, n := range names {
		if !keys[n] {
			t.Errorf("the JSON's %s has no column", n)
		}
		delete(keys, n)
	}
	for k := range keys {
		t.Errorf("column %s names no JSON field", k)
	}
}

// TestRoundingFollowsTheColumns: after rounding, each figure has at most its column's decimals,
// the CSV cell is that number as the JSON writes it, and a person sees Shown decimals.
func TestRoundingFollowsTheColumns(t *testing.T) {
	m := fullMetrics()
	roundMetrics(&m)
	js, _ := json.Marshal(m)
	for _, c := range append(StepColumns(), StepDetails()...) {
		if !c.IsNumber() {
			continue
		}
		v, ok := c.Value(m)
		if !ok {
			t.Errorf("%s: lost its value", c.Key)
			continue
		}
		if c.Digits >= 0 {
			p := math.Pow(10, float64(c.Digits))
			if math.Abs(v*p-math.Round(v*p)) > 1e-6 {
				t.Errorf("%s = %v: more than %d decimals", c.Key, v, c.Digits)
			}
		} else if v != 2.123456789 {
			t.Errorf("%s = %v: a value kept as given changed", c.Key, v)
		}
		cell := c.Cell(m)
		if !strings.Contains(string(js), cell) {
			t.Errorf("%s: CSV cell %q is not the JSON's number", c.Key, cell)
		}
		f := c.Format(m)
		if dot := strings.IndexByte(f, '.'); c.Shown > 0 && (dot < 0 || len(f)-dot-1 != c.Shown) {
			t.Errorf("%s: shown as %q, want %d decimals", c.Key, f, c.Shown)
		}
	}
}

// TestRowIsTheCSVOfTheColumns: text columns, nulls and advice codes as the CSV states them.
func TestRowIsTheCSVOfTheColumns(t *testing.T) {
	m := fullMetrics()
	m.DiameterAtMaxCurvatureMM = nil
	m.CenteringRatio["3"] = nil
	row := m.Row()
	keys := StepColumnKeys()
	if len(row) != len(keys) {
		t.Fatalf("%d cells for %d columns", len(row), len(keys))
	}
	want := map[string]string{"step": "2", "label": "25/.04", "alloy": "niti-superelastic",
		"diameter_at_max_curvature_mm": "", "centering_ratio_3": "", "advice": "same-taper;long-peck",
		"transportation_1_mm": "0.123456789"}
	for i, k := range keys {
		if w, ok := want[k]; ok && row[i] != w {
			t.Errorf("%s: %q, want %q", k, row[i], w)
		}
	}
	adv, _ := StepColumn("advice")
	if got := adv.Format(m); got != "same-taper long-peck" {
		t.Errorf("advice shown as %q", got)
	}
}

// TestRoundingDoesNotChangeASharedValue: an optional figure is replaced, not written through,
// so a pointer another step holds keeps its value.
func TestRoundingDoesNotChangeASharedValue(t *testing.T) {
	shared := 1.23456789
	a := StepMetrics{TorsionMargin: &shared}
	roundMetrics(&a)
	if shared != 1.23456789 || *a.TorsionMargin != 1.235 {
		t.Errorf("shared %v, rounded %v", shared, *a.TorsionMargin)
	}
}

// A torsional margin over a load near zero is shown as "over 100" to a person, while the CSV
// (and the JSON) keep the ratio; ordinary margins are shown with their decimal.
func TestTorsionMarginShownUpTo(t *testing.T) {
	var col Column
	for _, c := range StepColumns() {
		if c.Key == "torsion_margin" {
			col = c
		}
	}
	if col.Key == "" {
		t.Fatal("no torsion_margin column")
	}
	for _, c := range []struct {
		v          float64
		shown, csv string
	}{{18033.3, "over 100", "18033.3"}, {10.6, "10.6", "10.6"}, {100, "100.0", "100"}} {
		v := c.v
		m := StepMetrics{TorsionMargin: &v}
		if got := col.Format(m); got != c.shown {
			t.Errorf("margin %v shown as %q, want %q", v, got, c.shown)
		}
		if got := col.Cell(m); got != c.csv {
			t.Errorf("margin %v in the CSV as %q, want %q", v, got, c.csv)
		}
	}
}
