package mesh

import (
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

func within(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.6g, want %.6g within %.2g %%", what, got, want, 100*rel)
	}
}

// Analytic values: cylinder V = pi r^2 h, A = 2 pi r h + 2 pi r^2; cone frustum
// V = pi h (r1^2 + r1 r2 + r2^2)/3, lateral A = pi (r1 + r2) sqrt((r1 - r2)^2 + h^2);
// torus section (Pappus) V = pi r^2 R alpha, A = 2 pi r R alpha + 2 pi r^2 with its two caps.
// The mesh values come from the divergence theorem; fine tessellation must agree within 0.5 %.
func TestAreaVolumeAnalytic(t *testing.T) {
	r, h := 0.8, 12.0
	cyl := shapeCylinder(r, h, 256, 40)
	within(t, "cylinder volume", Volume(cyl), math.Pi*r*r*h, 0.005)
	within(t, "cylinder area", Area(cyl), 2*math.Pi*r*h+2*math.Pi*r*r, 0.005)

	r1, r2 := 0.9, 0.3
	fr := shapeFrustum(r1, r2, h, 256, 40)
	within(t, "frustum volume", Volume(fr), math.Pi*h*(r1*r1+r1*r2+r2*r2)/3, 0.005)
	within(t, "frustum area", Area(fr), math.Pi*(r1+r2)*math.Hypot(r1-r2, h)+math.Pi*(r1*r1+r2*r2), 0.005)

	big, rt, alpha := 6.0, 0.7, 1.2
	tor := shapeTorusSection(big, rt, alpha, 192, 192)
	within(t, "torus section volume", Volume(tor), math.Pi*rt*rt*big*alpha, 0.005)
	within(t, "torus section area", Area(tor), 2*math.Pi*rt*big*alpha+2*math.Pi*rt*rt, 0.005)

	// Area and volume do not change when the solid moves (analytic geometry): the sums stay
	// accurate on a mesh far from the origin.
	a0, v0 := AreaVolume(tor)
	if a, v := AreaVolume(shapeMove(tor, mgl64.Vec3{40, -25, 13})); math.Abs(a-a0) > 1e-9*a0 || math.Abs(v-v0) > 1e-9*v0 {
		t.Errorf("moved torus section: area %v, volume %v; in place %v, %v", a, v, a0, v0)
	}

	// Coarse tessellation must fall short: the check is not blind.
	coarse := shapeCylinder(r, h, 8, 2)
	if v := Volume(coarse); v > 0.95*math.Pi*r*r*h {
		t.Errorf("an octagonal prism should hold clearly less than the cylinder: %g", v)
	}
}

func TestVolumeSignAndTranslation(t *testing.T) {
	cyl := shapeCylinder(1, 5, 64, 4)
	v := Volume(cyl)
	if v <= 0 {
		t.Fatalf("outward normals must give a positive volume, got %g", v)
	}
	// Divergence theorem: the volume does not depend on where the solid sits.
	far := shapeMove(cyl, mgl64.Vec3{1e4, -3e4, 2e4})
	within(t, "moved volume", Volume(far), v, 1e-9)
	flipped := &Mesh{Vertices: cyl.Vertices}
	for _, tr := range cyl.Triangles {
		flipped.Triangles = append(flipped.Triangles, [3]int32{tr[0], tr[2], tr[1]})
	}
	within(t, "flipped volume", Volume(flipped), -v, 1e-12)
}

// The centroid of a frustum lies on its axis at h (r1^2 + 2 r1 r2 + 3 r2^2) / (4 (r1^2 + r1 r2 + r2^2))
// above the wide base (solid of revolution, standard handbook formula).
func TestCentroidFrustum(t *testing.T) {
	r1, r2, h := 1.0, 0.4, 6.0
	m := shapeMove(shapeFrustum(r1, r2, h, 256, 30), mgl64.Vec3{3, -2, 1})
	c := Centroid(m)
	wantZ := 1 + h*(r1*r1+2*r1*r2+3*r2*r2)/(4*(r1*r1+r1*r2+r2*r2))
	if math.Abs(c[0]-3) > 1e-9 || math.Abs(c[1]+2) > 1e-9 || math.Abs(c[2]-wantZ) > 0.005*h {
		t.Errorf("centroid %v, want (3, -2, %.4f)", c, wantZ)
	}
	// Open surface: the area centre of a cylinder side is its mid-height.
	side := shapeTube(straightFrame(4), constRadius(1), 64, 8, false)
	if c := Centroid(side); c.Sub(mgl64.Vec3{0, 0, 2}).Len() > 1e-9 {
		t.Errorf("open tube centre %v, want (0,0,2)", c)
	}
}

// admeshPath finds the admesh reference tool (Debian package admesh); without it the caller
// is skipped, except under CI, where it fails.
func admeshPath(tb testing.TB) string {
	tb.Helper()
	bin, err := exec.LookPath("admesh")
	if err != nil {
		if os.Getenv("CI") != "" {
			tb.Fatal("admesh is not installed (apt-get install admesh); CI needs it as the reference")
		}
		tb.Skip("admesh not installed")
	}
	return bin
}

var (
	admeshVolume = regexp.MustCompile(`Volume\s*:\s*([-+0-9.eE]+)`)
	admeshParts  = regexp.MustCompile(`Number of parts\s*:\s*(\d+)`)
	admeshFacets = regexp.MustCompile(`Number of facets\s*:\s*(\d+)`)
)

// admesh (Debian package admesh) is the reference library: it must report the same volume,
// facet count and number of parts as we compute on the same binary STL. (admesh 0.98 prints
// no surface area; VTK checks the area below.)
func TestVolumeMatchesAdmesh(t *testing.T) {
	bin := admeshPath(t)
	dir := t.TempDir()
	cases := map[string]*Mesh{
		"frustum.stl": shapeFrustum(0.9, 0.3, 12, 96, 20),
		"torus.stl":   shapeTorusSection(6, 0.7, 1.2, 64, 64),
		"two.stl":     shapeMerge(shapeCylinder(1, 3, 32, 3), shapeMove(shapeCylinder(0.5, 2, 24, 2), mgl64.Vec3{5, 0, 0})),
	}
	for name, m := range cases {
		path := filepath.Join(dir, name)
		if err := WriteSTLFile(path, m); err != nil {
			t.Fatal(err)
		}
		got, _, err := LoadFile(t.Context(), path, LoadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		out, err := exec.Command(bin, path).CombinedOutput()
		if err != nil {
			t.Fatalf("admesh %s: %v\n%s", name, err, out)
		}
		num := func(re *regexp.Regexp) float64 {
			mm := re.FindSubmatch(out)
			if mm == nil {
				t.Fatalf("%s: no %s in admesh output:\n%s", name, re, out)
			}
			v, _ := strconv.ParseFloat(string(mm[1]), 64)
			return v
		}
		within(t, name+" volume vs admesh", Volume(got), num(admeshVolume), 1e-5)
		if f := num(admeshFacets); int(f) != len(got.Triangles) {
			t.Errorf("%s: admesh counts %v facets, we %d", name, f, len(got.Triangles))
		}
		if p := num(admeshParts); int(p) != Validate(got).Shells {
			t.Errorf("%s: admesh counts %v parts, we %d shells", name, p, Validate(got).Shells)
		}
	}
}

// vtkMassPropertiesScript prints VTK's surface area and volume of an STL file.
const vtkMassPropertiesScript = `
import sys, vtk
r = vtk.vtkSTLReader(); r.SetFileName(sys.argv[1]); r.Update()
m = vtk.vtkMassProperties(); m.SetInputConnection(r.GetOutputPort()); m.Update()
print(repr(m.GetSurfaceArea()), repr(m.GetVolume()))
`

// VTK's vtkMassProperties (Debian package python3-vtk9) is the reference for the area, which
// admesh does not print: on the same binary STL both area and volume must agree.
func TestAreaVolumeMatchVTK(t *testing.T) {
	py := "/usr/bin/python3"
	if out, err := exec.Command(py, "-c", "import vtk").CombinedOutput(); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("python3-vtk9 is needed as the reference (apt-get install python3-vtk9): %v %s", err, out)
		}
		t.Skip("python3-vtk9 not installed")
	}
	dir := t.TempDir()
	for name, m := range map[string]*Mesh{
		"cylinder.stl": shapeCylinder(0.8, 12, 64, 10),
		"torus.stl":    shapeTorusSection(6, 0.7, 1.2, 48, 48),
	} {
		path := filepath.Join(dir, name)
		if err := WriteSTLFile(path, m); err != nil {
			t.Fatal(err)
		}
		got, _, err := LoadFile(t.Context(), path, LoadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		out, err := exec.Command(py, "-c", vtkMassPropertiesScript, path).CombinedOutput()
		if err != nil {
			t.Fatalf("vtk on %s: %v\n%s", name, err, out)
		}
		f := strings.Fields(string(out))
		if len(f) != 2 {
			t.Fatalf("vtk output %q", out)
		}
		area, _ := strconv.ParseFloat(f[0], 64)
		vol, _ := strconv.ParseFloat(f[1], 64)
		within(t, name+" area vs VTK", Area(got), area, 1e-6)
		within(t, name+" volume vs VTK", Volume(got), vol, 1e-6)
	}
}

// vectorAreaVolume is AreaVolume as it was written with mgl64's vector operations.
func vectorAreaVolume(m *Mesh) (area, vol float64) {
	lo, hi := m.Bounds()
	ref := lo.Add(hi).Mul(0.5)
	nv := int32(len(m.Vertices))
	for t, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		a, b, c := m.Corners(t)
		area += b.Sub(a).Cross(c.Sub(a)).Len() / 2
		a, b, c = a.Sub(ref), b.Sub(ref), c.Sub(ref)
		vol += a.Dot(b.Cross(c)) / 6
	}
	return area, vol
}

// vectorSignedVolume is Validate's signed volume as it was written with mgl64's vector
// operations (the first vertex as the reference, divided by 6 at the end).
func vectorSignedVolume(m *Mesh) float64 {
	if len(m.Vertices) == 0 {
		return 0
	}
	ref := m.Vertices[0]
	nv := int32(len(m.Vertices))
	vol := 0.0
	for _, tri := range m.Triangles {
		if !triInRange(tri, nv) {
			continue
		}
		a, b, c := m.Vertices[tri[0]].Sub(ref), m.Vertices[tri[1]].Sub(ref), m.Vertices[tri[2]].Sub(ref)
		vol += a.Dot(b.Cross(c))
	}
	return vol / 6
}

// SumTriangles' scalar sums must be those of the same formulas written with mgl64's vector
// operations (and of isDegenerate), bit for bit: Sub, Cross, Dot and Len in the same order, on
// tubes moved far from the origin and stretched unevenly, with degenerate and out-of-range
// triangles.
func TestSumTrianglesMatchesVectorOperations(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := range 40 {
		m := shapeCanalLike(12+trial%5*7, 10+trial*3)
		for i := range m.Vertices {
			for k := range 3 {
				m.Vertices[i][k] = m.Vertices[i][k]*(1+rng.Float64()) + 100*rng.Float64()
			}
		}
		nv := int32(len(m.Vertices))
		m.Triangles = append(m.Triangles, [3]int32{0, 0, 1}, [3]int32{0, nv, 1}, [3]int32{-1, 2, 3}, [3]int32{4, 5, 4})
		a, v := vectorAreaVolume(m)
		s := SumTriangles(m)
		deg := 0
		for tt := range m.Triangles {
			if isDegenerate(m, tt) {
				deg++
			}
		}
		if s.Area != a || s.Volume != v || s.SignedVolume != vectorSignedVolume(m) || s.Degenerate != deg {
			t.Fatalf("trial %d: %+v, by vectors %v %v %v, degenerate %d", trial, s, a, v, vectorSignedVolume(m), deg)
		}
	}
}
