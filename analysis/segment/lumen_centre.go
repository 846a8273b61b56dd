package segment

import (
	"context"
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/mesh/parallel"
	"tapersweep/mesh/volume"
)

// How the path is moved to the middle of the lumen (centreOnLumen).
const (
	centreRounds = 3
	centreRays   = 32
	centreReach  = 2.0 // mm along a ray at most
	centreEnter  = 2.0 // voxels a ray may cross before it meets the lumen
	centreTail   = 3.0 // voxels a ray reads on past the lumen's edge (as the section's area is read)
	centreMove   = 2.0 // voxels a station may move in one round at most
	centreEase   = 4.0 // voxels from an end over which the move grows from none to whole,
	centreEaseMM = 2.0 // and at least this many mm (sections next to the orifice meet the chamber)
)

// centreOnLumen moves each station of a path (every ds mm) to the middle of the lumen in its
// cross-section: the centroid of the section's darkness, (dentine - I) / (dentine - canal)
// clipped to [0, 1], along rays from the station over the dark run each ray crosses first and
// three voxels past it (the blur's share of the lumen: without it a narrow blurred canal's
// darkness under half-way covers less than the two voxels a station needs to move, and the
// path stayed against the wall, TestPathInTheMiddleOfANarrowCanal).
// A minimal path through a canal runs on the cost floor wherever the lumen is dark, so it
// takes the shortest way and hugs the inner wall of each bend; sections read about a point
// at the wall see half the lumen (CT family 1-007: 0.2 mm off the middle of a 0.45 mm canal,
// its diameter read 0.25 mm). Stations whose darkness adds up to less than a canal two voxels
// across (the lumen not resolved) keep their place, as do the two ends the user gave.
func centreOnLumen(ctx context.Context, v *volume.Volume, line []mgl64.Vec3, ds, dark, bright, voxel float64) []mgl64.Vec3 {
	h := math.Max(0.25*v.MinSpacing(), 0.005)
	n := int(centreReach/h) + 1
	enter := int(centreEnter * voxel / h)
	tail := int(centreTail * voxel / h)
	half := 0.5 * (dark + bright)
	minArea := math.Pi * voxel * voxel // a lumen two voxels across
	dtheta := 2 * math.Pi / centreRays
	ease := math.Max(centreEase*voxel, centreEaseMM)
	for range centreRounds {
		if ctx.Err() != nil || len(line) < 4 {
			return line
		}
		s := analysis.ArcLengths(line)
		fr := pathFrames(line, s, ds)
		shifts := make([]mgl64.Vec3, len(line))
		parallel.For(0, len(line), func(_, i int) {
			var first mgl64.Vec3
			area := 0.0
			for r := range centreRays {
				d := rayDir(fr, i, r, centreRays)
				inside, out := false, n
				for q := range n {
					x := v.SampleWorld(line[i].Add(d.Mul(float64(q) * h)))
					if x < half {
						inside = true
					} else if inside && out == n {
						out = q + tail // the blur's share of the lumen lies past its edge
					} else if !inside && q > enter {
						break
					}
					if q > out {
						break
					}
					a := math.Min(math.Max((bright-x)/(bright-dark), 0), 1) * ringArea(q, h) * dtheta
					area += a
					first = first.Add(d.Mul(a * float64(q) * h)) // the ring's sector lies q h out
				}
			}
			if area < minArea {
				return
			}
			shift := first.Mul(1 / area)
			if l := shift.Len(); l > centreMove*voxel {
				shift = shift.Mul(centreMove * voxel / l)
			}
			// The user's ends stay; the stations next to them move less, so the path does not
			// fold there.
			shifts[i] = shift.Mul(math.Min(1, math.Min(s[i], s[len(s)-1]-s[i])/ease))
		})
		shifts = analysis.SmoothPolyline(shifts, 3)
		shifts[0], shifts[len(shifts)-1] = mgl64.Vec3{}, mgl64.Vec3{}
		moved := make([]mgl64.Vec3, len(line))
		for i := range line {
			moved[i] = line[i].Add(shifts[i])
		}
		line = analysis.ResamplePolyline(moved, ds)
	}
	return line
}
