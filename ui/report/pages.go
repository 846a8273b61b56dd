package report

import (
	"bytes"
	"fmt"
	"image"
	"image/png"
	"math"
	"strings"

	"codeberg.org/go-pdf/fpdf"
	"gonum.org/v1/plot"

	"tapersweep/analysis"
	"tapersweep/models"
	"tapersweep/ui/plots"
	"tapersweep/ui/scene"
)

// Text sizes, points, and line heights, mm.
const (
	sizeTitle   = 16.0
	sizeHeading = 11.0
	sizeBody    = 8.5
	sizeSmall   = 7.5
	lineBody    = 4.0
	lineSmall   = 3.4
	// tableLine is the line height of the summary's step table: close rows keep the summary
	// on one page for a usual sequence.
	tableLine = 3.1
)

// headingKeep is the room a heading needs below it (mm) to stay on the page with the
// first lines of what it heads.
const headingKeep = 20.0

func heading(pdf *fpdf.Fpdf, text string) {
	if pdf.GetY()+2+6+headingKeep > pageH-bottomM-6 {
		pdf.AddPage()
	}
	pdf.Ln(2)
	pdf.SetFont(fontBold, "", sizeHeading)
	pdf.CellFormat(bodyW, 6, text, "", 1, "L", false, 0, "")
	pdf.SetFont(fontRegular, "", sizeBody)
}

// keyValue writes "key: value" lines in two columns of the given widths from x.
func keyValue(pdf *fpdf.Fpdf, x, keyW, valW float64, pairs [][2]string) {
	keyValueSized(pdf, x, keyW, valW, pairs, sizeBody, lineBody)
}

// keyValueSized is keyValue in a given font size (points) and line height (mm).
func keyValueSized(pdf *fpdf.Fpdf, x, keyW, valW float64, pairs [][2]string, size, line float64) {
	for _, kv := range pairs {
		pdf.SetX(x)
		pdf.SetFont(fontRegular, "", size)
		pdf.SetTextColor(90, 90, 90)
		pdf.CellFormat(keyW, line, kv[0], "", 0, "L", false, 0, "")
		pdf.SetTextColor(0, 0, 0)
		pdf.MultiCell(valW, line, kv[1], "", "L", false)
	}
}

func mm(v float64) string { return fmt.Sprintf("%.2f mm", v) }

// summaryPage states the canal, the table of steps, the model's settings and the caution.
func summaryPage(pdf *fpdf.Fpdf, res *analysis.Result, sum analysis.ResultSummary, opt Options) {
	pdf.AddPage()
	pdf.SetFont(fontBold, "", sizeTitle)
	pdf.CellFormat(bodyW, 8, "tapersweep report", "", 1, "L", false, 0, "")
	pdf.SetFont(fontRegular, "", sizeHeading)
	pdf.MultiCell(bodyW, 5, opt.Title, "", "L", false)
	pdf.SetFont(fontRegular, "", sizeSmall)
	pdf.SetTextColor(90, 90, 90)
	var src []string
	if opt.CanalFile != "" {
		src = append(src, "canal file: "+opt.CanalFile)
	}
	if res.Canal.Source != "" {
		src = append(src, "found in the scan: "+res.Canal.Source)
	}
	if opt.SequenceFile != "" {
		src = append(src, "sequence file: "+opt.SequenceFile)
	}
	src = append(src, fmt.Sprintf("%d steps, a page each after the summary", len(res.Steps)))
	pdf.MultiCell(bodyW, lineSmall+0.4, strings.Join(src, "   ·   "), "", "L", false)
	pdf.SetTextColor(0, 0, 0)
	caution(pdf, sum.Caution)

	heading(pdf, "The canal")
	c := sum.Canal
	// Each measure of the bend with the band the line pins it down to (low–high).
	bend := "none: the canal is straight"
	if c.MaxCurvature.RadiusMM != nil {
		bend = fmt.Sprintf("radius %s, %s", c.RadiusText(), c.PlaceText())
	}
	arc := "no curved part"
	if r := c.Arc.RadiusMM; r != nil {
		arc = fmt.Sprintf("radius %.2f mm over %.1f°", *r, c.Arc.AngleDeg)
	}
	pairs := [][2]string{
		{"name", c.Name},
		{"centerline length", mm(c.LengthMM)},
		{"working length", mm(c.WorkingLengthMM)},
		{"tightest bend", bend},
		{"Schneider angle", c.SchneiderText()},
		{"curved part (fitted arc)", arc},
		{"voxel for the centerline", fmt.Sprintf("%.3f mm", c.VoxelMM)},
	}
	notes := append(append([]string{}, c.Warnings...), sum.Warnings...)
	if res.Canal.BendUncertain() {
		notes = append(notes, analysis.BendInheritNote(bendMark)+": the figures say where to look, not how much")
	}
	for i, n := range notes {
		key := ""
		if i == 0 {
			key = "notes"
		}
		pairs = append(pairs, [2]string{key, n})
	}
	keyValue(pdf, margin, 42, bodyW-42, pairs)

	heading(pdf, "Steps")
	labels, cells := stepTableMarked(sum, res.Canal.BendUncertain())
	stepTable(pdf, labels, cells)

	heading(pdf, "How the whole sequence moved the canal")
	pdf.SetFont(fontRegular, "", sizeBody)
	pdf.MultiCell(bodyW, lineBody, "The canal as the last step leaves it against the canal as scanned. "+
		transportSentence(sum.Sequence), "", "L", false)
	pdf.SetFont(fontRegular, "", sizeSmall)
	pdf.SetTextColor(90, 90, 90)
	pdf.MultiCell(bodyW, lineSmall, transportLevelsNote, "", "L", false)
	pdf.SetTextColor(0, 0, 0)

	heading(pdf, "Model, assumptions and parameters")
	modelSection(pdf, res, sum)
}

// caution prints the safety wording in a framed box at the top of the first page, heading and
// text together, where the footer of every page points.
func caution(pdf *fpdf.Fpdf, text string) {
	pdf.Ln(2)
	pdf.SetFont(fontRegular, "", sizeBody)
	lines := len(pdf.SplitText(text, bodyW-4))
	y := pdf.GetY()
	h := 6 + float64(lines)*lineBody + 2
	pdf.SetFillColor(250, 246, 236)
	pdf.SetDrawColor(170, 150, 110)
	pdf.Rect(margin, y, bodyW, h, "FD")
	pdf.SetXY(margin+2, y+1)
	pdf.SetFont(fontBold, "", sizeBody+0.5)
	pdf.CellFormat(bodyW-4, 5, "Caution", "", 2, "L", false, 0, "")
	pdf.SetFont(fontRegular, "", sizeBody)
	pdf.SetX(margin + 2)
	pdf.MultiCell(bodyW-4, lineBody, text, "", "L", false)
	pdf.SetY(y + h)
	pdf.SetDrawColor(0, 0, 0)
}

// stepTable prints labels down the left and one column per step, in blocks of at most
// stepsPerBlock columns so a long sequence still fits the page width.
func stepTable(pdf *fpdf.Fpdf, labels []string, cells [][]string) {
	const labelW, stepsPerBlock, maxColW = 50.0, 8, 34.0
	steps := 0
	if len(cells) > 0 {
		steps = len(cells[0])
	}
	for lo := 0; lo < steps; lo += stepsPerBlock {
		hi := min(lo+stepsPerBlock, steps)
		colW := min(maxColW, (bodyW-labelW)/float64(min(steps, stepsPerBlock)))
		for i, label := range labels {
			vals := cells[i][lo:hi]
			if label == "advice" {
				for k, v := range vals {
					vals[k] = strings.ReplaceAll(v, ";", " ")
				}
			}
			// Row height: the tallest cell, the label included, once wrapped.
			pdf.SetFont(fontRegular, "", sizeSmall)
			labelLines := len(pdf.SplitText(label, labelW-1.5))
			lines := max(1, labelLines)
			for _, v := range vals {
				lines = max(lines, len(pdf.SplitText(v, colW-1.5)))
			}
			h := float64(lines) * tableLine
			if pdf.GetY()+h > pageH-bottomM-8 {
				pdf.AddPage()
			}
			y := pdf.GetY()
			fill := i%2 == 0
			pdf.SetFillColor(240, 239, 234)
			if i == 0 {
				pdf.SetFont(fontBold, "", sizeSmall)
			}
			pdf.SetXY(margin, y)
			if labelLines > 1 {
				if fill {
					pdf.Rect(margin, y, labelW, h, "F")
				}
				pdf.MultiCell(labelW, tableLine, label, "", "L", false)
			} else {
				pdf.CellFormat(labelW, h, label, "", 0, "L", fill, 0, "")
			}
			for k, v := range vals {
				x := margin + labelW + float64(k)*colW
				pdf.SetXY(x, y)
				if lines == 1 {
					pdf.CellFormat(colW, h, v, "", 0, "R", fill, 0, "")
					continue
				}
				if fill {
					pdf.Rect(x, y, colW, h, "F")
				}
				pdf.MultiCell(colW, tableLine, v, "", "R", false)
			}
			pdf.SetXY(margin, y+h)
		}
		pdf.Ln(2)
	}
	pdf.SetFont(fontRegular, "", sizeBody)
}

// modelSection states the settings the figures rest on; illustrative values say so.
func modelSection(pdf *fpdf.Fpdf, res *analysis.Result, sum analysis.ResultSummary) {
	m := sum.Model
	pairs := [][2]string{
		{"file path", pathModelText(m)},
		{"wall stiffness", fmt.Sprintf("%g N/mm² (illustrative): the dentine's resistance to being cut; elastic path only", m.WallStiffnessNPerMM2)},
		{"depth of cut", fmt.Sprintf("the file's radius less the distance from the centerline to the wall, per place around the wall; contact below %.3f mm is drawn and counted as none", m.ContactThresholdMM)},
		{"bending strain", "outer-fibre strain d·k/2 of the file's diameter d where the curvature of the file's path is k (the canal's centerline when centred)"},
		{"fatigue", "Miner's sum of revolutions over cycles to failure at each point of the file through the insertion schedule; the alloy's strain-life law, eps = C N^-b below its recoverable strain, steeper above it"},
		{"torsion", fmt.Sprintf("cutting torque from a cutting coefficient of %g N/mm² (illustrative) against the section's torsional capacity", m.CuttingCoefficientNPerMM2)},
		{"note", m.Note},
	}
	if m.MinWallMM != nil {
		pairs = append(pairs, [2]string{"wall to the root", fmt.Sprintf("to the root's surface (%s), estimated; advice < %g mm, Lim & Stock 1987 (from memory)", models.Printable(m.RootSource, models.MaxNameRunes), *m.MinWallMM)})
	}
	for _, a := range alloysUsed(res) {
		src := "from the sequence file"
		if a.Illustrative {
			src = "built in: " + models.IllustrativeNote
		}
		pairs = append(pairs, [2]string{"alloy", fmt.Sprintf(
			"%s: E %g GPa, shear ultimate %g MPa, recoverable strain %.4g %%, strain-life C %g, b %g, b2 %g (%s)",
			models.Printable(a.Name, models.MaxNameRunes), a.ElasticModulusGPa, a.ShearUltimateMPa, 100*a.RecoverableStrain, a.StrainLifeC, a.StrainLifeB, a.LowCycleB, src)})
	}
	// The model section is reference: in the small size, so the summary stays on one page.
	keyValueSized(pdf, margin, 42, bodyW-42, pairs, sizeSmall+0.5, lineSmall+0.2)
}

// pathModelText states how the file runs in the canal.
func pathModelText(m analysis.ModelSummary) string {
	if m.PathModel == models.PathElastic {
		return "elastic: the file's axis bends as a beam on an elastic foundation (E·I from alloy and diameter against " +
			"the wall stiffness below), held at the orifice, free at the tip; cut, strain and fatigue follow that path"
	}
	return "centred: the file follows the canal's centerline; a real file straightens in a curve and presses on " +
		"the outer wall, which this model cannot show (its transportation comes from an uneven wall only)"
}

// alloysUsed lists each alloy the steps use once, in step order.
func alloysUsed(res *analysis.Result) []models.Alloy {
	seen := map[string]bool{}
	var out []models.Alloy
	for _, st := range res.Steps {
		a := st.Alloy
		if a.Name == "" {
			a.Name = st.Metrics.Alloy
		}
		if !seen[a.Name] {
			seen[a.Name] = true
			out = append(out, a)
		}
	}
	return out
}

// The step picture's place on the page, mm.
const (
	pictureWMM    = 84.0
	pictureMaxHMM = 112.0
	sectionsHMM   = 54.0
	sectionsDPI   = 200
)

// stepPage shows one step: the view with its legend, the numbers and the advice beside it, the
// cross-sections at 1, 3 and 5 mm from the apical end, and the profiles.
func stepPage(pdf *fpdf.Fpdf, res *analysis.Result, st *analysis.StepResult, opt Options) error {
	c := res.Canal
	m := st.Metrics
	pdf.AddPage()
	pdf.SetFont(fontBold, "", 13)
	pdf.CellFormat(bodyW, 7, fmt.Sprintf("Step %d of %d: %s, %s", st.Number, len(res.Steps), m.Label, models.Printable(m.Alloy, models.MaxNameRunes)), "", 1, "L", false, 0, "")
	pdf.SetFont(fontRegular, "", sizeBody)
	pdf.MultiCell(bodyW, lineBody, fmt.Sprintf("Target depth %s: the tip at %.2f mm from the orifice, %.2f mm from the apical end "+
		"(working length %.2f mm). Wall shaded by depth of cut against the canal as the earlier steps left it.",
		st.Step.Depth.String(), m.TipDepthMM, m.TipFromApexMM, c.WorkingLength), "", "L", false)
	pdf.Ln(1)

	// The canal runs down the page: its picture on the left, the numbers beside it, the
	// sections and the profiles underneath.
	top := pdf.GetY()
	imgW := pictureWMM
	imgH := imgW * float64(opt.ImageHeight) / float64(opt.ImageWidth)
	if imgH > pictureMaxHMM {
		imgW, imgH = imgW*pictureMaxHMM/imgH, pictureMaxHMM
	}
	// Printed about 75 mm wide: text 3.4 times its screen size reads at 7 to 8 points.
	img, err := scene.Picture(c, res, scene.Options{Step: st.Number}, opt.View, opt.ImageWidth, opt.ImageHeight,
		3.4*float64(opt.ImageWidth)/1040)
	if err != nil {
		return err
	}
	if err := placePNG(pdf, fmt.Sprintf("step%d-view", st.Number), img, margin, top, imgW, imgH); err != nil {
		return err
	}
	pdf.SetY(top)
	numbersAndAdvice(pdf, res, st, margin+imgW+5)
	pdf.SetY(max(top+imgH, pdf.GetY()) + 2)
	if err := sectionRow(pdf, res, st); err != nil {
		return err
	}
	return profilePlots(pdf, c, st)
}

// placePNG puts an image on the page at x, y, w x h mm.
func placePNG(pdf *fpdf.Fpdf, name string, img image.Image, x, y, w, h float64) error {
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		return err
	}
	pdf.RegisterImageOptionsReader(name, fpdf.ImageOptions{ImageType: "PNG"}, &buf)
	pdf.ImageOptions(name, x, y, w, h, false, fpdf.ImageOptions{ImageType: "PNG"}, 0, "")
	return nil
}

// sectionRow prints the canal's cross-sections at the standard levels with the step shown.
func sectionRow(pdf *fpdf.Fpdf, res *analysis.Result, st *analysis.StepResult) error {
	c := res.Canal
	var secs []*analysis.Section
	for _, x := range analysis.SectionLevels() {
		if x >= c.Line.Length() {
			continue
		}
		sec, err := analysis.SectionAt(c, res, st.Number, x)
		if err != nil {
			return err
		}
		secs = append(secs, sec)
	}
	if len(secs) == 0 {
		return nil
	}
	pdf.SetFont(fontBold, "", 9.5)
	pdf.CellFormat(bodyW, 5, "Cross-sections: the canal before and after this step", "", 1, "L", false, 0, "")
	px := func(mm float64) int { return int(math.Round(mm / 25.4 * sectionsDPI)) }
	img := plots.SectionsImage(secs, px(bodyW), px(sectionsHMM), plots.SectionOptions{
		LegendTop: scene.LegendTop(res, st.Number, false), ContactMM: res.Options.ContactThreshold,
		DPI: sectionsDPI, TextPt: 7, Key: true, Selected: -1})
	y := pdf.GetY()
	if err := placePNG(pdf, fmt.Sprintf("step%d-sections", st.Number), img, margin, y, bodyW, sectionsHMM); err != nil {
		return err
	}
	pdf.SetY(y + sectionsHMM + 2)
	return nil
}

// Plot sizes on the page (mm) and their resolution: sharp in print, small in the file.
const (
	plotWMM = 59.0
	plotHMM = 56.0
	// plotMinHMM is the smallest height a profile plot keeps its tick labels readable at.
	plotMinHMM = 40.0
	plotDPI    = 220
)

// profilePlots puts the three profiles side by side.
func profilePlots(pdf *fpdf.Fpdf, c *analysis.Canal, st *analysis.StepResult) error {
	pr := analysis.ProfileOf(c, st)
	gap := (bodyW - 3*plotWMM) / 2
	// The plots take the room left above the footer, down to plotMinHMM; less than that and
	// they go on the next page.
	h := plotHMM
	if room := pageH - bottomM - 7 - pdf.GetY(); room < h {
		if room >= plotMinHMM {
			h = room
		} else {
			pdf.AddPage()
		}
	}
	y := pdf.GetY()
	px := func(mm float64) int { return int(math.Round(mm / 25.4 * plotDPI)) }
	for k, p := range []*plot.Plot{plots.CutPlot(pr, plots.Print), plots.DiameterPlot(pr, plots.Print), plots.StrainPlot(pr, plots.Print)} {
		img := plots.Image(p, px(plotWMM), px(h), plotDPI)
		if err := placePNG(pdf, fmt.Sprintf("step%d-plot%d", st.Number, k), img, margin+float64(k)*(plotWMM+gap), y, plotWMM, h); err != nil {
			return err
		}
	}
	pdf.SetY(y + h + 2)
	return nil
}
