package main

import (
	"fyne.io/fyne/v2"
	"github.com/go-gl/glfw/v3.3/glfw"
)

// Largest window opened at start, logical units: beyond it a bigger screen adds nothing the
// pictures need, and the window stays a window.
const maxStartWidth, maxStartHeight = 1920, 1200

// titleBarAllowance is the height a window manager's title bar takes when the screen has a
// panel (the work area is smaller than the screen): the window's own content stays in view.
const titleBarAllowance = 40

// fitScreen sizes the window to the screen's work area (up to maxStartWidth x maxStartHeight)
// so a larger screen gives the 3D view the room; the window asks for 1280 x 800 otherwise.
// It runs once the toolkit has started (on its main thread, where the screen can be asked).
func fitScreen(w fyne.Window) {
	m := glfw.GetPrimaryMonitor()
	if m == nil {
		return
	}
	_, _, wd, ht := m.GetWorkarea()
	if mode := m.GetVideoMode(); mode != nil && ht < mode.Height {
		ht -= titleBarAllowance
	}
	// The canvas may not know its scale before the window is drawn; the monitor's content
	// scale (2 on a high-density screen) keeps the window inside the screen either way.
	scale := w.Canvas().Scale()
	if xs, ys := m.GetContentScale(); max(xs, ys) > scale {
		scale = max(xs, ys)
	}
	if wd <= 0 || ht <= 0 || !(scale > 0) {
		return
	}
	size := fyne.NewSize(min(float32(wd)/scale, maxStartWidth), min(float32(ht)/scale, maxStartHeight))
	if size.Width < 640 || size.Height < 480 {
		return // a tiny screen: the toolkit's own size is as good as any
	}
	w.Resize(size)
}
