package analysis

import (
	"context"
	"flag"
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"

	"tapersweep/models"
)

var cleanSpecs = flag.Int("clean-specs", 0, "random clean canal specs for TestCleanSpecsWarnNothing; 0 = the subset of normal tests")

// randomCleanSpec draws a closed, self-avoiding parametric canal: a straight coronal part,
// one to three arcs (radius at least three times the widest semi-axis, any plane turn) with
// straight parts between, round or oval, tapered or nearly uniform.
func randomCleanSpec(rng *rand.Rand, i int) *models.CanalSpec {
	u := func(a, b float64) float64 { return a + (b-a)*rng.Float64() }
	orifice := u(0.5, 1.8)
	apical := u(0.15, 0.5)
	if rng.IntN(4) == 0 {
		apical = orifice * u(0.8, 1)
	}
	oval := 0.0
	if rng.IntN(2) == 0 {
		oval = u(1, 2.5)
	}
	semi := orifice / 2 * max(1.0, oval)
	segs := []string{fmt.Sprintf(`{"kind":"straight","length":%.3f}`, u(1, 10))}
	for range 1 + rng.IntN(3) {
		segs = append(segs, fmt.Sprintf(`{"kind":"arc","radius":%.3f,"angle":%.3f,"plane_turn":%.1f}`, u(3*semi, 15), u(5, 50), u(-180, 180)))
		if rng.IntN(2) == 0 {
			segs = append(segs, fmt.Sprintf(`{"kind":"straight","length":%.3f}`, u(0.3, 5)))
		}
	}
	js := fmt.Sprintf(`{"name": "clean %d", "segments": [%s], "orifice_d": %.3f, "apical_d": %.3f, "oval": %.3f}`,
		i, strings.Join(segs, ","), orifice, apical, max(oval, 1))
	spec, err := models.ParseCanalSpec("clean.json", []byte(js))
	if err != nil {
		panic(err)
	}
	return spec
}

// TestCleanSpecsWarnNothing: random clean specs (closed, one piece, no branch: by
// construction) draw no warning of a branch left out or of pieces separate from the canal.
// The whole set of 500:
//
//	go test ./analysis -run TestCleanSpecsWarnNothing -clean-specs 500 -timeout 60m
func TestCleanSpecsWarnNothing(t *testing.T) {
	n := *cleanSpecs
	if n == 0 {
		n = 12
	}
	rng := rand.New(rand.NewPCG(500, 13))
	for i := range n {
		spec := randomCleanSpec(rng, i)
		c, err := CanalFromSpec(context.Background(), spec.Name, spec, CanalOptions{})
		if err != nil {
			t.Errorf("%s: %v", spec.Name, err)
			continue
		}
		for _, w := range c.Warnings {
			if strings.Contains(w, "branch") || strings.Contains(w, "separate") {
				t.Errorf("%s (%d segments, length %.1f mm): %q", spec.Name, len(spec.Segments), spec.Length(), w)
			}
		}
	}
}
