// Package segment finds a root canal and the root's outer surface in a scan (CBCT or
// micro-CT), given the canal's two ends.
//
// The canal: a minimal path through the dark canal between the orifice and the apical end
// (Dijkstra 1959 on a cost from the intensity, after Deschamps and Cohen 2001), then the lumen
// around it: the samples darker than a threshold half-way between the canal's intensity and
// the dentine's next to it (found along rays across the path; Otsu 1979 separates the two
// near the orifice), kept only where connected to the path, surfaced by marching cubes at that
// threshold (Lorensen and Cline 1987). Where the canal is narrower than the scan can show
// (about two voxels: the blur lifts its centre above the threshold) the stretch is reported as
// not resolved and the canal there follows the minimal path alone, drawn about one voxel wide.
//
// The root: along each ray, past the dentine, the fall to the periodontal space (or bone or
// soft tissue) at half-way between the dentine's intensity and the dip beyond it.
//
// A segmentation from a CBCT is an estimate limited by its voxel size and artefacts (metal,
// beam hardening): it does not replace reading the scan.
package segment

import (
	"context"
	"fmt"
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/mesh"
	"tapersweep/mesh/volume"
)

// Caution is said wherever a segmented canal is shown or reported.
const Caution = "The canal and root surfaces were found in the scan: an estimate limited by its voxel size and artefacts (metal, beam hardening). It does not replace reading the scan."

// Points are the two ends of one canal the user gives, in the scan's coordinates (mm).
type Points struct {
	Orifice, Apex mgl64.Vec3
}

// Options tune the search. Zero values pick the defaults.
type Options struct {
	// TubeRadius bounds the lumen around the path, mm (default 1.5).
	TubeRadius float64
	// Progress is told the stage and how far the whole search is (0..1).
	Progress func(stage string, done float64)
}

// Result is one canal found in a scan.
type Result struct {
	// Path runs from the orifice to the apical end through the canal, every DS mm (world
	// coordinates), smoothed over about three voxels (a chain of voxel steps is longer than the canal).
	Path []mgl64.Vec3
	DS   float64
	// Resolved tells, per path station, whether the scan shows the canal's lumen there.
	Resolved   []bool
	Unresolved []analysis.Stretch // along Path, mm from the orifice
	// Diameter is the lumen's area-equivalent diameter per station, mm, from its darkness
	// summed over the cross-section (an estimate even where the lumen is not resolved).
	Diameter []float64
	// Intensities: the canal's, the dentine's next to it per station, the lumen threshold
	// per station.
	CanalLevel   float64
	DentineLevel []float64
	Threshold    []float64
	// LumenRadius and RootRadius per station and ray (rays at angle 2 pi j / Rays about the
	// path, from Frames' N1 toward N2): where the lumen ends and where the root's outer surface
	// lies, mm. NaN where not found.
	Rays                    int
	LumenRadius, RootRadius [][]float64
	Frames                  *analysis.Centerline
	Lumen, Root             *mesh.Mesh
	Voxel                   float64 // the scan's largest voxel edge, mm
	Warnings                []string
}

// Find segments one canal of a scan.
func Find(ctx context.Context, v *volume.Volume, pts Points, opt Options) (*Result, error) {
	if opt.TubeRadius <= 0 {
		opt.TubeRadius = 1.5
	}
	progress := func(stage string, f float64) {
		if opt.Progress != nil {
			opt.Progress(stage, f)
		}
	}
	for _, p := range []struct {
		name string
		at   mgl64.Vec3
	}{{"orifice", pts.Orifice}, {"apical end", pts.Apex}} {
		if !v.Contains(p.at) {
			lo, hi := v.World(mgl64.Vec3{}), v.World(mgl64.Vec3{float64(v.NX - 1), float64(v.NY - 1), float64(v.NZ - 1)})
			return nil, fmt.Errorf("%s: the %s point (%.2f, %.2f, %.2f) mm lies outside the scan, which spans (%.2f, %.2f, %.2f) to (%.2f, %.2f, %.2f) mm",
				v.Info.Label, p.name, p.at[0], p.at[1], p.at[2], lo[0], lo[1], lo[2], hi[0], hi[1], hi[2])
		}
	}
	if d := pts.Orifice.Sub(pts.Apex).Len(); d < 3*v.MaxSpacing() {
		return nil, fmt.Errorf("%s: the orifice and the apical end are only %.2f mm apart", v.Info.Label, d)
	}
	progress("path", 0)
	raw, dark, bright, err := findPath(ctx, v, pts)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", v.Info.Label, err)
	}
	progress("lumen", 0.4)
	res := &Result{DS: v.MinSpacing(), Voxel: v.MaxSpacing(), CanalLevel: dark, Rays: profileRays}
	line := analysis.ResamplePolyline(raw, res.DS)
	line = analysis.ResamplePolyline(analysis.SmoothPolyline(line, 3), res.DS)
	if len(line) < 4 {
		return nil, fmt.Errorf("%s: the path between the two points is too short", v.Info.Label)
	}
	line = centreOnLumen(ctx, v, line, res.DS, dark, bright, res.Voxel)
	res.Path = line
	s := analysis.ArcLengths(line)
	res.Frames = pathFrames(line, s, res.DS)
	prof := sampleProfiles(ctx, v, res.Frames)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	res.classify(prof, dark, bright, opt.TubeRadius)
	if len(res.Unresolved) == 1 && res.Unresolved[0].From == 0 && res.Unresolved[0].To >= s[len(s)-1] {
		res.Warnings = append(res.Warnings, "the scan shows this canal's lumen nowhere between the two points: it follows the darkest path only; check that both points lie in the canal")
	}
	progress("surface", 0.6)
	res.Lumen, err = surfaceLumen(ctx, v, res, opt.TubeRadius)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", v.Info.Label, err)
	}
	progress("root", 0.85)
	res.Root = res.rootMesh()
	progress("done", 1)
	return res, nil
}

// pathFrames are the frames along a path of stations ds apart (arc lengths s), its curvature
// fitted over max(0.3 mm, 3 stations).
func pathFrames(line []mgl64.Vec3, s []float64, ds float64) *analysis.Centerline {
	return analysis.NewCenterline(line, ds, math.Max(0.3, 3*ds), 0, s[len(s)-1], 0, 0)
}

// findPath finds the minimal path between the two points, on a coarser copy of the region
// first when the region is large (a micro-CT scan), then at full resolution in a tube around it.
// It returns the path in mm and the canal's and the dentine's intensities near the orifice.
func findPath(ctx context.Context, v *volume.Volume, pts Points) ([]mgl64.Vec3, float64, float64, error) {
	a, b := v.IndexOf(pts.Orifice), v.IndexOf(pts.Apex)
	margin := math.Max(2, 0.3*pts.Orifice.Sub(pts.Apex).Len())
	var lo, hi [3]int
	count := 1.0
	for ax := range 3 {
		m := margin / v.Spacing[ax]
		lo[ax] = int(math.Floor(math.Min(a[ax], b[ax]) - m))
		hi[ax] = int(math.Ceil(math.Max(a[ax], b[ax]) + m))
		n := []int{v.NX, v.NY, v.NZ}[ax]
		count *= float64(min(hi[ax], n-1) - max(lo[ax], 0) + 1)
	}
	step := max(1, int(math.Ceil(math.Cbrt(count/maxPathSamples))))
	bx := newBox(v, lo, hi, step, true)
	dark, bright, err := canalAndDentine(bx, pts.Orifice)
	if err != nil {
		return nil, 0, 0, err
	}
	start := intoCanal(bx, bx.sampleOf(pts.Orifice), 0.5*(dark+bright))
	goal := bx.sampleOf(pts.Apex)
	path, err := minimalPath(ctx, bx, start, goal, dark, bright, nil)
	if err != nil {
		return nil, 0, 0, err
	}
	if step > 1 {
		// Again at full resolution, within a few coarse samples of the coarse path.
		coarse := make([]mgl64.Vec3, len(path))
		for i, n := range path {
			coarse[i] = bx.world(n)
		}
		reach := float64(step+2) * v.MaxSpacing()
		lo, hi = boundsOf(v, coarse, reach)
		fine := newBox(v, lo, hi, 1, true)
		allowed := make([]bool, len(fine.val))
		markNear(fine, coarse, reach, func(n int, _ int, _ float64) { allowed[n] = true })
		start, goal = intoCanal(fine, fine.sampleOf(pts.Orifice), 0.5*(dark+bright)), fine.sampleOf(pts.Apex)
		allowed[start], allowed[goal] = true, true
		path, err = minimalPath(ctx, fine, start, goal, dark, bright, allowed)
		if err != nil {
			return nil, 0, 0, err
		}
		bx = fine
	}
	out := make([]mgl64.Vec3, len(path))
	for i, n := range path {
		out[i] = bx.world(n)
	}
	out[0], out[len(out)-1] = pts.Orifice, pts.Apex // the user's ends, not their voxels' centres
	return out, dark, bright, nil
}

// maxPathSamples bounds the region searched at once; a larger region is searched coarser first.
const maxPathSamples = 6_000_000

// canalAndDentine are the intensities of the canal and of dentine near the orifice: the
// medians of the two classes Otsu's threshold separates within 2 mm of it.
func canalAndDentine(b *box, orifice mgl64.Vec3) (float64, float64, error) {
	var vals []float32
	markNear(b, []mgl64.Vec3{orifice}, 2, func(n, _ int, _ float64) { vals = append(vals, b.val[n]) })
	if len(vals) < 8 {
		return 0, 0, fmt.Errorf("too few voxels around the orifice point")
	}
	dark, bright, t := classLevels(vals)
	// The bright class's own spread (median absolute deviation, scaled to a standard
	// deviation) is the noise; a canal stands out from dentine by many times that.
	var hi []float64
	for _, v := range vals {
		if float64(v) >= t {
			hi = append(hi, float64(v))
		}
	}
	for i := range hi {
		hi[i] = math.Abs(hi[i] - bright)
	}
	noise := 1.4826 * median(hi)
	if !(bright-dark > 5*noise) {
		return 0, 0, fmt.Errorf("around the orifice point the scan shows no dark canal inside brighter dentine (levels %.0f and %.0f, noise %.0f): is the point in the canal?", dark, bright, noise)
	}
	return dark, bright, nil
}

// intoCanal is n when it is darker than t, else the nearest sample within two that is (a
// click a voxel off the canal), else n.
func intoCanal(b *box, n int, t float64) int {
	if float64(b.val[n]) < t {
		return n
	}
	i, j, k := b.ijk(n)
	best, bd := n, math.Inf(1)
	for dk := -2; dk <= 2; dk++ {
		for dj := -2; dj <= 2; dj++ {
			for di := -2; di <= 2; di++ {
				ii, jj, kk := i+di, j+dj, k+dk
				if ii < 0 || jj < 0 || kk < 0 || ii >= b.nx || jj >= b.ny || kk >= b.nz {
					continue
				}
				q := b.index(ii, jj, kk)
				if d := float64(di*di + dj*dj + dk*dk); float64(b.val[q]) < t && d < bd {
					best, bd = q, d
				}
			}
		}
	}
	return best
}

// darkestNear is the darkest sample within r samples of n.
func darkestNear(b *box, n, r int) int {
	i, j, k := b.ijk(n)
	best := n
	for dk := -r; dk <= r; dk++ {
		for dj := -r; dj <= r; dj++ {
			for di := -r; di <= r; di++ {
				ii, jj, kk := i+di, j+dj, k+dk
				if ii < 0 || jj < 0 || kk < 0 || ii >= b.nx || jj >= b.ny || kk >= b.nz {
					continue
				}
				if q := b.index(ii, jj, kk); b.val[q] < b.val[best] {
					best = q
				}
			}
		}
	}
	return best
}

// boundsOf is the voxel range covering points plus a margin in mm.
func boundsOf(v *volume.Volume, pts []mgl64.Vec3, margin float64) (lo, hi [3]int) {
	for a := range 3 {
		lo[a], hi[a] = math.MaxInt, math.MinInt
	}
	for _, p := range pts {
		q := v.IndexOf(p)
		for a := range 3 {
			m := margin / v.Spacing[a]
			lo[a] = min(lo[a], int(math.Floor(q[a]-m)))
			hi[a] = max(hi[a], int(math.Ceil(q[a]+m)))
		}
	}
	return lo, hi
}

// markNear calls fn for every sample of the box within r mm of any of the points, with the
// index of the nearest point so far met and the distance (a sample near several points is
// visited once per point).
func markNear(b *box, pts []mgl64.Vec3, r float64, fn func(n, point int, d float64)) {
	sp := b.spacing()
	for pi, p := range pts {
		c := b.vol.IndexOf(p)
		cs := 0.5 * float64(b.step-1)
		var lo, hi [3]int
		o := [3]int{b.i0, b.j0, b.k0}
		dims := [3]int{b.nx, b.ny, b.nz}
		for a := range 3 {
			f := (c[a] - float64(o[a]) - cs) / float64(b.step)
			m := r / sp[a]
			lo[a] = max(0, int(math.Floor(f-m)))
			hi[a] = min(dims[a]-1, int(math.Ceil(f+m)))
		}
		// The axes are orthonormal, so distances come from index steps times the spacing.
		r2 := r * r
		for k := lo[2]; k <= hi[2]; k++ {
			dz := (float64(o[2]+k*b.step) + cs - c[2]) * b.vol.Spacing[2]
			for j := lo[1]; j <= hi[1]; j++ {
				dy := (float64(o[1]+j*b.step) + cs - c[1]) * b.vol.Spacing[1]
				for i := lo[0]; i <= hi[0]; i++ {
					dx := (float64(o[0]+i*b.step) + cs - c[0]) * b.vol.Spacing[0]
					if d2 := dx*dx + dy*dy + dz*dz; d2 <= r2 {
						fn(b.index(i, j, k), pi, math.Sqrt(d2))
					}
				}
			}
		}
	}
}
