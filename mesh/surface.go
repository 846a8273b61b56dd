package mesh

import (
	"github.com/go-gl/mathgl/mgl64"
)

// ExtractSurface returns the boundary of the inside voxels of g as a closed, manifold,
// outward-facing triangle mesh. Samples sit at voxel centres and the surface passes
// half-way between an inside and an outside sample, so it shows the stair steps of a
// segmented scan (marching cubes on the 0/1 field at 0.5, with cases that keep it
// watertight; see isoBuildCases). Voxels outside the grid count as outside, so the
// surface always closes.
func ExtractSurface(g *Grid) *Mesh {
	if g == nil || g.NX <= 0 || g.NY <= 0 || g.NZ <= 0 || len(g.Inside) != g.NX*g.NY*g.NZ {
		return &Mesh{}
	}
	in := func(i, j, k int) bool {
		if i < 0 || j < 0 || k < 0 || i >= g.NX || j >= g.NY || k >= g.NZ {
			return false
		}
		return g.Inside[i+g.NX*(j+g.NY*k)]
	}
	return isoMarchingCubes(g.NX, g.NY, g.NZ, g.Origin, g.Voxel, in, nil)
}

// ExtractIsoSurface returns the surface field == iso of a sampled scalar field, with the
// side where field > iso inside; the mesh is closed, manifold and faces outward. Sample
// (i, j, k) is field[i + nx*(j + ny*k)] at origin + (i+0.5, j+0.5, k+0.5)*voxel, the same
// layout as a Grid. Samples beyond the field count as outside; NaN counts as outside.
// A field whose length does not match nx*ny*nz gives an empty mesh.
func ExtractIsoSurface(field []float32, nx, ny, nz int, origin mgl64.Vec3, voxel float64, iso float32) *Mesh {
	if nx <= 0 || ny <= 0 || nz <= 0 || len(field) != nx*ny*nz {
		return &Mesh{}
	}
	in := func(i, j, k int) bool {
		if i < 0 || j < 0 || k < 0 || i >= nx || j >= ny || k >= nz {
			return false
		}
		return field[i+nx*(j+ny*k)] > iso
	}
	// Where the crossing lies between lattice points p (inside or not) and p+d.
	at := func(p [3]int, d [3]int) float64 {
		f0 := isoSample(field, nx, ny, nz, p, iso)
		f1 := isoSample(field, nx, ny, nz, [3]int{p[0] + d[0], p[1] + d[1], p[2] + d[2]}, iso)
		t := float64((iso - f0) / (f1 - f0))
		if !(t >= 0 && t <= 1) { // NaN or a sample exactly at iso on the outside
			return 0.5
		}
		return t
	}
	return isoMarchingCubes(nx, ny, nz, origin, voxel, in, at)
}

// isoSample returns the field at lattice point p; points beyond the field read as just
// below iso, so a crossing into them sits next to the last inside sample.
func isoSample(field []float32, nx, ny, nz int, p [3]int, iso float32) float32 {
	if p[0] < 0 || p[1] < 0 || p[2] < 0 || p[0] >= nx || p[1] >= ny || p[2] >= nz {
		return iso - 1
	}
	return field[p[0]+nx*(p[1]+ny*p[2])]
}

// isoCubeEdge names a cube edge by its lower corner code (bit 0 = +x, bit 1 = +y,
// bit 2 = +z) and the axis bit it runs along.
type isoCubeEdge struct{ corner, axis int }

// isoCases lists, for each of the 256 inside/outside patterns of a cube's corners, the
// triangles of the surface inside that cube as triples of crossed edges, turned outward.
var isoCases = isoBuildCases()

// isoBuildCases derives the marching-cubes cases instead of copying a table. On each cube
// face the crossed edges are joined in pairs; a face with four crossings keeps its two
// inside corners connected (so a canal lumen stays one piece where voxels meet along an
// edge). The choice depends on the face alone, so the two cubes sharing a face always cut
// it the same way, which is why the surface is watertight and manifold. The face segments
// chain into loops around the cube, and each loop becomes a fan of triangles.
func isoBuildCases() [256][][3]isoCubeEdge {
	var cases [256][][3]isoCubeEdge
	edgeOf := func(a, b int) isoCubeEdge {
		if a > b {
			a, b = b, a
		}
		return isoCubeEdge{a, b &^ a}
	}
	for cfg := 1; cfg < 255; cfg++ {
		in := func(c int) bool { return cfg>>c&1 == 1 }
		// next maps an edge where the surface leaves a face's inside to where it re-enters
		// walking the face counter-clockwise seen from outside the cube.
		next := map[isoCubeEdge]isoCubeEdge{}
		for axis := range 3 {
			u, w := 1<<((axis+1)%3), 1<<((axis+2)%3)
			for side := range 2 {
				base := side << axis
				q := [4]int{base, base | u, base | u | w, base | w} // counter-clockwise seen from +axis
				if side == 0 {
					q[1], q[3] = q[3], q[1]
				}
				type crossing struct {
					edge isoCubeEdge
					exit bool
				}
				var cr []crossing
				for p := range 4 {
					a, b := q[p], q[(p+1)%4]
					if in(a) != in(b) {
						cr = append(cr, crossing{edgeOf(a, b), in(a)})
					}
				}
				for i, c := range cr {
					if !c.exit {
						continue
					}
					for d := 1; d < len(cr); d++ { // the next entry after this exit
						if e := cr[(i+d)%len(cr)]; !e.exit {
							next[c.edge] = e.edge
							break
						}
					}
				}
			}
		}
		// Walk the loops in a fixed order so the table does not depend on map order.
		var starts []isoCubeEdge
		for c := range 8 {
			for _, ax := range []int{1, 2, 4} {
				e := isoCubeEdge{c, ax}
				if c&ax == 0 {
					if _, ok := next[e]; ok {
						starts = append(starts, e)
					}
				}
			}
		}
		seen := map[isoCubeEdge]bool{}
		for _, st := range starts {
			if seen[st] {
				continue
			}
			var loop []isoCubeEdge
			for e := st; !seen[e]; e = next[e] {
				seen[e] = true
				loop = append(loop, e)
			}
			loop = isoFanStart(loop)
			for i := 1; i+1 < len(loop); i++ {
				cases[cfg] = append(cases[cfg], [3]isoCubeEdge{loop[0], loop[i], loop[i+1]})
			}
		}
	}
	// One corner inside (corner 0): the triangle must face away from it. The same walking
	// rule holds for every case, so one check decides the turning for all.
	t := cases[1][0]
	mid := func(e isoCubeEdge) mgl64.Vec3 {
		p := mgl64.Vec3{float64(e.corner & 1), float64(e.corner >> 1 & 1), float64(e.corner >> 2 & 1)}
		d := mgl64.Vec3{float64(e.axis & 1), float64(e.axis >> 1 & 1), float64(e.axis >> 2 & 1)}
		return p.Add(d.Mul(0.5))
	}
	n := mid(t[1]).Sub(mid(t[0])).Cross(mid(t[2]).Sub(mid(t[0])))
	if n.Dot(mgl64.Vec3{1, 1, 1}) < 0 {
		for c := range cases {
			for i := range cases[c] {
				cases[c][i][1], cases[c][i][2] = cases[c][i][2], cases[c][i][1]
			}
		}
	}
	return cases
}

// isoFanStart rotates a loop so that a fan from its first vertex draws no diagonal lying
// in a cube face: the neighbouring cube could draw the same diagonal, and the edge would
// then belong to four triangles.
func isoFanStart(loop []isoCubeEdge) []isoCubeEdge {
	onFace := func(a, b isoCubeEdge) bool {
		for ax := 1; ax <= 4; ax <<= 1 {
			if ax != a.axis && ax != b.axis && a.corner&ax == b.corner&ax {
				return true
			}
		}
		return false
	}
	n := len(loop)
	for r := range n {
		ok := true
		for i := 2; i+1 < n && ok; i++ {
			ok = !onFace(loop[r], loop[(r+i)%n])
		}
		if ok {
			return append(loop[r:], loop[:r]...)
		}
	}
	panic("marching cubes: a loop without a clean fan") // checked for all 256 cases by the tests
}

// isoMarchingCubes runs marching cubes over the lattice of nx*ny*nz samples padded by one
// outside layer. at gives the crossing parameter along an edge (nil: half-way).
// Crossing vertices are shared through two slabs of edge slots, so the work is one pass.
func isoMarchingCubes(nx, ny, nz int, origin mgl64.Vec3, voxel float64,
	in func(i, j, k int) bool, at func(p, d [3]int) float64) *Mesh {
	m := &Mesh{}
	sx, sy := nx+2, ny+2
	slabLo := make([]int32, sx*sy*8)
	slabHi := make([]int32, sx*sy*8)
	for i := range slabLo {
		slabLo[i], slabHi[i] = -1, -1
	}

	// vertex returns the mesh vertex on cube edge e of the cube at (ic, jc, kc).
	vertex := func(ic, jc, kc int, e isoCubeEdge) int32 {
		cu, dc := e.corner, e.axis
		p := [3]int{ic + cu&1, jc + cu>>1&1, kc + cu>>2&1}
		slab := slabLo
		if cu&4 != 0 {
			slab = slabHi
		}
		slot := ((p[1]+1)*sx+(p[0]+1))*8 + dc
		if id := slab[slot]; id >= 0 {
			return id
		}
		d := [3]int{dc & 1, dc >> 1 & 1, dc >> 2 & 1}
		t := 0.5
		if at != nil {
			t = at(p, d)
		}
		v := mgl64.Vec3{
			origin[0] + (float64(p[0])+0.5+t*float64(d[0]))*voxel,
			origin[1] + (float64(p[1])+0.5+t*float64(d[1]))*voxel,
			origin[2] + (float64(p[2])+0.5+t*float64(d[2]))*voxel,
		}
		id := int32(len(m.Vertices))
		m.Vertices = append(m.Vertices, v)
		slab[slot] = id
		return id
	}

	for kc := -1; kc < nz; kc++ {
		for jc := -1; jc < ny; jc++ {
			for ic := -1; ic < nx; ic++ {
				cfg := 0
				for c := range 8 {
					if in(ic+c&1, jc+c>>1&1, kc+c>>2&1) {
						cfg |= 1 << c
					}
				}
				for _, tri := range isoCases[cfg] {
					m.Triangles = append(m.Triangles, [3]int32{
						vertex(ic, jc, kc, tri[0]), vertex(ic, jc, kc, tri[1]), vertex(ic, jc, kc, tri[2])})
				}
			}
		}
		slabLo, slabHi = slabHi, slabLo
		for i := range slabHi {
			slabHi[i] = -1
		}
	}
	return m
}
