package report

import (
	"encoding/csv"
	"io"
	"strconv"
	"strings"

	"tapersweep/analysis"
)

// isTransportColumn tells the CSV's transportation columns, which the report states by its own
// rows (summaryTransportRows, transportPairs) together with the largest transportation and its
// direction.
func isTransportColumn(c analysis.Column) bool {
	return strings.HasPrefix(c.Key, "transportation_") || strings.HasPrefix(c.Key, "centering_ratio_") ||
		strings.HasPrefix(c.Key, "centre_shift_") || c.Key == "foramen_shift_mm"
}

// statedApart tells the columns the report states in its own words elsewhere: the
// transportation columns, and the contact threshold, which the model section states once (the
// engaged figures' labels refer to it).
func statedApart(c analysis.Column) bool {
	return isTransportColumn(c) || c.Key == "contact_threshold_mm"
}

// onStepPagesOnly tells the figures the summary's step table leaves to the step pages (page 1
// has no room for them): the shank's contact and the wall to the root's surface.
func onStepPagesOnly(c analysis.Column) bool { return c.Key == "shank_contact_mm" || isWallColumn(c) }

// isWallColumn tells the figures of the wall to the root's surface (the step pages state them on
// one line).
func isWallColumn(c analysis.Column) bool {
	return strings.Contains(c.Key, "wall_") && c.Key != "untouched_wall_pct"
}

// fixed writes v with d decimals, never "-0".
func fixed(v float64, d int) string {
	s := strconv.FormatFloat(v, 'f', d, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

// StepTable lays the run's steps out as the report prints them: one row per column of
// analysis.StepColumns (label first), then the transportation rows, advice last; one column
// per step. The cells are the numbers of the CSV (the run's summary) printed with the decimals
// the measurement supports (Column.Format, the column's Shown decimals) and the transportation
// figures of the JSON likewise rounded, so the PDF, the CSV and the JSON agree; a value that does
// not exist is "–".
func StepTable(sum analysis.ResultSummary) (labels []string, cells [][]string) {
	return stepTableMarked(sum, false)
}

// bendMark marks the figures that rest on a tightest bend the scan does not pin down.
const bendMark = "*"

// stepTableMarked is StepTable with the figures that rest on the tightest bend marked when
// markBend (the canal's band there is wide).
func stepTableMarked(sum analysis.ResultSummary, markBend bool) (labels []string, cells [][]string) {
	var cols []analysis.Column
	var advice *analysis.Column
	for _, c := range analysis.StepColumns() {
		switch {
		case c.Key == "advice":
			advice = &c
		case !statedApart(c) && !onStepPagesOnly(c):
			cols = append(cols, c)
		}
	}
	row := func(label string, cell func(m analysis.StepMetrics) string) {
		labels = append(labels, label)
		r := make([]string, len(sum.Steps))
		for j, m := range sum.Steps {
			if r[j] = cell(m); r[j] == "" {
				r[j] = "–"
			}
		}
		cells = append(cells, r)
	}
	for _, c := range cols {
		if markBend && analysis.RestsOnTightestBend(c.Key) {
			row(c.Label+" "+bendMark, func(m analysis.StepMetrics) string {
				if v := c.Format(m); v != "" {
					return v + bendMark
				}
				return ""
			})
			continue
		}
		row(c.Label, c.Format)
	}
	for _, r := range summaryTransportRows {
		row(r.label, func(m analysis.StepMetrics) string { return r.value(m.Transport) })
	}
	if advice != nil {
		row(advice.Label, advice.Cell)
	}
	return labels, cells
}

// WriteCSV writes one row per step under analysis.StepColumnKeys, as `analyze --format csv`.
func WriteCSV(w io.Writer, res *analysis.Result) error {
	cw := csv.NewWriter(w)
	cw.Write(analysis.StepColumnKeys())
	for _, s := range res.Steps {
		cw.Write(s.Metrics.Row())
	}
	cw.Flush()
	return cw.Error()
}

// TextRows states a run's steps under the columns as a terminal prints them: one-line headings,
// Shown decimals, "-" for a value that does not exist.
func TextRows(cols []analysis.Column, res *analysis.Result) (head []string, rows [][]string) {
	for _, c := range cols {
		head = append(head, c.HeadingLine())
	}
	for _, s := range res.Steps {
		row := make([]string, len(cols))
		for i, c := range cols {
			if row[i] = c.Format(s.Metrics); row[i] == "" && c.IsNumber() {
				row[i] = "-"
			}
		}
		rows = append(rows, row)
	}
	return head, rows
}
