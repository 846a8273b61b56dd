package analysis

import (
	"context"
	"strings"
	"testing"

	"tapersweep/models"
)

// A straight canal has a Schneider angle of 0 (Schneider 1971: straight up to 5 degrees), and
// a scan of one must not be said to leave it open by degrees: a line that never leaves its
// coronal axis by more than the tolerance is straight to within tol over its whole length.
// Checked on the exact mesh and on scan-like surfaces (binary and partial volume, noisy, an
// oblique orifice cut), where the last station before the apical end zone used to stand in
// for a departure and gave bands of 0-14 degrees.
func TestStraightCanalSchneiderBand(t *testing.T) {
	spec, err := models.ParseCanalSpec("straight.json", []byte(`{"name": "demo straight (invented)",
		"segments": [{"kind": "straight", "length": 16}], "orifice_d": 1.0, "apical_d": 0.35}`))
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		opt  *models.ScanOptions
	}{
		{"exact mesh", nil},
		{"binary 0.08 mm, noise 0.015", &models.ScanOptions{Voxel: 0.08, Noise: 0.015, Seed: 3}},
		{"partial volume 0.1 mm, cut 30 deg", &models.ScanOptions{Voxel: 0.1, PartialVolume: true, BlurVoxels: 0.5, CutDeg: 30, Seed: 4}},
	}
	for _, tc := range cases {
		var c *Canal
		if tc.opt == nil {
			c, err = CanalFromSpec(context.Background(), tc.name, spec, CanalOptions{})
		} else {
			m, serr := models.Scan(spec, *tc.opt)
			if serr != nil {
				t.Fatal(serr)
			}
			c, err = NewCanal(context.Background(), tc.name, m, CanalOptions{})
		}
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		m := c.Measures
		if m.SchneiderDeg > 2 || m.SchneiderRange[1] > 3 {
			t.Errorf("%s: Schneider %.2f deg, band %.2f-%.2f: a straight canal reads 0 within a few degrees",
				tc.name, m.SchneiderDeg, m.SchneiderRange[0], m.SchneiderRange[1])
		}
		for _, w := range c.Warnings {
			if strings.Contains(w, "Schneider") {
				t.Errorf("%s: warning %q on a straight canal", tc.name, w)
			}
		}
	}
}
