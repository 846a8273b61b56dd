package segment

import (
	"math"
	"slices"
)

// otsu is the threshold that best separates two classes of values (Otsu N, IEEE Trans SMC
// 1979;9:62-66), from a histogram of 256 bins over the values' range.
func otsu(vals []float32) float64 {
	if len(vals) == 0 {
		return 0
	}
	lo, hi := float64(vals[0]), float64(vals[0])
	for _, v := range vals {
		lo, hi = math.Min(lo, float64(v)), math.Max(hi, float64(v))
	}
	if hi <= lo {
		return lo
	}
	const bins = 256
	var hist [bins]float64
	w := (hi - lo) / bins
	for _, v := range vals {
		hist[min(bins-1, int((float64(v)-lo)/w))]++
	}
	total := float64(len(vals))
	var sumAll float64
	for i, c := range hist {
		sumAll += float64(i) * c
	}
	best, bestVar := 0, -1.0
	var w0, sum0 float64
	for i := range bins - 1 {
		w0 += hist[i]
		sum0 += float64(i) * hist[i]
		w1 := total - w0
		if w0 == 0 || w1 == 0 {
			continue
		}
		m0, m1 := sum0/w0, (sumAll-sum0)/w1
		if v := w0 * w1 * (m0 - m1) * (m0 - m1); v > bestVar {
			best, bestVar = i, v
		}
	}
	return lo + float64(best+1)*w
}

// median of a slice (which it reorders); NaN when empty.
func median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	slices.Sort(v)
	return v[len(v)/2]
}

// percentile p (0..1) of a slice (which it reorders).
func percentile(v []float64, p float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	slices.Sort(v)
	return v[min(len(v)-1, int(p*float64(len(v))))]
}

// classLevels splits values by Otsu's threshold. The bright class's median is the dentine's
// level; the dark class holds the canal and the blurred edge around it, so its lowest tenth
// is the canal's own level.
func classLevels(vals []float32) (dark, bright, threshold float64) {
	t := otsu(vals)
	var lo, hi []float64
	for _, v := range vals {
		if float64(v) < t {
			lo = append(lo, float64(v))
		} else {
			hi = append(hi, float64(v))
		}
	}
	return percentile(lo, 0.1), median(hi), t
}
