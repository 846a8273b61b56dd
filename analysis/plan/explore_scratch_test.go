package plan

import (
	"context"
	"fmt"
	"testing"

	"tapersweep/analysis"
	"tapersweep/models"
)

func TestScratchExplore(t *testing.T) {
	curve, err := models.ParseCanalSpec("curve.json", []byte(`{"name":"r3 60","segments":[{"kind":"straight","length":10},{"kind":"arc","radius":3,"angle":60},{"kind":"straight","length":2}],"orifice_d":1.0,"apical_d":0.25}`))
	if err != nil {
		t.Fatal(err)
	}
	for _, spec := range []*models.CanalSpec{models.DemoCanal(), curve} {
		c, err := analysis.CanalFromSpec(context.Background(), "x", spec, analysis.CanalOptions{})
		if err != nil {
			t.Fatal(err)
		}
		cc := coarse(c, 0.2, 32)
		fmt.Println(spec.Name, c.WorkingLength, c.Line.Length(), c.Measures.DepartureS, c.Measures.MaxCurvatureS)
		for _, steps := range []string{
			`{"size":30,"taper":0.04,"depth":"WL"}`,
			`{"size":20,"taper":0.04,"depth":"WL"},{"size":25,"taper":0.04,"depth":"WL"},{"size":30,"taper":0.04,"depth":"WL"}`,
			`{"size":20,"taper":0.06,"depth":"WL-2"},{"size":25,"taper":0.04,"depth":"WL"},{"size":30,"taper":0.04,"depth":"WL"}`,
			`{"size":40,"taper":0.06,"depth":10},{"size":30,"taper":0.06,"depth":"WL-3"},{"size":25,"taper":0.06,"depth":"WL-1"},{"size":20,"taper":0.06,"depth":"WL"},{"size":25,"taper":0.05,"depth":"WL"},{"size":30,"taper":0.04,"depth":"WL"}`,
			`{"size":30,"taper":0.06,"depth":"WL-4"},{"size":25,"taper":0.06,"depth":"WL-2"},{"size":20,"taper":0.05,"depth":"WL"},{"size":30,"taper":0.04,"depth":"WL"}`,
			`{"size":15,"taper":0.02,"depth":"WL"},{"size":20,"taper":0.03,"depth":"WL"},{"size":25,"taper":0.02,"depth":"WL"},{"size":30,"taper":0.03,"depth":"WL"},{"size":25,"taper":0.05,"depth":"WL-1"},{"size":30,"taper":0.04,"depth":"WL"}`,
		} {
			seq, err := models.ParseSequence("s", []byte(`{"steps":[`+steps+`]}`))
			if err != nil {
				t.Fatal(err)
			}
			for _, can := range []*analysis.Canal{c, cc} {
				res, err := analysis.Run(context.Background(), can, seq, analysis.RunOptions{})
				if err != nil {
					t.Fatal(err)
				}
				var E, T, F float64
				line := ""
				for _, s := range res.Steps {
					m := s.Metrics
					E, T, F = max(E, m.EngagedLengthMM), max(T, m.PeakTorqueIndex), max(F, m.FatigueDamage)
					line += fmt.Sprintf(" [%s %.2f %.2f %.4f %.5f]", m.Label, m.TipDepthMM, m.EngagedLengthMM, m.PeakTorqueIndex, m.FatigueDamage)
				}
				fmt.Printf("  E %.2f T %.4f F %.5f |%s\n", E, T, F, line)
			}
		}
	}
}
