package report

import (
	"fmt"
	"math"
	"strconv"

	"tapersweep/analysis"
)

// transportRow is one of Gambill's measures (Gambill JM, Alder M, del Rio CE, J Endod
// 1996;22:369-375) as the report prints it, from a step's or the whole sequence's Transport.
type transportRow struct {
	label string
	value func(tr analysis.Transport) string
}

// Gambill's measures are printed to the micrometre and the centring ratio to two decimals: the
// radius map does not place the wall more finely.
func mm3(v float64) string { return fixed(v, 3) }

func ratio(v *float64) string {
	if v == nil {
		return "–"
	}
	return fixed(*v, 2)
}

func deg(v float64) string { return fixed(v, 0) }

// signed prints a directional transportation with its sign ("+0.012", "-0.004", "0.000").
func signed(v float64) string {
	s := mm3(v)
	if s != mm3(0) && s[0] != '-' {
		s = "+" + s
	}
	return s
}

// level names a transportation level as the JSON keys it ("1" for 1 mm).
func level(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }

// transportLevelsNote says what the levels and the ratio mean, wherever the rows are printed.
const transportLevelsNote = "Gambill et al. (J Endod 1996): wall removed on one side against the opposite side, in and " +
	"across the plane of the main curve; a centring ratio of 1 is centred; directions in degrees about the axis from " +
	"the inner side of the main curve."

// sideWord names a direction about the canal's axis: 0° is the inner side of the main curve
// (the centerline's N1 at its tightest bend), 180° the outer side.
func sideWord(deg float64) string {
	d := math.Mod(deg, 360)
	if d < 0 {
		d += 360
	}
	switch {
	case d <= 45 || d >= 315:
		return "inner"
	case d >= 135 && d <= 225:
		return "outer"
	}
	return "across"
}

// transportPairs states a Transport as label/value pairs, as the step pages print it: the
// summary's rows with the signed parts in and across the plane of the main curve under the
// size.
func transportPairs(tr analysis.Transport) [][2]string {
	var out [][2]string
	for i, r := range summaryTransportRows {
		out = append(out, [2]string{r.label, r.value(tr)})
		if i == 0 {
			for _, d := range directionalRows {
				out = append(out, [2]string{d.label, d.value(tr)})
			}
		}
	}
	return out
}

// directionalRows are the transportation's signed parts, on the step pages.
var directionalRows = []transportRow{
	{"  in the curve's plane (+ inner side), mm", func(tr analysis.Transport) string {
		return levels(func(k string) string { return signed(tr.TransportationInPlaneMM[k]) })
	}},
	{"  across it (+ toward 90°), mm", func(tr analysis.Transport) string {
		return levels(func(k string) string { return signed(tr.TransportationAcrossMM[k]) })
	}},
}

// summaryTransportRows are Gambill's measures with the three levels side by side in each row
// (the summary's table and the step pages): the size, the centring ratio, the foramen shift
// and the largest transportation with its place and direction.
var summaryTransportRows = []transportRow{
	{"transportation at 1 / 3 / 5 mm, mm", func(tr analysis.Transport) string {
		return levels(func(k string) string { return mm3(tr.TransportationMM[k]) })
	}},
	{"centring ratio at 1 / 3 / 5 mm", func(tr analysis.Transport) string {
		return levels(func(k string) string { return ratio(tr.CenteringRatio[k]) })
	}},
	{"apical foramen shift, mm", func(tr analysis.Transport) string { return mm3(tr.ForamenShiftMM) }},
	{"largest, mm (mm from apex, toward)", func(tr analysis.Transport) string {
		if mm3(tr.Largest.MM) == mm3(0) {
			return "0" // under a micrometre: no place or direction to speak of
		}
		return mm3(tr.Largest.MM) + " (" + fixed(tr.Largest.FromApexMM, 2) + ", " + deg(tr.Largest.TowardDeg) + "° " +
			sideWord(tr.Largest.TowardDeg) + ")"
	}},
}

// levels joins a value per transportation level with " / ".
func levels(value func(key string) string) string {
	out := ""
	for i, x := range analysis.TransportLevels() {
		if i > 0 {
			out += " / "
		}
		out += value(level(x))
	}
	return out
}

// transportSentence states a Transport in one paragraph.
func transportSentence(tr analysis.Transport) string {
	s := fmt.Sprintf("Transportation at 1, 3 and 5 mm from the apical end: %s mm; centring ratio %s; apical foramen shift %s mm",
		levels(func(k string) string { return mm3(tr.TransportationMM[k]) }),
		levels(func(k string) string { return ratio(tr.CenteringRatio[k]) }), mm3(tr.ForamenShiftMM))
	if mm3(tr.Largest.MM) != mm3(0) {
		s += fmt.Sprintf("; the largest, %s mm, lies %s mm from the apical end toward %s° (%s side)",
			mm3(tr.Largest.MM), fixed(tr.Largest.FromApexMM, 2), deg(tr.Largest.TowardDeg), sideWord(tr.Largest.TowardDeg))
	}
	return s + "."
}
