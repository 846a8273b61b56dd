package models

import (
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh/volume"
)

// CTOptions say how a parametric canal is imaged as a CT scanner images the tooth around it:
// the canal inside a root of dentine, the root in its periodontal space, then bone below the
// crest and soft tissue above it.
type CTOptions struct {
	Voxel      float64 // voxel edge, mm
	BlurVoxels float64 // Gaussian point spread, standard deviation in voxels (0-3)
	Noise      float64 // Gaussian noise, standard deviation in the levels below (0-400)
	// Wall is the dentine around the canal at its apical end, mm (0: 1.0); it thickens by
	// ctWallGrowth toward the orifice, as a root does.
	Wall   float64
	Turn   mgl64.Quat // as ScanOptions
	Offset mgl64.Vec3 // as ScanOptions
	Seed   int64
}

// The levels of the CT phantom, Hounsfield-like, and its anatomy, as in the Python phantom the
// scan readers are tested with (volumetest/phantom.py): pulp and periodontal space 40,
// dentine 1600, bone 700, soft tissue 40; a periodontal space of 0.2 mm; the bone's crest
// 1.5 mm below the orifice.
const (
	ctPulp, ctDentine, ctBone, ctSoft = 40.0, 1600.0, 700.0, 40.0
	ctSpace                           = 0.2
	ctCrest                           = 1.5
	ctWallGrowth                      = 1.5     // mm more dentine at the orifice than at the apical end
	ctIntercept                       = -1024.0 // stored = level - ctIntercept, as a CT stores HU
)

// CT images a parametric canal and the tooth around it as a CT scan: each voxel takes the
// shares of pulp, dentine, periodontal space and bone it holds (the signed distance to the
// canal's wall ramped over one voxel), then a Gaussian point spread and Gaussian noise. The
// canal runs on past the orifice (s = 0) and widens into a pulp chamber above it, so the
// orifice point lies inside the lumen; the truth is CTTruth.
func CT(c *CanalSpec, opt CTOptions) (*volume.Volume, error) {
	if err := checkImaging("CT", c, opt.Voxel); err != nil {
		return nil, err
	}
	h := opt.Voxel
	wall := opt.Wall
	if wall == 0 {
		wall = 1.0
	}
	if !(opt.BlurVoxels >= 0 && opt.BlurVoxels <= 3) || !(opt.Noise >= 0 && opt.Noise <= 400) || !(wall > 0 && wall <= 5) {
		return nil, fmt.Errorf("CT of canal %q: blur %g voxels (0-3), noise %g (0-400), wall %g mm (0-5) out of range",
			c.Name, opt.BlurVoxels, opt.Noise, wall)
	}
	f := newCanalSolid(c, ScanOptions{Voxel: h})
	f.chamber = true
	f.extra = 2
	f.maxSemi = max(f.maxSemi, chamberRadius*math.Sqrt(f.oval))
	turn := unitTurn(opt.Turn)
	back := turn.Conjugate()
	n, origin, err := gridAround(f, turn, h, wall+ctWallGrowth+ctSpace+1+3*opt.BlurVoxels*h, opt.Offset)
	if err != nil {
		return nil, err
	}
	field := f.ctImage(n, origin, h, back, wall)
	if opt.BlurVoxels > 0 {
		gaussianBlur3(field, n, opt.BlurVoxels)
	}
	rng := rand.New(rand.NewPCG(uint64(opt.Seed), 0xc7))
	data := make([]uint16, len(field))
	for i, v := range field {
		x := float64(v) + opt.Noise*rng.NormFloat64() - ctIntercept
		data[i] = uint16(math.Round(min(max(x, 0), math.MaxUint16)))
	}
	return &volume.Volume{
		NX: n[0], NY: n[1], NZ: n[2],
		Spacing: [3]float64{h, h, h},
		Origin:  origin.Add(mgl64.Vec3{h / 2, h / 2, h / 2}),
		Axes:    [3]mgl64.Vec3{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}},
		Data:    data, Slope: 1, Intercept: ctIntercept,
		Info: volume.Info{Label: c.Name, Format: "CT phantom"},
	}, nil
}

// CTTruth is the exact centerline of a spec imaged by CT, in the scan's coordinates, every ds
// from the orifice.
func CTTruth(c *CanalSpec, opt CTOptions, ds float64) []mgl64.Vec3 {
	return ScanTruth(c, ScanOptions{Turn: opt.Turn}, ds)
}

// ctImage samples the levels on the grid (see CT). The bone's crest is a plane square to the
// canal's first straight run (spec coordinates: the canal starts down -z from the origin).
func (f *canalSolid) ctImage(n [3]int, origin mgl64.Vec3, h float64, back mgl64.Quat, wall float64) []float32 {
	ramp := func(d float64) float64 { return min(max(0.5-d/h, 0), 1) }
	wallAt := func(s float64) float64 { return wall + ctWallGrowth*(1-min(max(s/f.length, 0), 1)) }
	value := func(d, s float64, p mgl64.Vec3) float32 {
		w := wallAt(s)
		canal, root, space, bone := ramp(d), ramp(d-w), ramp(d-w-ctSpace), ramp(p.Z()+ctCrest)
		return float32(canal*ctPulp + (root-canal)*ctDentine + (space-root)*ctPulp + (1-space)*(bone*ctBone+(1-bone)*ctSoft))
	}
	// The wall changes by ctWallGrowth over the canal's length: a block's voxels lie within
	// reach of its centre, and their walls within reach times that rate.
	reach := sampleReach(h)
	slack := reach * (1 + ctWallGrowth/f.length)
	far := func(d, s float64, p mgl64.Vec3) bool {
		w := wallAt(s)
		return math.Abs(d) > reach && math.Abs(d-w) > slack && math.Abs(d-w-ctSpace) > slack && math.Abs(p.Z()+ctCrest) > reach
	}
	return f.sample(n, origin, h, back, value, far)
}
