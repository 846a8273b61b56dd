package analysis_test

import (
	"context"
	"errors"
	"fmt"

	"tapersweep/analysis"
	"tapersweep/models"
)

func ExampleRun() {
	ctx := context.Background()
	c, err := analysis.LoadCanalBytes(ctx, "demo-canal.json", models.DemoCanalJSON(), analysis.LoadOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	seq, err := models.ParseSequence("demo-sequence.json", models.DemoSequenceJSON())
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := analysis.Run(ctx, c, seq, analysis.RunOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(res.Canal.Name)
	for _, st := range res.Steps {
		fmt.Printf("step %d: %s, tip %.2f mm from the orifice\n", st.Number, st.Metrics.Label, st.Metrics.TipDepthMM)
	}
	// Output:
	// demo lower molar, mesial canal (invented)
	// step 1: 15/.02, tip 17.50 mm from the orifice
	// step 2: 20/.04, tip 14.50 mm from the orifice
	// step 3: 25/.06, tip 16.50 mm from the orifice
	// step 4: 25/.04, tip 17.50 mm from the orifice
}

// A surface whose size says it is not in millimetres is refused with a typed error, so that a
// front-end can name its own way to rescale it.
func ExampleUnitsError() {
	m := models.DemoCanal().Mesh(0.5, 12)
	for i := range m.Vertices {
		m.Vertices[i] = m.Vertices[i].Mul(1000) // as if written in micrometres
	}
	_, err := analysis.NewCanal(context.Background(), "scan.stl", m, analysis.CanalOptions{})
	var units *analysis.UnitsError
	if errors.As(err, &units) && units.TooLarge() {
		fmt.Printf("%v: scale it by 0.001\n", err)
	}
	// Output:
	// scan.stl: the mesh spans 17886 units, far more than a tooth in mm: scale it by 0.001
}

// The step figures are described once; every table picks its columns from them.
func ExampleColumn() {
	for _, c := range analysis.PickColumns("engaged_length_mm", "fatigue_damage") {
		fmt.Printf("%s: %q, %d decimals in the JSON, %d shown\n", c.Key, c.Label, c.Digits, c.Shown)
	}
	// Output:
	// engaged_length_mm: "engaged length (cuts past the contact threshold), mm", 3 decimals in the JSON, 2 shown
	// fatigue_damage: "fatigue use (1 = fracture)", 5 decimals in the JSON, 3 shown
}
