package ui

import (
	"path/filepath"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/models"
)

// menu is the window's main menu; it is rebuilt when the recent files change.
func (w *mainWindow) menu() *fyne.MainMenu {
	recent := fyne.NewMenuItem("Recent files", nil)
	var items []*fyne.MenuItem
	for _, p := range w.recent() {
		path := p
		items = append(items, fyne.NewMenuItem(filepath.Base(path)+"  ("+filepath.Dir(path)+")", func() { w.openPath(path) }))
	}
	if len(items) == 0 {
		none := fyne.NewMenuItem("none yet", nil)
		none.Disabled = true
		items = append(items, none)
	}
	recent.ChildMenu = fyne.NewMenu("", items...)
	file := fyne.NewMenu("File",
		fyne.NewMenuItem("Open canal (STL or canal JSON)…", w.openCanalDialog),
		fyne.NewMenuItem("Open a scan folder (DICOM or image slices)…", w.openScanFolderDialog),
		fyne.NewMenuItem("Open a scan file (NIfTI or DICOM multi-frame)…", w.openScanFileDialog),
		fyne.NewMenuItem("Open sequence…", w.openSequenceDialog),
		fyne.NewMenuItem("Save sequence…", w.saveSequenceDialog),
		recent,
		fyne.NewMenuItemSeparator(),
		fyne.NewMenuItem("Save the view as PNG…", w.exportPNG),
		fyne.NewMenuItem("Save the table as CSV…", w.exportCSV),
		fyne.NewMenuItem("Save the report as PDF…", w.exportPDF),
	)
	sequence := fyne.NewMenu("Sequence",
		fyne.NewMenuItem("Propose a sequence…", w.proposeDialog),
	)
	help := fyne.NewMenu("Help",
		fyne.NewMenuItem("How to move the view", w.showControlsHelp),
		fyne.NewMenuItem("About tapersweep", w.showAbout),
	)
	return fyne.NewMainMenu(file, sequence, help)
}

// aboutText is the About box: what the program is, and the safety wording.
func aboutText() string {
	return "tapersweep shows how a sequence of tapered files meets the wall of one root canal, " +
		"step by step, and measures it: where and how deep each file cuts, how much of it is engaged, " +
		"its bending strain where the canal bends most, fatigue use and torsional margin.\n\n" +
		"The canal and sequence it opens with are invented demo data. The built-in alloys carry " +
		models.IllustrativeNote + ".\n\n" + analysis.Caution
}

func (w *mainWindow) showAbout() {
	l := widget.NewLabel(aboutText())
	l.Wrapping = fyne.TextWrapWord
	d := dialog.NewCustom("About tapersweep", "Close", container.NewGridWrap(fyne.NewSize(520, 260), l), w.win)
	d.Show()
}

func (w *mainWindow) showControlsHelp() {
	l := widget.NewLabel("Drag: turn the canal.\nRight-drag or Shift-drag: move it.\nScroll: zoom.\n" +
		"Double-click: fit the canal in the view.\nPoint at the wall: depth of cut, distance from the apical end, canal radius.\n" +
		"Drop an STL, a canal JSON, a sequence JSON or a scan (folder, .nii, .dcm) on the window to open it.")
	dialog.NewCustom("Moving the view", "Close", l, w.win).Show()
}
