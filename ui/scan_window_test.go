package ui

import (
	"bytes"
	"fmt"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"

	"tapersweep/mesh"
	"tapersweep/mesh/volume/volumetest"
	"tapersweep/ui/report"
)

// openPatientScan opens the main window and a scan window on a synthetic series whose headers
// carry a made-up patient, with the canal's ends given, and waits until the canal is found
// and analysed.
func openPatientScan(t *testing.T) (*mainWindow, *scanWindow) {
	t.Helper()
	dir := volumetest.Phantom(t, "--voxel", "0.3", "--sigma", "1.0", "--factor", "2", "--formats", "series,multiframe",
		"--patient", volumetest.MadeUpPatient)
	o, x := volumetest.Ends(t, dir)
	a := test.NewApp()
	t.Cleanup(a.Quit)
	w := newMainWindow(a, queuedHandOver())
	w.win.Resize(fyne.NewSize(1280, 800))
	w.start(Options{})
	w.wait()
	t.Cleanup(w.view.close)
	sw := &scanWindow{main: w, opt: ScanOptions{Path: filepath.Join(dir, "series"), Orifice: &o, Apex: &x}, canals: []*scanCanal{{}}}
	sw.build()
	sw.load(false)
	w.wait()
	if sw.canals[0].canal == nil || w.canal != sw.canals[0].canal || w.res == nil {
		t.Fatalf("the scan's canal did not reach the main window: %s / %s", sw.status.Text, w.status.Text)
	}
	return w, sw
}

// The window finds the canal between the two ends, hands it to the analysis and draws its
// outline over the scan's slice.
func TestScanWindowFindsTheCanal(t *testing.T) {
	w, sw := openPatientScan(t)
	if w.canal.Name != "series" || !strings.Contains(w.canal.Source, "DICOM series") {
		t.Errorf("canal %q from %q", w.canal.Name, w.canal.Source)
	}
	if len(w.canal.Unresolved) == 0 {
		t.Error("the apical stretch of a 0.3 mm scan should be reported unresolved")
	}
	sw.redraw()
	outlined := 0
	pic := sw.axial.pic.img
	for i := 0; i < len(pic.Pix); i += 4 {
		if pic.Pix[i] == lumenColour.R && pic.Pix[i+1] == lumenColour.G && pic.Pix[i+2] == lumenColour.B {
			outlined++
		}
	}
	if outlined == 0 {
		t.Error("no lumen outline drawn over the scan's slice")
	}
	// A click on the axial slice places the apical end of a second canal where clicked.
	sw.canals = append(sw.canals, &scanCanal{})
	sw.current, sw.placing = 1, 1
	p := sw.axial.pic.world(10.5, 12.5)
	sw.clicked(p)
	if got := sw.canals[1].ends[1]; got == nil || got.Sub(p).Len() > 1e-9 {
		t.Errorf("apical end %v, clicked %v", got, p)
	}
	// Found too, the second canal is shown with the first drawn around it, and the other
	// way round when the first is chosen again (the phantom has one canal: found twice).
	sw.canals[1].ends = sw.canals[0].ends
	sw.find()
	w.wait()
	first, second := sw.canals[0].canal, sw.canals[1].canal
	if second == nil || w.canal != second {
		t.Fatalf("the second canal was not found and shown: %s", sw.status.Text)
	}
	if o := w.view.input().opt.Others; len(o) != 1 || o[0] != first.Mesh {
		t.Errorf("showing canal 2 the view draws %d other canals, want canal 1", len(o))
	}
	sw.canalSelect.SetSelected("Canal 1")
	w.wait()
	if o := w.view.input().opt.Others; w.canal != first || len(o) != 1 || o[0] != second.Mesh {
		t.Errorf("showing canal 1 again the view draws %d other canals, want canal 2", len(o))
	}
}

// No file the window saves, nor its titles, labels or recent files, carries a patient
// identifier unless the window's switch asks for it; then the report names the patient at
// the top of every page.
func TestScanWindowKeepsThePatientOut(t *testing.T) {
	w, sw := openPatientScan(t)
	ids := strings.Split(volumetest.MadeUpPatient, "|")
	ids = append(ids, "1901-02-03", "ZEBULON QUARTERMAINE")
	check := func(what string, data []byte) {
		for _, id := range ids {
			if bytes.Contains(bytes.ToUpper(data), bytes.ToUpper([]byte(id))) {
				t.Errorf("%s carries %q", what, id)
			}
		}
	}
	saved := savedFiles(t, w, sw)
	for name, data := range saved {
		check(name, data)
	}
	check("window titles and labels", []byte(strings.Join([]string{w.win.Title(), sw.win.Title(), sw.info.Text, sw.patient.Text,
		sw.status.Text, sw.points.Text, w.status.Text, w.summary.text.Text}, "\n")))
	check("recent files", []byte(strings.Join(w.recent(), "\n")))

	// The switch on: the patient is named on screen and on every page of the report.
	sw.showPatient = true
	sw.load(true)
	w.wait()
	if !strings.Contains(sw.patient.Text, "ZEBULON QUARTERMAINE") || !strings.Contains(w.scanPatient, "ZQ-4471-0093") {
		t.Fatalf("patient shown: %q, report: %q", sw.patient.Text, w.scanPatient)
	}
	named := savedFiles(t, w, sw)["report.pdf"]
	pages := strings.Split(pdfPages(t, named), "\f")
	n := 0
	for _, p := range pages {
		if strings.TrimSpace(p) == "" {
			continue
		}
		n++
		if !strings.Contains(p, "ZEBULON QUARTERMAINE") {
			t.Errorf("page %d does not name the patient", n)
		}
	}
	sw.showPatient = false
	sw.load(true)
	w.wait()
	if w.scanPatient != "" || sw.patient.Text != "" {
		t.Error("switching off leaves the patient named")
	}
}

// savedFiles are what the window's save commands write: canal and root STL, view PNG, table
// CSV, report PDF and the sequence.
func savedFiles(t *testing.T, w *mainWindow, sw *scanWindow) map[string][]byte {
	t.Helper()
	out := map[string][]byte{}
	var buf bytes.Buffer
	for _, root := range []bool{false, true} {
		buf.Reset()
		m := sw.canals[0].res.Lumen
		if root {
			m = sw.canals[0].res.Root
		}
		if err := writeMeshesSTL(&buf, "tapersweep surfaces found in "+sw.vol.Info.Label, []*mesh.Mesh{m}); err != nil {
			t.Fatal(err)
		}
		out[fmt.Sprintf("surface-root-%v.stl", root)] = append([]byte(nil), buf.Bytes()...)
	}
	in := w.view.input()
	cam, view := w.view.camera()
	img, err := viewPicture(in, cam, view, 640, 400)
	if err != nil {
		t.Fatal(err)
	}
	buf.Reset()
	png.Encode(&buf, img)
	out["view.png"] = append([]byte(nil), buf.Bytes()...)
	buf.Reset()
	if err := report.WriteCSV(&buf, w.res); err != nil {
		t.Fatal(err)
	}
	out["steps.csv"] = append([]byte(nil), buf.Bytes()...)
	buf.Reset()
	if err := report.WritePDF(&buf, w.res, w.reportOptions(w.res, view)); err != nil {
		t.Fatal(err)
	}
	out["report.pdf"] = append([]byte(nil), buf.Bytes()...)
	out["report.txt"] = []byte(pdfPages(t, out["report.pdf"]))
	seq, err := w.seq.MarshalJSON()
	if err != nil {
		t.Fatal(err)
	}
	out["sequence.json"] = seq
	return out
}

// pdfPages is a PDF's text by pdftotext (Debian poppler-utils); pages end in \f.
func pdfPages(t *testing.T, pdf []byte) string {
	t.Helper()
	tool, err := exec.LookPath("pdftotext")
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal("pdftotext (Debian poppler-utils) is needed")
		}
		t.Skip("pdftotext not installed")
	}
	f := filepath.Join(t.TempDir(), "r.pdf")
	if err := os.WriteFile(f, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	text, err := exec.Command(tool, "-enc", "UTF-8", f, "-").Output()
	if err != nil {
		t.Fatal(err)
	}
	return string(text)
}
