package plan

import (
	"math"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/models"
)

// coarse returns a copy of c sampled every ds mm along the centerline and at angles directions
// around it, for the search. Every per-station field the sweep reads (points, arc length,
// frames, curvature and its components, the radius map) is resampled together, so
// analysis.Run works on the copy exactly as on the original. Arc length keeps the original's
// values (s = i*ds, and the apical end), so depths and the working length mean the same mm.
// Between stations values are interpolated linearly; around a station the radius map is
// interpolated between the original's two nearest directions.
func coarse(c *analysis.Canal, ds float64, angles int) *analysis.Canal {
	src := c.Line
	L := src.Length()
	n := int(math.Floor(L/ds+models.LengthTolerance)) + 1
	s := make([]float64, 0, n+1)
	for i := 0; i < n; i++ {
		s = append(s, float64(i)*ds)
	}
	if L-s[len(s)-1] > ds*1e-6 {
		s = append(s, L)
	}
	n = len(s)
	line := &analysis.Centerline{
		Points: make([]mgl64.Vec3, n), S: s,
		T: make([]mgl64.Vec3, n), N1: make([]mgl64.Vec3, n), N2: make([]mgl64.Vec3, n),
		K: make([]float64, n), KN1: make([]float64, n), KN2: make([]float64, n),
		DS: ds,
	}
	// Each new station sits between two original stations lo and lo+1, a fraction f along.
	lo := make([]int, n)
	frac := make([]float64, n)
	for i, si := range s {
		j := 0
		for j = min(int(si/src.DS), src.Len()-2); j > 0 && src.S[j] > si; j-- {
		}
		for j < src.Len()-2 && src.S[j+1] < si {
			j++
		}
		f := 0.0
		if d := src.S[j+1] - src.S[j]; d > 0 {
			f = math.Max(0, math.Min(1, (si-src.S[j])/d))
		}
		lo[i], frac[i] = j, f
		mixV := func(a []mgl64.Vec3) mgl64.Vec3 { return a[j].Mul(1 - f).Add(a[j+1].Mul(f)) }
		mixF := func(a []float64) float64 { return a[j]*(1-f) + a[j+1]*f }
		line.Points[i] = mixV(src.Points)
		t := mixV(src.T).Normalize()
		n1 := mixV(src.N1)
		n1 = n1.Sub(t.Mul(n1.Dot(t))).Normalize()
		line.T[i], line.N1[i], line.N2[i] = t, n1, t.Cross(n1)
		line.K[i], line.KN1[i], line.KN2[i] = mixF(src.K), mixF(src.KN1), mixF(src.KN2)
	}
	out := *c
	// The root's map is the full canal's; the search sees the wall through newKeepWall, and runs
	// on this copy (fatigue use) do not measure it.
	out.Root, out.Thickness = nil, nil
	out.Line = line
	out.Angles = angles
	out.Rho = make([]float32, n*angles)
	na := c.Angles
	for i := range s {
		j, f := lo[i], frac[i]
		for a := 0; a < angles; a++ {
			fa := float64(a) * float64(na) / float64(angles)
			k := int(fa) % na
			g := fa - math.Floor(fa)
			k1 := (k + 1) % na
			at := func(st int) float64 {
				return (1-g)*float64(c.Rho[st*na+k]) + g*float64(c.Rho[st*na+k1])
			}
			out.Rho[i*angles+a] = float32((1-f)*at(j) + f*at(j+1))
		}
	}
	return &out
}

// fewAngles returns a copy of c with the same centerline and only a few directions of its
// radius map. Fatigue use depends on the centerline alone (the file's bending along it), so a
// run through this copy gives a file's fatigue use exactly as on c, for a fraction of the work.
func fewAngles(c *analysis.Canal) *analysis.Canal {
	const keep = 4
	if c.Angles%keep != 0 {
		return c
	}
	out := *c
	out.Root, out.Thickness = nil, nil
	stride := c.Angles / keep
	out.Angles = keep
	out.Rho = make([]float32, c.Line.Len()*keep)
	for i := 0; i < c.Line.Len(); i++ {
		for a := 0; a < keep; a++ {
			out.Rho[i*keep+a] = c.Rho[i*c.Angles+a*stride]
		}
	}
	return &out
}
