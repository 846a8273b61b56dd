package models

// catalogueTapers are the constant tapers of the generic catalogue.
var catalogueTapers = [...]float64{0.02, 0.03, 0.04, 0.05, 0.06, 0.07, 0.08, 0.10}

// CatalogueTapers returns the tapers the catalogue offers, ascending.
func CatalogueTapers() []float64 {
	out := make([]float64, len(catalogueTapers))
	copy(out, catalogueTapers[:])
	return out
}

// Catalogue returns a generic set of files: every ISO size from 06 to 140 in every catalogue
// taper, ordered by size and then taper, each with the defaults of NewInstrument.
func Catalogue() []Instrument {
	out := make([]Instrument, 0, len(isoSizes)*len(catalogueTapers))
	for _, size := range isoSizes {
		for _, taper := range catalogueTapers {
			out = append(out, NewInstrument(size, taper))
		}
	}
	return out
}
