package analysis

import (
	"fmt"
	"math"
)

// SectionLevels returns the distances from the apical end, mm, at which cross-sections are
// shown by default: the levels of micro-CT shaping studies (Peters OA et al., Int Endod J
// 2001;34:221-230), the same as TransportLevels (a fresh copy).
func SectionLevels() []float64 { return TransportLevels() }

// Outline is a canal's outline in the plane normal to the centerline: R[j] is the distance from
// the centerline along theta_j = 2 pi j / len(R) (theta = 0 along N1, the inner side of the main
// curve; theta = 90 degrees along N2). Between samples the distance runs linearly in theta, as
// Canal.MapAt reads a map, so the areas below are those of the outline the maps describe.
type Outline struct {
	R []float64
}

// Point is the j-th corner in the section's plane, mm: x along N1, y along N2.
func (o Outline) Point(j int) (x, y float64) {
	n := len(o.R)
	th := 2 * math.Pi * float64(j%n) / float64(n)
	s, c := math.Sincos(th)
	return o.R[j%n] * c, o.R[j%n] * s
}

// PointAt is the outline's point at the fractional sample index f (theta = 2 pi f / len(R)), the
// distance interpolated linearly between samples as the maps are read.
func (o Outline) PointAt(f float64) (x, y float64) {
	n := len(o.R)
	j := int(math.Floor(f))
	a := f - float64(j)
	r := o.R[((j%n)+n)%n]*(1-a) + o.R[(((j+1)%n)+n)%n]*a
	s, c := math.Sincos(2 * math.Pi * f / float64(n))
	return r * c, r * s
}

// Area is the area inside the outline, mm²: the integral of r²/2 over theta with r linear
// between samples.
func (o Outline) Area() float64 {
	n := len(o.R)
	if n == 0 {
		return 0
	}
	dth := 2 * math.Pi / float64(n)
	sum := 0.0
	for j := range o.R {
		a, b := o.R[j], o.R[(j+1)%n]
		sum += (a*a + a*b + b*b) / 3
	}
	return sum * dth / 2
}

// Centroid is the outline's area centroid in the section's plane, mm.
func (o Outline) Centroid() (x, y float64) {
	n := len(o.R)
	if n < 3 {
		return 0, 0
	}
	xs, ys := make([]float64, n), make([]float64, n)
	for j := range o.R {
		xs[j], ys[j] = o.Point(j)
	}
	x, y, _ = polygonCentroid(xs, ys)
	return x, y
}

// FileSection is the file's section in the plane: a circle of the file's diameter there, about
// the file's own axis (off the centerline on the elastic path).
type FileSection struct {
	X, Y     float64 // centre, mm, x along N1 and y along N2
	RadiusMM float64
}

// Section is the canal at one level: the outline as scanned, after each step up to the one
// shown, the file's section, the wall the step removed and how far it moved the canal there.
type Section struct {
	FromApexMM float64 // the level, mm from the apical end
	SMM        float64 // the same level, mm from the orifice
	Step       int     // the step shown (from 1); 0: the canal alone
	Scanned    Outline
	// Earlier are the outlines after each step before the shown one; Before is the outline as
	// the shown step meets it (the last of Earlier, or Scanned) and After the outline it leaves.
	Earlier       []Outline
	Before, After Outline
	File          *FileSection // nil where the file does not reach this level
	// Areas, mm²: inside the scanned outline, inside the outline after the step, removed by
	// the step, and removed since the scan.
	ScannedAreaMM2, AfterAreaMM2, RemovedMM2, RemovedSinceScanMM2 float64
	// Gambill's transportation by this step at this level (the same figure the step's
	// transportation_mm holds at 1, 3 and 5 mm), the side it moves toward (degrees about the
	// axis from the inner side of the main curve, in [0, 360)) and the centring ratio along the
	// direction the canal moved (the step's centering_ratio; nil when neither side lost wall).
	TransportationMM float64
	TowardDeg        float64
	CenteringRatio   *float64
	// DeepestCutMM is the deepest wall removed by the step around this level's outline.
	DeepestCutMM float64
	// Root is the root's outer surface in this plane (nil when no root is known), and Wall the
	// thinnest wall the shown step leaves at this level (as scanned for step 0).
	Root *Outline
	Wall *SectionWall
}

// SectionWall is the thinnest wall at one level: its thickness (the shortest distance to the
// root's surface in 3D), the side it faces (degrees, as TowardDeg) and the segment from the
// canal's outline to the nearest root point, that point projected into the section's plane
// (mm, x along N1, y along N2).
type SectionWall struct {
	MM, TowardDeg          float64
	FromX, FromY, ToX, ToY float64
}

// SectionAt is the cross-section fromApexMM from the apical end with step (from 1) of res shown;
// step 0 or res nil shows the canal as scanned alone.
func SectionAt(c *Canal, res *Result, step int, fromApexMM float64) (*Section, error) {
	L := c.Line.Length()
	if math.IsNaN(fromApexMM) || fromApexMM < 0 || fromApexMM > L {
		return nil, fmt.Errorf("a section %g mm from the apical end lies outside the canal (0 to %.2f mm)", fromApexMM, L)
	}
	if step < 0 || (step > 0 && (res == nil || step > len(res.Steps))) {
		n := 0
		if res != nil {
			n = len(res.Steps)
		}
		return nil, fmt.Errorf("step %d does not exist (the sequence has %d steps, numbered from 1)", step, n)
	}
	s := L - fromApexMM
	sec := &Section{FromApexMM: fromApexMM, SMM: s, Step: step, Scanned: c.outlineAt(c.Rho, s)}
	sec.ScannedAreaMM2 = sec.Scanned.Area()
	sec.Before, sec.After = sec.Scanned, sec.Scanned
	sec.AfterAreaMM2 = sec.ScannedAreaMM2
	if step == 0 {
		sec.Root, sec.Wall = c.rootAt(s, sec.After)
		return sec, nil
	}
	for _, st := range res.Steps[:step-1] {
		sec.Earlier = append(sec.Earlier, c.outlineAt(st.Prepared, s))
	}
	st := res.Steps[step-1]
	sec.Before, sec.After = c.outlineAt(st.Before, s), c.outlineAt(st.Prepared, s)
	sec.AfterAreaMM2 = sec.After.Area()
	sec.RemovedMM2 = sec.AfterAreaMM2 - sec.Before.Area()
	sec.RemovedSinceScanMM2 = sec.AfterAreaMM2 - sec.ScannedAreaMM2
	for j := range sec.After.R {
		sec.DeepestCutMM = math.Max(sec.DeepestCutMM, sec.After.R[j]-sec.Before.R[j])
	}
	at := transportAt(c, st.Before, st.Prepared, s)
	sec.TransportationMM, sec.TowardDeg, sec.CenteringRatio = at.size(), towardDeg(at.inPlane, at.across), at.ratioAlong
	sec.File = fileSectionAt(c, st, s)
	sec.Root, sec.Wall = c.rootAt(s, sec.After)
	return sec, nil
}

// rootAt is the root's outline at arc length s (rays in the section's plane from the centerline
// to the root's surface) and the thinnest wall from the canal's outline o there; nil without a
// root.
func (c *Canal) rootAt(s float64, o Outline) (*Outline, *SectionWall) {
	if c.Root == nil {
		return nil, nil
	}
	p, _, n1, n2 := c.Line.At(s)
	n := len(o.R)
	root := &Outline{R: make([]float64, n)}
	w := &SectionWall{MM: math.Inf(1)}
	seed := nearPoint{tri: -1}
	for j := 0; j < n; j++ {
		sin, cos := math.Sincos(2 * math.Pi * float64(j) / float64(n))
		dir := n1.Mul(cos).Add(n2.Mul(sin))
		if hit, ok := c.Root.Surface.Ray(p, dir, 4*c.Measures.Length); ok {
			root.R[j] = hit.T
		}
		var d float64
		d, seed = c.Root.signedDistance(p.Add(dir.Mul(o.R[j])), seed)
		if d < w.MM {
			q := seed.q.Sub(p)
			w.MM, w.TowardDeg = d, towardDeg(cos, sin)
			w.FromX, w.FromY = o.R[j]*cos, o.R[j]*sin
			w.ToX, w.ToY = q.Dot(n1), q.Dot(n2)
		}
	}
	w.MM = math.Max(w.MM, 0)
	return root, w
}

// outlineAt reads a station-major map of the canal at arc length s, one sample per angle.
func (c *Canal) outlineAt(m []float32, s float64) Outline {
	o := Outline{R: make([]float64, c.Angles)}
	for j := range o.R {
		o.R[j] = c.MapAt(m, s, 2*math.Pi*float64(j)/float64(c.Angles))
	}
	return o
}

// fileSectionAt is the file's section at arc length s, its axis interpolated between stations;
// nil beyond the tip.
func fileSectionAt(c *Canal, st *StepResult, s float64) *FileSection {
	if s > st.TipDepth || len(st.FileRadius) == 0 {
		return nil
	}
	at := func(v []float64) float64 {
		x := s / c.Line.DS
		i := min(max(0, int(math.Floor(x))), len(v)-1)
		if i+1 >= len(v) {
			return v[i]
		}
		f := x - float64(i)
		return v[i]*(1-f) + v[i+1]*f
	}
	// The file's diameter from its own law: exact where the tip lies between stations.
	fs := &FileSection{RadiusMM: st.Step.Instrument.Diameter(st.TipDepth-s) / 2}
	if len(st.Offset1) > 0 && len(st.Offset1) == len(st.Offset2) {
		fs.X, fs.Y = at(st.Offset1), at(st.Offset2)
	}
	return fs
}
