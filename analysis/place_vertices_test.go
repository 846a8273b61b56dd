package analysis

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
	"tapersweep/models"
)

// placeByDefinition is a wall point's (s, theta) straight from its definition, the formulas
// placeVertices must reproduce bit for bit: the nearest station over every station (distances
// as Vec3.Len gives them, the lowest index among equally near), refined onto the nearer of its
// two segments (the earlier one on a tie), and the angle in the frame at that arc length
// (atByDefinition), in [0, 2 pi).
func placeByDefinition(line *Centerline, p mgl64.Vec3) (s, theta float32) {
	i, bd := 0, math.Inf(1)
	for k, q := range line.Points {
		if d := q.Sub(p).Len(); d < bd {
			i, bd = k, d
		}
	}
	at := line.S[i]
	best := math.Inf(1)
	for _, k := range []int{i - 1, i} {
		if k < 0 || k+1 >= line.Len() {
			continue
		}
		a, b := line.Points[k], line.Points[k+1]
		ab := b.Sub(a)
		t := math.Max(0, math.Min(1, p.Sub(a).Dot(ab)/ab.Dot(ab)))
		if d := p.Sub(a.Add(ab.Mul(t))).Len(); d < best {
			best = d
			at = line.S[k] + t*(line.S[k+1]-line.S[k])
		}
	}
	q, _, n1, n2 := atByDefinition(line, at)
	d := p.Sub(q)
	th := math.Atan2(d.Dot(n2), d.Dot(n1))
	if th < 0 {
		th += 2 * math.Pi
	}
	return float32(at), float32(th)
}

// atByDefinition is the interpolated point and frame at arc length s as Vec3 arithmetic
// gives them: the point and both frame vectors mixed linearly between the neighbouring
// stations, the tangent normalised, the first normal made square to it and normalised, the
// second their cross product. Centerline.At must give exactly these.
func atByDefinition(c *Centerline, s float64) (p, t, n1, n2 mgl64.Vec3) {
	s = math.Max(0, math.Min(s, c.Length()))
	i := min(int(s/c.DS), len(c.S)-2)
	f := (s - c.S[i]) / (c.S[i+1] - c.S[i])
	mix := func(a, b mgl64.Vec3) mgl64.Vec3 { return a.Mul(1 - f).Add(b.Mul(f)) }
	p = mix(c.Points[i], c.Points[i+1])
	t = mix(c.T[i], c.T[i+1]).Normalize()
	n1 = mix(c.N1[i], c.N1[i+1])
	n1 = n1.Sub(t.Mul(n1.Dot(t))).Normalize()
	n2 = t.Cross(n1)
	return
}

// checkAt compares Centerline.At with atByDefinition bit for bit at every station, midway
// between stations, at random arc lengths, and beyond both ends.
func checkAt(t *testing.T, name string, line *Centerline, rng *rand.Rand) {
	t.Helper()
	var ss []float64
	for i, s := range line.S {
		ss = append(ss, s, s+0.5*line.DS, math.Nextafter(s, math.Inf(-1)), float64(i)*line.DS)
	}
	for range 2000 {
		ss = append(ss, rng.Float64()*line.Length())
	}
	ss = append(ss, -1, 0, line.Length(), line.Length()+1)
	same := func(a, b mgl64.Vec3) bool {
		for k := range 3 {
			if math.Float64bits(a[k]) != math.Float64bits(b[k]) {
				return false
			}
		}
		return true
	}
	for _, s := range ss {
		p, tt, n1, n2 := line.At(s)
		wp, wt, wn1, wn2 := atByDefinition(line, s)
		if !same(p, wp) || !same(tt, wt) || !same(n1, wn1) || !same(n2, wn2) {
			t.Fatalf("%s: At(%.17g) = %v %v %v %v, by definition %v %v %v %v", name, s, p, tt, n1, n2, wp, wt, wn1, wn2)
		}
	}
}

// checkPlacement places pts on line with placeVertices (one worker and all cores, in the given
// order and shuffled, so the hint chains differ) and compares every vertex with
// placeByDefinition, bit for bit.
func checkPlacement(t *testing.T, name string, line *Centerline, pts []mgl64.Vec3, rng *rand.Rand) {
	t.Helper()
	wantS, wantTh := make([]float32, len(pts)), make([]float32, len(pts))
	for v, p := range pts {
		wantS[v], wantTh[v] = placeByDefinition(line, p)
	}
	shuffled := rng.Perm(len(pts))
	for _, order := range []string{"mesh order", "shuffled"} {
		vs := pts
		if order == "shuffled" {
			vs = make([]mgl64.Vec3, len(pts))
			for v, j := range shuffled {
				vs[v] = pts[j]
			}
		}
		for _, workers := range []int{1, 0} {
			c := &Canal{Line: line, Mesh: &mesh.Mesh{Vertices: vs}}
			c.placeVertices(workers)
			bad := 0
			for v := range vs {
				j := v
				if order == "shuffled" {
					j = shuffled[v]
				}
				if math.Float32bits(c.VertexS[v]) != math.Float32bits(wantS[j]) ||
					math.Float32bits(c.VertexTheta[v]) != math.Float32bits(wantTh[j]) {
					if bad < 5 {
						t.Errorf("%s (%s, workers %d): vertex %v: (s %.9g, theta %.9g), by definition (%.9g, %.9g)",
							name, order, workers, vs[v], c.VertexS[v], c.VertexTheta[v], wantS[j], wantTh[j])
					}
					bad++
				}
			}
			if bad > 0 {
				t.Errorf("%s (%s, workers %d): %d of %d vertices differ", name, order, workers, bad, len(vs))
			}
		}
	}
}

// probePoints are points a placement must also get right: on every station, midway between
// neighbouring stations, near the line (inside the canal), far from it, and beyond both ends.
func probePoints(line *Centerline, rng *rand.Rand, n int) []mgl64.Vec3 {
	var out []mgl64.Vec3
	for i, q := range line.Points {
		out = append(out, q)
		if i+1 < line.Len() {
			out = append(out, q.Add(line.Points[i+1]).Mul(0.5))
		}
	}
	gauss := func(sd float64) mgl64.Vec3 {
		return mgl64.Vec3{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}.Mul(sd)
	}
	for range n {
		q := line.Points[rng.IntN(line.Len())]
		out = append(out, q.Add(gauss(0.2)), q.Add(gauss(2)), q.Add(gauss(50)))
	}
	for _, end := range []int{0, line.Len() - 1} {
		for range 20 {
			out = append(out, line.Points[end].Add(line.T[end].Mul(float64(end-1)*rng.Float64())).Add(gauss(0.1)))
		}
	}
	return out
}

// Every wall vertex's (s, theta), and the frame At gives, are exactly what their definitions give, on spec canals (straight,
// the tightest and widest example curves, an S-curve, a curve out of its plane, an oval), on
// scan-like canals (one turned and moved in the grid), and at probe points around each line.
func TestPlaceVerticesMatchesDefinition(t *testing.T) {
	rng := rand.New(rand.NewPCG(18, 1))
	examples := map[string]bool{"straight": true, "curve_70deg_r3": true, "curve_20deg_r10": true,
		"s_curve": true, "curve_3d": true, "oval": true, "scanlike_curve": true}
	for _, ex := range models.ExampleCanals() {
		if !examples[ex.File] {
			continue
		}
		var c *Canal
		var err error
		if ex.ScanLike {
			m, merr := ex.Mesh()
			if merr != nil {
				t.Fatal(merr)
			}
			c, err = NewCanal(context.Background(), ex.File, m, CanalOptions{})
		} else {
			c, err = CanalFromSpec(context.Background(), ex.File, ex.Spec, CanalOptions{})
		}
		if err != nil {
			t.Fatalf("%s: %v", ex.File, err)
		}
		checkAt(t, ex.File, c.Line, rng)
		checkPlacement(t, ex.File, c.Line, c.Mesh.Vertices, rng)
		checkPlacement(t, ex.File+" probes", c.Line, probePoints(c.Line, rng, 2000), rng)
	}
	fam := models.ScanFamily(5, 4)[3] // out of plane, turned and moved in the grid
	m, err := models.Scan(fam.Spec, fam.Scan)
	if err != nil {
		t.Fatal(err)
	}
	c, err := NewCanal(context.Background(), fam.Name, m, CanalOptions{})
	if err != nil {
		t.Fatalf("%s: %v", fam.Name, err)
	}
	checkAt(t, fam.Name, c.Line, rng)
	checkPlacement(t, fam.Name, c.Line, c.Mesh.Vertices, rng)
}

// A line that turns back on itself in a tight bend (out 3 mm, round a half circle of 0.3 mm
// radius, back 3 mm alongside): between the legs the far leg is as near as the near one, and on
// the plane halfway between them exactly as near (ties, taken by the lowest station).
func TestPlaceVerticesHairpin(t *testing.T) {
	const ds, r = StationSpacing, 0.3
	var pts []mgl64.Vec3
	leg := int(3 / ds)
	for i := 0; i <= leg; i++ {
		pts = append(pts, mgl64.Vec3{float64(i) * ds, 0, 0})
	}
	turn := int(math.Round(math.Pi * r / ds))
	for j := 1; j < turn; j++ {
		a := math.Pi * float64(j) / float64(turn)
		pts = append(pts, mgl64.Vec3{float64(leg)*ds + r*math.Sin(a), r - r*math.Cos(a), 0})
	}
	for i := leg; i >= 0; i-- {
		pts = append(pts, mgl64.Vec3{float64(i) * ds, 2 * r, 0})
	}
	line := NewCenterline(pts, ds, 0.3, 0, math.Inf(1), 0, 0)
	rng := rand.New(rand.NewPCG(18, 2))
	probes := probePoints(line, rng, 3000)
	for range 3000 {
		x := rng.Float64() * 3.4
		// On the middle plane (ties between the legs), and off it on both sides.
		probes = append(probes, mgl64.Vec3{x, r, rng.NormFloat64() * 0.2},
			mgl64.Vec3{x, r + rng.NormFloat64()*0.3, rng.NormFloat64() * 0.3})
	}
	for i := 0; i <= leg; i++ {
		probes = append(probes, mgl64.Vec3{float64(i) * ds, r, 0}, mgl64.Vec3{float64(i) * ds, r, 0.1})
	}
	// A tube round the whole line, as a canal's wall would be.
	for i := range line.Len() {
		for j := range 64 {
			a := 2 * math.Pi * float64(j) / 64
			probes = append(probes, line.Points[i].Add(line.N1[i].Mul(0.25*math.Cos(a))).Add(line.N2[i].Mul(0.25*math.Sin(a))))
		}
	}
	checkAt(t, "hairpin", line, rng)
	checkPlacement(t, "hairpin", line, probes, rng)
}
