package ui

import (
	"image"
	"image/color"
	"math"
	"sync"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/widget"

	"tapersweep/analysis"
	"tapersweep/ui/render"
	"tapersweep/ui/scene"
)

// sceneInput is what the viewport draws: a canal, a run (nil for the canal alone) and what to
// show of it. Version changes whenever any of it changes, so the worker knows to rebuild.
type sceneInput struct {
	canal   *analysis.Canal
	res     *analysis.Result
	opt     scene.Options
	version uint64
}

// viewport shows the canal through the CPU renderer. A worker goroutine builds the scene and
// renders frames; the raster hands out the latest one. Drag orbits, right-drag or shift-drag
// pans, scroll zooms, double-click fits; hovering the wall reports what lies under the pointer.
type viewport struct {
	widget.BaseWidget
	raster *canvas.Raster

	mu   sync.Mutex
	in   sceneInput
	cam  render.Camera
	view string // named view last aimed at
	// pixel size the raster last asked for; fallback from the widget size before that
	pxW, pxH int
	moving   bool // a drag is going on: render at 1x
	fitBuilt bool // fit the camera to the next built scene (canal and file)
	dirty    bool // a new frame is wanted
	busy     bool // the worker is working
	hoverAt  *image.Point
	pickAt   *image.Point  // a click to answer with the level of the wall under it
	front    *image.RGBA   // latest finished frame
	handed   *image.RGBA   // frame the raster last returned (may still be on its way to the screen)
	spare    []*image.RGBA // buffers free to render into
	wake     chan struct{}
	closed   bool
	frames   int // frames finished, for tests

	// worker-only state
	renderer *render.Renderer
	built    *scene.Built
	builtVer uint64
	buildErr error

	ui      *handOver
	onHover func(text string)      // called on the UI goroutine
	onError func(err error)        // scene could not be built
	onPick  func(fromApex float64) // the wall was clicked this far from the apical end

	// input state (UI goroutine)
	dragButton desktop.MouseButton
	dragShift  bool
	rightDown  bool
	lastMouse  fyne.Position
	settleAt   *time.Timer // ends a burst of scroll or slider frames with a still one
}

func newViewport(ui *handOver) *viewport {
	v := &viewport{wake: make(chan struct{}, 1), renderer: render.NewRenderer(), view: scene.Views[0].Name, ui: ui}
	v.cam = *render.NewCamera()
	v.raster = canvas.NewRaster(v.generate)
	v.ExtendBaseWidget(v)
	go v.work()
	return v
}

func (v *viewport) CreateRenderer() fyne.WidgetRenderer {
	return widget.NewSimpleRenderer(v.raster)
}

func (v *viewport) MinSize() fyne.Size { return fyne.NewSize(200, 160) }

// Resize keeps a pixel size to render at before the raster first asks.
func (v *viewport) Resize(s fyne.Size) {
	v.BaseWidget.Resize(s)
	scale := float32(1)
	if c := fyne.CurrentApp().Driver().CanvasForObject(v); c != nil {
		scale = c.Scale()
	}
	v.mu.Lock()
	if v.front == nil {
		v.pxW, v.pxH = int(s.Width*scale), int(s.Height*scale)
		v.requestLocked()
	}
	v.mu.Unlock()
}

// setScene changes what is drawn; the camera stays where it is unless aim is set.
func (v *viewport) setScene(in sceneInput, aim bool) {
	v.mu.Lock()
	defer v.mu.Unlock()
	in.version = v.in.version + 1
	newCanal := in.canal != v.in.canal
	v.in = in
	if (aim || newCanal) && in.canal != nil {
		v.aimLocked(v.view)
	}
	v.requestLocked()
}

// aim turns the camera to a named view and fits the canal.
func (v *viewport) aim(view string) {
	v.mu.Lock()
	defer v.mu.Unlock()
	v.view = view
	v.aimLocked(view)
	v.requestLocked()
}

func (v *viewport) aimLocked(view string) {
	if v.in.canal == nil {
		return
	}
	_ = scene.Aim(&v.cam, v.in.canal, view, v.aspectLocked())
	v.fitBuilt = true // the file above the orifice counts too, once the scene is built
}

func (v *viewport) aspectLocked() float64 {
	if v.pxW > 0 && v.pxH > 0 {
		return float64(v.pxW) / float64(v.pxH)
	}
	return 1.5
}

// fit keeps the direction and brings the whole canal into view.
func (v *viewport) fit() {
	v.mu.Lock()
	defer v.mu.Unlock()
	if v.in.canal == nil {
		return
	}
	v.fitBuilt = true
	v.requestLocked()
}

// camera returns a copy of the camera and the view's name.
func (v *viewport) camera() (render.Camera, string) {
	v.mu.Lock()
	defer v.mu.Unlock()
	return v.cam, v.view
}

// pixelSize is the size of the frames being drawn.
func (v *viewport) pixelSize() (int, int) {
	v.mu.Lock()
	defer v.mu.Unlock()
	return v.pxW, v.pxH
}

func (v *viewport) requestLocked() {
	v.dirty = true
	select {
	case v.wake <- struct{}{}:
	default:
	}
}

// generate hands the raster the latest frame when it has the asked size; otherwise a stretched
// copy until the worker catches up.
func (v *viewport) generate(w, h int) image.Image {
	v.mu.Lock()
	defer v.mu.Unlock()
	if w != v.pxW || h != v.pxH {
		v.pxW, v.pxH = w, h
		v.requestLocked()
	}
	if v.front != nil && v.front.Rect.Dx() == w && v.front.Rect.Dy() == h {
		v.handed = v.front
		return v.front
	}
	img := image.NewRGBA(image.Rect(0, 0, w, h))
	if v.front != nil {
		stretch(img, v.front)
	} else {
		fill(img, scene.Background)
	}
	v.handed = img
	return img
}

// work is the render goroutine: build the scene when its input changed, render, answer hover.
func (v *viewport) work() {
	for range v.wake {
		for {
			v.mu.Lock()
			if v.closed {
				v.mu.Unlock()
				return
			}
			if !v.dirty && v.hoverAt == nil && v.pickAt == nil {
				v.mu.Unlock()
				break
			}
			v.busy = true
			in, cam, w, h := v.in, v.cam, v.pxW, v.pxH
			ss := 2
			if v.moving {
				ss = 1
			}
			dirty := v.dirty
			v.dirty = false
			hover, click := v.hoverAt, v.pickAt
			v.hoverAt, v.pickAt = nil, nil
			dst := v.takeBufferLocked(w, h)
			v.mu.Unlock()

			if in.canal != nil && in.version != v.builtVer {
				v.builtVer = in.version
				v.built, v.buildErr = scene.Build(in.canal, in.res, in.opt)
				if v.buildErr != nil && v.onError != nil {
					err := v.buildErr
					v.ui.post(func() { v.onError(err) })
				}
			}
			if v.built != nil && v.buildErr == nil {
				v.mu.Lock()
				if v.fitBuilt {
					v.fitBuilt = false
					scene.Frame(&v.cam, v.built, v.pxW, v.pxH, 1)
				}
				cam = v.cam
				view := v.view
				v.mu.Unlock()
				if dirty && dst != nil {
					// While the view turns, a huge scan is drawn from a simplified copy.
					v.renderer.Render(dst, v.built.Scene, &cam, render.Options{Supersample: ss, Turning: ss == 1})
					scene.Decorate(dst, v.built, in.canal, view)
				}
			} else if dirty && dst != nil {
				fill(dst, scene.Background)
			}
			var text string
			if hover != nil && v.built != nil && v.buildErr == nil {
				text = hoverText(in, v.built, v.renderer, hover.X, hover.Y)
			}
			picked := math.NaN()
			if click != nil && v.built != nil && v.buildErr == nil {
				if p, _, ok := pickWall(v.built, v.renderer, in.canal, click.X, click.Y); ok {
					picked = in.canal.Line.Length() - p.S
				}
			}

			v.mu.Lock()
			if dirty && dst != nil {
				if v.front != nil {
					v.spare = append(v.spare, v.front)
				}
				v.front = dst
				v.frames++
			}
			v.busy = false
			v.mu.Unlock()
			if dirty {
				v.ui.post(v.raster.Refresh)
			}
			if hover != nil && v.onHover != nil {
				v.ui.post(func() { v.onHover(text) })
			}
			if !math.IsNaN(picked) && v.onPick != nil {
				v.ui.post(func() { v.onPick(picked) })
			}
		}
	}
}

// takeBufferLocked finds a buffer of the size that is neither on screen nor handed out.
func (v *viewport) takeBufferLocked(w, h int) *image.RGBA {
	if w <= 0 || h <= 0 {
		return nil
	}
	for i, b := range v.spare {
		if b != v.handed && b.Rect.Dx() == w && b.Rect.Dy() == h {
			v.spare = append(v.spare[:i], v.spare[i+1:]...)
			return b
		}
	}
	// Drop buffers of an old size; keep at most two spares.
	keep := v.spare[:0]
	for _, b := range v.spare {
		if b.Rect.Dx() == w && b.Rect.Dy() == h && len(keep) < 2 {
			keep = append(keep, b)
		}
	}
	v.spare = keep
	return image.NewRGBA(image.Rect(0, 0, w, h))
}

// idle says no frame is wanted or being drawn.
func (v *viewport) idle() bool {
	v.mu.Lock()
	defer v.mu.Unlock()
	return !v.dirty && !v.busy && v.hoverAt == nil && v.pickAt == nil
}

// snapshot copies the latest frame (for tests and the PNG export of what is on screen).
func (v *viewport) snapshot() *image.RGBA {
	v.mu.Lock()
	defer v.mu.Unlock()
	if v.front == nil {
		return nil
	}
	out := image.NewRGBA(v.front.Rect)
	copy(out.Pix, v.front.Pix)
	return out
}

func (v *viewport) close() {
	v.mu.Lock()
	v.closed = true
	v.requestLocked()
	v.mu.Unlock()
}

// ---- input ----

func (v *viewport) pixelScale() float32 {
	if c := fyne.CurrentApp().Driver().CanvasForObject(v); c != nil {
		return c.Scale()
	}
	return 1
}

// MouseDown remembers the button and Shift: a DragEvent carries neither.
func (v *viewport) MouseDown(ev *desktop.MouseEvent) {
	v.dragButton = ev.Button
	v.dragShift = ev.Modifier&fyne.KeyModifierShift != 0
	v.lastMouse = ev.Position
	if ev.Button == desktop.MouseButtonSecondary {
		v.rightDown = true
		v.setMoving(true)
	}
}

func (v *viewport) MouseUp(ev *desktop.MouseEvent) {
	if v.rightDown {
		v.rightDown = false
		v.setMoving(false)
	}
}

func (v *viewport) MouseIn(ev *desktop.MouseEvent) { v.lastMouse = ev.Position }

// MouseMoved pans while the right button is down (fyne starts no drag for it) and otherwise
// asks what lies under the pointer.
func (v *viewport) MouseMoved(ev *desktop.MouseEvent) {
	if v.rightDown {
		d := ev.Position.Subtract(v.lastMouse)
		v.lastMouse = ev.Position
		v.pan(d.X, d.Y)
		return
	}
	v.lastMouse = ev.Position
	s := v.pixelScale()
	p := image.Point{int(ev.Position.X * s), int(ev.Position.Y * s)}
	v.mu.Lock()
	v.hoverAt = &p
	select {
	case v.wake <- struct{}{}:
	default:
	}
	v.mu.Unlock()
}

func (v *viewport) MouseOut() {
	if v.onHover != nil {
		v.onHover("")
	}
}

func (v *viewport) Dragged(ev *fyne.DragEvent) {
	v.setMoving(true)
	if v.dragShift || v.dragButton == desktop.MouseButtonSecondary {
		v.pan(ev.Dragged.DX, ev.Dragged.DY)
		return
	}
	const radiansPerUnit = 0.01
	v.mu.Lock()
	v.cam.Orbit(-float64(ev.Dragged.DX)*radiansPerUnit, float64(ev.Dragged.DY)*radiansPerUnit)
	v.requestLocked()
	v.mu.Unlock()
}

func (v *viewport) DragEnd() {
	v.dragShift = false
	v.setMoving(false)
}

// pan moves the view with the pointer: a drag over the full height moves by the view's height.
func (v *viewport) pan(dx, dy float32) {
	h := v.Size().Height
	if h <= 0 {
		return
	}
	v.mu.Lock()
	v.cam.Pan(-float64(dx/h), float64(dy/h))
	v.requestLocked()
	v.mu.Unlock()
}

func (v *viewport) Scrolled(ev *fyne.ScrollEvent) {
	v.brieflyMoving()
	v.mu.Lock()
	v.cam.Dolly(math.Exp(-float64(ev.Scrolled.DY) * 0.004))
	v.requestLocked()
	v.mu.Unlock()
}

func (v *viewport) DoubleTapped(*fyne.PointEvent) { v.fit() }

// Tapped on the wall shows the cross-section there.
func (v *viewport) Tapped(ev *fyne.PointEvent) {
	s := v.pixelScale()
	p := image.Point{int(ev.Position.X * s), int(ev.Position.Y * s)}
	v.mu.Lock()
	v.pickAt = &p
	select {
	case v.wake <- struct{}{}:
	default:
	}
	v.mu.Unlock()
}

// brieflyMoving draws the frames of a burst of changes (scrolling, the insertion slider) at
// 1x and the still view supersampled once they stop.
func (v *viewport) brieflyMoving() {
	const still = 250 * time.Millisecond
	v.setMoving(true)
	if v.settleAt == nil {
		v.settleAt = time.AfterFunc(still, func() { v.setMoving(false) })
		return
	}
	v.settleAt.Reset(still)
}

func (v *viewport) setMoving(m bool) {
	v.mu.Lock()
	if v.moving != m {
		v.moving = m
		if !m {
			v.requestLocked() // the still view is drawn supersampled
		}
	}
	v.mu.Unlock()
}

// ---- small image helpers ----

func fill(img *image.RGBA, c color.RGBA) {
	if len(img.Pix) < 4 {
		return
	}
	img.Pix[0], img.Pix[1], img.Pix[2], img.Pix[3] = c.R, c.G, c.B, 255
	for n := 4; n < len(img.Pix); n *= 2 {
		copy(img.Pix[n:], img.Pix[:n])
	}
}

// stretch draws src over all of dst, nearest pixel.
func stretch(dst, src *image.RGBA) {
	dw, dh := dst.Rect.Dx(), dst.Rect.Dy()
	sw, sh := src.Rect.Dx(), src.Rect.Dy()
	if sw == 0 || sh == 0 {
		return
	}
	for y := 0; y < dh; y++ {
		sy := y * sh / dh
		drow := dst.Pix[y*dst.Stride:]
		srow := src.Pix[sy*src.Stride:]
		for x := 0; x < dw; x++ {
			sx := x * sw / dw
			copy(drow[4*x:4*x+4], srow[4*sx:4*sx+4])
		}
	}
}

// input is what the viewport is asked to draw.
func (v *viewport) input() sceneInput {
	v.mu.Lock()
	defer v.mu.Unlock()
	return v.in
}
