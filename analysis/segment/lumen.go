package segment

import (
	"context"
	"errors"
	"math"
	"slices"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
	"tapersweep/mesh/parallel"
	"tapersweep/mesh/volume"
)

// unresolvedRadius is the radius, in voxels, of the thin tube drawn along the path where the
// scan does not show the canal: wide enough to stay one connected piece on a grid of half
// voxels and for the centerline's sections to be outlined on it (at 0.6 they were not near a
// bend, and a canal stopped 0.6 mm short: TestCanalRunsToTheUnresolvedEnd), narrower than
// anything the scan could show (two voxels across).
const unresolvedRadius = 0.8

// maxFineSamples bounds the grid the lumen is surfaced on; below it the grid is twice as fine
// as the scan, so the thin unresolved stretch keeps its shape (a large region means fine
// voxels, where the scan's own grid is fine enough).
const maxFineSamples = 8_000_000

// surfaceLumen finds the lumen around the path and surfaces it.
func surfaceLumen(ctx context.Context, v *volume.Volume, res *Result, tube float64) (*mesh.Mesh, error) {
	ns := len(res.Path)
	// How far from each station the lumen may reach: its widest ray plus two voxels, within
	// the tube. This keeps the periodontal space beyond a thin apical wall out of the lumen.
	reach := make([]float64, ns)
	maxReach := 0.0
	for i := range ns {
		r := slices.Max(res.LumenRadius[i])
		if res.Resolved[i] {
			reach[i] = math.Min(tube, r+2*res.Voxel)
		}
		maxReach = math.Max(maxReach, reach[i])
	}
	margin := maxReach + 3*res.Voxel
	lo, hi := boundsOf(v, res.Path, margin)
	// Not smoothed: the thresholds were set on the scan's own values along the rays.
	b := newBox(v, lo, hi, 1, false)
	n := len(b.val)
	station := make([]int32, n)
	dist := make([]float32, n)
	for q := range station {
		station[q] = -1
		dist[q] = float32(math.Inf(1))
	}
	t := res.Frames.T
	last := ns - 1
	// Nearest station within reach; samples beyond the planes through the two ends are out.
	markNear(b, res.Path, maxReach+res.Voxel, func(q, i int, d float64) {
		if d <= reach[i]+1e-9 && float32(d) < dist[q] {
			dist[q], station[q] = float32(d), int32(i)
		}
	})
	for q, st := range station {
		if st < 0 {
			continue
		}
		w := b.world(q)
		if w.Sub(res.Path[0]).Dot(t[0]) < 0 || w.Sub(res.Path[last]).Dot(t[last]) > 0 {
			station[q] = -1
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	// Keep the dark samples connected to the path (6-neighbours, so the lumen does not leak
	// through a diagonal gap between voxels).
	dark := func(q int) bool {
		st := station[q]
		return st >= 0 && float64(b.val[q]) < res.Threshold[st]
	}
	inside := make([]bool, n)
	var queue []int
	for i := range ns {
		if !res.Resolved[i] {
			continue
		}
		q := darkestNear(b, b.sampleOf(res.Path[i]), 1)
		if dark(q) && !inside[q] {
			inside[q] = true
			queue = append(queue, q)
		}
	}
	offs := [6][3]int{{1, 0, 0}, {-1, 0, 0}, {0, 1, 0}, {0, -1, 0}, {0, 0, 1}, {0, 0, -1}}
	for len(queue) > 0 {
		q := queue[len(queue)-1]
		queue = queue[:len(queue)-1]
		i, j, k := b.ijk(q)
		for _, o := range offs {
			ii, jj, kk := i+o[0], j+o[1], k+o[2]
			if ii < 0 || jj < 0 || kk < 0 || ii >= b.nx || jj >= b.ny || kk >= b.nz {
				continue
			}
			r := b.index(ii, jj, kk)
			if !inside[r] && dark(r) {
				inside[r] = true
				queue = append(queue, r)
			}
		}
	}
	// The field surfaced at 0: (threshold - intensity) scaled by the contrast, positive in the
	// kept lumen; dark samples not kept are held just below 0.
	field := make([]float32, n)
	for q := range field {
		st := station[q]
		if st < 0 {
			field[q] = -1
			continue
		}
		c := res.Threshold[st] - res.CanalLevel
		f := float32((res.Threshold[st] - float64(b.val[q])) / c)
		if !inside[q] {
			f = min(f, -0.01)
		}
		field[q] = f
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	up := 2
	if n*8 > maxFineSamples {
		up = 1
	}
	fine, fx, fy, fz := upsample(field, b.nx, b.ny, b.nz, up)
	field = nil
	res.addUnresolvedTube(v, b, fine, fx, fy, fz, up)
	m := mesh.ExtractIsoSurface(fine, fx, fy, fz, mgl64.Vec3{-0.5, -0.5, -0.5}, 1, 0)
	if len(m.Triangles) == 0 {
		return nil, errors.New("no canal lumen was found along the path: are the two points in the canal?")
	}
	// Fine sample (a, b, c) lies at volume index origin + (a+0.5)/up - 0.5.
	o := b.volIndex(0, 0, 0)
	for i, p := range m.Vertices {
		q := mgl64.Vec3{o[0] + (p[0]+0.5)/float64(up) - 0.5, o[1] + (p[1]+0.5)/float64(up) - 0.5, o[2] + (p[2]+0.5)/float64(up) - 0.5}
		m.Vertices[i] = v.World(q)
	}
	if v.Handedness() < 0 {
		for i := range m.Triangles {
			m.Triangles[i][1], m.Triangles[i][2] = m.Triangles[i][2], m.Triangles[i][1]
		}
	}
	return m, nil
}

// upsample resamples a field on a grid up times finer (trilinear; fine sample a lies at
// coarse coordinate (a+0.5)/up - 0.5).
func upsample(f []float32, nx, ny, nz, up int) ([]float32, int, int, int) {
	if up == 1 {
		return f, nx, ny, nz
	}
	fx, fy, fz := nx*up, ny*up, nz*up
	out := make([]float32, fx*fy*fz)
	coord := func(a, n int) (int, float32) {
		x := (float64(a)+0.5)/float64(up) - 0.5
		x = math.Max(0, math.Min(x, float64(n-1)))
		i := min(int(x), max(n-2, 0))
		return i, float32(x - float64(i))
	}
	at := func(i, j, k int) float32 {
		return f[min(i, nx-1)+nx*(min(j, ny-1)+ny*min(k, nz-1))]
	}
	parallel.For(0, fz, func(_, c int) {
		k, wz := coord(c, nz)
		for bb := range fy {
			j, wy := coord(bb, ny)
			for a := range fx {
				i, wx := coord(a, nx)
				v := (1-wz)*((1-wy)*((1-wx)*at(i, j, k)+wx*at(i+1, j, k))+wy*((1-wx)*at(i, j+1, k)+wx*at(i+1, j+1, k))) +
					wz*((1-wy)*((1-wx)*at(i, j, k+1)+wx*at(i+1, j, k+1))+wy*((1-wx)*at(i, j+1, k+1)+wx*at(i+1, j+1, k+1)))
				out[a+fx*(bb+fy*c)] = v
			}
		}
	})
	return out, fx, fy, fz
}

// addUnresolvedTube raises the field to a thin tube along the path where the lumen is not
// resolved, so the canal stays one piece and its path is kept.
func (res *Result) addUnresolvedTube(v *volume.Volume, b *box, fine []float32, fx, fy, fz, up int) {
	r := math.Max(unresolvedRadius, 1/float64(up)) * res.Voxel // at least one sample of the grid
	o := b.volIndex(0, 0, 0)
	toFine := func(w mgl64.Vec3) mgl64.Vec3 {
		p := v.IndexOf(w)
		return mgl64.Vec3{(p[0]-o[0]+0.5)*float64(up) - 0.5, (p[1]-o[1]+0.5)*float64(up) - 0.5, (p[2]-o[2]+0.5)*float64(up) - 0.5}
	}
	fromFine := func(a, bb, c int) mgl64.Vec3 {
		return v.World(mgl64.Vec3{o[0] + (float64(a)+0.5)/float64(up) - 0.5, o[1] + (float64(bb)+0.5)/float64(up) - 0.5, o[2] + (float64(c)+0.5)/float64(up) - 0.5})
	}
	ns := len(res.Path)
	for i := range ns - 1 {
		// A segment takes part when either end is unresolved; it joins the resolved lumen.
		if res.Resolved[i] && res.Resolved[i+1] {
			continue
		}
		p0, p1 := res.Path[i], res.Path[i+1]
		a, c := toFine(p0), toFine(p1)
		pad := r/v.MinSpacing()*float64(up) + 1
		var lo, hi [3]int
		for ax, n := range [3]int{fx, fy, fz} {
			lo[ax] = max(0, int(math.Floor(math.Min(a[ax], c[ax])-pad)))
			hi[ax] = min(n-1, int(math.Ceil(math.Max(a[ax], c[ax])+pad)))
		}
		seg := p1.Sub(p0)
		l2 := seg.Dot(seg)
		for kk := lo[2]; kk <= hi[2]; kk++ {
			for jj := lo[1]; jj <= hi[1]; jj++ {
				for ii := lo[0]; ii <= hi[0]; ii++ {
					w := fromFine(ii, jj, kk)
					u := 0.0
					if l2 > 0 {
						u = math.Max(0, math.Min(1, w.Sub(p0).Dot(seg)/l2))
					}
					d := w.Sub(p0.Add(seg.Mul(u))).Len()
					if f := float32((r - d) / r); f > fine[ii+fx*(jj+fy*kk)] {
						fine[ii+fx*(jj+fy*kk)] = f
					}
				}
			}
		}
	}
}

// rootMesh surfaces the root's outer surface found along the rays: a closed tube around the
// path, capped at both ends.
func (res *Result) rootMesh() *mesh.Mesh {
	f := res.Frames
	return mesh.SweepTube(f.Points, f.N1, f.N2, func(i int, theta float64) float64 {
		row := res.RootRadius[i]
		n := len(row)
		x := theta / (2 * math.Pi) * float64(n)
		j := int(math.Floor(x)) % n
		w := x - math.Floor(x)
		return (1-w)*row[j] + w*row[(j+1)%n]
	}, res.Rays, true, true)
}

// rootForWall is the root's outer surface carried past both ends of the path along its end
// tangents by the root's mean radius there, with the end stations' outline: the wall around
// the canal is then measured to the root's side, never through a cap cut where the path ends
// (the orifice lies inside the tooth, not on its surface).
func (res *Result) rootForWall() *mesh.Mesh {
	f := res.Frames
	n := len(f.Points)
	if n < 2 || len(res.RootRadius) != n {
		return nil
	}
	mean := func(row []float64) float64 {
		sum := 0.0
		for _, v := range row {
			sum += v
		}
		return sum / float64(len(row))
	}
	t0 := f.Points[1].Sub(f.Points[0]).Normalize()
	t1 := f.Points[n-1].Sub(f.Points[n-2]).Normalize()
	e0, e1 := mean(res.RootRadius[0]), mean(res.RootRadius[n-1])
	var pts, n1, n2 []mgl64.Vec3
	var rows [][]float64
	for k := 4; k >= 1; k-- {
		pts = append(pts, f.Points[0].Sub(t0.Mul(e0*float64(k)/4)))
		n1, n2, rows = append(n1, f.N1[0]), append(n2, f.N2[0]), append(rows, res.RootRadius[0])
	}
	pts, n1, n2, rows = append(pts, f.Points...), append(n1, f.N1...), append(n2, f.N2...), append(rows, res.RootRadius...)
	for k := 1; k <= 4; k++ {
		pts = append(pts, f.Points[n-1].Add(t1.Mul(e1*float64(k)/4)))
		n1, n2, rows = append(n1, f.N1[n-1]), append(n2, f.N2[n-1]), append(rows, res.RootRadius[n-1])
	}
	return mesh.SweepTube(pts, n1, n2, func(i int, theta float64) float64 {
		row := rows[i]
		m := len(row)
		x := theta / (2 * math.Pi) * float64(m)
		j := int(math.Floor(x)) % m
		w := x - math.Floor(x)
		return (1-w)*row[j] + w*row[(j+1)%m]
	}, res.Rays, true, true)
}
