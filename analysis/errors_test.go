package analysis

import (
	"context"
	"errors"
	"strings"
	"testing"

	"tapersweep/mesh"
	"tapersweep/models"
)

// TestOneErrorContractForACanal: every error out of loading a canal names the file once, in a
// typed error a front-end can read (as fs.PathError does for the standard library), and no
// message names a command-line option.
func TestOneErrorContractForACanal(t *testing.T) {
	spec := models.DemoCanal()
	m := spec.Mesh(0.2, 24)
	scaled := func(k float64) *mesh.Mesh {
		c := &mesh.Mesh{Vertices: append(m.Vertices[:0:0], m.Vertices...), Triangles: m.Triangles}
		for i := range c.Vertices {
			c.Vertices[i] = c.Vertices[i].Mul(k)
		}
		return c
	}
	ctx := context.Background()
	// A canal about 18 mm long: in micrometres it spans thousands of units, in metres hundredths.
	for _, tc := range []struct {
		k     float64
		large bool
	}{{1000, true}, {0.001, false}} {
		_, err := NewCanal(ctx, "scan.stl", scaled(tc.k), CanalOptions{})
		var ue *UnitsError
		var ce *CanalError
		if !errors.As(err, &ue) || ue.TooLarge() != tc.large || !errors.As(err, &ce) || ce.File != "scan.stl" {
			t.Errorf("scaled by %g: %v", tc.k, err)
			continue
		}
		if n := strings.Count(err.Error(), "scan.stl"); n != 1 || strings.Contains(err.Error(), "--") {
			t.Errorf("scaled by %g: %q names the file %d times or an option", tc.k, err, n)
		}
	}
	// Options for surfaces given for a spec.
	for _, opt := range []LoadOptions{{Scale: 0.001}, {Shell: 1}} {
		_, err := LoadCanalBytes(ctx, "c.json", models.DemoCanalJSON(), opt)
		var so *SpecOptionError
		if !errors.As(err, &so) || strings.Count(err.Error(), "c.json") != 1 || strings.Contains(err.Error(), "--") {
			t.Errorf("%+v: %v", opt, err)
		}
	}
	// Null, a list and UTF-16 JSON are answered as JSON, not as a broken STL.
	for _, data := range []string{"null", "[1, 2]", "\xff\xfe{\x00}\x00"} {
		_, err := LoadCanalBytes(ctx, "c.json", []byte(data), LoadOptions{})
		var se *models.SpecError
		if !errors.As(err, &se) || strings.Contains(err.Error(), "STL") {
			t.Errorf("%q: %v", data, err)
		}
	}
}

// TestSpecLimitsAreTheCanalLimits: the longest spec the format allows is measured, not told to
// rescale a file that is in mm by definition; one over the limit is refused by the spec's own
// rule, naming the limit.
func TestSpecLimitsAreTheCanalLimits(t *testing.T) {
	if testing.Short() {
		t.Skip("meshes and measures a 100 mm canal")
	}
	long := `{"name": "long", "orifice_d": 1.2, "apical_d": 0.4, "segments": [{"kind": "straight", "length": 100}]}`
	spec, err := models.ParseCanalSpec("long.json", []byte(long))
	if err != nil {
		t.Fatal(err)
	}
	// Coarse settings: the point is that it is measured, not how finely.
	if _, err := CanalFromSpec(context.Background(), "long.json", spec, CanalOptions{Extract: ExtractOptions{Voxel: 0.1}, Angles: 16}); err != nil {
		t.Errorf("a spec of the longest length allowed: %v", err)
	}
	over := strings.Replace(long, `"length": 100`, `"length": 100.5`, 1)
	if _, err := models.ParseCanalSpec("over.json", []byte(over)); err == nil || !strings.Contains(err.Error(), "at most 100") {
		t.Errorf("a spec over the limit: %v", err)
	}
}
