package analysis

import (
	"bufio"
	"context"
	"crypto/sha256"
	"encoding/binary"
	"flag"
	"fmt"
	"hash"
	"math"
	"os"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/models"
)

// Speed work that must leave every output as it was: measure a set of canals, write one digest
// per canal (-digest-write FILE) before the change, then check against it (-digest-check FILE)
// after. Off unless a flag is given: the digests belong to one machine's build, not the repo.
var (
	digestWrite = flag.String("digest-write", "", "write the digests of TestCanalDigest's canals to this file")
	digestCheck = flag.String("digest-check", "", "check the digests of TestCanalDigest's canals against this file")
)

// TestCanalDigest measures the benchmark canals (typical and fine scans), spec canals with and
// without named ends, and canals of the scan-like family (-family, default 12; -family-seed),
// and digests everything a measured canal holds: the centerline and its frame and curvature,
// the radius map, each vertex's (s, theta), the measures and the warnings, bit for bit.
func TestCanalDigest(t *testing.T) {
	if *digestWrite == "" && *digestCheck == "" {
		t.Skip("needs -digest-write FILE or -digest-check FILE")
	}
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
	matchDigests(t, lines, *digestWrite, *digestCheck)
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

// matchDigests writes lines to the file write and compares them with the file check, line for
// line (either may be empty).
func matchDigests(t *testing.T, lines []string, write, check string) {
	t.Helper()
	if write != "" {
		if err := os.WriteFile(write, []byte(strings.Join(lines, "\n")+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if check == "" {
		return
	}
	f, err := os.Open(check)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var want []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		want = append(want, sc.Text())
	}
	if len(want) != len(lines) {
		t.Fatalf("%d digests, %s holds %d", len(lines), check, len(want))
	}
	for i := range lines {
		if lines[i] != want[i] {
			t.Errorf("changed:\n got %s\nwant %s", lines[i], want[i])
		}
	}
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
