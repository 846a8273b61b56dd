package ui

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/widget"
	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/analysis/segment"
	"tapersweep/mesh"
	"tapersweep/mesh/volume"
)

// ScanOptions say how the window opens a scan (from the command line).
type ScanOptions struct {
	Path  string
	Voxel float64 // mm, for stacks of image slices
	Label string
	// Orifice and Apex, when both given, place the first canal's ends and find it at once.
	Orifice, Apex *mgl64.Vec3
}

// scanCanal is one canal of the scan: the two ends the user placed and what was found.
type scanCanal struct {
	ends  [2]*mgl64.Vec3 // orifice, apical end
	res   *segment.Result
	canal *analysis.Canal
}

// scanWindow shows a scan in three slices (the scan's own, and two long sections: along the
// found canal, straightened, or through the last point placed), lets the user place each
// canal's two ends, finds the canals and hands the chosen one to the main window.
type scanWindow struct {
	main *mainWindow
	win  fyne.Window
	opt  ScanOptions
	vol  *volume.Volume

	canals  []*scanCanal
	current int // the canal being placed or shown
	placing int // 0: a click places the orifice, 1: the apical end
	slice   int // the axial slice shown
	levels  greyLevels
	focus   mgl64.Vec3 // where the sections cross before a canal is found

	axial, long1, long2 *sliceView
	sliceSlider         *widget.Slider
	levelSlider         *widget.Slider
	windowSlider        *widget.Slider
	canalSelect         *widget.Select
	placeRadio          *widget.RadioGroup
	points              *widget.Label
	info                *widget.Label
	patient             *widget.Label
	status              *widget.Label
	progress            *widget.ProgressBar
	findButton          *widget.Button
	cancelButton        *widget.Button
	cancel              context.CancelFunc
	showPatient         bool
	syncing             bool // controls are being set from the state: their callbacks do nothing
}

// openScanPath opens a scan in its own window (the scan is read in the background).
func (w *mainWindow) openScanPath(opt ScanOptions) {
	sw := &scanWindow{main: w, opt: opt, canals: []*scanCanal{{}}}
	sw.build()
	sw.win.Show()
	sw.load(false)
}

func (sw *scanWindow) build() {
	sw.win = sw.main.app.NewWindow("tapersweep: scan")
	sw.win.Resize(fyne.NewSize(1200, 760))
	sw.axial = newSliceView(sw.clicked)
	sw.long1 = newSliceView(sw.clicked)
	sw.long2 = newSliceView(sw.clicked)
	sw.sliceSlider = widget.NewSlider(0, 1)
	sw.sliceSlider.Step = 1
	sw.sliceSlider.OnChanged = func(v float64) {
		if !sw.syncing {
			sw.slice = int(v)
			sw.redraw()
		}
	}
	sw.levelSlider = widget.NewSlider(-2000, 5000)
	sw.windowSlider = widget.NewSlider(10, 8000)
	sw.levelSlider.OnChanged = func(v float64) { sw.levels.level = v; sw.redraw() }
	sw.windowSlider.OnChanged = func(v float64) { sw.levels.window = v; sw.redraw() }
	sw.info = widget.NewLabel("Reading the scan…")
	sw.info.Wrapping = fyne.TextWrapWord
	sw.patient = widget.NewLabel("")
	showName := widget.NewCheck("Show the patient's name", func(on bool) {
		sw.showPatient = on
		sw.load(true)
	})
	sw.canalSelect = widget.NewSelect(nil, func(s string) {
		if sw.syncing {
			return
		}
		var n int
		if _, err := fmt.Sscanf(s, "Canal %d", &n); err == nil && n >= 1 && n <= len(sw.canals) {
			sw.current = n - 1
			sw.showCurrent()
		}
	})
	addCanal := widget.NewButton("Add a canal", func() {
		sw.canals = append(sw.canals, &scanCanal{})
		sw.current = len(sw.canals) - 1
		sw.placing = 0
		sw.refreshControls()
	})
	sw.placeRadio = widget.NewRadioGroup([]string{"orifice", "apical end"}, func(s string) {
		sw.placing = 0
		if s == "apical end" {
			sw.placing = 1
		}
	})
	sw.placeRadio.Horizontal = true
	sw.placeRadio.SetSelected("orifice")
	sw.points = widget.NewLabel("")
	sw.points.Wrapping = fyne.TextWrapWord
	sw.status = widget.NewLabel("Click on a slice to place the canal's orifice, then its apical end.")
	sw.status.Wrapping = fyne.TextWrapWord
	sw.progress = widget.NewProgressBar()
	sw.progress.Hide()
	sw.findButton = widget.NewButton("Find the canal", sw.find)
	sw.cancelButton = widget.NewButton("Cancel", func() {
		if sw.cancel != nil {
			sw.cancel()
		}
	})
	sw.cancelButton.Hide()
	saveCanal := widget.NewButton("Save the canal surface (STL)…", func() { sw.saveSTL("canal.stl", false) })
	saveRoot := widget.NewButton("Save the root surface (STL)…", func() { sw.saveSTL("root.stl", true) })
	caution := widget.NewLabel(segment.Caution)
	caution.Wrapping = fyne.TextWrapWord

	titled := func(title string, v fyne.CanvasObject, below fyne.CanvasObject) fyne.CanvasObject {
		return container.NewBorder(sectionTitle(title), below, nil, nil, v)
	}
	views := container.NewGridWithColumns(3,
		titled("The scan's own slice", sw.axial, sw.sliceSlider),
		titled("Long section across the canal", sw.long1, nil),
		titled("Long section, turned a quarter", sw.long2, nil))
	controls := container.NewVBox(
		sw.info, container.NewHBox(showName), sw.patient,
		widget.NewSeparator(),
		container.NewHBox(sw.canalSelect, addCanal),
		container.NewHBox(widget.NewLabel("A click places the"), sw.placeRadio),
		sw.points,
		container.NewHBox(sw.findButton, sw.cancelButton), sw.progress, sw.status,
		widget.NewSeparator(),
		saveCanal, saveRoot,
		widget.NewSeparator(),
		widget.NewLabel("Grey levels: centre and width"), sw.levelSlider, sw.windowSlider,
		widget.NewSeparator(),
		caution)
	split := container.NewHSplit(views, container.NewVScroll(controls))
	split.Offset = 0.72
	sw.win.SetContent(split)
	sw.win.SetOnClosed(func() {
		if sw.cancel != nil {
			sw.cancel()
		}
		sw.vol = nil
	})
	sw.refreshControls()
}

// load reads the scan (again, when the patient's name is asked for or hidden).
func (sw *scanWindow) load(again bool) {
	opt := volume.Options{Voxel: sw.opt.Voxel, Label: sw.opt.Label, ReadPatient: sw.showPatient}
	path := sw.opt.Path
	sw.main.ui.spawn(func() {
		v, err := volume.Open(context.Background(), path, opt)
		sw.main.ui.postAndWait(func() {
			if err != nil && sw.opt.Voxel == 0 && strings.Contains(err.Error(), "--voxel") {
				sw.askVoxel()
				return
			}
			if err != nil {
				sw.status.SetText("Could not open the scan: " + err.Error())
				dialog.ShowError(err, sw.win)
				return
			}
			first := sw.vol == nil
			sw.vol = v
			sw.win.SetTitle("tapersweep: scan " + v.Info.Label)
			sw.info.SetText(v.Describe())
			sw.patient.SetText("")
			if sw.showPatient {
				sw.patient.SetText(patientText(v))
			}
			sw.main.scanPatient = ""
			if sw.showPatient {
				sw.main.scanPatient = patientText(v)
			}
			if first && !again {
				sw.levels = defaultLevels(v)
				sw.slice = v.NZ / 2
				sw.focus = v.World(mgl64.Vec3{float64(v.NX) / 2, float64(v.NY) / 2, float64(v.NZ) / 2})
				sw.sliceSlider.Max = float64(v.NZ - 1)
				sw.sliceSlider.SetValue(float64(sw.slice))
				sw.levelSlider.SetValue(sw.levels.level)
				sw.windowSlider.SetValue(sw.levels.window)
				sw.main.remember(path)
				if sw.opt.Orifice != nil && sw.opt.Apex != nil {
					sw.setEnd(0, *sw.opt.Orifice)
					sw.setEnd(1, *sw.opt.Apex)
					sw.find()
				}
			}
			sw.redraw()
		})
	})
}

// askVoxel asks for the voxel size of a stack of image slices, whose files do not state it.
func (sw *scanWindow) askVoxel() {
	entry := widget.NewEntry()
	entry.SetPlaceHolder("0.02")
	dialog.ShowForm("Voxel size of the slices", "Open", "Cancel",
		[]*widget.FormItem{widget.NewFormItem("Voxel edge (mm)", entry)}, func(ok bool) {
			if !ok {
				return
			}
			var v float64
			if _, err := fmt.Sscanf(entry.Text, "%g", &v); err != nil || !(v > 0) || v > 10 {
				sw.status.SetText("The voxel size must be a number of mm above 0.")
				return
			}
			sw.opt.Voxel = v
			sw.load(false)
		}, sw.win)
}

// patientText names the patient from the scan's header, for the user who asked.
func patientText(v *volume.Volume) string {
	p := v.Info.Patient
	if p == nil || (p.Name == "" && p.ID == "") {
		return "The scan does not name the patient."
	}
	return fmt.Sprintf("Patient: %s (ID %s)", strings.ReplaceAll(p.Name, "^", " "), p.ID)
}

// clicked places the end being placed at a point of the scan.
func (sw *scanWindow) clicked(p mgl64.Vec3) {
	if sw.vol == nil || !sw.vol.Contains(p) {
		return
	}
	sw.setEnd(sw.placing, p)
	if sw.placing == 0 {
		sw.placeRadio.SetSelected("apical end")
	}
	sw.redraw()
}

func (sw *scanWindow) setEnd(which int, p mgl64.Vec3) {
	c := sw.canals[sw.current]
	q := p
	c.ends[which] = &q
	c.res, c.canal = nil, nil
	sw.focus = p
	sw.slice = max(0, min(sw.vol.NZ-1, int(math.Round(sw.vol.IndexOf(p)[2]))))
	sw.syncing = true
	sw.sliceSlider.SetValue(float64(sw.slice))
	sw.syncing = false
	sw.refreshControls()
}

func (sw *scanWindow) refreshControls() {
	var names []string
	for i := range sw.canals {
		names = append(names, fmt.Sprintf("Canal %d", i+1))
	}
	sw.syncing = true
	sw.canalSelect.Options = names
	sw.canalSelect.SetSelectedIndex(sw.current)
	sw.syncing = false
	c := sw.canals[sw.current]
	point := func(p *mgl64.Vec3) string {
		if p == nil {
			return "not placed"
		}
		return fmt.Sprintf("(%.2f, %.2f, %.2f) mm", p[0], p[1], p[2])
	}
	text := "Orifice: " + point(c.ends[0]) + "\nApical end: " + point(c.ends[1])
	if c.res != nil {
		s := analysis.ArcLengths(c.res.Path)
		L := s[len(s)-1]
		text += fmt.Sprintf("\nFound: a path of %.2f mm.", L)
		for _, u := range c.res.Unresolved {
			text += fmt.Sprintf("\nNot resolved in the scan from %.1f to %.1f mm from the apical end.", L-u.From, L-u.To)
		}
	}
	sw.points.SetText(text)
	if c.ends[0] != nil && c.ends[1] != nil {
		sw.findButton.Enable()
	} else {
		sw.findButton.Disable()
	}
}

// showCurrent hands the current canal to the main window, if found, and redraws.
func (sw *scanWindow) showCurrent() {
	sw.refreshControls()
	if c := sw.canals[sw.current]; c.canal != nil {
		// The tooth's other canals found so far are drawn around this one.
		var others []*mesh.Mesh
		for i, o := range sw.canals {
			if i != sw.current && o.canal != nil {
				others = append(others, o.canal.Mesh)
			}
		}
		sw.main.others = others
		sw.main.setCanal(c.canal)
		sw.main.win.SetTitle(fmt.Sprintf("tapersweep: %s, canal %d", sw.vol.Info.Label, sw.current+1))
	}
	sw.redraw()
}

// find segments the current canal in the background, with progress and cancel.
func (sw *scanWindow) find() {
	c := sw.canals[sw.current]
	if sw.vol == nil || c.ends[0] == nil || c.ends[1] == nil {
		return
	}
	if sw.cancel != nil {
		sw.cancel()
	}
	ctx, cancel := context.WithCancel(context.Background())
	sw.cancel = cancel
	v, pts, n := sw.vol, segment.Points{Orifice: *c.ends[0], Apex: *c.ends[1]}, sw.current
	sw.progress.SetValue(0)
	sw.progress.Show()
	sw.cancelButton.Show()
	sw.findButton.Disable()
	sw.status.SetText("Finding the canal…")
	label := v.Info.Label
	if len(sw.canals) > 1 {
		label = fmt.Sprintf("%s, canal %d", label, n+1)
	}
	source := v.Describe()
	sw.main.ui.spawn(func() {
		res, err := segment.Find(ctx, v, pts, segment.Options{Progress: func(stage string, f float64) {
			sw.main.ui.post(func() { sw.progress.SetValue(f); sw.status.SetText("Finding the canal: " + stage + "…") })
		}})
		var canal *analysis.Canal
		if err == nil {
			canal, err = res.Measure(ctx, label, analysis.CanalOptions{})
		}
		if err == nil {
			canal.Source = source
			canal.Warnings = append(canal.Warnings, segment.Caution)
		}
		sw.main.ui.postAndWait(func() {
			sw.progress.Hide()
			sw.cancelButton.Hide()
			sw.findButton.Enable()
			switch {
			case errors.Is(err, context.Canceled) || ctx.Err() != nil:
				sw.status.SetText("Stopped; place the ends again or find again.")
				return
			case err != nil:
				sw.status.SetText("Could not find the canal: " + err.Error())
				return
			}
			sc := sw.canals[n]
			sc.res, sc.canal = res, canal
			// Show a slice a third of the way down, where the lumen is outlined.
			sw.slice = max(0, min(sw.vol.NZ-1, int(math.Round(sw.vol.IndexOf(res.Path[len(res.Path)/3])[2]))))
			sw.syncing = true
			sw.sliceSlider.SetValue(float64(sw.slice))
			sw.syncing = false
			sw.status.SetText("Found. The canal is measured in the main window; the outlines show here.")
			sw.current = n
			sw.showCurrent()
		})
	})
}

// redraw draws the three slices with the ends and outlines of every canal.
func (sw *scanWindow) redraw() {
	v := sw.vol
	if v == nil {
		return
	}
	k := max(0, min(v.NZ-1, sw.slice))
	ax := axialPicture(v, k, sw.levels)
	for i, c := range sw.canals {
		if c.res != nil {
			drawMeshSection(ax.img, v, c.res.Root, float64(k), rootColour)
			drawMeshSection(ax.img, v, c.res.Lumen, float64(k), lumenColour)
		}
		for e, p := range c.ends {
			if p == nil {
				continue
			}
			q := v.IndexOf(*p)
			if math.Abs(q[2]-float64(k)) <= 2 {
				col := orificeColour
				if e == 1 {
					col = apexColour
				}
				r := 4.0
				if i != sw.current {
					r = 2.5
				}
				drawMarker(ax.img, q[0]+0.5, q[1]+0.5, r, col)
			}
		}
	}
	sw.axial.show(ax)
	if c := sw.canals[sw.current]; c.res != nil {
		sw.long1.show(straightPicture(v, c.res, 0, 3.5, sw.levels))
		sw.long2.show(straightPicture(v, c.res, c.res.Rays/4, 3.5, sw.levels))
		return
	}
	// Before a canal is found: the planes of the grid through the last point, the scan's
	// slice axis pointing up.
	px := v.MinSpacing()
	size := func(n int, sp float64) int { return int(math.Ceil(float64(n) * sp / px)) }
	up := v.Axes[2].Mul(-1)
	p1 := planePicture(v, sw.focus, v.Axes[0], up, size(v.NX, v.Spacing[0]), size(v.NZ, v.Spacing[2]), px, sw.levels)
	p2 := planePicture(v, sw.focus, v.Axes[1], up, size(v.NY, v.Spacing[1]), size(v.NZ, v.Spacing[2]), px, sw.levels)
	for _, pic := range []*slicePicture{p1, p2} {
		for e, p := range sw.canals[sw.current].ends {
			if p == nil {
				continue
			}
			// where the end lies on this plane (pixels), found by inverting the plane's map
			o := pic.world(0, 0)
			ax := pic.world(1, 0).Sub(o)
			dn := pic.world(0, 1).Sub(o)
			d := p.Sub(o)
			col := orificeColour
			if e == 1 {
				col = apexColour
			}
			drawMarker(pic.img, d.Dot(ax)/ax.Dot(ax), d.Dot(dn)/dn.Dot(dn), 4, col)
		}
	}
	sw.long1.show(p1)
	sw.long2.show(p2)
}

// saveSTL writes every found canal's lumen (or root) surface as one STL, a surface each.
func (sw *scanWindow) saveSTL(name string, root bool) {
	var meshes []*mesh.Mesh
	for _, c := range sw.canals {
		if c.res == nil {
			continue
		}
		if root {
			meshes = append(meshes, c.res.Root)
		} else {
			meshes = append(meshes, c.res.Lumen)
		}
	}
	if len(meshes) == 0 {
		dialog.ShowError(errors.New("no canal found yet: place its two ends and find it first"), sw.win)
		return
	}
	what := "canal"
	if root {
		what = "root"
	}
	header := fmt.Sprintf("tapersweep %s surfaces found in %s", what, sw.vol.Info.Label)
	sw.main.saveDialog(name, []string{".stl"}, func(out io.Writer) error { return writeMeshesSTL(out, header, meshes) })
}

// writeMeshesSTL writes meshes as one binary STL, each a separate surface.
func writeMeshesSTL(out io.Writer, header string, meshes []*mesh.Mesh) error {
	return mesh.WriteSTL(out, mesh.Join(meshes...), header)
}

// isScanPath tells a scan (a folder, a NIfTI file, a DICOM file) from the other files opened.
func isScanPath(path string) bool {
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		return true
	}
	l := strings.ToLower(path)
	if strings.HasSuffix(l, ".nii") || strings.HasSuffix(l, ".nii.gz") || strings.HasSuffix(l, ".dcm") {
		return true
	}
	f, err := os.Open(path)
	if err != nil {
		return false
	}
	defer f.Close()
	var head [132]byte
	n, _ := io.ReadFull(f, head[:])
	return n == 132 && string(head[128:]) == "DICM"
}

// openScanFolderDialog asks for a folder of DICOM slices or image slices.
func (w *mainWindow) openScanFolderDialog() {
	d := dialog.NewFolderOpen(func(u fyne.ListableURI, err error) {
		if err != nil || u == nil {
			return
		}
		w.openScanPath(ScanOptions{Path: u.Path()})
	}, w.win)
	d.Show()
}

// openScanFileDialog asks for a NIfTI or DICOM multi-frame file.
func (w *mainWindow) openScanFileDialog() {
	d := dialog.NewFileOpen(func(r fyne.URIReadCloser, err error) {
		if err != nil || r == nil {
			return
		}
		path := r.URI().Path()
		r.Close()
		w.openScanPath(ScanOptions{Path: path})
	}, w.win)
	d.SetFilter(storage.NewExtensionFileFilter([]string{".nii", ".gz", ".dcm"}))
	w.startIn(d)
	d.Show()
}
