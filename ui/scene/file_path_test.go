package scene

import (
	"context"
	"math"
	"testing"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/models"
)

// elasticDemo runs the demo sequence with the file as a bending beam.
func elasticDemo(t *testing.T) (*analysis.Canal, *analysis.Result) {
	t.Helper()
	c, _ := demo(t)
	seq, err := models.ParseSequence("demo", models.DemoSequenceJSON())
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Run(context.Background(), c, seq, analysis.RunOptions{PathModel: models.PathElastic})
	if err != nil {
		t.Fatal(err)
	}
	return c, res
}

// ringCentre is the mean of ring k's vertices: the tube's axis there (the grooves have three-
// and six-fold symmetry, which a ring of fileAround points averages out exactly).
func ringCentre(m tube, k int) mgl64.Vec3 {
	var sum mgl64.Vec3
	r := m.ring(k)
	for _, v := range r {
		sum = sum.Add(v)
	}
	return sum.Mul(1 / float64(len(r)))
}

type tube struct{ v []mgl64.Vec3 }

func (t tube) ring(k int) []mgl64.Vec3 { return t.v[k*fileAround : (k+1)*fileAround] }

// TestFileIsDrawnOnItsOwnPath: with the elastic path, the file's axis near the tip sits at
// centerline + Offset1*N1 + Offset2*N2 of the analysis (the offset's definition in
// analysis.StepResult), not on the centerline; the centred drawing keeps its axis on the
// centerline. Rings are compared with the station nearest to them, so the tolerance is the
// change of the offset over half a station plus rounding.
func TestFileIsDrawnOnItsOwnPath(t *testing.T) {
	c, res := elasticDemo(t)
	// The step whose file sits farthest off the centerline at its tip.
	var st *analysis.StepResult
	far := 0.0
	for _, s := range res.Steps {
		if n := len(s.Offset1); n > 0 {
			if d := math.Hypot(s.Offset1[n-1], s.Offset2[n-1]); d > far {
				st, far = s, d
			}
		}
	}
	if st == nil || far < 0.005 {
		t.Fatalf("no step of the elastic demo leaves the centerline at its tip by 5 µm or more (largest %.4f mm)", far)
	}
	in := st.Step.Instrument
	onPath := tube{FileMeshOnPath(c, in, st.TipDepth, st.Offset1, st.Offset2).Vertices}
	centred := tube{FileMesh(c, in, st.TipDepth).Vertices}
	length := math.Min(in.CuttingLength+fileAbove, st.TipDepth+fileAbove)
	rings := (len(onPath.v) - 2) / fileAround
	checked := 0
	for k := 0; k < rings; k++ {
		u := length * float64(k) / float64(rings-1)
		if u > 1 {
			break // the first millimetre from the tip
		}
		s := st.TipDepth - u
		i := min(c.Line.Station(s), len(st.Offset1)-1)
		p, _, n1, n2 := c.Line.At(s)
		want := p.Add(n1.Mul(st.Offset1[i])).Add(n2.Mul(st.Offset2[i]))
		tol := 1e-4
		if i > 0 {
			tol += math.Hypot(st.Offset1[i]-st.Offset1[i-1], st.Offset2[i]-st.Offset2[i-1])
		}
		if d := ringCentre(onPath, k).Sub(want).Len(); d > tol {
			t.Errorf("ring %.2f mm from the tip: axis %.4f mm from centerline + offset (tolerance %.4f)", u, d, tol)
		}
		off := math.Hypot(st.Offset1[i], st.Offset2[i])
		if d := ringCentre(onPath, k).Sub(p).Len(); off > 0.005 && d < 0.5*off {
			t.Errorf("ring %.2f mm from the tip: axis only %.4f mm off the centerline, the offset is %.4f", u, d, off)
		}
		if d := ringCentre(centred, k).Sub(p).Len(); d > 1e-6 {
			t.Errorf("centred file, ring %.2f mm from the tip: axis %.6f mm off the centerline", u, d)
		}
		checked++
	}
	if checked < 10 {
		t.Fatalf("only %d rings checked", checked)
	}

	// The scene draws the file on its path with the centerline beside it; a centred run does not.
	b, err := Build(c, res, Options{Step: st.Number})
	if err != nil {
		t.Fatal(err)
	}
	if !b.OwnPath || b.CenterlineIndex < 0 {
		t.Errorf("elastic step: own path %v, centerline index %d", b.OwnPath, b.CenterlineIndex)
	}
	if got := b.File.Vertices[0]; got != onPath.v[0] {
		t.Errorf("the scene's file is not the one on the path: first vertex %v, want %v", got, onPath.v[0])
	}
	cc, centredRes := demo(t)
	b, err = Build(cc, centredRes, Options{Step: st.Number})
	if err != nil {
		t.Fatal(err)
	}
	if b.OwnPath || b.CenterlineIndex >= 0 {
		t.Errorf("centred step: own path %v, centerline index %d; the centred drawing must stay as it was", b.OwnPath, b.CenterlineIndex)
	}
}
