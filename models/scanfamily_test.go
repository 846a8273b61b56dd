package models

import (
	"math"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// scanLineDistance is the distance from p to the polyline and the arc length there.
func scanLineDistance(p mgl64.Vec3, line []mgl64.Vec3) (dist, s float64) {
	dist = math.Inf(1)
	acc := 0.0
	for i := 0; i+1 < len(line); i++ {
		a, b := line[i], line[i+1]
		ab := b.Sub(a)
		l := ab.Len()
		t := math.Max(0, math.Min(1, p.Sub(a).Dot(ab)/(l*l)))
		if d := p.Sub(a.Add(ab.Mul(t))).Len(); d < dist {
			dist, s = d, acc+t*l
		}
		acc += l
	}
	return dist, s
}

// TestScanMatchesExactCanal: the imaged surface lies where the exact canal's wall is. For a
// round canal the wall is at distance d(s)/2 from the exact centerline (analytic geometry),
// the apical end is the plane across the last tangent, and the orifice is the cut plane
// through s = 0. A binary image puts the surface half-way between an inside and an outside
// voxel centre, so within sqrt(3)/2 voxel of the wall; a partial-volume image within a
// fifth of a voxel (linear interpolation of a ramp across a curved wall). Within two voxels
// of a rim, where an end meets the wall, sampling rounds the edge and either is accepted.
func TestScanMatchesExactCanal(t *testing.T) {
	c := canalSpecOf(t, 1.2, 0.5, 0, `{"kind": "straight", "length": 4}, {"kind": "arc", "radius": 4, "angle": 50}, {"kind": "straight", "length": 2}`)
	turn := mgl64.QuatRotate(0.7, mgl64.Vec3{1, 2, 3}.Normalize())
	for _, tc := range []struct {
		name string
		opt  ScanOptions
		tol  float64
	}{
		{"binary", ScanOptions{Voxel: 0.08}, 0.08 * math.Sqrt(3) / 2},
		{"partial volume", ScanOptions{Voxel: 0.08, PartialVolume: true}, 0.08 / 5},
		{"turned, cut 30 deg", ScanOptions{Voxel: 0.07, PartialVolume: true, Turn: turn, Offset: mgl64.Vec3{0.3, 0.6, 0.1}, CutDeg: 30, CutTowardDeg: 70}, 0.07 / 5},
	} {
		m, err := Scan(c, tc.opt)
		if err != nil {
			t.Fatal(err)
		}
		canalCheckClosed(t, tc.name, m)
		truth := ScanTruth(c, tc.opt, 0.02)
		tilt, toward := mgl64.DegToRad(tc.opt.CutDeg), mgl64.DegToRad(tc.opt.CutTowardDeg)
		cutN := canalRotate(mgl64.Vec3{0, 0, 1}, mgl64.Vec3{math.Cos(toward), math.Sin(toward), 0}, tilt)
		q := tc.opt.Turn
		if q.Len() == 0 {
			q = mgl64.QuatIdent()
		}
		cutN = q.Rotate(cutN)
		end := truth[len(truth)-1]
		endT := end.Sub(truth[len(truth)-2]).Normalize()
		worst := 0.0
		for _, p := range m.Vertices {
			d, s := scanLineDistance(p, truth)
			wall := math.Abs(d - c.Diameter(s)/2)
			if s == 0 { // the wall the cut leaves before s = 0: the first straight part carried on
				t0 := truth[1].Sub(truth[0]).Normalize()
				q := p.Sub(truth[0])
				u := q.Dot(t0)
				r := (c.OrificeD + (c.ApicalD-c.OrificeD)*u/c.Length()) / 2
				wall = math.Abs(q.Sub(t0.Mul(u)).Len() - r)
			}
			cap := math.Abs(p.Sub(end).Dot(endT))
			cut := math.Abs(p.Sub(truth[0]).Dot(cutN))
			if near := 2 * tc.opt.Voxel; (wall < near && (cap < near || cut < near)) || (cap < near && cut < near) {
				continue // a rim, where sampling rounds the edge
			}
			worst = math.Max(worst, math.Min(wall, math.Min(cap, cut)))
		}
		if worst > tc.tol {
			t.Errorf("%s: a vertex lies %.4f mm from the exact wall, ends and cut (limit %.4f)", tc.name, worst, tc.tol)
		}
	}
}

// TestScanFamilyDraws: the family is reproducible, covers every condition the measures issue
// names, and states exact answers that agree with analytic geometry.
func TestScanFamilyDraws(t *testing.T) {
	a, b := ScanFamily(3, 100), ScanFamily(3, 100)
	seen := map[string]int{}
	for i, sc := range a {
		if sc.Name != b[i].Name || sc.Scan != b[i].Scan || sc.Spec.Length() != b[i].Spec.Length() {
			t.Fatalf("%s: the same seed drew another canal", sc.Name)
		}
		seen[sc.Shape]++
		if sc.Spec.Oval > 1 {
			seen["oval"]++
		}
		if sc.Uniform {
			seen["uniform"]++
		}
		if sc.Scan.PartialVolume {
			seen["partial"]++
		}
		if sc.Scan.CutDeg > 0 {
			seen["cut"]++
		}
		if sc.Aligned {
			seen["aligned"]++
		}
		if v := sc.Scan.Voxel; v < 0.04-1e-9 || v > 0.15 || v > sc.Spec.ApicalD/3+1e-9 {
			t.Errorf("%s: voxel %g mm out of range", sc.Name, v)
		}
		if sc.Scan.Noise > 0.02 || sc.Spec.OrificeD < 0.6 || sc.Spec.OrificeD > 1.6 || sc.Spec.Oval > 2 || sc.Scan.CutDeg > 40 {
			t.Errorf("%s: a draw is out of range: %+v %+v", sc.Name, sc.Scan, sc.Spec)
		}
		// One arc is clearly the tightest.
		_, _, r, ok := sc.Spec.TightestArc()
		if !ok {
			t.Fatalf("%s: no arc", sc.Name)
		}
		for _, seg := range sc.Spec.Segments {
			if seg.Kind == "arc" && seg.Radius != r && seg.Radius < 1.29*r {
				t.Errorf("%s: arcs of %g and %g mm are too alike to name the tightest", sc.Name, r, seg.Radius)
			}
		}
	}
	for _, k := range append(append([]string{}, scanShapes...), "oval", "uniform", "partial", "cut", "aligned") {
		if seen[k] < 10 {
			t.Errorf("only %d of 100 canals are %q", seen[k], k)
		}
	}
	// Schneider's construction on an arc ending at the foramen gives half the arc's angle
	// (geometry of the construction: the chord of an arc makes half its angle with the
	// tangent); with a straight apical part, the chord from the arc's start to the end.
	c := canalSpecOf(t, 1, 0.3, 0, `{"kind": "straight", "length": 5}, {"kind": "arc", "radius": 4, "angle": 50}`)
	if got := c.SchneiderAngle(); math.Abs(got-25) > 1e-9 {
		t.Errorf("arc at the foramen: Schneider %.6f, want 25", got)
	}
	c = canalSpecOf(t, 1, 0.3, 0, `{"kind": "straight", "length": 5}, {"kind": "arc", "radius": 5, "angle": 45}, {"kind": "straight", "length": 3}`)
	R, al := 5.0, math.Pi/4
	want := mgl64.RadToDeg(math.Atan2(R*(1-math.Cos(al))+3*math.Sin(al), R*math.Sin(al)+3*math.Cos(al)))
	if got := c.SchneiderAngle(); math.Abs(got-want) > 1e-9 {
		t.Errorf("arc and straight tail: Schneider %.6f, want %.6f", got, want)
	}
	if from, to, r, _ := c.TightestArc(); from != 5 || math.Abs(to-(5+R*al)) > 1e-12 || r != 5 {
		t.Errorf("tightest arc [%g, %g] r %g, want [5, %g] r 5", from, to, r, 5+R*al)
	}
}
