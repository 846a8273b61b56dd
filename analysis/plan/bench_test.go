package plan

import (
	"context"
	"testing"

	"tapersweep/models"
)

// sixtyInstruments is a shelf of 60 files: ISO sizes 15 to 60 in tapers .02 to .07.
func sixtyInstruments() []models.Instrument {
	var out []models.Instrument
	for _, size := range []int{15, 20, 25, 30, 35, 40, 45, 50, 55, 60} {
		for _, taper := range []float64{0.02, 0.03, 0.04, 0.05, 0.06, 0.07} {
			out = append(out, models.NewInstrument(size, taper))
		}
	}
	return out
}

// BenchmarkPlan60x8 plans the demo canal from 60 instruments in up to 8 steps, the coarse
// canal, the search and the full-resolution re-check included. Target: <= 5 s per plan on
// 2 cores. The canal is measured once beforehand (its own cost is benchmarked in analysis);
// the search's cost depends on the canal's length and the instruments, not on its triangles.
func BenchmarkPlan60x8(b *testing.B) {
	demo, _ := testCanals(b)
	ins := sixtyInstruments()
	if len(ins) != 60 {
		b.Fatalf("%d instruments", len(ins))
	}
	opt := Options{Target: Target{Size: 30, Taper: 0.04}, Instruments: ins, MaxSteps: 8}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		pl, err := Propose(context.Background(), demo, opt)
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(len(pl.Sequence.Steps)), "steps")
	}
}

// BenchmarkPlan60x8KeepWall is BenchmarkPlan60x8 with a wall of 0.3 mm to keep, in a canal
// whose root has a groove where wide openers pass (coronalGrooveJSON): the wall measured once
// on the coarse canal, each candidate tested against it, three times as many plans re-checked
// with the wall at full resolution. Same target: <= 5 s per plan on 2 cores.
func BenchmarkPlan60x8KeepWall(b *testing.B) {
	c := coronalGrooveCanal(b)
	opt := Options{Target: Target{Size: 30, Taper: 0.04}, Instruments: sixtyInstruments(), MaxSteps: 8, KeepWallMM: 0.3}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		pl, err := Propose(context.Background(), c, opt)
		if err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(float64(len(pl.Sequence.Steps)), "steps")
	}
}
