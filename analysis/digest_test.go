package analysis

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"fmt"
	"hash"
	"math"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh/digesttest"
	"tapersweep/models"
)

// Speed work that must leave every output as it was: measure a set of canals, write one digest
// per canal (-digest-write FILE) before the change, then check against it (-digest-check FILE)
// after. Off unless a flag is given: the digests belong to one machine's build, not the repo.
var canalDigests = digesttest.Flags("digest", "TestCanalDigest's canals")

// TestCanalDigest measures the benchmark canals (typical and fine scans), spec canals with and
// without named ends, and canals of the scan-like family (-family, default 12; -family-seed),
// and digests everything a measured canal holds: the centerline and its frame and curvature,
// the radius map, each vertex's (s, theta), the measures and the warnings, bit for bit.
func TestCanalDigest(t *testing.T) {
	canalDigests.Skip(t)
	var lines []string
	for _, j := range digestCanals() {
		c, err := j.measure()
		d := "error: " + fmt.Sprint(err)
		if err == nil {
			d = canalDigest(c)
		}
		lines = append(lines, j.name+"\t"+d)
		t.Logf("%s\t%s", j.name, d)
	}
	canalDigests.Match(t, lines)
}

// digestCanal is one canal of the digests: its name and how it is measured.
type digestCanal struct {
	name    string
	measure func() (*Canal, error)
}

// digestCanals are the canals TestCanalDigest and TestRunDigest measure.
func digestCanals() []digestCanal {
	ctx := context.Background()
	var jobs []digestCanal
	scanLike := func(name string, voxel, noise float64) {
		jobs = append(jobs, digestCanal{name, func() (*Canal, error) {
			m, err := models.ScanLike(benchDemo(), voxel, noise, 1)
			if err != nil {
				return nil, err
			}
			return NewCanal(ctx, name, m, CanalOptions{})
		}})
	}
	scanLike("typical", 0.06, 0.01)
	scanLike("fine", 0.02, 0.005)
	jobs = append(jobs,
		digestCanal{"demo spec", func() (*Canal, error) { return CanalFromSpec(ctx, "demo", benchDemo(), CanalOptions{}) }},
		digestCanal{"demo mesh, ends found", func() (*Canal, error) {
			return NewCanal(ctx, "demo mesh", benchDemo().Mesh(StationSpacing, 96), CanalOptions{})
		}},
		digestCanal{"demo as shipped, spec", func() (*Canal, error) { return CanalFromSpec(ctx, "demo", models.DemoCanal(), CanalOptions{}) }},
	)
	n := *familySize
	if n == 0 {
		n = 12
	}
	for _, sc := range models.ScanFamily(*familySeed, n) {
		jobs = append(jobs, digestCanal{sc.Name, func() (*Canal, error) {
			m, err := models.Scan(sc.Spec, sc.Scan)
			if err != nil {
				return nil, err
			}
			c, err := NewCanal(ctx, sc.Name, m, CanalOptions{})
			if err == nil && endsAmbiguous(c.Warnings) {
				o := models.ScanTruth(sc.Spec, sc.Scan, StationSpacing)[0]
				c, err = NewCanal(ctx, sc.Name, m, CanalOptions{Extract: ExtractOptions{Orifice: &o}})
			}
			return c, err
		}})
	}
	return jobs
}

// canalDigest is a short hash of a measured canal's outputs, bit for bit, and a few figures
// to read.
func canalDigest(c *Canal) string {
	h := sha256.New()
	f64 := func(xs ...float64) {
		for _, x := range xs {
			binary.Write(h, binary.LittleEndian, math.Float64bits(x))
		}
	}
	vecs := func(vs []mgl64.Vec3) {
		for _, v := range vs {
			f64(v[0], v[1], v[2])
		}
	}
	f32 := func(xs []float32) {
		for _, x := range xs {
			binary.Write(h, binary.LittleEndian, math.Float32bits(x))
		}
	}
	l := c.Line
	vecs(l.Points)
	f64(l.S...)
	vecs(l.T)
	vecs(l.N1)
	vecs(l.N2)
	f64(l.K...)
	f64(l.KN1...)
	f64(l.KN2...)
	f64(l.DS, c.WorkingLength, c.Voxel, c.SurfaceDetail)
	f32(c.Rho)
	f32(c.VertexS)
	f32(c.VertexTheta)
	f32(c.Thickness)
	fmt.Fprintf(h, "%+v|%q|%+v|%d|%d|%v|%v", c.Measures, c.Warnings, c.Unresolved, c.Angles, len(c.Mesh.Triangles), l.zone, l.measured)
	return fmt.Sprintf("%x\tstations %d length %.6f", sumOf(h), l.Len(), c.Measures.Length)
}

func sumOf(h hash.Hash) []byte { return h.Sum(nil)[:12] }
