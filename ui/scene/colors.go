package scene

import (
	"image/color"
	"math"

	"tapersweep/analysis"
	"tapersweep/models"
	"tapersweep/ui/render"
)

// One colour per meaning, the same in the window, the PNGs and the report: the pictures, the
// cross-sections and the profile plots all take their colours from here.
var (
	// Background of every view: a light warm paper tone.
	Background = color.RGBA{246, 245, 241, 255}
	// Ink is text, axes and the outline of the canal after the step.
	Ink = color.RGBA{34, 36, 42, 255}
	// ScannedInk is the canal as scanned (dashed in sections, the wider line in profiles).
	ScannedInk = color.RGBA{120, 120, 116, 255}
	// EarlierInk is an outline left by an earlier step.
	EarlierInk = color.RGBA{175, 174, 168, 255}
	// FileMetal is the file's body: a neutral metal grey, never a depth-of-cut colour.
	FileMetal = color.RGBA{156, 160, 166, 255}
	// FileInk draws the file in profiles and outlines its section: a darker steel grey.
	FileInk = color.RGBA{88, 94, 104, 255}
	// TransportInk is the transportation arrow: an orange that is neither a file's size colour
	// nor on the depth-of-cut scale.
	TransportInk = color.RGBA{214, 96, 18, 255}
	// LimitInk marks a limit (the alloy's recoverable strain).
	LimitInk = color.RGBA{170, 30, 40, 255}
	// CenterlineInk is the thin centerline beside a file on its own path.
	CenterlineInk = color.RGBA{30, 60, 120, 255}
	// RootInk is the root's outer surface (see-through in 3D, its outline in sections): a
	// dentine-like warm grey.
	RootInk = color.RGBA{150, 128, 96, 255}
)

// wallScale is the one scale of the wall left to the root's surface (render.WallScale).
var wallScale = render.WallScale()

// WallScale returns the wall-thickness scale: the 3D colour mode and its legend.
func WallScale() *render.Scale { return wallScale }

// depthScale is the one depth-of-cut scale (render.DepthScale) every picture uses.
var depthScale = render.DepthScale()

// DepthScale returns the depth-of-cut scale: wall, cross-sections and legends.
func DepthScale() *render.Scale { return depthScale }

// DepthColor is the colour of a depth of cut of e mm on a scale whose top is max mm.
func DepthColor(e, max float64) color.RGBA { return depthScale.At(e / max) }

// EngagedBand is the pale tint of the engaged zone in profile plots: a depth-of-cut colour
// faded into the paper, since it is where the file cuts.
func EngagedBand() color.RGBA {
	c := depthScale.At(0.35)
	mix := func(a, b uint8) uint8 { return uint8((int(a) + 4*int(b)) / 5) }
	return color.RGBA{mix(c.R, Background.R), mix(c.G, Background.G), mix(c.B, Background.B), 255}
}

// FileColor is the ISO 3630-1 size colour, with white drawn as a light grey so it shows
// against a light background. It appears only as a band at the file's handle end and in the
// step table, never on the file's body.
func FileColor(size int) color.RGBA {
	name, c, ok := models.ISOColor(size)
	if !ok {
		return color.RGBA{150, 150, 150, 255}
	}
	if name == "white" {
		return color.RGBA{228, 228, 224, 255}
	}
	return c
}

// LegendTop is the top of the depth-of-cut legend for step (from 1) of res: the step's own
// deepest cut, so the deepest cut of each step has the darkest colour, or with fixed the
// deepest cut of the whole run rounded up, so colours compare across steps. It is never below
// twice the contact threshold (a step that hardly touches the wall keeps a readable legend).
func LegendTop(res *analysis.Result, step int, fixed bool) float64 {
	if res == nil {
		return 0.05
	}
	floor := 2 * res.Options.WithDefaults().ContactThreshold
	if !fixed && step > 0 && step <= len(res.Steps) {
		return math.Max(floor, res.Steps[step-1].Metrics.MaxDepthOfCutMM)
	}
	m := 0.0
	for _, s := range res.Steps {
		m = math.Max(m, s.Metrics.MaxDepthOfCutMM)
	}
	for _, v := range []float64{0.02, 0.05, 0.1, 0.15, 0.2, 0.3, 0.4, 0.5, 0.75, 1, 1.5, 2} {
		if m <= v {
			return math.Max(floor, v)
		}
	}
	return math.Ceil(m)
}
