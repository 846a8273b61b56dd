package models

import (
	"math"
	"strings"
	"testing"

	"tapersweep/mesh"
)

func TestScanLikeClosedAndFaithful(t *testing.T) {
	c := canalSpecOf(t, 0.9, 0.4, 0, `{"kind": "straight", "length": 3}, {"kind": "arc", "radius": 4, "angle": 40}`)
	const voxel, noise = 0.08, 0.015
	clean, err := ScanLike(c, voxel, 0, 1)
	if err != nil {
		t.Fatal(err)
	}
	m, err := ScanLike(c, voxel, noise, 1)
	if err != nil {
		t.Fatal(err)
	}
	canalCheckClosed(t, "scan-like", m)
	if len(m.Vertices) != len(clean.Vertices) || len(m.Triangles) != len(clean.Triangles) {
		t.Fatal("noise changed the connectivity")
	}
	// Noise moves each vertex by at most `noise`, and does move them.
	maxMove := 0.0
	for i := range m.Vertices {
		maxMove = math.Max(maxMove, m.Vertices[i].Sub(clean.Vertices[i]).Len())
	}
	if maxMove > noise*(1+1e-9) || maxMove < noise/2 {
		t.Errorf("largest vertex move %g, want in (%g, %g]", maxMove, noise/2, noise)
	}
	// A segmented surface stays within about a voxel of the true wall, so its volume is
	// close to int pi r^2 ds (Pappus for tubes): within 6 % on a 5-voxel tip.
	r0, r1, l := 0.45, 0.2, c.Length()
	want := math.Pi * l * (r0*r0 + r0*r1 + r1*r1) / 3
	if got := mesh.Volume(m); math.Abs(got-want) > 0.06*want {
		t.Errorf("volume %.4f, integral %.4f", got, want)
	}
	// Same seed, same surface; another seed, another surface.
	again, _ := ScanLike(c, voxel, noise, 1)
	other, _ := ScanLike(c, voxel, noise, 2)
	same, differ := true, false
	for i := range m.Vertices {
		same = same && again.Vertices[i] == m.Vertices[i]
		differ = differ || other.Vertices[i] != m.Vertices[i]
	}
	if !same || !differ {
		t.Errorf("determinism: same seed equal %v, other seed differs %v", same, differ)
	}
}

func TestScanLikeRejects(t *testing.T) {
	c := canalSpecOf(t, 0.9, 0.25, 0, `{"kind": "straight", "length": 3}`)
	if _, err := ScanLike(c, 0.08, 0.01, 1); err == nil || !strings.Contains(err.Error(), "4 voxels") {
		t.Errorf("0.25 mm tip at 0.08 mm voxels: %v, want a 4-voxel error", err)
	}
	if _, err := ScanLike(c, 0.05, 0.03, 1); err == nil || !strings.Contains(err.Error(), "noise") {
		t.Errorf("noise over a quarter voxel: %v", err)
	}
	if _, err := ScanLike(c, 0, 0.01, 1); err == nil {
		t.Error("zero voxel accepted")
	}
}

// BenchmarkVoxelizeCanal: the demo canal meshed to about 200k triangles, voxelised at
// 0.03 mm (target: well under 0.5 s on 2 cores).
func BenchmarkVoxelizeCanal(b *testing.B) {
	c := DemoCanal()
	m := c.Mesh(c.Length()/780, 128)
	var g *mesh.Grid
	for b.Loop() {
		var err error
		if g, err = mesh.Voxelize(m, 0.03, 2, 0); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(m.Triangles)), "triangles")
	b.ReportMetric(float64(len(g.Inside)), "voxels")
}

// BenchmarkScanLike: the demo canal's scan-like surface at 0.05 mm voxels.
func BenchmarkScanLike(b *testing.B) {
	c := DemoCanal()
	var m *mesh.Mesh
	for b.Loop() {
		var err error
		if m, err = ScanLike(c, 0.05, 0.01, 1); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(len(m.Triangles)), "triangles")
}
