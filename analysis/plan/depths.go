package plan

import (
	"fmt"
	"math"

	"tapersweep/analysis"
	"tapersweep/models"
)

// depthChoice is one depth a preparing file may be taken to, with why it is offered.
type depthChoice struct {
	depth models.Depth
	why   string
}

// wlOffsets are the depths short of working length offered to every file, mm.
var wlOffsets = [...]float64{0, 1, 2, 3, 4, 5}

// crownDownSteps are how far short of the start of the curve the crown-down depths lie, mm.
var crownDownSteps = [...]float64{0, 2, 4}

// minDepthMM keeps the shallowest choice a real step into the canal.
const minDepthMM = 3.0

// depthChoices lists the depths the search offers each preparing file, deepest first: working
// length and 1 to 5 mm short of it (the apical part, where curves sit), and three crown-down
// depths: where the canal leaves its straight coronal part (Schneider's departure point,
// rounded down to 0.5 mm) and 2 and 4 mm short of that. In a straight canal the crown-down
// depths start from half the working length instead. Depths closer than 0.5 mm to one already
// offered, or shallower than 3 mm, are left out.
func depthChoices(c *analysis.Canal) []depthChoice {
	wl := math.Min(c.WorkingLength, c.Line.Length())
	var out []depthChoice
	taken := func(d float64) bool {
		for _, o := range out {
			if math.Abs(o.depth.Resolve(wl)-d) < 0.5-models.LengthTolerance {
				return true
			}
		}
		return false
	}
	for _, off := range wlOffsets {
		if d := wl - off; d >= minDepthMM && !taken(d) {
			out = append(out, depthChoice{models.DepthWL(-off), "working length"})
		}
	}
	bend := c.Measures.DepartureS
	why := "where the canal leaves its straight coronal part"
	if !(c.Measures.ArcAngleDeg > 0) || bend <= 0 {
		bend, why = wl/2, "half the working length (the canal is straight)"
	}
	bend = math.Floor(bend*2) / 2
	for _, short := range crownDownSteps {
		if d := bend - short; d >= minDepthMM && d < wl && !taken(d) {
			w := why
			if short > 0 {
				w = fmt.Sprintf("%g mm short of %s", short, why)
			}
			out = append(out, depthChoice{models.DepthMM(d), w})
		}
	}
	return out
}

// depthText lists the choices for the explanation.
func depthText(ch []depthChoice, wl float64) string {
	s := ""
	for i, c := range ch {
		if i > 0 {
			s += ", "
		}
		if c.depth.FromWL {
			s += c.depth.String()
		} else {
			s += fmt.Sprintf("%.1f mm (%s)", c.depth.Resolve(wl), c.why)
		}
	}
	return s
}
