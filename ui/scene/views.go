package scene

import (
	"fmt"
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/ui/render"
)

// View is a named direction to look at a canal from, taken from the canal itself.
type View struct {
	Name, Description string
}

// Views lists the named views; the first is the default.
var Views = []View{
	{"side", "square to the plane of the main curve: the curve in profile"},
	{"edge", "in the plane of the main curve: the curve edge-on"},
	{"down", "down the coronal axis into the orifice"},
}

// ViewNames is the list of names, for flags and menus.
func ViewNames() []string {
	out := make([]string, len(Views))
	for i, v := range Views {
		out[i] = v.Name
	}
	return out
}

// Aim points the camera at the whole canal from the named view and fits it to an image of the
// given aspect (width / height).
func Aim(cam *render.Camera, c *analysis.Canal, view string, aspect float64) error {
	star := c.Line.Station(c.Measures.MaxCurvatureS)
	t0 := c.Line.T[0]
	var dir, up mgl64.Vec3
	switch view {
	case "", "side":
		dir, up = c.Line.N2[star], t0.Mul(-1)
	case "edge":
		dir, up = c.Line.N1[star].Mul(-1), t0.Mul(-1)
	case "down":
		dir, up = t0.Mul(-1), c.Line.N1[star]
	default:
		return fmt.Errorf("unknown view %q (views: %v)", view, ViewNames())
	}
	lo, hi := c.Mesh.Bounds()
	cam.FovY = 30 * math.Pi / 180
	cam.LookFrom(dir, up)
	cam.Fit(lo, hi, aspect)
	return nil
}
