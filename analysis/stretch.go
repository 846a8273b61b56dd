package analysis

// Stretch is a part of a canal between two arc lengths from the orifice, mm.
type Stretch struct {
	From, To float64
}

// UnresolvedSummary states an unresolved stretch in outputs, measured from the apical end.
type UnresolvedSummary struct {
	FromApexMM float64 `json:"from_apex_mm"`
	ToApexMM   float64 `json:"to_apex_mm"`
}
