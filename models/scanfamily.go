package models

import (
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// ScanCase is one canal of a family of scan-like canals with exact answers: a parametric
// canal, how it is imaged, and what a measurement of the image should find.
type ScanCase struct {
	Name  string
	Shape string // "one bend", "S-curve", "gentle then sharp", "out of plane"
	Spec  *CanalSpec
	Scan  ScanOptions
	// Uniform marks a nearly uniform canal (apical diameter at least 0.8 of the orifice's).
	Uniform bool
	// Aligned marks a canal placed with its plane of symmetry on a row of voxel centres.
	Aligned bool
}

// Shapes of the family, in the order they are drawn.
var scanShapes = []string{"one bend", "S-curve", "gentle then sharp", "out of plane"}

// ScanFamily draws n scan-like canals from seed. Each canal starts with a straight coronal
// part and has one tightest arc whose radius is at most 1/1.3 of every other arc's; the
// conditions are drawn at random: round or oval sections (long to short axis 1.0-2.0),
// orifice 0.6-1.6 mm, apical end 0.2-0.4 mm (or, for one canal in five, nearly uniform: 0.8
// to 0.95 of the orifice), voxels 0.04-0.15 mm but never wider than a third of the apical
// diameter (a scan that cannot resolve the apical end has no exact answer there) and
// coarsened where the image would not fit the surface extraction's grid (fitGrid), binary
// or partial-volume images (with a point spread of 0-0.7 voxel), vertex noise 0-0.02 mm,
// an orifice cut 0-40 degrees from square on half the canals, and a placement either turned
// at random in the grid or with the canal's plane of symmetry on a row of voxel centres.
func ScanFamily(seed uint64, n int) []ScanCase {
	rng := rand.New(rand.NewPCG(seed, 0xfa111e5))
	u := func(a, b float64) float64 { return a + (b-a)*rng.Float64() }
	out := make([]ScanCase, 0, n)
	for i := range n {
		sc := ScanCase{Shape: scanShapes[i%len(scanShapes)]}
		segs := familySegments(sc.Shape, u, rng)
		orifice := u(0.6, 1.6)
		apical := u(0.2, 0.4)
		if rng.IntN(5) == 0 {
			sc.Uniform = true
			apical = orifice * u(0.8, 0.95)
		}
		oval := 0.0
		if rng.IntN(5) >= 2 {
			oval = u(1.0, 2.0)
		}
		sc.Spec = &CanalSpec{Segments: segs, OrificeD: round3(orifice), ApicalD: round3(apical), Oval: round3(oval)}
		voxel := u(0.04, 0.15)
		voxel = math.Floor(1000*min(voxel, sc.Spec.ApicalD/3)) / 1000
		sc.Scan = ScanOptions{Voxel: voxel, Noise: round3(u(0, 0.02)), Seed: int64(rng.Uint32())}
		if rng.IntN(2) == 0 {
			sc.Scan.PartialVolume = true
			sc.Scan.BlurVoxels = round3(u(0, 0.7))
		}
		if rng.IntN(2) == 0 {
			sc.Scan.CutDeg = round3(u(0, 40))
			sc.Scan.CutTowardDeg = round3(u(0, 360))
		}
		if rng.IntN(10) < 3 {
			sc.Aligned = true
		} else {
			axis := mgl64.Vec3{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}.Normalize()
			sc.Scan.Turn = mgl64.QuatRotate(u(0, 2*math.Pi), axis)
			sc.Scan.Offset = mgl64.Vec3{rng.Float64(), rng.Float64(), rng.Float64()}
		}
		sc.Name = fmt.Sprintf("family %d-%03d %s", seed, i+1, sc.Shape)
		sc.Spec.Name = sc.Name
		if err := sc.Spec.Validate(); err != nil {
			panic(fmt.Sprintf("scan family: %s: %v", sc.Name, err)) // the draws above stay in range
		}
		sc.Spec.path = buildCanalPath(sc.Spec)
		fitGrid(sc.Spec, &sc.Scan)
		out = append(out, sc)
	}
	return out
}

// familySegments draws the centerline of one shape.
func familySegments(shape string, u func(a, b float64) float64, rng *rand.Rand) []CanalSegment {
	straight := func(l float64) CanalSegment { return CanalSegment{Kind: "straight", Length: round3(l)} }
	arc := func(r, a, turn float64) CanalSegment {
		return CanalSegment{Kind: "arc", Radius: round3(r), Angle: round3(a), PlaneTurn: turn}
	}
	// Two arcs where one is clearly the tighter, in either order.
	pair := func() (r1, r2 float64) {
		tight := u(2.5, 6)
		other := tight * u(1.3, 2.5)
		if rng.IntN(2) == 0 {
			return tight, other
		}
		return other, tight
	}
	switch shape {
	case "one bend":
		return []CanalSegment{straight(u(3, 10)), arc(u(2.5, 10), u(20, 60), 0), straight(u(0.5, 4))}
	case "S-curve":
		r1, r2 := pair()
		return []CanalSegment{straight(u(4, 9)), arc(r1, u(20, 40), 0), straight(u(0.3, 2)),
			arc(r2, u(20, 35), 180), straight(u(0.5, 3))}
	case "gentle then sharp":
		return []CanalSegment{straight(u(3, 7)), arc(u(10, 20), u(10, 25), 0), straight(u(1, 4)),
			arc(u(2.5, 5), u(20, 45), 0), straight(u(0.5, 2))}
	default: // out of plane
		r1, r2 := pair()
		turn := u(60, 120)
		if rng.IntN(2) == 0 {
			turn = -turn
		}
		return []CanalSegment{straight(u(4, 9)), arc(r1, u(20, 35), 0), arc(r2, u(20, 40), round3(turn)), straight(u(0.5, 3))}
	}
}

func round3(v float64) float64 { return math.Round(v*1000) / 1000 }

// TightestArc is the arc of smallest radius: where it starts and ends (mm from the orifice)
// and its radius; ok is false for a canal without arcs.
func (c *CanalSpec) TightestArc() (from, to, radius float64, ok bool) {
	s := 0.0
	radius = math.Inf(1)
	for _, seg := range c.Segments {
		l := seg.length()
		if seg.Kind == "arc" && seg.Radius < radius {
			from, to, radius, ok = s, s+l, seg.Radius, true
		}
		s += l
	}
	return from, to, radius, ok
}

// SchneiderAngle is the angle of Schneider's construction (Oral Surg Oral Med Oral Pathol
// 1971;32:271) on the exact canal, in degrees: the line of the first straight part, the
// point where the canal leaves it (the start of the first arc), and the line from there to
// the apical end. 0 for a canal without arcs.
func (c *CanalSpec) SchneiderAngle() float64 {
	s := 0.0
	for _, seg := range c.Segments {
		if seg.Kind == "arc" {
			break
		}
		s += seg.length()
	}
	if s >= c.Length() {
		return 0
	}
	p, t, _ := c.At(s)
	end, _, _ := c.At(c.Length())
	first, _, _ := c.At(0)
	axis := p.Sub(first)
	if axis.Len() < 1e-9 { // no straight part: the tangent at the orifice
		axis = t
	}
	cos := axis.Normalize().Dot(end.Sub(p).Normalize())
	return mgl64.RadToDeg(math.Acos(math.Max(-1, math.Min(1, cos))))
}

// fitGrid coarsens the voxel of a long canal drawn at a fine voxel until its image fits the
// grid the surface extraction takes (mesh.MaxGridVoxels): 331-080, 36.6 M voxels of 0.041 mm.
// Draws that fit are left as they are, so every seed's other canals stay the same.
func fitGrid(c *CanalSpec, opt *ScanOptions) {
	f := newCanalSolid(c, *opt)
	turn := unitTurn(opt.Turn)
	for range 20 {
		n, _, err := gridAround(f, turn, opt.Voxel, opt.margin(), opt.Offset)
		if err == nil {
			return
		}
		total := float64(n[0]) * float64(n[1]) * float64(n[2])
		opt.Voxel = math.Ceil(1000*opt.Voxel*math.Cbrt(total/mesh.MaxGridVoxels)*1.01) / 1000
	}
}
