package segment

import (
	"context"
	"path/filepath"
	"testing"
)

func TestExplore2(t *testing.T) {
	dir := phantom(t, "--voxel", "0.15", "--formats", "series")
	e := loadExact(t, dir)
	v := openScan(t, filepath.Join(dir, "series"), volumeOptions())
	raw, dark, bright, err := findPath(context.Background(), v, e.ends())
	if err != nil {
		t.Fatal(err)
	}
	lo, hi := boundsOf(v, raw, 1)
	b := newBox(v, lo, hi, 1, true)
	c := pathCost(b, dark, bright)
	t.Logf("dark %.0f bright %.0f", dark, bright)
	for i, p := range raw {
		k, d := e.nearest(p)
		q := b.sampleOf(p)
		if i%3 == 0 {
			t.Logf("%d: s %.2f off %.3f I %.0f cost %.3f", i, e.Stations[k][0], d, b.val[q], c[q])
		}
	}
	// cost along the exact line
	sum := 0.0
	for i := 180; i < len(e.Stations); i++ {
		q := b.sampleOf(e.point(i))
		sum += float64(c[q]) * 0.05
	}
	t.Logf("exact line from s=9: cost %.3f", sum)
}
