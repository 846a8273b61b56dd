package analysis

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"

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
func extractCenterline(ctx context.Context, m *mesh.Mesh, bvh *mesh.BVH, opt ExtractOptions, workers int) ([]mgl64.Vec3, extraction, error) {
	var info extraction
	area, vol := mesh.Area(m), mesh.Volume(m)
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
	fromSeed, _ := vg.dijkstra([]int32{seed}, nil)
	unreached := 0
	for _, d := range fromSeed {
		if math.IsInf(d, 1) {
			unreached++
		}
	}
	if unreached > 0 {
		info.warnings = append(info.warnings, fmt.Sprintf(
			"%.1f%% of the enclosed volume is in pieces separate from the widest canal and was left out",
			100*float64(unreached)/float64(len(vg.cells))))
	}
	a, _ := farthest(fromSeed)
	fromA, _ := vg.dijkstra([]int32{a}, nil)
	b, _ := farthest(fromA)
	if opt.Orifice != nil {
		a = vg.nearest(*opt.Orifice, fromSeed)
	}
	if opt.Apex != nil {
		b = vg.nearest(*opt.Apex, fromSeed)
	}
	if opt.Orifice == nil && opt.Apex == nil && vg.endWidth(b) > vg.endWidth(a) {
		a, b = b, a // the wider end is the orifice
	} else if opt.Orifice == nil && opt.Apex != nil {
		fromB, _ := vg.dijkstra([]int32{b}, nil)
		a, _ = farthest(fromB)
	} else if opt.Apex == nil && opt.Orifice != nil {
		fromOrifice, _ := vg.dijkstra([]int32{a}, nil)
		b, _ = farthest(fromOrifice)
	}
	if err := ctx.Err(); err != nil {
		return nil, info, err
	}
	// Minimal path through the middle: cost 1/(DT^2 + eps) keeps it on the distance ridge.
	eps := h * h * 0.25
	_, prev := vg.dijkstra([]int32{a}, func(p, q int32) float64 {
		dp, dq := vg.dist[p], vg.dist[q]
		return 0.5 * (1/(dp*dp+eps) + 1/(dq*dq+eps))
	})
	path := tracePath(prev, b)
	if len(path) < 2 || path[0] != a {
		return nil, info, errors.New("no path joins the two ends of the canal")
	}
	info.warnings = append(info.warnings, vg.branchWarnings(path)...)
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
	pts, moved := recentre(m, pts, bvh, ds, workers)
	// Stations whose cross-section met an end cap could not be re-centred: near a wide end
	// they still lean toward the rim, so they are cut off too.
	first, last := 0, len(pts)-1
	for first < last && !moved[first] {
		first++
	}
	for last > first && !moved[last] {
		last--
	}
	if last-first < 3 {
		return nil, info, errors.New("no cross-section of the canal could be outlined: is the surface closed?")
	}
	pts, moved = pts[first:last+1], moved[first:last+1]
	fillUnmoved(pts, moved)
	pts = resample(smoothGaussian(pts, math.Max(1, 2*info.noise/ds)), ds)
	measured := arcLengths(pts)
	info.head, info.tail = extendToWall(pts, bvh, rStart, rEnd)
	pts = resample(info.head.add(pts, info.tail), ds)
	info.measuredFrom = info.head.length()
	info.measuredTo = info.measuredFrom + measured[len(measured)-1]
	return pts, info, nil
}

// nearest returns the reached node closest to p.
func (vg *voxelGraph) nearest(p mgl64.Vec3, reach []float64) int32 {
	best, bd := int32(0), math.Inf(1)
	for n := range vg.cells {
		if math.IsInf(reach[n], 1) {
			continue
		}
		if d := vg.center(int32(n)).Sub(p).Len(); d < bd {
			best, bd = int32(n), d
		}
	}
	return best
}

// endWidth is the widest distance-to-wall within 1 mm (geodesic) of an end node.
func (vg *voxelGraph) endWidth(end int32) float64 {
	d, _ := vg.dijkstra([]int32{end}, nil, 1.0)
	w := 0.0
	for n, dn := range d {
		if dn <= 1.0 {
			w = math.Max(w, vg.dist[n])
		}
	}
	return w
}

// branchWarnings reports inside volume that reaches far from the chosen path: a lateral canal
// or a second root canal joined to this one.
func (vg *voxelGraph) branchWarnings(path []int32) []string {
	fromPath, _ := vg.dijkstra(path, nil)
	maxR := 0.0
	for _, n := range path {
		maxR = math.Max(maxR, vg.dist[n])
	}
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

// recentre moves each station to the centroid of the canal's cross-section in its normal
// plane, outlined by rays from the station. In an oval canal the distance ridge is a band, so
// a medial path wanders across it; the centroid does not. Stations whose outline meets an end
// cap (a hit face almost facing along the axis) keep their place.
func recentre(m *mesh.Mesh, pts []mgl64.Vec3, bvh *mesh.BVH, ds float64, workers int) ([]mgl64.Vec3, []bool) {
	out := append([]mgl64.Vec3(nil), pts...)
	moved := make([]bool, len(pts))
	d1, _ := derivatives(pts, ds, max(2, int(0.2/ds)))
	var dirs [recentreRays][2]float64
	for j := range dirs {
		a := 2 * math.Pi * float64(j) / recentreRays
		dirs[j] = [2]float64{math.Cos(a), math.Sin(a)}
	}
	parallel.For(workers, len(pts), func(_, i int) {
		t := d1[i].Normalize()
		if t.Len() == 0 {
			return
		}
		u := anyPerpendicular(t)
		v := t.Cross(u)
		var xs, ys [recentreRays]float64
		for j, dv := range dirs {
			dir := u.Mul(dv[0]).Add(v.Mul(dv[1]))
			hit, ok := bvh.Ray(pts[i], dir, 50)
			if !ok {
				return
			}
			xs[j], ys[j] = hit.T*dv[0], hit.T*dv[1]
		}
		cx, cy, ok := polygonCentroid(xs[:], ys[:])
		if ok {
			out[i] = pts[i].Add(u.Mul(cx)).Add(v.Mul(cy))
			moved[i] = true
		}
	})
	return out, moved
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
	sort.Float64s(ls)
	return ls[len(ls)/2]
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
func fillUnmoved(pts []mgl64.Vec3, moved []bool) {
	prev := 0
	for i := 1; i < len(pts); i++ {
		if !moved[i] {
			continue
		}
		for k := prev + 1; k < i; k++ {
			f := float64(k-prev) / float64(i-prev)
			pts[k] = pts[prev].Mul(1 - f).Add(pts[i].Mul(f))
		}
		prev = i
	}
}
