package models_test

import (
	"fmt"

	"tapersweep/models"
)

func ExampleParseSequence() {
	seq, err := models.ParseSequence("plan.json", []byte(`{"steps": [
		{"size": 20, "taper": 0.04, "depth": "WL-1"},
		{"size": 25, "taper": 0.06, "depth": "WL", "rpm": 300}]}`))
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, st := range seq.Steps {
		fmt.Printf("step %d: %s to %s at %g rpm\n", i+1, st.Instrument.Label(), st.Depth, st.RPM)
	}
	// A mistake names the file, the line where it can be seen, the step and the field.
	_, err = models.ParseSequence("plan.json", []byte(`{"steps": [{"size": 15, "size": 80, "taper": 0.04, "depth": "WL"}]}`))
	fmt.Println(err)
	// Output:
	// step 1: 20/.04 to WL-1 at 400 rpm
	// step 2: 25/.06 to WL at 300 rpm
	// plan.json:1:25: step 1: "size": given twice (first on line 1); a field may appear once
}

func ExampleParseCanalSpec() {
	spec, err := models.ParseCanalSpec("canal.json", []byte(`{"name": "example (invented)",
		"segments": [{"kind": "straight", "length": 10}, {"kind": "arc", "radius": 5, "angle": 30}],
		"orifice_d": 1.0, "apical_d": 0.3}`))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %.2f mm long, working length %.2f mm, %.2f mm wide at the orifice\n",
		spec.Name, spec.Length(), spec.WorkingLength(), spec.Diameter(0))
	// Output:
	// example (invented): 12.62 mm long, working length 12.62 mm, 1.00 mm wide at the orifice
}

func ExampleSequence_Validate() {
	seq := &models.Sequence{Name: "edited", PathModel: models.PathCentred,
		Steps: []models.Step{models.NewStep(models.NewInstrument(25, 0.6), models.DepthWL(0))}}
	fmt.Println(seq.Validate())
	// Output:
	// edited: step 1: taper: must be at most 0.2 mm per mm (got 0.6): no file is made that steep; .06 is written 0.06
}

func ExamplePrintable() {
	fmt.Println(models.Printable("canal \x1b[31m12\x1b[0m\nmesial", models.MaxNameRunes))
	// Output:
	// canal �[31m12�[0m mesial
}
