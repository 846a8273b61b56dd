// Package report writes a sequence run out for people who do not have the window open: a PDF
// (summary page, one page per step with a view, profile plots, advice and numbers), a CSV with
// one row per step, and PNG views. It builds on ui/scene for pictures and gonum plots for
// profiles.
package report

import (
	"bytes"
	"fmt"
	"io"
	"path/filepath"

	"codeberg.org/go-pdf/fpdf"

	"tapersweep/analysis"
	"tapersweep/ui/scene"
)

// Options say what the PDF shows.
type Options struct {
	Title        string // heading of the first page; default: the canal's name
	CanalFile    string // the canal file as the user named it, shown on the summary page
	SequenceFile string // the sequence file, shown on the summary page
	View         string // named view of the step pictures (scene.Views); default the first
	// ImageWidth x ImageHeight is the size in pixels of each step's picture, printed 84 mm wide
	// (at most 130 mm high); 0 = 1040 x 1560.
	ImageWidth, ImageHeight int
	// Patient names the patient at the top of every page; only when the user asked for it
	// (by default no output carries a patient identifier).
	Patient string
}

func (o Options) withDefaults(res *analysis.Result) Options {
	if o.Title == "" {
		o.Title = res.Canal.Name
	}
	if o.View == "" {
		o.View = scene.Views[0].Name
	}
	if o.ImageWidth <= 0 || o.ImageHeight <= 0 {
		o.ImageWidth, o.ImageHeight = 1040, 1560
	}
	return o
}

// Page geometry, mm (A4 portrait).
const (
	pageW   = 210.0
	pageH   = 297.0
	margin  = 14.0
	bodyW   = pageW - 2*margin
	bottomM = 14.0
)

// Font families registered in every document.
const (
	fontRegular = "goregular"
	fontBold    = "gobold"
)

// WritePDF writes the report of a run: a summary page, then one page per step.
func WritePDF(w io.Writer, res *analysis.Result, opt Options) error {
	if res == nil || res.Canal == nil {
		return fmt.Errorf("report: no run to report")
	}
	opt = opt.withDefaults(res)
	if err := checkView(opt.View); err != nil {
		return err
	}
	pdf := newDocument(opt)
	sum := res.Summary()
	summaryPage(pdf, res, sum, opt)
	for _, st := range res.Steps {
		if err := stepPage(pdf, res, st, opt); err != nil {
			return fmt.Errorf("report: step %d: %w", st.Number, err)
		}
		if err := pdf.Error(); err != nil {
			return fmt.Errorf("report: step %d: %w", st.Number, err)
		}
	}
	if err := pdf.Error(); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	// fpdf builds the whole document in memory; write it once so a failed write is reported.
	var buf bytes.Buffer
	if err := pdf.Output(&buf); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	_, err := w.Write(buf.Bytes())
	return err
}

func checkView(view string) error {
	for _, v := range scene.ViewNames() {
		if v == view {
			return nil
		}
	}
	return fmt.Errorf("report: unknown view %q (views: %v)", view, scene.ViewNames())
}

// newDocument sets up an A4 document with the Go fonts (UTF-8, so mm², ° and ≤ print) and a
// footer that carries the page number and a pointer to the caution.
func newDocument(opt Options) *fpdf.Fpdf {
	pdf := fpdf.New("P", "mm", "A4", "")
	pdf.SetMargins(margin, margin, margin)
	pdf.SetAutoPageBreak(true, bottomM+6)
	pdf.AddUTF8FontFromBytes(fontRegular, "", goRegularTTF)
	pdf.AddUTF8FontFromBytes(fontBold, "", goBoldTTF)
	pdf.SetTitle("tapersweep report: "+opt.Title, true)
	pdf.SetCreator("tapersweep", true)
	pdf.AliasNbPages("{pages}")
	if opt.Patient != "" {
		pdf.SetHeaderFunc(func() {
			pdf.SetFont(fontBold, "", 8)
			pdf.CellFormat(bodyW, 4, "Named at the user's request: "+opt.Patient, "", 1, "L", false, 0, "")
			pdf.Ln(1)
		})
	}
	pdf.SetFooterFunc(func() {
		pdf.SetY(-bottomM)
		pdf.SetFont(fontRegular, "", 7.5)
		pdf.SetTextColor(110, 110, 110)
		left := "tapersweep report"
		if opt.CanalFile != "" {
			left += " · " + filepath.Base(opt.CanalFile)
		}
		left += " · model estimates, not a guarantee: see the caution on page 1"
		pdf.CellFormat(bodyW-30, 4, left, "", 0, "L", false, 0, "")
		pdf.CellFormat(30, 4, fmt.Sprintf("page %d of {pages}", pdf.PageNo()), "", 0, "R", false, 0, "")
		pdf.SetTextColor(0, 0, 0)
	})
	return pdf
}
