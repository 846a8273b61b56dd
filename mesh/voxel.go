package mesh

import (
	"fmt"
	"math"
	"slices"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh/parallel"
)

// MaxGridVoxels bounds the size of a grid that Voxelize will build (one byte per voxel, and the
// distance transform's float32 per voxel on top), so memory stays modest on a laptop.
const MaxGridVoxels = 30_000_000

// GridTooLargeError is a grid Voxelize refuses: more than MaxGridVoxels voxels.
type GridTooLargeError struct {
	Voxel float64    // the edge asked for, mm
	Box   mgl64.Vec3 // the mesh's extent, mm
}

func (e *GridTooLargeError) Error() string {
	return fmt.Sprintf("voxelize: a %g mm voxel over a %.3g x %.3g x %.3g mm box needs more than %d voxels",
		e.Voxel, e.Box[0], e.Box[1], e.Box[2], MaxGridVoxels)
}

// GridCells is the number of voxels Voxelize makes for a box of extent ext at the given voxel
// edge and padding: what MaxGridVoxels is compared with.
func GridCells(ext mgl64.Vec3, voxel float64, pad int) float64 {
	total := 1.0
	for a := range 3 {
		total *= max(math.Ceil(ext[a]/voxel)+float64(2*pad), 1)
	}
	return total
}

// Grid is a boolean voxel grid. Voxel (i, j, k) is stored at i + NX*(j + NY*k) and its
// centre lies at Origin + (i+0.5, j+0.5, k+0.5)*Voxel.
type Grid struct {
	Origin     mgl64.Vec3
	Voxel      float64
	NX, NY, NZ int
	Inside     []bool
}

// Index returns the position of voxel (i, j, k) in Inside.
func (g *Grid) Index(i, j, k int) int { return i + g.NX*(j+g.NY*k) }

// Center returns the centre of voxel (i, j, k).
func (g *Grid) Center(i, j, k int) mgl64.Vec3 {
	return g.Origin.Add(mgl64.Vec3{float64(i) + 0.5, float64(j) + 0.5, float64(k) + 0.5}.Mul(g.Voxel))
}

// Voxelize marks the voxels whose centres lie inside the closed mesh m: for every z column
// through voxel centres it counts the crossings of the mesh below each centre (odd = inside).
// The grid spans the mesh's bounds plus pad empty voxels on every side. It fails when the
// grid would hold more than MaxGridVoxels voxels (a *GridTooLargeError). The rows are filled
// on workers goroutines (0: all cores); the grid does not depend on their number.
func Voxelize(m *Mesh, voxel float64, pad, workers int) (*Grid, error) {
	if m == nil || len(m.Triangles) == 0 {
		return nil, fmt.Errorf("voxelize: empty mesh")
	}
	if !(voxel > 0) || math.IsInf(voxel, 0) {
		return nil, fmt.Errorf("voxelize: voxel size %g mm: want a positive number", voxel)
	}
	if pad < 0 {
		pad = 0
	}
	for i, v := range m.Vertices {
		if math.IsNaN(v[0]+v[1]+v[2]) || math.IsInf(v[0]+v[1]+v[2], 0) {
			return nil, fmt.Errorf("voxelize: vertex %d %v is not a finite point", i, v)
		}
	}
	lo, hi := m.Bounds()
	if GridCells(hi.Sub(lo), voxel, pad) > MaxGridVoxels {
		return nil, &GridTooLargeError{Voxel: voxel, Box: hi.Sub(lo)}
	}
	var n [3]int
	for a := range 3 {
		n[a] = int(max(math.Ceil((hi[a]-lo[a])/voxel)+float64(2*pad), 1))
	}
	for _, t := range m.Triangles {
		for _, v := range t {
			if v < 0 || int(v) >= len(m.Vertices) {
				return nil, fmt.Errorf("voxelize: triangle refers to vertex %d of %d", v, len(m.Vertices))
			}
		}
	}
	// Centre the box: the mesh sits in the middle of the slack left by rounding up.
	origin := lo
	for a := range 3 {
		slack := float64(n[a])*voxel - (hi[a] - lo[a])
		origin[a] = lo[a] - slack/2
	}
	g := &Grid{Origin: origin, Voxel: voxel, NX: n[0], NY: n[1], NZ: n[2], Inside: make([]bool, n[0]*n[1]*n[2])}
	voxelFill(g, m, workers)
	return g, nil
}

// voxelSlack (in voxels) widens the rows and columns a triangle is tried against. Whether a
// centre on the very edge of a triangle's footprint is crossed must be decided by the exact
// edge rule of voxelColumnHit alone: bucketing arithmetic that rounds the other way drops
// one of the two triangles sharing the edge, and a whole row of columns on a mesh's plane
// of symmetry loses a crossing (its voxels turn outside).
const voxelSlack = 1e-3

// voxelRowsOf buckets triangles by the rows j (y of voxel centres) their xy footprint covers,
// in compressed form: row j holds list[start[j]:start[j+1]].
func voxelRowsOf(g *Grid, m *Mesh) (start []int, list []int32) {
	start = make([]int, g.NY+1)
	rowRange := func(t [3]int32) (int, int) {
		y0 := math.Min(m.Vertices[t[0]][1], math.Min(m.Vertices[t[1]][1], m.Vertices[t[2]][1]))
		y1 := math.Max(m.Vertices[t[0]][1], math.Max(m.Vertices[t[1]][1], m.Vertices[t[2]][1]))
		j0 := int(math.Ceil((y0-g.Origin[1])/g.Voxel - 0.5 - voxelSlack))
		j1 := int(math.Floor((y1-g.Origin[1])/g.Voxel - 0.5 + voxelSlack))
		return max(j0, 0), min(j1, g.NY-1)
	}
	for _, t := range m.Triangles {
		j0, j1 := rowRange(t)
		for j := j0; j <= j1; j++ {
			start[j+1]++
		}
	}
	for j := 1; j <= g.NY; j++ {
		start[j] += start[j-1]
	}
	list = make([]int32, start[g.NY])
	fill := slices.Clone(start[:g.NY])
	for ti, t := range m.Triangles {
		j0, j1 := rowRange(t)
		for j := j0; j <= j1; j++ {
			list[fill[j]] = int32(ti)
			fill[j]++
		}
	}
	return start, list
}

// voxelCrossing is one crossing of column i by the mesh at height z.
type voxelCrossing struct {
	i int32
	z float64
}

// voxelFill computes the rows in parallel; each row is independent, so the result does not
// depend on the number of workers.
func voxelFill(g *Grid, m *Mesh, workers int) {
	start, list := voxelRowsOf(g, m)
	hits := make([][]voxelCrossing, parallel.Workers(workers, g.NY))
	parallel.For(workers, g.NY, func(w, j int) {
		hits[w] = voxelRow(g, m, j, list[start[j]:start[j+1]], hits[w][:0])
	})
}

// voxelRow finds the crossings of every column of row j and fills the voxels between them.
func voxelRow(g *Grid, m *Mesh, j int, tris []int32, hits []voxelCrossing) []voxelCrossing {
	v := g.Voxel
	py := g.Origin[1] + (float64(j)+0.5)*v
	for _, ti := range tris {
		t := m.Triangles[ti]
		a, b, c := m.Vertices[t[0]], m.Vertices[t[1]], m.Vertices[t[2]]
		x0 := math.Min(a[0], math.Min(b[0], c[0]))
		x1 := math.Max(a[0], math.Max(b[0], c[0]))
		i0 := max(int(math.Ceil((x0-g.Origin[0])/v-0.5-voxelSlack)), 0)
		i1 := min(int(math.Floor((x1-g.Origin[0])/v-0.5+voxelSlack)), g.NX-1)
		for i := i0; i <= i1; i++ {
			px := g.Origin[0] + (float64(i)+0.5)*v
			if z, ok := voxelColumnHit(a, b, c, px, py); ok {
				hits = append(hits, voxelCrossing{int32(i), z})
			}
		}
	}
	slices.SortFunc(hits, func(p, q voxelCrossing) int {
		if p.i != q.i {
			return int(p.i - q.i)
		}
		return cmpFloat(p.z, q.z)
	})
	for s := 0; s < len(hits); {
		e := s
		for e < len(hits) && hits[e].i == hits[s].i {
			e++
		}
		i := int(hits[s].i)
		// Pairs of crossings bound the inside; an unpaired last crossing (open mesh) is ignored.
		for p := s; p+1 < e; p += 2 {
			k0 := max(int(math.Ceil((hits[p].z-g.Origin[2])/v-0.5)), 0)
			k1 := min(int(math.Ceil((hits[p+1].z-g.Origin[2])/v-0.5))-1, g.NZ-1)
			for k := k0; k <= k1; k++ {
				g.Inside[g.Index(i, j, k)] = true
			}
		}
		s = e
	}
	return hits
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// voxelColumnHit tells whether the vertical line through (px, py) crosses triangle abc and
// at which z. Points on an edge are decided by a half-open rule evaluated on the edge
// alone (its endpoints in a fixed order), so two triangles that share an edge see exactly
// the same number there: one of them claims the point if they lie on opposite sides of the
// edge in the xy projection, both or neither if they fold over it, and the crossing count
// keeps its parity either way. Triangles seen edge-on are skipped.
func voxelColumnHit(a, b, c mgl64.Vec3, px, py float64) (float64, bool) {
	area := (b[0]-a[0])*(c[1]-a[1]) - (b[1]-a[1])*(c[0]-a[0])
	if area == 0 || math.IsNaN(area) {
		return 0, false
	}
	if area < 0 { // make the projection counter-clockwise
		b, c = c, b
	}
	wa, okA := voxelEdgeSide(b, c, px, py)
	if !okA {
		return 0, false
	}
	wb, okB := voxelEdgeSide(c, a, px, py)
	if !okB {
		return 0, false
	}
	wc, okC := voxelEdgeSide(a, b, px, py)
	if !okC {
		return 0, false
	}
	sum := wa + wb + wc
	if sum == 0 {
		return 0, false
	}
	return (wa*a[2] + wb*b[2] + wc*c[2]) / sum, true
}

// voxelEdgeSide returns the signed distance-like value of (px, py) left of the directed edge
// p->q and whether the point counts as inside that edge's half plane.
func voxelEdgeSide(p, q mgl64.Vec3, px, py float64) (float64, bool) {
	// Evaluate with the endpoints in a fixed (lexicographic) order so the neighbour, which
	// walks the edge the other way, gets exactly the negated value.
	s, e, sign := p, q, 1.0
	if q[0] < p[0] || (q[0] == p[0] && q[1] < p[1]) {
		s, e, sign = q, p, -1.0
	}
	w := sign * ((e[0]-s[0])*(py-s[1]) - (e[1]-s[1])*(px-s[0]))
	if w > 0 {
		return w, true
	}
	if w < 0 {
		return w, false
	}
	// On the edge line: keep it for "left or top" edges of the counter-clockwise triangle,
	// which the reversed edge is not.
	dx, dy := q[0]-p[0], q[1]-p[1]
	return 0, dy < 0 || (dy == 0 && dx < 0)
}
