package models

import (
	"fmt"
	"math"

	"tapersweep/mesh"

	"github.com/go-gl/mathgl/mgl64"
)

// RootSpec is the root's outer surface around a parametric canal: a tube along the canal's own
// centerline whose area-equivalent diameter narrows linearly from CoronalD at the orifice's
// level to ApicalD at the canal's apical end, oval like the canal (long axis across the plane
// of the first arc), with an optional concavity (a groove) on one side. It runs above the
// orifice by its coronal radius and past the apical end by its apical radius, so no point of the
// canal's side lies nearer the tube's flat ends than its side.
type RootSpec struct {
	CoronalD, ApicalD float64
	Oval              float64 // long over short axis (>= 1; 0 = round)
	Concavity         *Concavity
}

// Concavity is a groove in the root's outer surface. Directions follow the analysis: 0 degrees
// is the side the canal's first arc bends toward, turning right-handed about the centerline's
// direction toward the apex (90 is the oval's long axis).
type Concavity struct {
	DepthMM   float64 // how far the surface is pushed in at the groove's bottom
	TowardDeg float64 // the side it lies on
	// WidthDeg is the groove's full width around the root (the depth falls to 0 at its edges).
	WidthDeg float64
	// FromApexMM and LengthMM place the groove along the canal (its deepest point FromApexMM
	// from the apical end, falling to 0 LengthMM/2 either side); LengthMM 0 = the whole root.
	FromApexMM, LengthMM float64
}

// rootJSON and concavityJSON are the spec file's "root" object (README, "Canal spec files").
type rootJSON struct {
	CoronalD  *float64       `json:"coronal_d" doc:"the root's diameter at the orifice's level, mm"`
	ApicalD   *float64       `json:"apical_d" doc:"the root's diameter at the canal's apical end, mm"`
	Oval      *float64       `json:"oval,omitempty"`
	Concavity *concavityJSON `json:"concavity,omitempty"`
}

type concavityJSON struct {
	Depth     *float64 `json:"depth" doc:"how deep the groove is, mm"`
	TowardDeg *float64 `json:"toward_deg" doc:"the side the groove lies on, degrees"`
	WidthDeg  *float64 `json:"width_deg,omitempty"`
	FromApex  *float64 `json:"from_apex,omitempty"`
	Length    *float64 `json:"length,omitempty"`
}

// Root limits and defaults.
const (
	DefaultConcavityWidthDeg = 90.0
	maxRootDiamMM            = 20.0
	// minRootClearanceMM: the root must stand at least this far clear of the canal everywhere
	// in the spec (a wall is measured, not invented through the canal).
	minRootClearanceMM = 0.01
)

func (j *rootJSON) root() *RootSpec {
	if j == nil {
		return nil
	}
	r := &RootSpec{CoronalD: *j.CoronalD, ApicalD: *j.ApicalD, Oval: orDefault(j.Oval, 0)}
	if c := j.Concavity; c != nil {
		r.Concavity = &Concavity{DepthMM: *c.Depth, TowardDeg: *c.TowardDeg,
			WidthDeg: orDefault(c.WidthDeg, DefaultConcavityWidthDeg), FromApexMM: orDefault(c.FromApex, 0),
			LengthMM: orDefault(c.Length, 0)}
	}
	return r
}

func (r *RootSpec) toJSON() *rootJSON {
	if r == nil {
		return nil
	}
	given := func(v float64) *float64 {
		if v == 0 {
			return nil
		}
		return &v
	}
	j := &rootJSON{CoronalD: &r.CoronalD, ApicalD: &r.ApicalD, Oval: given(r.Oval)}
	if c := r.Concavity; c != nil {
		j.Concavity = &concavityJSON{Depth: &c.DepthMM, TowardDeg: &c.TowardDeg, WidthDeg: &c.WidthDeg,
			FromApex: given(c.FromApexMM), Length: given(c.LengthMM)}
	}
	return j
}

// validateRoot checks the root against its canal; the error names the field.
func (c *CanalSpec) validateRoot() error {
	r := c.Root
	if r == nil {
		return nil
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"root.coronal_d", r.CoronalD}, {"root.apical_d", r.ApicalD}} {
		if !(f.v > 0) || f.v > maxRootDiamMM {
			return fmt.Errorf("field %q = %g: want a diameter in mm above 0 and at most %g", f.name, f.v, maxRootDiamMM)
		}
	}
	if r.Oval != 0 && (r.Oval < 1 || r.Oval > 10) {
		return fmt.Errorf("field \"root.oval\" = %g: want a long-to-short axis ratio from 1 to 10", r.Oval)
	}
	if k := r.Concavity; k != nil {
		switch {
		case !(k.DepthMM >= 0) || k.DepthMM > maxRootDiamMM/2:
			return fmt.Errorf("field \"root.concavity.depth\" = %g: want mm from 0 to %g", k.DepthMM, maxRootDiamMM/2)
		case math.IsNaN(k.TowardDeg) || math.Abs(k.TowardDeg) > 3600:
			return fmt.Errorf("field \"root.concavity.toward_deg\" = %g: want degrees", k.TowardDeg)
		case !(k.WidthDeg > 0) || k.WidthDeg > 360:
			return fmt.Errorf("field \"root.concavity.width_deg\" = %g: want degrees above 0 and at most 360", k.WidthDeg)
		case !(k.LengthMM >= 0) || k.LengthMM > MaxCanalLengthMM:
			return fmt.Errorf("field \"root.concavity.length\" = %g: want mm from 0 to %g", k.LengthMM, MaxCanalLengthMM)
		case !(k.FromApexMM >= 0) || k.FromApexMM > c.Length():
			return fmt.Errorf("field \"root.concavity.from_apex\" = %g: want mm from 0 to the canal's length (%.2f)", k.FromApexMM, c.Length())
		}
	}
	// The tube must not fold on itself in the tightest arc, and must hold the canal.
	long := max(r.CoronalD, r.ApicalD) / 2 * math.Sqrt(max(r.Oval, 1))
	for _, s := range c.Segments {
		if s.Kind == "arc" && s.Radius <= long {
			return fmt.Errorf("the root (up to %.2f mm from the centerline) is wider than an arc of the canal is tight (radius %g mm): its surface would fold", long, s.Radius)
		}
	}
	L := c.Length()
	for k := 0; k <= 200; k++ {
		s := L * float64(k) / 200
		canal := c.Diameter(s) / 2 * math.Sqrt(max(c.Oval, 1)) // the canal's long semi-axis
		if inner := r.innerRadius(s, L); inner-canal < minRootClearanceMM {
			return fmt.Errorf("the root leaves no wall around the canal %.2f mm from the orifice (root %.3f mm, canal %.3f mm from the centerline at its widest): widen the root or make the concavity shallower",
				s, inner, canal)
		}
	}
	return nil
}

// diameter is the root's area-equivalent diameter at s (clamped to the canal).
func (r *RootSpec) diameter(s, length float64) float64 {
	f := 0.0
	if length > 0 {
		f = min(max(s/length, 0), 1)
	}
	return r.CoronalD + (r.ApicalD-r.CoronalD)*f
}

// depthAt is the concavity's depth at s and angle phi (radians, from the first arc's bending side).
func (r *RootSpec) depthAt(s, length, phi float64) float64 {
	k := r.Concavity
	if k == nil || k.DepthMM == 0 {
		return 0
	}
	half := k.WidthDeg / 2 * math.Pi / 180
	d := math.Remainder(phi-k.TowardDeg*math.Pi/180, 2*math.Pi)
	if math.Abs(d) >= half {
		return 0
	}
	across := (1 + math.Cos(math.Pi*d/half)) / 2
	along := 1.0
	if k.LengthMM > 0 {
		u := s - (length - k.FromApexMM)
		if math.Abs(u) >= k.LengthMM/2 {
			return 0
		}
		along = (1 + math.Cos(math.Pi*u/(k.LengthMM/2))) / 2
	}
	return k.DepthMM * across * along
}

// RadiusAt is the distance from the canal's centerline to the root's outer surface at arc
// length s in direction phi (radians; 0 is the side the first arc bends toward, turning
// right-handed about the direction toward the apex, as the analysis measures directions).
func (r *RootSpec) RadiusAt(s, length, phi float64) float64 {
	sin, cos := math.Sincos(phi)
	// The oval's long axis lies at 90 degrees: swap the roles of the angle's parts.
	return ovalRadius(r.diameter(s, length)/2, r.Oval, sin, cos) - r.depthAt(s, length, phi)
}

// innerRadius is the root's least distance from the centerline at s (sampled every degree).
func (r *RootSpec) innerRadius(s, length float64) float64 {
	best := math.Inf(1)
	for k := 0; k < 360; k++ {
		best = min(best, r.RadiusAt(s, length, float64(k)*math.Pi/180))
	}
	return best
}

// RootMesh returns the root's outer surface as a closed, outward-facing mesh (rings every ds,
// `around` vertices per ring), or nil when the spec has no root.
func (c *CanalSpec) RootMesh(ds float64, around int) *mesh.Mesh {
	r := c.Root
	g := c.geometry()
	if r == nil || len(g.pieces) == 0 {
		return nil
	}
	around = min(max(around, 8), 4096)
	L := g.length
	above, below := r.CoronalD/2, r.ApicalD/2
	inner := canalStations(L, ds)
	if len(inner)*around > maxCanalMeshVertices {
		inner = canalStations(L, L*float64(around)/maxCanalMeshVertices)
	}
	var s []float64
	for k := 4; k >= 1; k-- {
		s = append(s, -above*float64(k)/4)
	}
	s = append(s, inner...)
	for k := 1; k <= 4; k++ {
		s = append(s, L+below*float64(k)/4)
	}
	centers := make([]mgl64.Vec3, len(s))
	n1 := make([]mgl64.Vec3, len(s))
	n2 := make([]mgl64.Vec3, len(s))
	for i, si := range s {
		pc, u := g.pieceAt(si)
		p, t, long := pc.frameAt(u)
		switch {
		case si < 0:
			p = p.Add(t.Mul(si))
		case si > L:
			p = p.Add(t.Mul(si - L))
		}
		// n1: the side the first arc bends toward (long x t), n2 = t x n1 = long.
		centers[i], n1[i], n2[i] = p, long.Cross(t), long
	}
	radius := func(i int, theta float64) float64 { return r.RadiusAt(s[i], L, theta) }
	return mesh.SweepTube(centers, n1, n2, radius, around, true, true)
}
