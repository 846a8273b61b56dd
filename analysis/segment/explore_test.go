package segment

import (
	"context"
	"math"
	"path/filepath"
	"testing"

	"tapersweep/analysis"
	"tapersweep/mesh"
)

func TestExplore(t *testing.T) {
	dir := phantom(t, "--voxel", "0.15", "--formats", "series")
	e := loadExact(t, dir)
	v := openScan(t, filepath.Join(dir, "series"), volumeOptions())
	res, err := Find(context.Background(), v, e.ends(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("levels canal %.0f, dentine %.0f..%.0f, unresolved %+v, lumen %d tris, root %d tris", res.CanalLevel, res.DentineLevel[0], res.DentineLevel[len(res.DentineLevel)-1], res.Unresolved, len(res.Lumen.Triangles), len(res.Root.Triangles))
	worst := 0.0
	for i, p := range res.Path {
		_, d := e.nearest(p)
		if res.Resolved[i] {
			worst = math.Max(worst, d)
		}
	}
	t.Logf("path: worst %.3f mm where resolved", worst)
	for i := 0; i < len(res.Path); i += 5 {
		k, _ := e.nearest(res.Path[i])
		t.Logf("path %d s %.2f: resolved %v d_eq %.3f exact %.3f threshold %.0f dentine %.0f", i, e.Stations[k][0], res.Resolved[i], res.Diameter[i], e.diameter(k), res.Threshold[i], res.DentineLevel[i])
	}
	c, err := analysis.NewCanal(context.Background(), "x", res.Lumen, analysis.CanalOptions{Extract: analysis.ExtractOptions{Orifice: &res.Path[0], Apex: &res.Path[len(res.Path)-1]}})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("canal length %.2f (exact %.2f) warnings %v", c.Line.Length(), e.Length, c.Warnings)
	for i := 0; i < c.Line.Len(); i += 10 {
		p := c.Line.Points[i]
		k, d := e.nearest(p)
		area := 0.0
		for _, r := range c.Rho[i*c.Angles : (i+1)*c.Angles] {
			area += 0.5 * float64(r) * float64(r) * 2 * math.Pi / float64(c.Angles)
		}
		t.Logf("s %.2f: off %.3f, d %.3f exact %.3f", c.Line.S[i], d, 2*math.Sqrt(area/math.Pi), e.diameter(k))
	}
	bvh := mesh.NewBVH(e.rootMesh())
	var ds []float64
	for _, p := range res.Root.Vertices {
		k, _ := e.nearest(p)
		s := e.Stations[k][0]
		if s < 0.5 || s > e.Length-1.3 {
			continue
		}
		_, _, d := bvh.Closest(p)
		ds = append(ds, d)
	}
	t.Logf("root: median %.3f, 95%% %.3f, max %.3f mm over %d vertices", percentile(append([]float64{}, ds...), 0.5), percentile(append([]float64{}, ds...), 0.95), percentile(ds, 1), len(ds))
}
