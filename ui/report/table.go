package report

import (
	"encoding/csv"
	"io"
	"strconv"
	"strings"

	"tapersweep/analysis"
)

// columnLabels names each of analysis.StepColumns in plain words with its unit, for the
// report's table; the CSV keeps the column names themselves.
var columnLabels = map[string]string{
	"step":                         "step",
	"label":                        "file (size/taper)",
	"alloy":                        "alloy",
	"tip_depth_mm":                 "tip depth from orifice, mm",
	"tip_from_apex_mm":             "tip from apical end, mm",
	"engaged_length_mm":            "engaged length, mm",
	"engaged_area_mm2":             "engaged area, mm²",
	"removed_volume_mm3":           "removed volume, mm³",
	"max_depth_of_cut_mm":          "deepest cut, mm",
	"untouched_wall_pct":           "wall not yet touched, %",
	"diameter_at_max_curvature_mm": "file diameter at tightest bend, mm",
	"strain_at_max_curvature_pct":  "strain at tightest bend, %",
	"peak_strain_pct":              "peak strain, %",
	"fatigue_damage":               "fatigue use (1 = fracture)",
	"fracture_from_tip_mm":         "fracture point from tip, mm",
	"torsion_margin":               "torsional margin (capacity / load)",
	"peak_torque_index":            "peak torque, N·cm (illustrative)",
	"advice":                       "advice",
}

// columnDecimals is how many decimals each number is printed with: what the measurement
// supports (stations are 0.05 mm apart, ISO 3630-1 holds tip diameters to about 0.02 mm), not
// the digits the JSON keeps. Columns not listed print as the JSON writes them.
var columnDecimals = map[string]int{
	"tip_depth_mm":                 2,
	"tip_from_apex_mm":             2,
	"engaged_length_mm":            2,
	"engaged_area_mm2":             2,
	"removed_volume_mm3":           3,
	"max_depth_of_cut_mm":          3,
	"untouched_wall_pct":           1,
	"diameter_at_max_curvature_mm": 2,
	"strain_at_max_curvature_pct":  2,
	"peak_strain_pct":              2,
	"fatigue_damage":               3,
	"fracture_from_tip_mm":         2,
	"torsion_margin":               1,
	"peak_torque_index":            3,
}

// cell is a value of column col as Row writes it, printed with the column's decimals; an
// empty value (null in the JSON) is "–".
func cell(col, v string) string {
	if v == "" {
		return "–"
	}
	d, ok := columnDecimals[col]
	if !ok {
		return v
	}
	f, err := strconv.ParseFloat(v, 64)
	if err != nil {
		return v
	}
	return fixed(f, d)
}

// fixed writes v with d decimals, never "-0".
func fixed(v float64, d int) string {
	s := strconv.FormatFloat(v, 'f', d, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

// ColumnLabel is the plain-words heading of one of analysis.StepColumns.
func ColumnLabel(col string) string {
	if l, ok := columnLabels[col]; ok {
		return l
	}
	return col
}

// StepTable lays the run's steps out as the report prints them: one row per column of
// analysis.StepColumns (label first), then the transportation rows, advice last; one column
// per step. The cells are the numbers the CSV holds (StepMetrics.Row of the run's summary)
// and the transportation figures of the JSON, printed with the decimals the measurement
// supports (columnDecimals), so the PDF, the CSV and the JSON agree; a value that does not
// exist is "–".
func StepTable(sum analysis.ResultSummary) (labels []string, cells [][]string) {
	// The transportation columns of the CSV are stated by the report's own rows
	// (summaryTransportRows), which also give the largest transportation and its direction.
	skip := func(c string) bool {
		return strings.HasPrefix(c, "transportation_") || strings.HasPrefix(c, "centering_ratio_") || c == "foramen_shift_mm"
	}
	cols := analysis.StepColumns
	advice := -1
	for i, c := range cols {
		if c == "advice" {
			advice = i
			continue
		}
		if skip(c) {
			continue
		}
		labels = append(labels, ColumnLabel(c))
		cells = append(cells, make([]string, len(sum.Steps)))
	}
	first := len(labels)
	for _, r := range summaryTransportRows {
		labels = append(labels, r.label)
		cells = append(cells, make([]string, len(sum.Steps)))
	}
	if advice >= 0 {
		labels = append(labels, ColumnLabel("advice"))
		cells = append(cells, make([]string, len(sum.Steps)))
	}
	for j, m := range sum.Steps {
		row := 0
		for i, v := range m.Row() {
			if skip(cols[i]) {
				continue
			}
			v = cell(cols[i], v)
			at := row
			if i == advice {
				at = len(labels) - 1
			} else {
				row++
			}
			cells[at][j] = v
		}
		for k, r := range summaryTransportRows {
			cells[first+k][j] = r.value(m.Transport)
		}
	}
	return labels, cells
}

// WriteCSV writes one row per step under analysis.StepColumns, as `analyze --format csv`.
func WriteCSV(w io.Writer, res *analysis.Result) error {
	cw := csv.NewWriter(w)
	cw.Write(analysis.StepColumns)
	for _, s := range res.Steps {
		cw.Write(s.Metrics.Row())
	}
	cw.Flush()
	return cw.Error()
}
