package analysis

import (
	"math"

	"tapersweep/models"
)

// DefaultWallStiffness k_w, N/mm2: the dentine's resistance to being pushed aside by the file,
// as a foundation under a beam. An illustrative setting: offsets scale with (E I / k_w)^(1/2)
// and the comparisons between files and alloys hold whatever its value.
const DefaultWallStiffness = 1000.0

// elasticPath is the file's own axis with its tip at a given depth: its offset from the
// centerline at each station (components along N1 and N2) and its curvature.
type elasticPath struct {
	o1, o2 []float64 // mm, stations 0..tip
	k      []float64 // 1/mm, curvature of the file's axis
}

// solveElasticPath treats the file as a beam on an elastic foundation in the canal's frames:
// its offset delta(s) minimises the bending energy integral of E I(u) |k_c + delta”|^2 plus
// the wall term k_w |delta|^2 (for small offsets the path's curvature vector is the
// centerline's plus delta” in a parallel-transported frame, so the two components decouple).
// The file is held at the orifice in line with the canal (delta = delta' = 0) and its tip is
// free (zero moment and shear follow from the energy). One banded (pentadiagonal) solve per
// component; afterwards the axis is kept inside the canal as prepared so far.
func solveElasticPath(c *Canal, in models.Instrument, eGPa, kw, D float64, tip int, prepared []float32) elasticPath {
	line := c.Line
	n := tip + 1
	p := elasticPath{o1: make([]float64, n), o2: make([]float64, n), k: make([]float64, n)}
	for i := 0; i < n; i++ {
		p.k[i] = line.K[i]
	}
	if n < 4 || eGPa <= 0 || kw <= 0 {
		return p
	}
	h := line.DS
	ei := make([]float64, n)
	for i := range ei {
		ei[i] = eGPa * 1000 * in.SecondMoment(math.Max(0, D-line.S[i])) // N*mm2
	}
	kws := make([]float64, n)
	for i := range kws {
		kws[i] = kw
	}
	solveComponent(ei, line.KN1[:n], kws, h, p.o1)
	solveComponent(ei, line.KN2[:n], kws, h, p.o2)
	// Where the axis would leave the canal as prepared so far, the wall there is stiffened in
	// proportion and the beam solved once more (two banded solves, no contact iteration).
	limit := make([]float64, n)
	again := false
	for i := 0; i < n; i++ {
		m := math.Hypot(p.o1[i], p.o2[i])
		limit[i] = c.MapAt(prepared, line.S[i], math.Atan2(p.o2[i], p.o1[i]))
		if m > limit[i] && limit[i] > 0 {
			kws[i] = kw * math.Pow(m/limit[i], 4)
			again = true
		}
	}
	if again {
		solveComponent(ei, line.KN1[:n], kws, h, p.o1)
		solveComponent(ei, line.KN2[:n], kws, h, p.o2)
	}
	// Strain follows the beam's own shape; the axis is then kept inside the canal.
	for i := 1; i < n-1; i++ {
		k1 := line.KN1[i] + (p.o1[i+1]-2*p.o1[i]+p.o1[i-1])/(h*h)
		k2 := line.KN2[i] + (p.o2[i+1]-2*p.o2[i]+p.o2[i-1])/(h*h)
		p.k[i] = math.Hypot(k1, k2)
	}
	for i := 0; i < n; i++ {
		if m := math.Hypot(p.o1[i], p.o2[i]); m > limit[i] {
			f := math.Max(0, limit[i]) / m
			p.o1[i] *= f
			p.o2[i] *= f
		}
	}
	p.k[n-1] = p.k[n-2]
	return p
}

// solveComponent minimises sum_j c_j (h^2 kappa_j + d_{j+1} - 2 d_j + d_{j-1})^2 + sum_i kw_i h d_i^2
// with c_j = EI_j / h^3 and d_0 = d_1 = 0, writing d into out.
func solveComponent(ei, kappa, kw []float64, h float64, out []float64) {
	n := len(ei)
	// Unknowns d_2..d_{n-1}; band storage: diag, first and second off-diagonals.
	m := n - 2
	a0 := make([]float64, m)
	a1 := make([]float64, m)
	a2 := make([]float64, m)
	b := make([]float64, m)
	v := [3]float64{1, -2, 1}
	for j := 1; j <= n-2; j++ { // second difference centred on j touches j-1, j, j+1
		cj := ei[j] / (h * h * h)
		rhs := -cj * h * h * kappa[j]
		for a := 0; a < 3; a++ {
			ia := j - 1 + a - 2 // unknown index
			if ia < 0 {
				continue
			}
			b[ia] += rhs * v[a]
			for q := a; q < 3; q++ {
				iq := j - 1 + q - 2
				if iq < 0 {
					continue
				}
				switch iq - ia {
				case 0:
					a0[ia] += cj * v[a] * v[q]
				case 1:
					a1[ia] += cj * v[a] * v[q]
				case 2:
					a2[ia] += cj * v[a] * v[q]
				}
			}
		}
	}
	for i := range a0 {
		a0[i] += kw[i+2] * h
	}
	// Banded LDL^T (bandwidth 2).
	d := make([]float64, m)
	l1 := make([]float64, m) // L[i+1][i]
	l2 := make([]float64, m) // L[i+2][i]
	for i := 0; i < m; i++ {
		di := a0[i]
		if i >= 1 {
			di -= l1[i-1] * l1[i-1] * d[i-1]
		}
		if i >= 2 {
			di -= l2[i-2] * l2[i-2] * d[i-2]
		}
		d[i] = di
		if i+1 < m {
			x := a1[i]
			if i >= 1 {
				x -= l2[i-1] * l1[i-1] * d[i-1]
			}
			l1[i] = x / di
		}
		if i+2 < m {
			l2[i] = a2[i] / di
		}
	}
	y := make([]float64, m)
	for i := 0; i < m; i++ {
		y[i] = b[i]
		if i >= 1 {
			y[i] -= l1[i-1] * y[i-1]
		}
		if i >= 2 {
			y[i] -= l2[i-2] * y[i-2]
		}
	}
	for i := m - 1; i >= 0; i-- {
		x := y[i] / d[i]
		if i+1 < m {
			x -= l1[i] * out[i+3]
		}
		if i+2 < m {
			x -= l2[i] * out[i+4]
		}
		out[i+2] = x
	}
	out[0], out[1] = 0, 0
}
