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
	// look gives the direction to look along and the image's up direction, from the canal's
	// frame at its tightest bend (station star).
	look func(c *analysis.Canal, star int) (dir, up mgl64.Vec3)
}

// views are the named views, each with how it looks at a canal; the first is the default.
var views = [...]View{
	{DefaultView, "square to the plane of the main curve: the curve in profile",
		func(c *analysis.Canal, star int) (dir, up mgl64.Vec3) { return c.Line.N2[star], c.Line.T[0].Mul(-1) }},
	{"edge", "in the plane of the main curve: the curve edge-on",
		func(c *analysis.Canal, star int) (dir, up mgl64.Vec3) {
			return c.Line.N1[star].Mul(-1), c.Line.T[0].Mul(-1)
		}},
	{"down", "down the coronal axis into the orifice",
		func(c *analysis.Canal, star int) (dir, up mgl64.Vec3) { return c.Line.T[0].Mul(-1), c.Line.N1[star] }},
}

// DefaultView is the view a picture takes when none is named: the first of the list.
const DefaultView = "side"

// Views returns the named views, the default first (a fresh copy).
func Views() []View { return append([]View(nil), views[:]...) }

// ViewNames is the list of names, for flags and menus.
func ViewNames() []string {
	out := make([]string, len(views))
	for i, v := range views {
		out[i] = v.Name
	}
	return out
}

// Aim points the camera at the whole canal from the named view ("" is the default) and fits it
// to an image of the given aspect (width / height).
func Aim(cam *render.Camera, c *analysis.Canal, view string, aspect float64) error {
	if view == "" {
		view = DefaultView
	}
	var look func(c *analysis.Canal, star int) (dir, up mgl64.Vec3)
	for _, v := range views {
		if v.Name == view {
			look = v.look
		}
	}
	if look == nil {
		return fmt.Errorf("unknown view %q (views: %v)", view, ViewNames())
	}
	dir, up := look(c, c.Line.Station(c.Measures.MaxCurvatureS))
	lo, hi := c.Mesh.Bounds()
	cam.FovY = 30 * math.Pi / 180
	cam.LookFrom(dir, up)
	cam.Fit(lo, hi, aspect)
	return nil
}
