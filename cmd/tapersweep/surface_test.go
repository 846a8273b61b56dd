package main

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"tapersweep/mesh"
	"tapersweep/models"
)

// `surface --format json` states the same facet count, number of parts and volume as admesh
// (Debian package admesh, the reference tool) on a clean canal, on the same canal with 30 %
// of its triangles turned the wrong way (admesh reverses them as we do). Skips without admesh except under CI.
func TestSurfaceMatchesAdmesh(t *testing.T) {
	bin, err := exec.LookPath("admesh")
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal("admesh is not installed (apt-get install admesh)")
		}
		t.Skip("admesh not installed")
	}
	dir := t.TempDir()
	clean := models.ExampleCanals()[2].Spec.Mesh(0.1, 48)
	mixed := &mesh.Mesh{Vertices: clean.Vertices}
	rng := rand.New(rand.NewPCG(5, 6))
	for _, tr := range clean.Triangles {
		if rng.IntN(10) < 3 {
			tr[1], tr[2] = tr[2], tr[1]
		}
		mixed.Triangles = append(mixed.Triangles, tr)
	}
	for name, m := range map[string]*mesh.Mesh{"clean.stl": clean, "mixed.stl": mixed} {
		path := filepath.Join(dir, name)
		if err := mesh.WriteSTLFile(path, m); err != nil {
			t.Fatal(err)
		}
		code, out, errOut := runCLI(t, "surface", "--canal", path, "--format", "json")
		if code != exitOK {
			t.Fatalf("%s: exit %d: %s", name, code, errOut)
		}
		var got surfaceReport
		if err := json.Unmarshal([]byte(out), &got); err != nil {
			t.Fatal(err)
		}
		ref, err := exec.Command(bin, path).CombinedOutput()
		if err != nil {
			t.Fatalf("admesh: %v\n%s", err, ref)
		}
		num := func(pattern string) float64 {
			m := regexp.MustCompile(pattern).FindSubmatch(ref)
			if m == nil {
				t.Fatalf("no %s in admesh output:\n%s", pattern, ref)
			}
			v, _ := strconv.ParseFloat(string(m[1]), 64)
			return v
		}
		if f := num(`Number of facets\s*:\s*(\d+)`); int(f) != got.Triangles {
			t.Errorf("%s: admesh %v facets, we %d", name, f, got.Triangles)
		}
		if p := num(`Number of parts\s*:\s*(\d+)`); int(p) != got.Shells {
			t.Errorf("%s: admesh %v parts, we %d", name, p, got.Shells)
		}
		v := num(`Volume\s*:\s*([-+0-9.eE]+)`)
		if got.VolumeMM3 == nil || math.Abs(*got.VolumeMM3-v) > 1e-5*v {
			t.Errorf("%s: admesh volume %v, we %v", name, v, got.VolumeMM3)
		}
		if name == "mixed.stl" {
			rev := num(`Facets reversed\s*:\s*(\d+)`)
			if got.Turned == 0 || !strings.Contains(errOut, "turned over") {
				t.Errorf("mixed: turned %d (admesh reversed %v), stderr %q", got.Turned, rev, errOut)
			}
		}
	}
}

// The text report names what a user checks first, and bad input is refused as elsewhere.
func TestSurfaceText(t *testing.T) {
	code, out, _ := runCLI(t, "surface", "--canal", "../../testdata/curve_45deg_r5.stl")
	for _, want := range []string{"binary STL", "triangles          6016", "closed             yes", "volume", "mm3"} {
		if code != exitOK || !strings.Contains(out, want) {
			t.Errorf("exit %d, no %q in\n%s", code, want, out)
		}
	}
	code, _, errOut := runCLI(t, "surface", "--canal", "../../testdata/curve_45deg_r5.json")
	if code != exitBadInput || !strings.Contains(errOut, "not an STL surface") {
		t.Errorf("a spec: exit %d %s", code, errOut)
	}
	if code, _, _ := runCLI(t, "surface"); code != exitUsage {
		t.Errorf("no --canal: exit %d", code)
	}
}
