package ui

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"sync/atomic"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/mesh"
	"tapersweep/models"
)

// recentKey is where the preferences keep recently opened files, newest first.
const (
	recentKey = "recent_files"
	recentMax = 8
)

// loadProgress is the dialog shown while a canal is read and measured, with a cancel button.
type loadProgress struct {
	dlg    dialog.Dialog
	bar    *widget.ProgressBar
	busy   *widget.ProgressBarInfinite
	stage  *widget.Label
	cancel context.CancelFunc
}

// canalLoader reads and measures a canal, reporting progress (stage, done, total bytes).
type canalLoader func(ctx context.Context, progress func(stage string, done, total int64)) (*analysis.Canal, error)

// loadCanal runs a canal loader off the UI goroutine with progress and cancel; a finished canal
// replaces the current one and the sequence is run through it. The built-in demo loads
// without the dialog (the status line says it).
func (w *mainWindow) loadCanal(name string, withDialog bool, load canalLoader) {
	if w.loader != nil {
		w.loader.cancel()
		w.loader.dlg.Hide()
	}
	ctx, cancel := context.WithCancel(context.Background())
	lp := &loadProgress{bar: widget.NewProgressBar(), busy: widget.NewProgressBarInfinite(),
		stage: widget.NewLabel("reading " + name), cancel: cancel}
	lp.bar.Hide()
	cancelButton := widget.NewButton("Cancel", func() {
		cancel()
		w.setStatus("Loading " + name + " cancelled; the previous canal stays.")
	})
	lp.dlg = dialog.NewCustomWithoutButtons("Opening a canal",
		container.NewVBox(lp.stage, lp.bar, lp.busy, cancelButton), w.win)
	lp.dlg.Resize(fyne.NewSize(440, 160))
	w.loader = lp
	if withDialog {
		lp.dlg.Show()
	}
	w.setStatus("Measuring " + name + "…")
	w.summary.showLoading(name)

	var lastShown atomic.Int64
	progress := func(stage string, done, total int64) {
		if total <= 0 {
			return
		}
		pct := done * 100 / total
		if pct == lastShown.Load() {
			return // one update per percent keeps the UI queue short
		}
		lastShown.Store(pct)
		w.ui.post(func() {
			lp.busy.Hide()
			lp.bar.Show()
			lp.bar.SetValue(float64(done) / float64(total))
			lp.stage.SetText(stage + " " + name)
			if done >= total {
				lp.stage.SetText("finding the centerline and measuring the wall…")
				lp.bar.Hide()
				lp.busy.Show()
			}
		})
	}
	w.ui.spawn(func() {
		c, err := load(ctx, progress)
		w.ui.postAndWait(func() {
			lp.busy.Stop()
			lp.dlg.Hide()
			if w.loader == lp {
				w.loader = nil
			}
			switch {
			case errors.Is(err, context.Canceled) || ctx.Err() != nil:
				if w.canal != nil {
					w.summary.showMeasures(w.canal)
				}
				return
			case err != nil:
				w.setStatus("Could not open the canal: " + err.Error())
				w.summary.showFailure(name, err, w.canal)
				dialog.ShowError(err, w.win)
				return
			}
			w.others = nil // a canal opened on its own has no neighbours from a scan
			w.setCanal(c)
		})
	})
}

// loadCanalPath opens an STL or canal JSON from disk.
func (w *mainWindow) loadCanalPath(path string) {
	scale := w.scale
	w.loadCanal(filepath.Base(path), true, func(ctx context.Context, progress func(string, int64, int64)) (*analysis.Canal, error) {
		// Streamed from disk: Cancel stops the read itself. A surface whose measures cannot be
		// trusted is shown with its warnings rather than refused: the window is where one looks.
		opt := analysis.LoadOptions{Progress: progress, Force: true}
		if strings.EqualFold(filepath.Ext(path), ".stl") {
			opt.Scale = scale
		}
		c, err := analysis.LoadCanal(ctx, path, opt)
		if err == nil {
			w.ui.post(func() { w.remember(path) })
		}
		return c, err
	})
}

func readAllLimited(name string, r io.Reader) ([]byte, error) {
	data, err := io.ReadAll(io.LimitReader(r, mesh.MaxSTLBytes+1))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	if len(data) > mesh.MaxSTLBytes {
		return nil, fmt.Errorf("%s: larger than %d GB: too big to be a canal surface", name, mesh.MaxSTLBytes>>30)
	}
	return data, nil
}

// openSequencePath reads a sequence file and runs it; a bad file leaves the current one.
func (w *mainWindow) openSequencePath(path string) {
	seq, err := models.LoadSequence(path)
	if err == nil && w.canal != nil {
		err = seq.CheckDepths(w.canal.Line.Length(), w.canal.WorkingLength)
	}
	if err != nil {
		w.setStatus("Could not open the sequence: " + err.Error())
		dialog.ShowError(err, w.win)
		return
	}
	w.remember(path)
	w.takeSequence(seq)
}

// takeSequence replaces the sequence (opened or adopted) and runs it.
func (w *mainWindow) takeSequence(seq *models.Sequence) {
	w.seq = seq
	w.selected = 0
	w.res = nil
	w.path.show(seq.PathModel, nil)
	w.showStepState()
	w.rerun()
}

// openPath opens any file the program reads, told apart by its name and content.
func (w *mainWindow) openPath(path string) {
	if isScanPath(path) {
		w.openScanPath(ScanOptions{Path: path})
		return
	}
	if strings.EqualFold(filepath.Ext(path), ".stl") {
		w.loadCanalPath(path)
		return
	}
	head := make([]byte, 64<<10)
	f, _, err := mesh.OpenInput(path, 0) // a named pipe would block the window
	if err != nil {
		w.setStatus(err.Error())
		return
	}
	n, _ := io.ReadFull(f, head)
	f.Close()
	head = head[:n]
	if isCanalFile(head) {
		w.loadCanalPath(path)
		return
	}
	w.openSequencePath(path)
}

// isCanalFile tells a canal spec or an STL from a sequence by the start of the file.
func isCanalFile(head []byte) bool {
	if !models.LooksLikeJSON(head) {
		return true // not JSON: an STL
	}
	return bytes.Contains(head, []byte(`"segments"`))
}

// dropped opens files dropped on the window.
func (w *mainWindow) dropped(_ fyne.Position, uris []fyne.URI) {
	for _, u := range uris {
		if u.Scheme() != "file" {
			w.setStatus("Only local files can be opened: " + u.String())
			continue
		}
		w.openPath(u.Path())
	}
}

// remember puts a path at the top of the recent files.
func (w *mainWindow) remember(path string) {
	if abs, err := filepath.Abs(path); err == nil {
		path = abs
	}
	prefs := w.app.Preferences()
	list := []string{path}
	for _, p := range prefs.StringList(recentKey) {
		if p != path && len(list) < recentMax {
			list = append(list, p)
		}
	}
	prefs.SetStringList(recentKey, list)
	w.win.SetMainMenu(w.menu())
}

func (w *mainWindow) recent() []string { return w.app.Preferences().StringList(recentKey) }

// ---- dialogs ----

func (w *mainWindow) openCanalDialog() {
	d := dialog.NewFileOpen(func(r fyne.URIReadCloser, err error) {
		if err != nil || r == nil {
			return
		}
		uri := r.URI()
		name := uri.Name()
		if uri.Scheme() == "file" {
			r.Close()
			w.loadCanalPath(uri.Path())
			return
		}
		w.loadCanal(name, true, func(ctx context.Context, progress func(string, int64, int64)) (*analysis.Canal, error) {
			defer r.Close()
			data, err := readAllLimited(name, r)
			if err != nil {
				return nil, err
			}
			return analysis.LoadCanalBytes(ctx, name, data, analysis.LoadOptions{Progress: progress, Force: true})
		})
	}, w.win)
	d.SetFilter(storage.NewExtensionFileFilter([]string{".stl", ".STL", ".json"}))
	w.startIn(d)
	d.Show()
}

func (w *mainWindow) openSequenceDialog() {
	d := dialog.NewFileOpen(func(r fyne.URIReadCloser, err error) {
		if err != nil || r == nil {
			return
		}
		defer r.Close()
		if r.URI().Scheme() == "file" {
			w.openSequencePath(r.URI().Path())
			return
		}
		data, err := io.ReadAll(io.LimitReader(r, 4<<20))
		if err == nil {
			var seq *models.Sequence
			if seq, err = models.ParseSequence(r.URI().Name(), data); err == nil {
				w.takeSequence(seq)
				return
			}
		}
		dialog.ShowError(err, w.win)
	}, w.win)
	d.SetFilter(storage.NewExtensionFileFilter([]string{".json"}))
	w.startIn(d)
	d.Show()
}

// saveDialog asks for a file to write and hands it to write, off the UI goroutine (pictures
// and reports take a moment); the outcome shows in the status line.
func (w *mainWindow) saveDialog(name string, exts []string, write func(io.Writer) error) {
	d := dialog.NewFileSave(func(wc fyne.URIWriteCloser, err error) {
		if err != nil || wc == nil {
			return
		}
		path := wc.URI().Path()
		w.setStatus("Saving " + path + "…")
		w.ui.spawn(func() {
			err := write(wc)
			if a, ok := wc.(interface{ Abort() }); ok && err != nil {
				a.Abort() // the old file stays as it was
			} else if cerr := wc.Close(); err == nil {
				err = cerr
			}
			w.ui.postAndWait(func() {
				if err != nil {
					w.setStatus("Could not save " + path + ": " + err.Error())
					dialog.ShowError(err, w.win)
					return
				}
				w.setStatus("Saved " + path)
			})
		})
	}, w.win)
	d.SetFileName(name)
	d.SetFilter(storage.NewExtensionFileFilter(exts))
	w.startIn(d)
	d.Show()
}

// startIn opens file dialogs in the folder of the most recent file.
func (w *mainWindow) startIn(d *dialog.FileDialog) {
	for _, p := range w.recent() {
		if lister, err := storage.ListerForURI(storage.NewFileURI(filepath.Dir(p))); err == nil {
			d.SetLocation(lister)
			return
		}
	}
}

func (w *mainWindow) saveSequenceDialog() {
	if w.seq == nil {
		return
	}
	seq := w.seq
	w.saveDialog("sequence.json", []string{".json"}, func(out io.Writer) error {
		data, err := seq.MarshalJSON()
		if err != nil {
			return err
		}
		_, err = out.Write(append(data, '\n'))
		return err
	})
}
