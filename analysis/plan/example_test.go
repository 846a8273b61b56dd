package plan_test

import (
	"fmt"

	"tapersweep/analysis/plan"
)

func ExampleParseTarget() {
	for _, s := range []string{"30/.04", "25/06", "30/0.6"} {
		t, err := plan.ParseTarget(s)
		if err != nil {
			fmt.Println(err)
			continue
		}
		fmt.Printf("%s: size %d, taper %g\n", t.Label(), t.Size, t.Taper)
	}
	// Output:
	// 30/.04: size 30, taper 0.04
	// 25/.06: size 25, taper 0.06
	// target "30/0.6": the taper must be above 0 and at most 0.2 mm per mm
}
