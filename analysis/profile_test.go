package analysis_test

import (
	"context"
	"math"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
)

// TestProfileOfAStraightCone checks the profiles against analytic geometry: in a straight
// round cone the canal's diameter narrows linearly from the orifice to the apical end (the spec's
// diameters), a file of tip size d0 and taper k with its tip at depth D has the diameter
// d0 + k (D - s) at arc length s, and a straight canal bends nothing.
func TestProfileOfAStraightCone(t *testing.T) {
	ex := models.ExampleCanals()[0]
	if ex.File != "straight" {
		t.Fatalf("the first example canal is %s, not the straight cone", ex.File)
	}
	ctx := context.Background()
	c, err := analysis.CanalFromSpec(ctx, ex.File, ex.Spec, analysis.CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	seq, err := models.ParseSequence("seq", []byte(`{"steps": [{"size": 30, "taper": 0.04, "depth": "WL-1"}]}`))
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Run(ctx, c, seq, analysis.RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	st := res.Steps[0]
	pr := analysis.ProfileOf(c, st)
	L, D := c.Line.Length(), st.TipDepth
	n := c.Line.Len()
	if len(pr.FromApexMM) != n || pr.FromApexMM[0] != L || pr.FromApexMM[n-1] != 0 {
		t.Fatalf("distance from the apical end runs %v..%v over %d stations, want %v..0 over %d",
			pr.FromApexMM[0], pr.FromApexMM[len(pr.FromApexMM)-1], len(pr.FromApexMM), L, n)
	}
	for i := 0; i < n; i++ {
		s := c.Line.S[i]
		if s < 0.5 || s > L-0.5 { // the ends are capped
			continue
		}
		want := ex.Spec.Diameter(s)
		// A 96-gon inscribed in the circle and a radius map of 128 directions: within 2 %.
		if math.Abs(pr.CanalNarrowDMM[i]-want) > 0.02*want || math.Abs(pr.CanalWideDMM[i]-want) > 0.02*want {
			t.Fatalf("s %.2f: canal diameter %.4f..%.4f, want %.4f", s, pr.CanalNarrowDMM[i], pr.CanalWideDMM[i], want)
		}
		if s < D-0.1 && D-s < 10 {
			wantFile := 0.30 + 0.04*(D-s)
			if math.Abs(pr.FileDMM[i]-wantFile) > 0.005 {
				t.Fatalf("s %.2f: file diameter %.4f, want %.4f", s, pr.FileDMM[i], wantFile)
			}
			// Depth of cut where the file is wider than the canal: (d_file - d_canal)/2.
			if over := (wantFile - want) / 2; over > 0.02 && math.Abs(pr.DeepestCutMM[i]-over) > 0.01 {
				t.Fatalf("s %.2f: deepest cut %.4f, want %.4f", s, pr.DeepestCutMM[i], over)
			}
		}
		if s > D+0.1 && pr.FileDMM[i] != 0 {
			t.Fatalf("s %.2f beyond the tip: file diameter %.4f", s, pr.FileDMM[i])
		}
	}
	for k, e := range pr.StrainPct {
		if e > 0.2 { // the extracted centerline keeps a trace of curvature; a 10 mm bend gives 2.5 % at 0.5 mm
			t.Fatalf("%.2f mm from the tip: strain %.3f %% in a straight canal", pr.FromTipMM[k], e)
		}
	}
}

// The engaged zone of the profile is the step's own (engaged_from_tip_mm above its tip), and the
// canal alone has no step's series.
func TestProfileEngagedZoneAndCanalAlone(t *testing.T) {
	ctx := context.Background()
	c, err := analysis.CanalFromSpec(ctx, "demo", models.DemoCanal(), analysis.CanalOptions{})
	if err != nil {
		t.Fatal(err)
	}
	seq, err := models.ParseSequence("demo", models.DemoSequenceJSON())
	if err != nil {
		t.Fatal(err)
	}
	res, err := analysis.Run(ctx, c, seq, analysis.RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	L := c.Line.Length()
	for _, st := range res.Steps {
		pr := analysis.ProfileOf(c, st)
		m := st.Metrics
		if m.EngagedLengthMM == 0 {
			continue
		}
		if got, want := pr.EngagedFromApexMM[1]-pr.EngagedFromApexMM[0], m.EngagedFromTipMM[1]-m.EngagedFromTipMM[0]; math.Abs(got-want) > 1e-9 {
			t.Errorf("step %d: engaged zone %.3f mm long in the profile, %.3f in the metrics", st.Number, got, want)
		}
		if tip := L - st.TipDepth; pr.EngagedFromApexMM[0] < tip-1e-9 {
			t.Errorf("step %d: engaged zone starts %.3f mm from the apical end, below the tip at %.3f", st.Number, pr.EngagedFromApexMM[0], tip)
		}
	}
	alone := analysis.ProfileOf(c, nil)
	if alone.Step != 0 || alone.FileDMM != nil || len(alone.CurvaturePerMM) != c.Line.Len() {
		t.Errorf("canal alone: step %d, file %v, %d curvatures", alone.Step, alone.FileDMM != nil, len(alone.CurvaturePerMM))
	}
}
