package mesh

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

func voxCount(g *Grid) int {
	n := 0
	for _, in := range g.Inside {
		if in {
			n++
		}
	}
	return n
}

// voxBox returns the unit cube [0,1]^3 as 12 triangles; diagonalUp picks which diagonal
// splits the top and bottom faces.
func voxBox(diagonalUp bool) *Mesh {
	m := &Mesh{}
	for c := range 8 {
		m.Vertices = append(m.Vertices, mgl64.Vec3{float64(c & 1), float64(c >> 1 & 1), float64(c >> 2 & 1)})
	}
	quad := func(a, b, c, d int32) { // counter-clockwise seen from outside
		m.Triangles = append(m.Triangles, [3]int32{a, b, c}, [3]int32{a, c, d})
	}
	if diagonalUp {
		quad(0, 2, 3, 1) // bottom, split 0-3 (the line x = y)
		quad(4, 5, 7, 6) // top, split 4-7
	} else {
		quad(1, 0, 2, 3) // bottom, split 1-2 (the line x + y = 1)
		quad(5, 7, 6, 4) // top, split 5-6
	}
	quad(0, 1, 5, 4) // y = 0
	quad(2, 6, 7, 3) // y = 1
	quad(0, 4, 6, 2) // x = 0
	quad(1, 3, 7, 5) // x = 1
	return m
}

func TestVoxelizeGridLayout(t *testing.T) {
	g, err := Voxelize(voxBox(true), 0.125, 1, 0)
	if err != nil {
		t.Fatal(err)
	}
	// Definition: 8 voxels over the unit cube plus one pad voxel each side.
	if g.NX != 10 || g.NY != 10 || g.NZ != 10 || len(g.Inside) != 10*10*10 {
		t.Fatalf("grid %dx%dx%d (%d)", g.NX, g.NY, g.NZ, len(g.Inside))
	}
	if got := g.Index(2, 3, 4); got != 2+10*(3+10*4) {
		t.Errorf("Index(2,3,4) = %d", got)
	}
	if got, want := g.Center(0, 0, 0), (mgl64.Vec3{-0.0625, -0.0625, -0.0625}); !got.ApproxEqualThreshold(want, 1e-12) {
		t.Errorf("Center(0,0,0) = %v, want %v", got, want)
	}
}

// Columns through voxel centres run exactly along the diagonals that split the box's top
// and bottom faces (x = y or x + y = 1 both pass through centres of 0.125 mm voxels), so every such
// column hits two triangles at once on each face. The half-open rule must count it once.
func TestVoxelizeColumnsOnSharedEdges(t *testing.T) {
	for _, up := range []bool{true, false} {
		for _, flip := range []bool{false, true} {
			m := voxBox(up)
			if flip { // the same box with all triangles reversed: parity must not care
				for i, tr := range m.Triangles {
					m.Triangles[i] = [3]int32{tr[0], tr[2], tr[1]}
				}
			}
			g, err := Voxelize(m, 0.125, 1, 0)
			if err != nil {
				t.Fatal(err)
			}
			// Analytic: the centres 0.0625..0.9375 of an 8^3 block lie inside the unit cube.
			if n := voxCount(g); n != 512 {
				t.Errorf("diagonalUp=%v flipped=%v: %d voxels inside, want 512", up, flip, n)
			}
			for k := 1; k <= 8; k++ {
				for i := 1; i <= 8; i++ {
					if !g.Inside[g.Index(i, i, k)] || !g.Inside[g.Index(i, 9-i, k)] {
						t.Fatalf("diagonalUp=%v: diagonal column (%d,%d) not filled at k=%d", up, i, i, k)
					}
				}
			}
		}
	}
}

// A pyramid whose apex and base diagonal stand exactly on voxel-centre columns (all
// coordinates are exact binary fractions): the column x = y runs along the base diagonal
// and along two slanted edges, and the middle column through the apex vertex, where
// four triangles meet. Each must still cross the surface the right number of times.
func TestVoxelizeColumnsThroughVertices(t *testing.T) {
	const lo, hi, mid, top = 0.0625, 0.9375, 0.5, 0.875
	m := &Mesh{Vertices: []mgl64.Vec3{{lo, lo, 0}, {hi, lo, 0}, {hi, hi, 0}, {lo, hi, 0}, {mid, mid, top}},
		Triangles: [][3]int32{{0, 2, 1}, {0, 3, 2}, {0, 1, 4}, {1, 2, 4}, {2, 3, 4}, {3, 0, 4}}}
	g, err := Voxelize(m, 0.125, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	if g.Center(3, 3, 0)[0] != mid || g.Center(3, 3, 0)[1] != mid {
		t.Fatalf("set-up: column (3,3) at %v, want x = y = %g", g.Center(3, 3, 0), mid)
	}
	// Analytic square pyramid: |x-mid|, |y-mid| < h(z) = (hi-mid)(1 - z/top), 0 < z < top.
	halfWidth := func(z float64) float64 { return (hi - mid) * (1 - z/top) }
	bad := 0
	for k := range g.NZ {
		for j := range g.NY {
			for i := range g.NX {
				c := g.Center(i, j, k)
				h := halfWidth(c[2])
				if math.Abs(math.Abs(c[0]-mid)-h) < 1e-12 || math.Abs(math.Abs(c[1]-mid)-h) < 1e-12 {
					continue // on a side face: either answer is right
				}
				want := c[2] < top && math.Abs(c[0]-mid) < h && math.Abs(c[1]-mid) < h
				if g.Inside[g.Index(i, j, k)] != want {
					bad++
				}
			}
		}
	}
	if bad != 0 {
		t.Errorf("%d voxels disagree with the analytic pyramid", bad)
	}
	for k := range g.NZ {
		if !g.Inside[g.Index(3, 3, k)] {
			t.Errorf("apex column empty at z=%.4f", g.Center(3, 3, k)[2])
		}
	}
}

func TestVoxelizeSphereVolume(t *testing.T) {
	const r = 1.0
	m := tubeSphere(mgl64.Vec3{0.013, -0.021, 0.007}, r, 64, 96)
	g, err := Voxelize(m, 0.05, 2, 0)
	if err != nil {
		t.Fatal(err)
	}
	// Divergence theorem volume of the polyhedron vs. voxel count: within 1 % at 40 voxels
	// across (the count error scales with surface/volume * voxel).
	want := Volume(m)
	got := float64(voxCount(g)) * math.Pow(g.Voxel, 3)
	if math.Abs(got-want) > 0.01*want {
		t.Errorf("voxel volume %.4f, mesh volume %.4f", got, want)
	}
	// Same grid on one worker and on all cores, and on three.
	for _, workers := range []int{1, 3} {
		g1, err := Voxelize(m, 0.05, 2, workers)
		if err != nil || !slices.Equal(g1.Inside, g.Inside) {
			t.Errorf("result depends on the number of workers (%d, err %v)", workers, err)
		}
	}
}

func TestVoxelizeRejects(t *testing.T) {
	box := voxBox(true)
	for _, v := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		if _, err := Voxelize(box, v, 1, 0); err == nil {
			t.Errorf("voxel %g accepted", v)
		}
	}
	big := &Mesh{Vertices: slices.Clone(box.Vertices), Triangles: box.Triangles}
	for i := range big.Vertices {
		big.Vertices[i] = big.Vertices[i].Mul(1000)
	}
	_, err := Voxelize(big, 0.01, 1, 0)
	var ge *GridTooLargeError
	if !errors.As(err, &ge) || ge.Voxel != 0.01 || !strings.Contains(err.Error(), "more than 30000000 voxels") {
		t.Errorf("a 10^15-voxel grid: err %v, want a grid too large", err)
	}
	bad := &Mesh{Vertices: box.Vertices, Triangles: [][3]int32{{0, 1, 99}}}
	if _, err := Voxelize(bad, 0.1, 1, 0); err == nil {
		t.Error("triangle with an out-of-range vertex accepted")
	}
	nan := &Mesh{Vertices: slices.Clone(box.Vertices), Triangles: box.Triangles}
	nan.Vertices[3][0] = math.NaN()
	if _, err := Voxelize(nan, 0.1, 1, 0); err == nil {
		t.Error("NaN vertex accepted")
	}
	if _, err := Voxelize(&Mesh{}, 0.1, 1, 0); err == nil {
		t.Error("empty mesh accepted")
	}
}

// BenchmarkVoxelize: a 200k-triangle curved tapered canal at 0.03 mm (target: well under
// 0.5 s per run on 2 cores).
func BenchmarkVoxelize(b *testing.B) {
	m := tubeCanalLike(782, 128)
	var g *Grid
	for b.Loop() {
		var err error
		if g, err = Voxelize(m, 0.03, 2, 0); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(m.Triangles)), "triangles")
	b.ReportMetric(float64(len(g.Inside)), "voxels")
}

// TestVoxelizeSymmetryPlaneOnCentres: curved tubes whose plane of symmetry (y = 0) holds a
// row of voxel centres, and whose wall has vertices on that plane up to rounding (cos(pi/2)
// is 6e-17, not 0), as a parametric canal's mesh has. Every voxel must agree with the
// analytic tube (distance to the arc's circle under the radius), except in the thin band
// the tessellation leaves undecided.
func TestVoxelizeSymmetryPlaneOnCentres(t *testing.T) {
	const big, alpha, seg = 6.0, 1.0, 48
	frame := func(s float64) shapeFrame { // the arc in the xz plane; n across it, b in it
		a := alpha * s
		n := mgl64.Vec3{math.Cos(a), 0, math.Sin(a)}
		return shapeFrame{c: n.Mul(big), n: mgl64.Vec3{0, 1, 0}, b: n}
	}
	rows := 0
	for _, r := range []float64{0.35, 0.45, 0.5, 0.55, 0.6} {
		for _, cells := range []float64{13.1, 13.37, 15.2, 15.61, 17.05, 17.77, 19.3, 19.9, 21.4, 21.47} {
			// ceil(2r/h) is odd, so the centred grid puts a row of centres on y = 0.
			h := 2 * r / (cells - 0.5)
			m := shapeTube(frame, constRadius(r), seg, 200, true)
			g, err := Voxelize(m, h, 2, 0)
			if err != nil {
				t.Fatal(err)
			}
			row := -1
			for j := range g.NY {
				if math.Abs(g.Center(0, j, 0)[1]) < 1e-9*h {
					row = j
				}
			}
			if row < 0 {
				continue
			}
			rows++
			// Analytic geometry: inside when the distance to the circle of radius big in the xz
			// plane is under r, at an angle 0..alpha; the polygon of seg sides lies between
			// r cos(pi/seg) and r, less the sag of a chord between rings (under 1e-4 mm).
			inner := r*math.Cos(math.Pi/seg) - 1e-4
			bad, rowBad := 0, 0
			for k := range g.NZ {
				for j := range g.NY {
					for i := range g.NX {
						c := g.Center(i, j, k)
						a := math.Atan2(c[2], c[0])
						rho := math.Hypot(math.Hypot(c[0], c[2])-big, c[1])
						if a < 0.01 || a > alpha-0.01 || (rho > inner-1e-9 && rho < r+1e-9) {
							continue // at a cap or in the undecided band
						}
						if got := g.Inside[g.Index(i, j, k)]; got != (rho < inner) {
							bad++
							if j == row {
								rowBad++
							}
						}
					}
				}
			}
			if bad != 0 {
				t.Errorf("r %g, voxel %.4f: %d voxels disagree with the analytic tube, %d of them in the row on the symmetry plane", r, h, bad, rowBad)
			}
		}
	}
	if rows < 10 {
		t.Fatalf("set-up: only %d grids had a row of centres on y = 0", rows)
	}
}
