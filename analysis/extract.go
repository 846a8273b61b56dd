package analysis

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
	"tapersweep/mesh/parallel"
)

// ExtractOptions tune centerline extraction. Zero values pick the defaults (DEVELOPERS.md, "How the centerline is found").
type ExtractOptions struct {
	Voxel   float64     // voxel edge in mm; 0 = about 1/8 of the median canal radius
	Orifice *mgl64.Vec3 // optional: a point near the coronal end chosen by the user
	Apex    *mgl64.Vec3 // optional: a point near the apical end
}

// extraction is what centerline extraction learns besides the line itself.
type extraction struct {
	voxel    float64
	warnings []string
	noise    float64 // typical spacing of the surface's own detail, mm
	// The stretch of the line measured from cross-sections; beyond it each end was carried
	// straight along its tangent to the wall.
	measuredFrom, measuredTo float64
	head, tail               extension
	// endRadius is the long semi-axis of the canal at the orifice and at the apical end
	// (the mean largest distance to the wall over the first and last mm measured).
	endRadius [2]float64
}

// extension is a straight piece added at one end of the measured line.
type extension struct{ from, to mgl64.Vec3 }

func (e extension) length() float64 { return e.to.Sub(e.from).Len() }

// add puts the head before and the tail after the points (pieces of zero length are skipped).
func (e extension) add(pts []mgl64.Vec3, tail extension) []mgl64.Vec3 {
	out := pts
	if e.length() > 0 {
		out = append([]mgl64.Vec3{e.to}, out...)
	}
	if tail.length() > 0 {
		out = append(out, tail.to)
	}
	return out
}

// extractCenterline finds the canal's axis in a closed mesh: voxelise, distance transform,
// the two ends of the longest geodesic path, a minimal path through the middle, smoothing,
// ends carried to the wall by ray casts, and each station re-centred on its cross-section.
// area and vol are mesh.AreaVolume(m); wall gives the mesh's BVH, waiting until it is built (it
// is made meanwhile).
func extractCenterline(ctx context.Context, m *mesh.Mesh, area, vol float64, wall func() *mesh.BVH, opt ExtractOptions, workers int) ([]mgl64.Vec3, extraction, error) {
	var info extraction
	if area <= 0 || vol <= 0 {
		return nil, info, errors.New("the surface encloses no volume (is it closed, with normals facing out?)")
	}
	meanR := 2 * vol / area // a long tube has V/A = r/2
	h := opt.Voxel
	lo, hi := m.Bounds()
	ext := hi.Sub(lo)
	if h <= 0 {
		h = meanR / 8
	}
	if bound := math.Cbrt((ext[0] + 4*h) * (ext[1] + 4*h) * (ext[2] + 4*h) / mesh.MaxGridVoxels); h < bound {
		h = bound
	}
	for mesh.GridCells(ext, h, 2) > mesh.MaxGridVoxels { // the padding and rounding up can still tip it over
		h *= 1.01
	}
	info.voxel = h
	info.noise = medianEdge(m)
	grid, err := mesh.Voxelize(m, h, 2, workers)
	if err != nil {
		return nil, info, err
	}
	if err := ctx.Err(); err != nil {
		return nil, info, err
	}
	sq := squaredDistance(grid, workers)
	vg := newVoxelGraph(grid, sq)
	if len(vg.cells) < 8 {
		if expect := vol / (h * h * h); expect > 100 {
			// The surface encloses volume, yet almost no point is inside it an odd number of
			// times: its shells cancel out.
			return nil, info, fmt.Errorf("the surface encloses %.3g mm3, but almost no point lies inside it: it holds the same surface twice (two copies, or one shell inside another); remove the copy, or keep one shell with --shell N where they are separate", vol)
		}
		return nil, info, fmt.Errorf("the canal is too thin for a %.3f mm voxel grid (only %d voxels inside)", h, len(vg.cells))
	}
	if err := ctx.Err(); err != nil {
		return nil, info, err
	}
	// Seed at the widest voxel; its component is the canal.
	seed := int32(0)
	for n := range vg.dist {
		if vg.dist[n] > vg.dist[seed] {
			seed = int32(n)
		}
	}
	canal, reached := vg.component(seed)
	if unreached := len(vg.cells) - reached; unreached > 0 {
		info.warnings = append(info.warnings, fmt.Sprintf(
			"%.1f%% of the enclosed volume is in pieces separate from the widest canal and was left out",
			100*float64(unreached)/float64(len(vg.cells))))
	}
	// The far ends by a double sweep on a grid twice as coarse: the ends are cut off and
	// re-made later, and the searches over the whole canal cost an eighth.
	cg := vg.coarsen(canal)
	farFrom := func(n int32) int32 {
		d := cg.dijkstra([]int32{n})
		far, _ := farthest(d)
		return far
	}
	aC := farFrom(cg.up[seed])
	bC := farFrom(aC)
	a, b := cg.rep[aC], cg.rep[bC]
	if opt.Orifice != nil {
		a = vg.nearest(*opt.Orifice, canal)
	}
	if opt.Apex != nil {
		b = vg.nearest(*opt.Apex, canal)
	}
	if opt.Orifice == nil && opt.Apex != nil {
		a = cg.rep[farFrom(cg.up[b])]
	} else if opt.Apex == nil && opt.Orifice != nil {
		b = cg.rep[farFrom(cg.up[a])]
	}
	if err := ctx.Err(); err != nil {
		return nil, info, err
	}
	// Minimal path through the middle: cost 1/(DT^2 + eps) keeps it on the distance ridge.
	eps := h * h * 0.25
	cost := make([]float64, len(vg.cells))
	for n, d := range vg.dist {
		cost[n] = 1 / (d*d + eps)
	}
	path := vg.minimalPath(a, b, cost)
	if len(path) < 2 || path[0] != a {
		return nil, info, errors.New("no path joins the two ends of the canal")
	}
	raw := make([]mgl64.Vec3, len(path))
	for i, n := range path {
		raw[i] = vg.center(n)
	}
	ds := StationSpacing
	pts := smoothGaussian(resample(raw, ds), 2*h/ds)
	// The double sweep ends on the rim of a wide end and a medial path cannot reach an end
	// anyway: cut about one and a half end radii off each end, re-centre what is left on its
	// cross-sections, and carry each end along its tangent to the wall.
	rStart, rEnd := endRadius(vg, path, true), endRadius(vg, path, false)
	pts = trimEnds(pts, ds, 1.5*rStart+h, 1.5*rEnd+h)
	if len(pts) < 4 {
		return nil, info, errors.New("the canal is too short to find its axis")
	}
	if err := ctx.Err(); err != nil {
		return nil, info, err
	}
	bvh := wall()
	pts, sec := recentre(pts, bvh, ds, workers)
	// Stations whose cross-section could not be outlined (a ray slipped out through a hole or
	// past the end) are cut off the ends and bridged inside.
	first, last := 0, len(pts)-1
	for first < last && !sec[first].ok {
		first++
	}
	for last > first && !sec[last].ok {
		last--
	}
	if last-first < 3 {
		return nil, info, errors.New("no cross-section of the canal could be outlined: is the surface closed?")
	}
	pts, sec = pts[first:last+1], sec[first:last+1]
	fillUnmoved(pts, sec)
	info.warnings = append(info.warnings, cg.branchWarnings(path, sec)...)
	if opt.Orifice == nil && opt.Apex == nil {
		// The orifice is the wider end, judged by the mean width of the sections over the
		// last 2 mm at each end (one wide section at a rim cannot decide it).
		wa, wb := endWidths(pts, sec, ds)
		if wb > wa {
			slices.Reverse(pts)
			slices.Reverse(sec)
			rStart, rEnd = rEnd, rStart
			wa, wb = wb, wa
		}
		if wb > 0.85*wa {
			info.warnings = append(info.warnings, fmt.Sprintf(
				"the two ends of the canal are close in width (%.2f and %.2f mm across): the wider was taken as the orifice; if that is wrong, name an end with --orifice X,Y,Z or --apical-end X,Y,Z",
				wa, wb))
		}
	}
	info.endRadius = [2]float64{endReach(sec, ds, false), endReach(sec, ds, true)}
	// The sections of the last stations may still meet an end cap (an oblique cut, the rim of
	// a wide end): their centroids pull the line off its path, so they go too.
	// They go before the ends are grown (a cut station would steer the growth) and again
	// after (the growth stops only once a cut is plain).
	tol := math.Max(0.02, 0.3*info.noise)
	pts, sec = trimBent(pts, sec, tol, info.endRadius, true)
	pts, sec = growEnds(pts, sec, bvh, ds, info.endRadius)
	first, last = bentKept(pts, sec, tol, info.endRadius, false)
	info.warnings = append(info.warnings, unfollowedBend(pts, last)...)
	pts = pts[first : last+1]
	pts = resample(smoothGaussian(pts, math.Max(1, 2*info.noise/ds)), ds)
	measured := arcLengths(pts)
	info.head, info.tail = extendToWall(pts, bvh, rStart, rEnd)
	pts = resample(info.head.add(pts, info.tail), ds)
	info.measuredFrom = info.head.length()
	info.measuredTo = info.measuredFrom + measured[len(measured)-1]
	return pts, info, nil
}

// nearest returns the node of the canal closest to p.
func (vg *voxelGraph) nearest(p mgl64.Vec3, canal []bool) int32 {
	best, bd := int32(0), math.Inf(1)
	for n := range vg.cells {
		if !canal[n] {
			continue
		}
		if d := vg.center(int32(n)).Sub(p).Len(); d < bd {
			best, bd = int32(n), d
		}
	}
	return best
}

// branchWarnings reports inside volume that reaches far from the chosen path (fine nodes): a
// lateral canal or a second root canal joined to this one, measured on the coarse grid. Its
// own sections (sec) say how far the canal itself reaches from its axis: an oval's long
// semi-axis is no branch.
func (cg *coarseGraph) branchWarnings(path []int32, sec []section) []string {
	var from []int32
	for _, n := range path {
		if m := cg.up[n]; m >= 0 && (len(from) == 0 || from[len(from)-1] != m) {
			from = append(from, m)
		}
	}
	fromPath := cg.dijkstra(from)
	maxR := 0.0
	for _, n := range from {
		maxR = math.Max(maxR, cg.dist[n])
	}
	for _, sc := range sec {
		if sc.ok {
			maxR = math.Max(maxR, 0.75*sc.far)
		}
	}
	vg := cg.voxelGraph
	reach := 0.0
	for n, d := range fromPath {
		if !math.IsInf(d, 1) && d-vg.dist[n] > reach {
			reach = d - vg.dist[n]
		}
	}
	if reach > math.Max(1.0, 2*maxR) {
		return []string{fmt.Sprintf("a branch reaching %.1f mm from the main canal was left out of the centerline", reach)}
	}
	return nil
}

// Stations of the line are checked against the path it holds further in: a quadratic fitted to
// bentFit stations that lie bentGap stations further in predicts each one.
const (
	bentFit = 20 // 1 mm
	bentGap = 6  // 0.3 mm
)

// bentReach is how far from an end, in end radii, an end cap can cut the sections: a cut
// tilted 45 degrees reaches one radius past the axis, and the line may end a radius beyond.
const bentReach = 2.5

// bentNarrowing is how far from the trend of the sections further in (a share of the width
// the trend gives) a section's width must be to count as cut by an end cap: narrower where
// the cap cuts it, wider where the line already leans and its plane crosses the canal aslant.
const bentNarrowing = 0.02

// trimBent drops the stations at either end of a line spaced StationSpacing apart whose
// section is cut by an end cap: off the trend of the sections further in by
// bentNarrowing, and straying more than tol mm from the path the line holds further in.
// Every station beyond the first such one goes too. Only stations within bentReach end radii
// (endRadius: at the start, at the end) of an end are checked, and a real curve, whose
// sections keep their width, is never taken for a cut section. A section wider than the
// trend counts only when the line may lean (leaning: a medial path's ends); a line grown
// section by section does not lean, and an oval canal's sections widen in a sharp bend.
func trimBent(pts []mgl64.Vec3, sec []section, tol float64, endRadius [2]float64, leaning bool) ([]mgl64.Vec3, []section) {
	first, last := bentKept(pts, sec, tol, endRadius, leaning)
	return pts[first : last+1], sec[first : last+1]
}

// bentKept is the first and last station trimBent keeps.
func bentKept(pts []mgl64.Vec3, sec []section, tol float64, endRadius [2]float64, leaning bool) (first, last int) {
	n := len(pts)
	reach := func(r float64) int {
		return min(int(math.Ceil(bentReach*r/StationSpacing)), n/3-bentGap-bentFit)
	}
	// Least-squares weights that give a quadratic's value at x = 0 from its samples at
	// x = bentGap+1 .. bentGap+bentFit.
	var xs [bentFit]float64
	var m mgl64.Mat3
	for k := range xs {
		x := float64(bentGap + 1 + k)
		xs[k] = x
		row := mgl64.Vec3{1, x, x * x}
		m = m.Add(outer(row, row))
	}
	inv := m.Inv()
	width := func(i int) float64 { return 2 * math.Sqrt(sec[i].area/math.Pi) }
	// fitAt fits, over the window that starts bentGap+1 stations in from station k, a
	// quadratic to the positions and a line to the widths, and returns both at k with the
	// scatter (root mean square residual) of each about its fit.
	fitAt := func(k int, at func(int) int) (pos mgl64.Vec3, posScatter, wid, widScatter float64) {
		var coef [3]mgl64.Vec3
		var wx, wxx, ww, wxw float64
		for j, x := range xs {
			i := at(k + bentGap + 1 + j)
			row := mgl64.Vec3{1, x, x * x}
			for a := range 3 {
				coef[a] = coef[a].Add(row.Mul(pts[i][a]))
			}
			wx += x
			wxx += x * x
			ww += width(i)
			wxw += x * width(i)
		}
		for a := range 3 {
			coef[a] = inv.Mul3x1(coef[a])
		}
		slope := (bentFit*wxw - wx*ww) / (bentFit*wxx - wx*wx)
		icpt := (ww - slope*wx) / bentFit
		var sp, sw float64
		for j, x := range xs {
			i := at(k + bentGap + 1 + j)
			q := mgl64.Vec3{coef[0].Dot(mgl64.Vec3{1, x, x * x}), coef[1].Dot(mgl64.Vec3{1, x, x * x}), coef[2].Dot(mgl64.Vec3{1, x, x * x})}
			sp += pts[i].Sub(q).LenSqr()
			d := width(i) - (icpt + slope*x)
			sw += d * d
		}
		return mgl64.Vec3{coef[0][0], coef[1][0], coef[2][0]}, math.Sqrt(sp / bentFit), icpt, math.Sqrt(sw / bentFit)
	}
	strays := func(k int, at func(int) int) (bool, bool) {
		pred, ps, wPred, ws := fitAt(k, at)
		i := at(k)
		off := wPred - width(i)
		if leaning {
			off = math.Abs(off)
		}
		return pts[i].Sub(pred).Len() > math.Max(tol, 4*ps), off > math.Max(bentNarrowing*wPred, 4*ws)
	}
	// cut walks outward to the first station that strays and whose width is off its trend;
	// the straying stations just inside it belong to the same bend and go too.
	cut := func(start int, at func(int) int) int {
		for k := start; k >= 0; k-- {
			if off, wide := strays(k, at); off && wide {
				for k < start {
					if off, _ := strays(k+1, at); !off {
						break
					}
					k++
				}
				return k + 1
			}
		}
		return 0
	}
	first = cut(reach(endRadius[0]), func(i int) int { return i })
	last = n - 1 - cut(reach(endRadius[1]), func(i int) int { return n - 1 - i })
	return first, last
}

// A warning says a bend beyond the cut-back apical end is not measured where the stations cut
// off end in a direction more than unfollowedTurn degrees from the end kept and more than
// unfollowedOffset mm aside of the line carried straight. A section cut by an end cap pulls
// its centroid aside by a few hundredths of a mm; a bend that only looks like a cut (an oval
// canal's sections narrowing a little in a sharp bend near a wide end) turns by tens of
// degrees over a mm or more and ends tenths of a mm aside.
// The turn is the lesser of the angles between the stations cut off (a chord over their last
// growChord) and the end kept, over its last growChord and over its last unfollowedChord (1
// mm): the short chord alone takes a line's wander of a few hundredths of a mm across a
// coarse, flat oval end for a turn (14-16 degrees of a straight tail, family 163-041), the
// long one alone lags where a bend ends just inside the end kept (12 degrees of a straight
// tail after a sharp arc, 113-071).
const (
	unfollowedTurn   = 10.0
	unfollowedOffset = 0.15
	unfollowedChord  = 20
)

// unfollowedBend warns where the stations cut off the apical end of the grown line (pts after
// last) turn away from the line's direction at the end kept: the line is carried straight
// beyond it, so a bend there is not measured and may be the tightest. (At the orifice an
// oblique access cut pulls the centroids of the last millimetres of stations far aside, and
// no bend there is the tightest without the line showing it further in: no such warning.)
func unfollowedBend(pts []mgl64.Vec3, last int) []string {
	kept, dropped := pts[:last+1], pts[last+1:]
	if len(dropped) <= growChord || len(kept) <= unfollowedChord {
		return nil
	}
	dir := func(p []mgl64.Vec3, n int) mgl64.Vec3 { return p[len(p)-1].Sub(p[len(p)-1-n]).Normalize() }
	angle := func(a, b mgl64.Vec3) float64 { return math.Acos(math.Max(-1, math.Min(1, a.Dot(b)))) * 180 / math.Pi }
	end, along := kept[len(kept)-1], dir(kept, unfollowedChord)
	to := dropped[len(dropped)-1].Sub(end)
	aside := to.Sub(along.Mul(to.Dot(along))).Len()
	tail := dir(dropped, growChord)
	deg := min(angle(along, tail), angle(dir(kept, growChord), tail))
	if deg <= unfollowedTurn || aside <= unfollowedOffset {
		return nil
	}
	return []string{fmt.Sprintf("the canal turns about %.0f degrees in the last %.1f mm before the apical end, "+
		"where the scan's end cuts its cross-sections: the centerline is carried straight there, so a bend "+
		"within that stretch is not measured and may be the tightest (check the apical end on the scan)",
		deg, float64(len(dropped))*StationSpacing)}
}

// growChord is the chord, in stations, whose direction carries a growing end on: 0.3 mm,
// steady against the wiggle of single sections, and on a bend of radius 3 mm off the tangent
// by under 3 degrees.
const growChord = 6

// growNarrowing is the least share of the last station's area a grown station's section
// keeps: a canal tapering 0.1 mm per mm and 0.3 mm wide loses 3 % over a station, a section
// that meets an end cap more.
const growNarrowing = 0.9

// growEnds carries each end of a re-centred line on along the canal, one station at a time:
// the next station is the last one moved on by ds along the end's direction and re-centred on
// its cross-section, until the station leaves the canal (it is past the end), its section
// meets the end cap (its centre moves sideways by more than half a station, or its area drops
// by a tenth), or the growth passes four end radii (reach: at the start, at the end) plus
// 1 mm, well past the one and a half cut off (a bound, not a rule: the canal ends first). The
// medial path's ends were cut back by about one and a half end radii, since a path through the middle
// cannot reach an end; a bend within that stretch is followed here, where a straight carry
// along the end tangent would cut across it. Stations whose sections meet an end cap are
// left for trimBent.
func growEnds(pts []mgl64.Vec3, sec []section, bvh *mesh.BVH, ds float64, reach [2]float64) ([]mgl64.Vec3, []section) {
	caster := mesh.FanCaster{BVH: bvh}
	grow := func(pts []mgl64.Vec3, sec []section, reach float64) ([]mgl64.Vec3, []section) {
		back := min(len(pts)-1, growChord)
		for step := 0; float64(step)*ds < 4*reach+1; step++ {
			last := pts[len(pts)-1]
			dir := last.Sub(pts[len(pts)-1-back]).Normalize()
			next := last.Add(dir.Mul(ds))
			if !bvh.Inside(next) {
				break
			}
			c, s := centreOfSection(next, dir, &caster)
			if !s.ok || !bvh.Inside(c) {
				break
			}
			if c.Sub(next).Len() > ds/2 || s.area < growNarrowing*sec[len(sec)-1].area {
				break // the section meets the end cap
			}
			pts = append(pts, last.Add(c.Sub(last).Normalize().Mul(ds)))
			sec = append(sec, s)
		}
		return pts, sec
	}
	pts, sec = grow(pts, sec, reach[1])
	slices.Reverse(pts)
	slices.Reverse(sec)
	pts, sec = grow(pts, sec, reach[0])
	slices.Reverse(pts)
	slices.Reverse(sec)
	return pts, sec
}

// extendToWall finds where each end of a medial line, carried along its end tangent, meets
// the wall: a medial path stops about one radius short of each end.
func extendToWall(pts []mgl64.Vec3, bvh *mesh.BVH, rStart, rEnd float64) (head, tail extension) {
	n := len(pts)
	// The end tangent as the chord over the last 0.4 mm: steady against the last wiggles, and
	// on a curved end off by only half the turn over that chord.
	dirAt := func(from, dir int) mgl64.Vec3 {
		j := max(0, min(n-1, from+8*dir))
		return pts[from].Sub(pts[j]).Normalize()
	}
	head = extension{pts[0], pts[0]}
	tail = extension{pts[n-1], pts[n-1]}
	if hit, ok := bvh.Ray(pts[0], dirAt(0, 1), 10*rStart+1); ok {
		head.to = hit.Point
	}
	if hit, ok := bvh.Ray(pts[n-1], dirAt(n-1, -1), 10*rEnd+1); ok {
		tail.to = hit.Point
	}
	return head, tail
}

// recentreRays is the number of rays that outline a cross-section.
const recentreRays = 128

// recentreReach bounds each ray of an outline at this many times the median ray: an oval
// section (long to short axis up to 2) stays whole, a branch's opening is cut off.
const recentreReach = 2.0

// section is what the rays of one station found: its area and the largest distance from
// the station to the wall (the long semi-axis of an oval section), mm2 and mm.
type section struct {
	ok        bool
	area, far float64
}

// recentre moves each station to the centroid of the canal's cross-section in its normal
// plane, outlined by rays from the station. In an oval canal the distance ridge is a band, so
// a medial path wanders across it; the centroid does not. A station whose rays do not all
// find the wall keeps its place and is marked not ok.
func recentre(pts []mgl64.Vec3, bvh *mesh.BVH, ds float64, workers int) ([]mgl64.Vec3, []section) {
	out := append([]mgl64.Vec3(nil), pts...)
	sec := make([]section, len(pts))
	d1, _ := derivatives(pts, ds, max(2, int(0.2/ds)))
	casters := make([]mesh.FanCaster, parallel.Workers(workers, len(pts)))
	for w := range casters {
		casters[w].BVH = bvh
	}
	parallel.For(workers, len(pts), func(w, i int) {
		if c, s := centreOfSection(pts[i], d1[i], &casters[w]); s.ok {
			out[i], sec[i] = c, s
		}
	})
	return out, sec
}

// sectionCos and sectionSin are the directions, in a section's own plane, of the rays that
// outline it.
var sectionCos, sectionSin = func() (cs, sn [recentreRays]float64) {
	for j := range cs {
		a := 2 * math.Pi * float64(j) / recentreRays
		cs[j], sn[j] = math.Cos(a), math.Sin(a)
	}
	return cs, sn
}()

// centreOfSection outlines the canal's cross-section through p normal to tangent with rays
// from p, cast as one fan (fc: one caster per goroutine), and returns its centroid. The
// section is not ok when a ray finds no wall.
func centreOfSection(p, tangent mgl64.Vec3, fc *mesh.FanCaster) (mgl64.Vec3, section) {
	t := tangent.Normalize()
	if t.Len() == 0 {
		return p, section{}
	}
	u := anyPerpendicular(t)
	v := t.Cross(u)
	var xs, ys, ts, sorted [recentreRays]float64
	fc.Cast(p, u, v, sectionCos[:], sectionSin[:], 50, ts[:])
	for _, d := range ts {
		if d < 0 {
			return p, section{}
		}
	}
	// A ray that runs off into a branch or a side canal would drag the centroid after
	// it: no ray counts longer than recentreReach times the median.
	sorted = ts
	slices.Sort(sorted[:])
	limit := recentreReach * sorted[recentreRays/2]
	far := 0.0
	for j := range ts {
		t := math.Min(ts[j], limit)
		xs[j], ys[j] = t*sectionCos[j], t*sectionSin[j]
		far = math.Max(far, t)
	}
	cx, cy, ok := polygonCentroid(xs[:], ys[:])
	if !ok {
		return p, section{}
	}
	return p.Add(u.Mul(cx)).Add(v.Mul(cy)), section{ok: true, area: polygonArea(xs[:], ys[:]), far: far}
}

// endWidths is the mean width (diameter of the circle of the same area) of the sections
// within 2 mm of each end, or over the first and last third of a shorter line.
func endWidths(pts []mgl64.Vec3, sec []section, ds float64) (start, end float64) {
	n := min(int(math.Round(2/ds))+1, max(1, len(pts)/3))
	mean := func(from, to int) float64 {
		sum, cnt := 0.0, 0
		for i := from; i < to; i++ {
			if sec[i].ok {
				sum += 2 * math.Sqrt(sec[i].area/math.Pi)
				cnt++
			}
		}
		if cnt == 0 {
			return 0
		}
		return sum / float64(cnt)
	}
	return mean(0, n), mean(len(pts)-n, len(pts))
}

// endReach is the mean largest distance to the wall over the stations within 1 mm of the
// start (or of the end): the long semi-axis of the canal's end.
func endReach(sec []section, ds float64, atEnd bool) float64 {
	n := min(int(math.Round(1/ds))+1, len(sec))
	sum, cnt := 0.0, 0
	for k := 0; k < n; k++ {
		i := k
		if atEnd {
			i = len(sec) - 1 - k
		}
		if sec[i].ok {
			sum += sec[i].far
			cnt++
		}
	}
	if cnt == 0 {
		return 0
	}
	return sum / float64(cnt)
}

// polygonCentroid is the area centroid of a simple closed polygon.
func polygonCentroid(xs, ys []float64) (cx, cy float64, ok bool) {
	var a2 float64
	n := len(xs)
	for j := 0; j < n; j++ {
		k := (j + 1) % n
		c := xs[j]*ys[k] - xs[k]*ys[j]
		a2 += c
		cx += (xs[j] + xs[k]) * c
		cy += (ys[j] + ys[k]) * c
	}
	if math.Abs(a2) < 1e-18 {
		return 0, 0, false
	}
	return cx / (3 * a2), cy / (3 * a2), true
}

// polygonArea is the area of a simple closed polygon (shoelace formula).
func polygonArea(xs, ys []float64) float64 {
	a2 := 0.0
	for j := range xs {
		k := (j + 1) % len(xs)
		a2 += xs[j]*ys[k] - xs[k]*ys[j]
	}
	return math.Abs(a2) / 2
}

// medianEdge is the median edge length of the mesh's triangles (a sample of up to 20k).
func medianEdge(m *mesh.Mesh) float64 {
	step := max(1, len(m.Triangles)/20000)
	var ls []float64
	for t := 0; t < len(m.Triangles); t += step {
		a, b, c := m.Corners(t)
		ls = append(ls, a.Sub(b).Len(), b.Sub(c).Len(), c.Sub(a).Len())
	}
	if len(ls) == 0 {
		return 0
	}
	return nthSmallest(ls, len(ls)/2)
}

// nthSmallest returns the value a sort would put at place k (from 0), reordering xs: a
// quickselect with the median of three as pivot, a tenth of the cost of sorting.
func nthSmallest(xs []float64, k int) float64 {
	lo, hi := 0, len(xs)-1
	for hi > lo {
		mid := lo + (hi-lo)/2
		if xs[mid] < xs[lo] {
			xs[mid], xs[lo] = xs[lo], xs[mid]
		}
		if xs[hi] < xs[lo] {
			xs[hi], xs[lo] = xs[lo], xs[hi]
		}
		if xs[hi] < xs[mid] {
			xs[hi], xs[mid] = xs[mid], xs[hi]
		}
		pivot := xs[mid]
		i, j := lo, hi
		for i <= j {
			for xs[i] < pivot {
				i++
			}
			for xs[j] > pivot {
				j--
			}
			if i <= j {
				xs[i], xs[j] = xs[j], xs[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return xs[k]
		}
	}
	return xs[k]
}

// endRadius is the widest distance to the wall over the first (or last) 2 mm of the path.
func endRadius(vg *voxelGraph, path []int32, start bool) float64 {
	r := 0.0
	from := vg.center(path[0])
	if !start {
		from = vg.center(path[len(path)-1])
	}
	for k := range path {
		n := path[k]
		if !start {
			n = path[len(path)-1-k]
		}
		if vg.center(n).Sub(from).Len() > 2 {
			break
		}
		r = math.Max(r, vg.dist[n])
	}
	return r
}

// trimEnds drops stations within a and b mm of arc length from the start and the end.
func trimEnds(pts []mgl64.Vec3, ds, a, b float64) []mgl64.Vec3 {
	i0 := int(math.Ceil(a / ds))
	i1 := len(pts) - 1 - int(math.Ceil(b/ds))
	if i1-i0 < 3 {
		mid := len(pts) / 2
		i0, i1 = max(0, mid-2), min(len(pts)-1, mid+2)
	}
	return pts[i0 : i1+1]
}

// fillUnmoved puts each station that could not be re-centred (a ray slipped through the
// wall) on the straight line between its nearest re-centred neighbours. The first and last
// stations have been re-centred.
func fillUnmoved(pts []mgl64.Vec3, sec []section) {
	prev := 0
	for i := 1; i < len(pts); i++ {
		if !sec[i].ok {
			continue
		}
		for k := prev + 1; k < i; k++ {
			f := float64(k-prev) / float64(i-prev)
			pts[k] = pts[prev].Mul(1 - f).Add(pts[i].Mul(f))
		}
		prev = i
	}
}
