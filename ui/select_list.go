package ui

import (
	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/widget"
)

// selectList is a drop-down list that opens only while it is on a window. The toolkit's list
// opens its pop-up menu on the canvas it finds for the list, and a tap or key that arrives
// while the list is not on one (the window rebuilding its content, a test without a window)
// crashed the pop-up menu with a nil canvas: such a tap or key is ignored.
type selectList struct {
	widget.Select
}

func newSelectList(options []string, changed func(string)) *selectList {
	s := &selectList{}
	s.Options = options
	s.OnChanged = changed
	s.ExtendBaseWidget(s)
	return s
}

// onCanvas says whether the list is on a window's canvas, where its pop-up can open.
func (s *selectList) onCanvas() bool {
	a := fyne.CurrentApp()
	return a != nil && a.Driver().CanvasForObject(s) != nil
}

func (s *selectList) Tapped(ev *fyne.PointEvent) {
	if s.onCanvas() {
		s.Select.Tapped(ev)
	}
}

func (s *selectList) TypedKey(ev *fyne.KeyEvent) {
	if s.onCanvas() {
		s.Select.TypedKey(ev)
	}
}
