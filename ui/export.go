package ui

import (
	"errors"
	"image"
	"image/png"
	"io"
	"strconv"

	"fyne.io/fyne/v2/dialog"

	"tapersweep/analysis"
	"tapersweep/ui/render"
	"tapersweep/ui/report"
	"tapersweep/ui/scene"
)

// viewPicture draws what the viewport shows from its camera, supersampled, with the title and
// legend, at the viewport's pixel size (at least 640 x 400). It is safe off the UI goroutine:
// it works on copies taken by the caller.
func viewPicture(in sceneInput, cam render.Camera, view string, pw, ph int) (*image.RGBA, error) {
	if in.canal == nil {
		return nil, errors.New("no canal to draw yet")
	}
	b, err := scene.Build(in.canal, in.res, in.opt)
	if err != nil {
		return nil, err
	}
	pw, ph = max(pw, 640), max(ph, 400)
	img := image.NewRGBA(image.Rect(0, 0, pw, ph))
	r := render.NewRenderer()
	defer r.Close()
	r.Render(img, b.Scene, &cam, render.Options{Supersample: 2})
	scene.Decorate(img, b, in.canal, view)
	return img, nil
}

// exportPNG saves the view as it is on screen.
func (w *mainWindow) exportPNG() {
	if w.canal == nil {
		dialog.ShowError(errors.New("no canal to draw yet"), w.win)
		return
	}
	in := w.view.input()
	cam, view := w.view.camera()
	pw, ph := w.view.pixelSize()
	name := "canal.png"
	if in.opt.Step > 0 {
		name = "step" + strconv.Itoa(in.opt.Step) + ".png"
	}
	w.saveDialog(name, []string{".png"}, func(out io.Writer) error {
		img, err := viewPicture(in, cam, view, pw, ph)
		if err != nil {
			return err
		}
		return png.Encode(out, img)
	})
}

// exportCSV saves the step table, one row per step, in the columns every output shares.
func (w *mainWindow) exportCSV() {
	res := w.res
	if res == nil {
		dialog.ShowError(errors.New("no analysis to save yet"), w.win)
		return
	}
	w.saveDialog("steps.csv", []string{".csv"}, func(out io.Writer) error { return report.WriteCSV(out, res) })
}

// exportPDF writes the report: a summary page and a page per step.
func (w *mainWindow) exportPDF() {
	res := w.res
	if res == nil {
		dialog.ShowError(errors.New("no analysis to report yet"), w.win)
		return
	}
	_, view := w.view.camera()
	opt := w.reportOptions(res, view)
	w.saveDialog("report.pdf", []string{".pdf"}, func(out io.Writer) error { return report.WritePDF(out, res, opt) })
}

// reportOptions are what a saved report says of the canal and sequence; the patient only when
// the scan window's switch asks for it.
func (w *mainWindow) reportOptions(res *analysis.Result, view string) report.Options {
	return report.Options{View: view, SequenceFile: res.Sequence.Name, CanalFile: res.Canal.Name, Patient: w.scanPatient}
}
