package models

import (
	"reflect"
	"testing"
)

func TestCatalogue(t *testing.T) {
	c := Catalogue()
	sizes, tapers := ISOSizes(), CatalogueTapers()
	if len(c) != len(sizes)*len(tapers) {
		t.Fatalf("catalogue has %d files, want %d sizes x %d tapers", len(c), len(sizes), len(tapers))
	}
	seen := map[string]bool{}
	for i, in := range c {
		// Ordered by size, then taper; every size on the ISO 3630-1 list.
		if want := sizes[i/len(tapers)]; in.Size != want {
			t.Errorf("entry %d size %d, want %d", i, in.Size, want)
		}
		if want := tapers[i%len(tapers)]; in.Taper != want {
			t.Errorf("entry %d taper %g, want %g", i, in.Taper, want)
		}
		if seen[in.Label()] {
			t.Errorf("label %s twice", in.Label())
		}
		seen[in.Label()] = true
		// The tip is never cut by the flute cap (d0 = size/100, ISO 3630-1).
		if in.Diameter(0) != in.TipDiameter() {
			t.Errorf("%s: tip %g, want %g", in.Label(), in.Diameter(0), in.TipDiameter())
		}
	}
	if !reflect.DeepEqual(c, Catalogue()) {
		t.Error("catalogue differs between calls")
	}
}
