package report

import (
	"fmt"

	"codeberg.org/go-pdf/fpdf"

	"tapersweep/analysis"
)

// numbersAndAdvice writes the step's numbers, its advice and how the file is used in a column
// from x to the right margin.
func numbersAndAdvice(pdf *fpdf.Fpdf, res *analysis.Result, st *analysis.StepResult, x float64) {
	markBend := res.Canal.BendUncertain()
	m := st.Metrics
	colW := margin + bodyW - x

	pdf.SetX(x)
	pdf.SetFont(fontBold, "", 9.5)
	pdf.CellFormat(colW, 5, "Numbers", "", 1, "L", false, 0, "")
	var pairs [][2]string
	for _, c := range analysis.StepColumns() {
		switch c.Key {
		case "step", "label", "alloy", "advice", "tip_depth_mm", "tip_from_apex_mm":
			continue
		}
		if statedApart(c) || isWallColumn(c) {
			continue // stated below, under "How this step moved the canal", in the model section, or on one line (the wall)
		}
		// To the decimals the measurement supports (the column's Shown), as the summary's table.
		v := c.Format(m)
		label := c.Label
		switch {
		case v == "":
			v = "–"
		case markBend && analysis.RestsOnTightestBend(c.Key):
			v += bendMark
		}
		pairs = append(pairs, [2]string{label, v})
	}
	opt := func(v *float64, d int) string {
		if v == nil {
			return "–"
		}
		return fixed(*v, d)
	}
	pairs = append(pairs,
		[2]string{"engaged zone from tip, mm", fixed(m.EngagedFromTipMM[0], 2) + " to " + fixed(m.EngagedFromTipMM[1], 2)},
		[2]string{"peak strain from tip, mm", fixed(m.PeakStrainFromTipMM, 2)},
		[2]string{"most used point from tip, mm", fixed(m.PeakDamageFromTipMM, 2)},
		[2]string{"weakest section from tip, mm", opt(m.TorsionMarginFromTipMM, 2)},
		[2]string{"capacity 3 mm from tip, N·cm", fixed(m.CapacityAt3mmNcm, 3)},
		[2]string{"schedule, s (revolutions)", fixed(m.ScheduleTimeS, 1) + " (" + fixed(m.Revolutions, 0) + ")"},
	)
	if w := m.Wall; w.ThinnestWallMM != nil {
		pairs = append(pairs, [2]string{"thinnest wall to root, mm (from apex, toward, under limit)",
			fmt.Sprintf("%s (%s mm, %s°, %s %%)", fixed(*w.ThinnestWallMM, 2), fixed(*w.ThinnestWallFromApexMM, 1),
				fixed(*w.ThinnestWallTowardDeg, 0), opt(w.WallUnderLimitPct, 1))})
	}
	if m.FractureTimeS != nil {
		pairs = append(pairs, [2]string{"fracture after, s (tip depth, mm)",
			opt(m.FractureTimeS, 1) + " (" + opt(m.FractureTipDepthMM, 2) + ")"})
	}
	numberLines(pdf, x, colW, pairs)
	if markBend {
		sum := res.Canal.Summary(false)
		pdf.SetX(x)
		pdf.SetFont(fontRegular, "", sizeSmall)
		pdf.MultiCell(colW, lineSmall, fmt.Sprintf("%s rests on the tightest bend, which the scan pins down only to r %s, %s.",
			bendMark, sum.RadiusText(), sum.PlaceText()), "", "L", false)
	}
	pdf.Ln(1.5)
	pdf.SetX(x)
	pdf.SetFont(fontBold, "", 9.5)
	pdf.CellFormat(colW, 5, "How this step moved the canal", "", 1, "L", false, 0, "")
	numberLines(pdf, x, colW, transportPairs(m.Transport))
	pdf.Ln(2)
	pdf.SetX(x)
	pdf.SetFont(fontBold, "", 9.5)
	pdf.CellFormat(colW, 5, "Advice", "", 1, "L", false, 0, "")
	pdf.SetFont(fontRegular, "", sizeSmall)
	if len(m.Advice) == 0 {
		pdf.SetX(x)
		pdf.MultiCell(colW, lineSmall, "Nothing to remark for this step.", "", "L", false)
	}
	for _, a := range m.Advice {
		pdf.SetX(x)
		pdf.MultiCell(colW, lineSmall, "• "+a.Text, "", "L", false)
		pdf.Ln(0.8)
	}
	pdf.Ln(1.5)
	pdf.SetX(x)
	pdf.SetFont(fontBold, "", 9.5)
	pdf.CellFormat(colW, 5, "How the file is used", "", 1, "L", false, 0, "")
	pdf.SetFont(fontRegular, "", sizeSmall)
	s := st.Step
	limit := "none set"
	if s.TorqueLimitNcm > 0 {
		limit = fmt.Sprintf("%g N·cm", s.TorqueLimitNcm)
	}
	pdf.SetX(x)
	pdf.MultiCell(colW, lineSmall, fmt.Sprintf(
		"%g rpm; advance %g mm/s in pecks of %g mm past the deepest point, withdrawing %g mm between them; "+
			"motor torque limit %s; %s section.", s.RPM, s.AdvanceMMs, s.PeckMM, s.RetractMM, limit, s.SectionName), "", "L", false)
}

// numberLines writes label/value pairs, values right-aligned, in a column from x.
func numberLines(pdf *fpdf.Fpdf, x, colW float64, pairs [][2]string) {
	for _, kv := range pairs {
		pdf.SetX(x)
		pdf.SetFont(fontRegular, "", sizeSmall)
		pdf.SetTextColor(90, 90, 90)
		pdf.CellFormat(colW-30, lineSmall, kv[0], "", 0, "L", false, 0, "")
		pdf.SetTextColor(0, 0, 0)
		pdf.CellFormat(30, lineSmall, kv[1], "", 1, "R", false, 0, "")
	}
}
