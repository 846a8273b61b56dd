package analysis

import (
	"fmt"
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// DefaultMinWallMM is the least wall of dentine the thin-wall warning asks to keep between the
// prepared canal and the root's outer surface. Lim and Stock (Int Endod J 1987;20:33) suggested
// about 0.2-0.3 mm as the minimum remaining thickness after preparation (from memory); the safer
// end is the default. A warning, not a verdict: the user sets their own (--min-wall).
const DefaultMinWallMM = 0.3

// Root is the root's outer surface around a canal (dentine against the periodontal space).
type Root struct {
	Mesh    *mesh.Mesh
	Surface *mesh.BVH
	// Source says where it comes from: the canal spec, a second surface of the canal's file, a file.
	Source string
	// normals are the triangles' outward unit normals (the sign of a distance: inside or out).
	normals []mgl64.Vec3
	// near is Surface laid out for the closest-point queries of the wall.
	near *mesh.NearTree
}

// newRoot prepares a root surface for distance queries; it is turned to face outward.
func newRoot(m *mesh.Mesh, source string) *Root {
	mesh.OrientConsistently(m)
	r := &Root{Mesh: m, Surface: mesh.NewBVH(m), Source: source, normals: make([]mgl64.Vec3, len(m.Triangles))}
	r.Surface.AddSlabs()
	r.near = r.Surface.NewNearTree()
	for t := range m.Triangles {
		r.normals[t] = mesh.FaceNormal(m, t)
	}
	return r
}

// wallPoint is the canal's wall at station i, direction j of a station-major map.
func (c *Canal) wallPoint(m []float32, i, j int) mgl64.Vec3 {
	th := 2 * math.Pi * float64(j) / float64(c.Angles)
	sin, cos := math.Sincos(th)
	dir := c.Line.N1[i].Mul(cos).Add(c.Line.N2[i].Mul(sin))
	return c.Line.Points[i].Add(dir.Mul(float64(m[i*c.Angles+j])))
}

// WallAt is the wall left to the root at (s, theta) of the canal whose radius map is m (Rho as
// scanned, a step's Before or Prepared): one exact query from the map's wall there, for a
// reading at one place (the pictures' maps hold each cell only to their tolerance). NaN
// without a root.
func (c *Canal) WallAt(m []float32, s, theta float64) float64 {
	if c.Root == nil || len(m) != len(c.Rho) {
		return math.NaN()
	}
	p, _, n1, n2 := c.Line.At(s)
	sin, cos := math.Sincos(theta)
	d, _ := c.Root.signedDistance(p.Add(n1.Mul(cos).Add(n2.Mul(sin)).Mul(c.MapAt(m, s, theta))), nearPoint{tri: -1})
	return d
}

// nearPoint is a surface point of the root and its triangle: the answer of one query, and the
// seed of the next nearby one.
type nearPoint struct {
	q   mgl64.Vec3
	tri int32
}

// signedDistance is the distance from p to the root surface, negative when p lies outside the
// root, with the nearest point. A seed (a surface point found for a nearby query; tri < 0 for
// none) bounds the search: nothing farther than it can be the nearest, which prunes most of the
// tree. The sign is the side of the nearest triangle's plane, and the parity test where that is
// unclear (p in the plane).
func (r *Root) signedDistance(p mgl64.Vec3, seed nearPoint) (float64, nearPoint) {
	limit := math.Inf(1)
	if seed.tri >= 0 {
		limit = p.Sub(seed.q).Len()*(1+1e-9) + 1e-12
	}
	q, tri, d, ok := r.near.ClosestWithin(p, limit)
	if !ok {
		if seed.tri < 0 {
			return math.Inf(1), seed
		}
		q, tri, d = seed.q, seed.tri, p.Sub(seed.q).Len()
	}
	near := nearPoint{q: q, tri: tri}
	side := p.Sub(q).Dot(r.normals[tri])
	switch {
	case side > 1e-9*max(d, 1e-6):
		return -d, near
	case side < -1e-9*max(d, 1e-6):
		return d, near
	case r.Surface.Inside(p):
		return d, near
	}
	return -d, near
}

// Wall is how much dentine a canal leaves to the root's outer surface, as every output states
// it. Every field is absent when no root is known.
type Wall struct {
	// ThinnestWallMM is the least wall anywhere along the canal (0 where the canal reaches or
	// passes the root surface), ThinnestWallFromApexMM where (mm from the apical end) and
	// ThinnestWallTowardDeg toward which side (degrees in [0, 360): 0 is the inner side of the
	// main curve, turning right-handed about the tangent toward the apex, as toward_deg).
	ThinnestWallMM         *float64 `json:"thinnest_wall_mm,omitempty"`
	ThinnestWallFromApexMM *float64 `json:"thinnest_wall_from_apex_mm,omitempty"`
	ThinnestWallTowardDeg  *float64 `json:"thinnest_wall_toward_deg,omitempty"`
	// WallUnderLimitPct is the share of the canal's wall (by area of the map's cells) whose
	// wall is thinner than WallLimitMM.
	WallUnderLimitPct *float64 `json:"wall_under_limit_pct,omitempty"`
	WallLimitMM       *float64 `json:"wall_limit_mm,omitempty"`
	// WallThinnedMM is how much the step took off the wall at the place it leaves thinnest.
	WallThinnedMM *float64 `json:"wall_thinned_mm,omitempty"`
}

// wallPlace is the thinnest cell of a thickness map.
type wallPlace struct {
	cell      int
	thickness float64
}

// thinnest finds the least wall of a thickness map.
func thinnest(th []float32) wallPlace {
	best := wallPlace{cell: -1, thickness: math.Inf(1)}
	for k, v := range th {
		if float64(v) < best.thickness {
			best = wallPlace{cell: k, thickness: float64(v)}
		}
	}
	return best
}

// wallOf states the wall of map w against a limit; before (the map the step met, or nil) gives
// how much the step thinned the wall at its thinnest place, measured there exactly.
func (c *Canal) wallOf(w, before *wallMap, limit float64) Wall {
	if w == nil {
		return Wall{}
	}
	th, prepared := w.th, w.rho
	p := thinnest(th)
	if p.cell < 0 {
		return Wall{}
	}
	i, j := p.cell/c.Angles, p.cell%c.Angles
	wall := Wall{
		ThinnestWallMM:         finite(round(max(p.thickness, 0), 3)),
		ThinnestWallFromApexMM: finite(round(c.Line.Length()-c.Line.S[i], 2)),
		ThinnestWallTowardDeg:  finite(towardDeg(math.Cos(2*math.Pi*float64(j)/float64(c.Angles)), math.Sin(2*math.Pi*float64(j)/float64(c.Angles)))),
		WallLimitMM:            finite(limit),
	}
	// The share by area: each cell's area is about its station's arc-length share times the
	// wall's radius there.
	under, all := 0.0, 0.0
	for k, v := range th {
		a := float64(prepared[k]) * c.Line.share(k/c.Angles)
		all += a
		if float64(v) < limit {
			under += a
		}
	}
	if all > 0 {
		wall.WallUnderLimitPct = finite(round(100*under/all, 2))
	}
	if before != nil {
		wall.WallThinnedMM = finite(round(max(c.exactAt(before, p.cell), 0)-max(p.thickness, 0), 3))
	}
	return wall
}

// share is station i's share of the centerline's length (half a spacing at each end).
func (l *Centerline) share(i int) float64 {
	if i == 0 || i == l.Len()-1 {
		return l.DS / 2
	}
	return l.DS
}

// thinWallText words the thin-wall warning.
func thinWallText(w Wall) string {
	if w.ThinnestWallMM == nil || w.WallLimitMM == nil {
		return ""
	}
	where := fmt.Sprintf("%.1f mm from the apical end, toward %.0f°", *w.ThinnestWallFromApexMM, *w.ThinnestWallTowardDeg)
	if *w.ThinnestWallMM <= 0 {
		return fmt.Sprintf("the canal reaches the root's outer surface %s (a perforation in the model; an estimate: check the scan)", where)
	}
	return fmt.Sprintf("the wall left to the root's outer surface is %.3f mm %s, under the %.3g mm limit it should keep (%.1f %% of the wall): an estimate, not a measurement",
		*w.ThinnestWallMM, where, *w.WallLimitMM, *w.WallUnderLimitPct)
}

// RootError says why a root surface cannot be used with its canal.
type RootError struct {
	Source string
	Msg    string
}

func (e *RootError) Error() string { return fmt.Sprintf("root surface (%s): %s", e.Source, e.Msg) }

// attachRoot measures the wall around the canal as scanned. A root that does not hold the
// canal is refused; one the canal leaves in places is kept with a warning.
func (c *Canal) attachRoot(m *mesh.Mesh, source string, workers int) error {
	if source == "" {
		source = "given"
	}
	if len(m.Triangles) == 0 {
		return &RootError{Source: source, Msg: "the surface has no triangles"}
	}
	if rep := mesh.Validate(m); rep.BoundaryEdges > 0 {
		return &RootError{Source: source, Msg: fmt.Sprintf("the surface is not closed (%d edges border holes), so its inside is not known", rep.BoundaryEdges)}
	}
	c.Root = newRoot(m, source)
	c.scannedWall = c.wallThickness(c.Rho, nil, math.NaN(), wallScanned, workers)
	c.wallAtLimit = &wallAtLimit{}
	c.Thickness = c.scannedWall.th
	outside := 0
	for _, v := range c.Thickness {
		if v < 0 {
			outside++
		}
	}
	switch share := float64(outside) / float64(len(c.Thickness)); {
	case share > 0.5:
		c.Root, c.Thickness = nil, nil
		return &RootError{Source: source, Msg: fmt.Sprintf("it does not enclose the canal (%.0f %% of the canal's wall lies outside it): is it the root of this canal, in the same coordinates and units?", 100*share)}
	case outside > 0:
		c.Warnings = append(c.Warnings, fmt.Sprintf("the canal as scanned passes outside the root surface over %.1f %% of its wall: the wall figures there read 0", 100*share))
	}
	return nil
}
