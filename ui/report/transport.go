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

// level names a transportation level as the JSON keys it ("1" for 1 mm).
func level(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }

// transportLevelsNote says what the levels and the ratio mean, wherever the rows are printed.
const transportLevelsNote = "Gambill et al. (J Endod 1996): wall removed on one side against the opposite side, in and " +
	"across the plane of the main curve; a centring ratio of 1 is centred; directions in degrees about the axis from " +
	"the inner side of the main curve."

// transportRows lists transportation and centring at each level, the foramen shift and the
// largest transportation with its place and direction.
var transportRows = func() []transportRow {
	var rows []transportRow
	for _, x := range analysis.TransportLevels {
		key := level(x)
		rows = append(rows, transportRow{"transportation at " + key + " mm, mm",
			func(tr analysis.Transport) string { return mm3(tr.TransportationMM[key]) }})
	}
	for _, x := range analysis.TransportLevels {
		key := level(x)
		rows = append(rows, transportRow{"centring ratio at " + key + " mm",
			func(tr analysis.Transport) string { return ratio(tr.CenteringRatio[key]) }})
	}
	return append(rows,
		transportRow{"apical foramen shift, mm", func(tr analysis.Transport) string { return mm3(tr.ForamenShiftMM) }},
		transportRow{"largest transportation, mm", func(tr analysis.Transport) string { return mm3(tr.Largest.MM) }},
		transportRow{"  its place, mm from apical end", func(tr analysis.Transport) string {
			if tr.Largest.MM == 0 {
				return "–"
			}
			return fixed(tr.Largest.FromApexMM, 2)
		}},
		transportRow{"  its direction (0° = inner side)", func(tr analysis.Transport) string {
			if tr.Largest.MM == 0 {
				return "–"
			}
			return deg(tr.Largest.TowardDeg) + "° " + sideWord(tr.Largest.TowardDeg)
		}},
	)
}()

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

// transportPairs states a Transport as label/value pairs.
func transportPairs(tr analysis.Transport) [][2]string {
	out := make([][2]string, len(transportRows))
	for i, r := range transportRows {
		out[i] = [2]string{r.label, r.value(tr)}
	}
	return out
}

// summaryTransportRows are the same measures folded into fewer rows for the summary page's
// table: the three levels side by side.
var summaryTransportRows = []transportRow{
	{"transportation at 1 / 3 / 5 mm, mm", func(tr analysis.Transport) string {
		return levels(func(k string) string { return mm3(tr.TransportationMM[k]) })
	}},
	{"centring ratio at 1 / 3 / 5 mm", func(tr analysis.Transport) string {
		return levels(func(k string) string { return ratio(tr.CenteringRatio[k]) })
	}},
	{"apical foramen shift, mm", func(tr analysis.Transport) string { return mm3(tr.ForamenShiftMM) }},
	{"largest, mm (mm from apex, toward)", func(tr analysis.Transport) string {
		if tr.Largest.MM == 0 {
			return "0"
		}
		return mm3(tr.Largest.MM) + " (" + fixed(tr.Largest.FromApexMM, 2) + ", " + deg(tr.Largest.TowardDeg) + "° " +
			sideWord(tr.Largest.TowardDeg) + ")"
	}},
}

// levels joins a value per transportation level with " / ".
func levels(value func(key string) string) string {
	out := ""
	for i, x := range analysis.TransportLevels {
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
	if tr.Largest.MM > 0 {
		s += fmt.Sprintf("; the largest, %s mm, lies %s mm from the apical end toward %s° (%s side)",
			mm3(tr.Largest.MM), fixed(tr.Largest.FromApexMM, 2), deg(tr.Largest.TowardDeg), sideWord(tr.Largest.TowardDeg))
	}
	return s + "."
}
