package segment

import (
	"context"
	"fmt"
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
)

// Measure turns a found canal into a measured canal: centerline and radius map from the lumen
// surface, between the path's two ends; the stretches the scan does not resolve are carried
// over (and draw the apex-unresolved advice), the scan's voxel is its surface detail.
func (r *Result) Measure(ctx context.Context, name string, opt analysis.CanalOptions) (*analysis.Canal, error) {
	last := len(r.Path) - 1
	o, a := r.Path[0], r.Path[last]
	opt.Extract.Orifice, opt.Extract.Apex = &o, &a
	if opt.Root == nil {
		if root := r.rootForWall(); root != nil {
			opt.Root, opt.RootSource = root, "found in the scan"
		}
	}
	c, err := analysis.NewCanal(ctx, name, r.Lumen, opt)
	if err != nil {
		return nil, err
	}
	c.SurfaceDetail = r.Voxel
	s := analysis.ArcLengths(r.Path)
	at := func(sp float64) float64 { // the canal's arc length at the path's arc length sp
		i := 0
		for i < last && s[i] < sp {
			i++
		}
		return c.Line.S[nearestStation(c.Line.Points, r.Path[i])]
	}
	L := c.Line.Length()
	for _, st := range r.Unresolved {
		u := analysis.Stretch{From: at(st.From), To: at(st.To)}
		if st.To >= s[last]-r.DS {
			u.To = L // reaches the apical end
		}
		c.Unresolved = append(c.Unresolved, u)
		c.Warnings = append(c.Warnings, fmt.Sprintf(
			"the canal is not resolved in the scan from %.1f to %.1f mm from the apical end (narrower than about two voxels of %.2f mm): there it follows the scan's darkest path only",
			L-u.From, L-u.To, r.Voxel))
	}
	c.Warnings = append(c.Warnings, r.Warnings...)
	return c, nil
}

// nearestStation is the index of the point nearest to p.
func nearestStation(pts []mgl64.Vec3, p mgl64.Vec3) int {
	best, bd := 0, math.Inf(1)
	for i, q := range pts {
		if d := q.Sub(p).Len(); d < bd {
			best, bd = i, d
		}
	}
	return best
}
