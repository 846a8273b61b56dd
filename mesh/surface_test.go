package mesh

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// surfBallGrid marks the voxel centres within r of c on a grid of n^3 voxels.
func surfBallGrid(n int, voxel, r float64, c mgl64.Vec3) *Grid {
	g := &Grid{Voxel: voxel, NX: n, NY: n, NZ: n, Inside: make([]bool, n*n*n)}
	for k := range n {
		for j := range n {
			for i := range n {
				g.Inside[g.Index(i, j, k)] = g.Center(i, j, k).Sub(c).Len() < r
			}
		}
	}
	return g
}

func surfCheckClosed(t *testing.T, what string, m *Mesh, shells int) {
	t.Helper()
	rep := Validate(m)
	// A watertight, consistently oriented 2-manifold: every edge in exactly two triangles
	// running it in opposite directions.
	if !rep.Closed || !rep.Manifold || rep.InconsistentOrientation != 0 || rep.Degenerate != 0 || rep.Shells != shells {
		t.Errorf("%s: %+v (want closed, manifold, oriented, %d shells)", what, rep, shells)
	}
}

func TestExtractSurfaceBallClosedAndVolume(t *testing.T) {
	const n, v, r = 40, 0.05, 0.8
	c := mgl64.Vec3{1.003, 0.998, 1.011}
	g := surfBallGrid(n, v, r, c)
	m := ExtractSurface(g)
	surfCheckClosed(t, "ball", m, 1)
	vol := Volume(m)
	// Analytic sphere volume 4/3 pi r^3: the mid-way surface of a binary mask stays within
	// about a voxel of the true one; at r = 16 voxels that is within 2 %.
	want := 4.0 / 3 * math.Pi * r * r * r
	if math.Abs(vol-want) > 0.02*want {
		t.Errorf("ball volume %.4f, analytic %.4f", vol, want)
	}
	// The surface must lie within one voxel of the sphere.
	for _, p := range m.Vertices {
		if d := math.Abs(p.Sub(c).Len() - r); d > v {
			t.Fatalf("vertex %v is %.3f mm off the sphere", p, d)
		}
	}
}

func TestExtractSurfaceTubeVolume(t *testing.T) {
	// A cylinder of radius 0.5 along z, 2 mm long, in 0.04 mm voxels.
	const v, r, l = 0.04, 0.5, 2.0
	g := &Grid{Origin: mgl64.Vec3{-0.6, -0.6, -0.2}, Voxel: v, NX: 30, NY: 30, NZ: 60}
	g.Inside = make([]bool, g.NX*g.NY*g.NZ)
	for k := range g.NZ {
		for j := range g.NY {
			for i := range g.NX {
				p := g.Center(i, j, k)
				g.Inside[g.Index(i, j, k)] = math.Hypot(p[0], p[1]) < r && p[2] > 0 && p[2] < l
			}
		}
	}
	m := ExtractSurface(g)
	surfCheckClosed(t, "tube", m, 1)
	// Analytic cylinder pi r^2 l, within 2 % (one-voxel rim on a 12-voxel radius).
	want := math.Pi * r * r * l
	if got := Volume(m); math.Abs(got-want) > 0.02*want {
		t.Errorf("tube volume %.4f, analytic %.4f", got, want)
	}
}

// Voxels that touch only along an edge or at a corner are where marching cubes can tear or
// pinch. Every 2x2x2 configuration must give a closed manifold with the right shell count
// (the components of the inside voxels connected through shared faces, and the surface
// shells of the outside, which here is always one connected region).
func TestExtractSurfaceAllCubeConfigurations(t *testing.T) {
	for cfg := 1; cfg < 256; cfg++ {
		g := &Grid{Voxel: 1, NX: 2, NY: 2, NZ: 2, Inside: make([]bool, 8)}
		for c := range 8 {
			g.Inside[c] = cfg>>c&1 == 1
		}
		m := ExtractSurface(g)
		rep := Validate(m)
		if !rep.Closed || rep.InconsistentOrientation != 0 || rep.Degenerate != 0 {
			t.Fatalf("configuration %08b: %+v", cfg, rep)
		}
		if rep.NonManifoldEdges != 0 {
			t.Fatalf("configuration %08b: %d non-manifold edges", cfg, rep.NonManifoldEdges)
		}
		// Divergence theorem: the enclosed volume is positive for outward triangles.
		if Volume(m) <= 0 {
			t.Fatalf("configuration %08b: volume %g", cfg, Volume(m))
		}
	}
}

// Random masks put every pair of neighbouring cube patterns side by side; the surface must
// stay closed and manifold (each edge in two oppositely run triangles) whatever the mix.
func TestExtractSurfaceRandomMasksClosed(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, density := range []float64{0.2, 0.5, 0.8} {
		g := &Grid{Voxel: 0.1, NX: 14, NY: 13, NZ: 12}
		g.Inside = make([]bool, g.NX*g.NY*g.NZ)
		for i := range g.Inside {
			g.Inside[i] = rng.Float64() < density
		}
		m := ExtractSurface(g)
		rep := Validate(m)
		if !rep.Closed || !rep.Manifold || rep.InconsistentOrientation != 0 || rep.Degenerate != 0 {
			t.Errorf("density %.1f: %+v", density, rep)
		}
		// Outward triangles enclose a positive volume (divergence theorem).
		if v := Volume(m); v <= 0 {
			t.Errorf("density %.1f: volume %g", density, v)
		}
	}
}

func TestExtractIsoSurfaceSmoothSphere(t *testing.T) {
	const n, v, r = 32, 0.1, 1.2
	c := mgl64.Vec3{1.6, 1.6, 1.6}
	field := make([]float32, n*n*n)
	g := &Grid{Voxel: v, NX: n, NY: n, NZ: n}
	for k := range n {
		for j := range n {
			for i := range n {
				field[g.Index(i, j, k)] = float32(r - g.Center(i, j, k).Sub(c).Len())
			}
		}
	}
	m := ExtractIsoSurface(field, n, n, n, mgl64.Vec3{}, v, 0)
	surfCheckClosed(t, "iso sphere", m, 1)
	// Analytic sphere: with linear interpolation of a distance field the error is second
	// order; 12 voxels of radius give well under 1 % in volume and area.
	wantV, wantA := 4.0/3*math.Pi*r*r*r, 4*math.Pi*r*r
	if got := Volume(m); math.Abs(got-wantV) > 0.01*wantV {
		t.Errorf("iso sphere volume %.4f, analytic %.4f", got, wantV)
	}
	if got := Area(m); math.Abs(got-wantA) > 0.01*wantA {
		t.Errorf("iso sphere area %.4f, analytic %.4f", got, wantA)
	}
	if got := ExtractIsoSurface(field[:10], n, n, n, mgl64.Vec3{}, v, 0); len(got.Triangles) != 0 {
		t.Error("a field of the wrong length gave a surface")
	}
}

// surfPython finds a python3 that has scikit-image (Debian python3-skimage).
func surfPython() string {
	for _, py := range []string{"python3", "/usr/bin/python3"} {
		if exec.Command(py, "-c", "import skimage.measure, numpy").Run() == nil {
			return py
		}
	}
	return ""
}

// Cross-check against scikit-image's marching cubes (Lewiner) on the same mask: the two
// surfaces are different triangulations of the same mid-way boundary, so area and volume
// agree within a few percent.
func TestExtractSurfaceAgreesWithScikitImage(t *testing.T) {
	py := surfPython()
	if py == "" {
		if os.Getenv("CI") != "" {
			t.Fatal("python3 with scikit-image (Debian python3-skimage) is needed for this check")
		}
		t.Skip("python3 with scikit-image not installed")
	}
	const n, v = 36, 0.05
	g := surfBallGrid(n, v, 0.7, mgl64.Vec3{0.9, 0.9, 0.9})
	// Add a tube through the ball so the shape is not only a sphere.
	for k := range n {
		for j := range n {
			for i := range n {
				p := g.Center(i, j, k)
				if math.Hypot(p[0]-0.9, p[2]-0.9) < 0.3 && p[1] > 0.2 && p[1] < 1.6 {
					g.Inside[g.Index(i, j, k)] = true
				}
			}
		}
	}
	raw := make([]byte, len(g.Inside))
	for i, in := range g.Inside {
		if in {
			raw[i] = 1
		}
	}
	path := filepath.Join(t.TempDir(), "mask.u8")
	if err := os.WriteFile(path, raw, 0o644); err != nil {
		t.Fatal(err)
	}
	script := fmt.Sprintf(`
import numpy as np
from skimage import measure
m = np.fromfile(%q, dtype=np.uint8).reshape((%d, %d, %d)).astype(np.float32)
m = np.pad(m, 1)
verts, faces, _, _ = measure.marching_cubes(m, 0.5, spacing=(%g, %g, %g))
a, b, c = verts[faces[:, 0]], verts[faces[:, 1]], verts[faces[:, 2]]
vol = abs(np.einsum('ij,ij->i', a, np.cross(b, c)).sum() / 6)
print(measure.mesh_surface_area(verts, faces), vol)
`, path, g.NZ, g.NY, g.NX, v, v, v)
	out, err := exec.Command(py, "-c", script).CombinedOutput()
	if err != nil {
		t.Fatalf("python: %v\n%s", err, out)
	}
	var skArea, skVol float64
	if _, err := fmt.Sscan(strings.TrimSpace(string(out)), &skArea, &skVol); err != nil {
		t.Fatalf("python output %q: %v", out, err)
	}
	m := ExtractSurface(g)
	area, vol := Area(m), Volume(m)
	t.Logf("area %.4f (skimage %.4f), volume %.4f (skimage %.4f)", area, skArea, vol, skVol)
	if math.Abs(vol-skVol) > 0.02*skVol {
		t.Errorf("volume %.4f, scikit-image %.4f", vol, skVol)
	}
	if math.Abs(area-skArea) > 0.05*skArea {
		t.Errorf("area %.4f, scikit-image %.4f", area, skArea)
	}
}

// BenchmarkExtractSurface: the boundary of a 200k-triangle curved canal voxelised at 0.02 mm.
func BenchmarkExtractSurface(b *testing.B) {
	g, err := Voxelize(tubeCanalLike(782, 128), 0.02, 2, 0)
	if err != nil {
		b.Fatal(err)
	}
	var tris int
	for b.Loop() {
		tris = len(ExtractSurface(g).Triangles)
	}
	b.ReportMetric(float64(tris), "triangles")
	b.ReportMetric(float64(len(g.Inside)), "voxels")
}
