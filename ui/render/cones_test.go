package render

import (
	"bytes"
	"image"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
)

// Every triangle of a skipped cluster faces away from the eye: the eye lies behind the
// triangle's plane (plain geometry: (p - eye).n > 0 at each corner, n the outward normal).
func TestSkippedClustersFaceAway(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	m := canalTube(300, 64, 0.6, 0.2)
	// A bumpy copy: the same connectivity, each vertex moved by up to 2 % of the radius.
	bumpy := canalTube(300, 64, 0.6, 0.2)
	for i := range bumpy.Vertices {
		for k := 0; k < 3; k++ {
			bumpy.Vertices[i][k] += (rng.Float64()*2 - 1) * 0.012
		}
	}
	for _, c := range []struct {
		name     string
		mesh     *mesh.Mesh
		min, max float64 // share of clusters skipped
	}{
		// About half the triangles face away from any eye; the clusters should find most of
		// them on the smooth tube, fewer where bumps spread the normals.
		{"tube", m, 0.25, 0.5},
		{"bumpy", bumpy, 0.02, 0.5},
	} {
		cl, tm := buildClusters(c.mesh), c.mesh
		skipped, total := 0, 0
		for e := 0; e < 200; e++ {
			// Eyes all around the canal, 2 to 40 mm from its middle.
			dir := mgl64.Vec3{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}.Normalize()
			eye := mgl64.Vec3{1, 0, -8}.Add(dir.Mul(2 + 38*rng.Float64()))
			// The mask of 64 clusters at once says what each says alone.
			for b := 0; b < len(cl); b += 64 {
				mask := awayMask(cl[b:min(b+64, len(cl))], eye)
				for j := b; j < min(b+64, len(cl)); j++ {
					if one := awayMask(cl[j:j+1], eye); mask>>(j-b)&1 != one {
						t.Fatalf("%s: cluster %d: %d in a mask of 64, %d alone", c.name, j, mask>>(j-b)&1, one)
					}
				}
			}
			for ci := range cl {
				total++
				if awayMask(cl[ci:ci+1], eye) == 0 {
					continue
				}
				skipped++
				for tr := ci * clusterSize; tr < min((ci+1)*clusterSize, len(tm.Triangles)); tr++ {
					p0, p1, p2 := tm.Corners(tr)
					n := p1.Sub(p0).Cross(p2.Sub(p0))
					for _, p := range [3]mgl64.Vec3{p0, p1, p2} {
						if p.Sub(eye).Dot(n) <= 0 {
							t.Fatalf("%s: cluster %d skipped from %v but triangle %d faces the eye", c.name, ci, eye, tr)
						}
					}
				}
			}
		}
		if f := float64(skipped) / float64(total); f < c.min || f > c.max {
			t.Errorf("%s: %.0f %% of clusters skipped, want %.0f-%.0f %%", c.name, 100*f, 100*c.min, 100*c.max)
		}
	}
}

// Skipping clusters changes no pixel: the canal drawn opaque from many sides with its clusters
// and with clusters that are never skipped.
func TestClusterSkipKeepsPicture(t *testing.T) {
	s, cam := canalScene(400, 64)
	s.Objects = s.Objects[1:]
	s.Objects[0].Opacity = 1
	m := s.Objects[0].Mesh
	with, without := NewRenderer(), NewRenderer()
	defer with.Close()
	defer without.Close()
	a := image.NewRGBA(image.Rect(0, 0, 320, 240))
	b := image.NewRGBA(image.Rect(0, 0, 320, 240))
	without.Render(b, s, cam, Options{})
	never := make([]coneCluster, len(without.meshes[m].clusters)) // cosB = 0: never skipped
	without.meshes[m].clusters = never
	for i := 0; i < 12; i++ {
		c := *cam
		c.Orbit(float64(i)*0.55, math.Sin(float64(i))*0.9)
		c.Dolly(0.4 + 0.1*float64(i%4))
		with.Render(a, s, &c, Options{})
		without.Render(b, s, &c, Options{})
		if !bytes.Equal(a.Pix, b.Pix) {
			t.Fatalf("view %d: pictures differ", i)
		}
	}
	if &without.meshes[m].clusters[0] != &never[0] {
		t.Fatal("the clusters that are never skipped were not used")
	}
}
