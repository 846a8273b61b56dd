package analysis

import (
	"math"
	"math/bits"

	"tapersweep/models"
)

// DefaultWallStiffness k_w, N/mm2: the dentine's resistance to being pushed aside by the file,
// per mm of the file's length and mm of push where its whole circumference presses on the wall.
// An illustrative setting: the comparisons between files and alloys hold whatever its value.
const DefaultWallStiffness = 1000.0

// elasticPath is the file's own axis with its tip at a given depth: its offset from the
// centerline at each station (components along N1 and N2) and its curvature.
type elasticPath struct {
	o1, o2 []float64 // mm, stations 0..tip
	k      []float64 // 1/mm, curvature of the file's axis
}

// contactDirections is how many directions around each station the contact with the wall is
// summed over (every few directions of the radius map).
const contactDirections = 16

// offsetTolerance, mm: the contact iteration stops when a round moves the file by less (a
// direction whose contact flips that late carries almost no force).
const offsetTolerance = 1e-5

// maxContactRounds bounds the active-set iteration (it settles in a few rounds).
const maxContactRounds = 30

// pathEvery: the schedule's fatigue solves the beam with the tip at every pathEvery-th station
// (0.8 mm) and blends the damage rates of the two solves on either side of the tip; on two test
// canals this stays within a few percent of a solve at every station (TestElasticFatigueBlend).
var pathEvery = 16

// pathStride: those solves take every second station (0.1 mm), the file at its target every one.
var pathStride = 2

// elasticSolver finds the file's own path in the canal as one step meets it: the file is a beam
// (Euler-Bernoulli) whose offset delta(s) from the centerline minimises
//
//	1/2 int E I(u) |k_c + delta''|^2 ds + 1/2 int (k_w/pi) int_theta p(theta)^2 dtheta ds,
//	p(theta) = max(0, delta . e_theta + r - rho(theta)),
//
// the bending energy (for small offsets the path's curvature vector is the centerline's plus
// the second derivative of delta in the parallel-transported frame) and a one-sided, gap-aware contact with the wall:
// the file's surface, reaching delta . e_theta + r from the centerline in direction theta, presses
// only where it passes the wall rho(theta) of the canal as prepared so far, and nowhere else.
// Where the file passes the wall all round the contact acts as a foundation of stiffness k_w.
// The file is held at the orifice in line with the canal (delta = delta' = 0), its tip free.
//
// Given which directions press (the active set), the energy is quadratic: one banded solve of
// both components together. The set is found by iterating (an active-set, semi-smooth Newton
// method) until it stops changing; a solve starts from the previous one's offsets, so the
// schedule's many tip positions, taken deepest last, need a round or two each.
type elasticSolver struct {
	c        *Canal
	in       models.Instrument
	eMPa, kw float64 // N/mm2
	prepared []float32
	// The contact directions (every few directions of the radius map) and the wall there, per
	// station: wall[i*m+q].
	cos, sin []float64
	dTheta   float64
	wall     []float64
	minWall  []float64 // the nearest wall of each station
	// Work space for up to the whole line.
	// Per node of a solve (every stride-th station): stiffness, the file's radius, the
	// centerline's curvature vector, the node's station, offsets and curvature.
	ei, r, k1, k2 []float64
	node          []int
	d1, d2, kn    []float64
	sums          []contactSums
	f1, f2        []float64 // offsets of the last solve per station (the next one's start)
	solved        int       // stations of the last solve
	bendA, bendB  []float64 // the bending part of the banded system
	a, b, x       []float64
	band          bandFactor
	// The pressing directions of each node, a bit per direction in maskWords words: this
	// round's and the last round's.
	pressing, pressed []uint64
	maskWords         int
	lsP, lsS          []float64 // the line search's pressing directions
	solves, rounds    int       // solves so far and their contact rounds (for tests of the speed-up)
}

// newElasticSolver makes the work space of the solves on canal c with wall stiffness kw; prepare
// sets the file and the wall before solving.
func newElasticSolver(c *Canal, kw float64) *elasticSolver {
	n := c.Line.Len()
	es := &elasticSolver{c: c, kw: kw}
	stride := 1
	if c.Angles > contactDirections && c.Angles%contactDirections == 0 {
		stride = c.Angles / contactDirections
	}
	m := c.Angles / stride
	es.dTheta = 2 * math.Pi / float64(m)
	es.cos, es.sin = make([]float64, m), make([]float64, m)
	for q := range es.cos {
		es.cos[q], es.sin[q] = math.Cos(float64(q)*es.dTheta), math.Sin(float64(q)*es.dTheta)
	}
	es.wall, es.minWall = make([]float64, n*m), make([]float64, n)
	es.ei, es.r, es.k1, es.k2 = make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	es.node, es.sums = make([]int, n), make([]contactSums, n)
	es.d1, es.d2, es.kn = make([]float64, n), make([]float64, n), make([]float64, n)
	es.f1, es.f2 = make([]float64, n), make([]float64, n)
	N := 2 * n
	es.bendA, es.a = make([]float64, N*bandW), make([]float64, N*bandW)
	es.bendB, es.b, es.x = make([]float64, N), make([]float64, N), make([]float64, N)
	es.band = newBandFactor(N)
	es.maskWords = (m + 63) / 64
	es.pressing, es.pressed = make([]uint64, n*es.maskWords), make([]uint64, n*es.maskWords)
	return es
}

// prepare sets the file in of elastic modulus eGPa and the wall of the canal as prepared so far
// (a radius map); the solves that follow start afresh.
func (es *elasticSolver) prepare(in models.Instrument, eGPa float64, prepared []float32) *elasticSolver {
	c := es.c
	es.in, es.eMPa, es.prepared = in, eGPa*1000, prepared
	m := len(es.cos)
	stride := c.Angles / m
	for i := range es.minWall {
		row := prepared[i*c.Angles : (i+1)*c.Angles]
		lo := math.Inf(1)
		for q := 0; q < m; q++ {
			w := float64(row[q*stride])
			es.wall[i*m+q] = w
			lo = min(lo, w)
		}
		es.minWall[i] = lo
	}
	es.solved = 0
	return es
}

// Half-bandwidth of the system: unknowns are interleaved (station, component), the bending term
// couples stations two apart (4 places) and the contact the two components of one station.
const (
	halfBand = 4
	bandW    = halfBand + 1
)

// path returns the file's path with its tip at depth D, at station tip, the beam solved at
// every station.
func (es *elasticSolver) path(D float64, tip int) elasticPath {
	c, line := es.c, es.c.Line
	n := tip + 1
	p := elasticPath{k: es.solve(D, tip, 1), o1: make([]float64, n), o2: make([]float64, n)}
	if es.solvable(n) {
		copy(p.o1, es.f1[:n])
		copy(p.o2, es.f2[:n])
	}
	// The axis itself stays inside the canal as prepared (the contact keeps it there unless the
	// wall is set very soft).
	for i := 0; i < n; i++ {
		mag := math.Hypot(p.o1[i], p.o2[i])
		if mag <= es.minWall[i] {
			continue
		}
		if lim := c.MapAt(es.prepared, line.S[i], math.Atan2(p.o2[i], p.o1[i])); mag > lim {
			f := math.Max(0, lim) / mag
			p.o1[i] *= f
			p.o2[i] *= f
		}
	}
	return p
}

// solvable reports whether a beam of n stations is solved (else the file follows the centerline).
func (es *elasticSolver) solvable(n int) bool { return n >= 4 && es.eMPa > 0 && es.kw > 0 }

// solve solves the beam with its tip at depth D, at station tip, at every stride-th station (1
// or 2; the path between is interpolated, its curvature too). It returns the curvature of the
// file's axis at every station up to the tip and leaves its offsets there in f1, f2 (the next
// solve's start).
func (es *elasticSolver) solve(D float64, tip, stride int) []float64 {
	line := es.c.Line
	n := tip + 1
	k := make([]float64, n)
	copy(k, line.K[:n])
	if !es.solvable(n) {
		return k
	}
	if stride < 1 || (n-1)%stride != 0 || (n-1)/stride < 3 {
		stride = 1
	}
	nc := (n-1)/stride + 1 // nodes of the solve: stations 0, stride, ..., tip
	h := float64(stride) * line.DS
	es.guess(n)
	for j := 0; j < nc; j++ {
		i := j * stride
		d := es.in.Diameter(math.Max(0, D-line.S[i]))
		es.ei[j] = es.eMPa * es.in.Section.SecondMoment(d) // N*mm2
		es.r[j] = d / 2
		es.k1[j], es.k2[j] = line.KN1[i], line.KN2[i]
		es.node[j] = i
		es.d1[j], es.d2[j] = es.f1[i], es.f2[i]
	}
	es.d1[0], es.d1[1], es.d2[0], es.d2[1] = 0, 0, 0, 0
	N := 2 * (nc - 2) // unknowns: both components at nodes 2..nc-1
	es.assembleBending(nc, h)
	full := false // the last round took the whole Newton step
	es.solves++
	for round := 0; ; round++ {
		es.rounds++
		es.pressing, es.pressed = es.pressed, es.pressing
		first := es.contact(nc, round == 0)
		if round > 0 && full && first == nc || round == maxContactRounds {
			break
		}
		// The rows of the nodes before the first whose contact changed are those of the last
		// round, and so are their factors: the system is written and factored from there on.
		from := 2 * (max(first, 2) - 2)
		copy(es.a[from*bandW:N*bandW], es.bendA[from*bandW:N*bandW])
		copy(es.b[from:N], es.bendB[from:N])
		f := h * es.kw / math.Pi * es.dTheta
		for j := max(first, 2); j < nc; j++ {
			cs := &es.sums[j]
			ia := 2 * (j - 2)
			es.a[ia*bandW] += f * cs.k11
			es.a[ia*bandW+1] += f * cs.k12
			es.a[(ia+1)*bandW] += f * cs.k22
			es.b[ia] += f * cs.b1
			es.b[ia+1] += f * cs.b2
		}
		es.band.solve(es.a, es.b, es.x, N, from)
		// Plain Newton steps first (most solves settle within a few rounds); from the seventh round
		// on, a line search stops any cycling.
		alpha := 1.0
		if round >= 6 {
			alpha = es.lineSearch(nc, h, f)
		}
		full = alpha == 1
		change := 0.0
		for j := 2; j < nc; j++ {
			s1, s2 := alpha*(es.x[2*(j-2)]-es.d1[j]), alpha*(es.x[2*(j-2)+1]-es.d2[j])
			change = max(change, math.Abs(s1), math.Abs(s2))
			es.d1[j] += s1
			es.d2[j] += s2
		}
		if change < offsetTolerance {
			break
		}
	}
	// Curvature of the beam's own shape at the nodes (strain follows it), then both it and the
	// offsets carried to every station between nodes.
	kn := es.kn[:nc]
	kn[0] = line.K[0]
	for j := 1; j < nc-1; j++ {
		k1 := es.k1[j] + (es.d1[j+1]-2*es.d1[j]+es.d1[j-1])/(h*h)
		k2 := es.k2[j] + (es.d2[j+1]-2*es.d2[j]+es.d2[j-1])/(h*h)
		kn[j] = math.Hypot(k1, k2)
	}
	kn[nc-1] = kn[nc-2]
	for j := 0; j < nc; j++ {
		i := es.node[j]
		es.f1[i], es.f2[i], k[i] = es.d1[j], es.d2[j], kn[j]
		if j+1 < nc {
			for q := 1; q < stride; q++ {
				t := float64(q) / float64(stride)
				es.f1[i+q] = (1-t)*es.d1[j] + t*es.d1[j+1]
				es.f2[i+q] = (1-t)*es.d2[j] + t*es.d2[j+1]
				k[i+q] = (1-t)*kn[j] + t*kn[j+1]
			}
		}
	}
	return k
}

// guess sets the offsets (per station) a solve of n stations starts from: the last solve's,
// and beyond its tip the line of its last two stations.
func (es *elasticSolver) guess(n int) {
	last := es.solved
	for i := max(last, 2); i < n; i++ {
		if last >= 4 {
			es.f1[i] = 2*es.f1[i-1] - es.f1[i-2]
			es.f2[i] = 2*es.f2[i-1] - es.f2[i-2]
		} else {
			es.f1[i], es.f2[i] = 0, 0
		}
	}
	es.solved = n
}

// assembleBending writes the bending part of the system over nc nodes h apart: for each j,
// c_j (h^2 k_j + d_{j+1} - 2 d_j + d_{j-1})^2 per component with c_j = E I_j / h^3 (twice the
// energy), d_0 = d_1 = 0. Node j adds c_j (1, -2, 1)^T (1, -2, 1) to the rows and columns of
// nodes j-1, j, j+1 and -c_j h^2 k_j (1, -2, 1) to their right-hand sides, each entry in the
// order of j.
func (es *elasticSolver) assembleBending(nc int, h float64) {
	N := 2 * (nc - 2)
	A, B := es.bendA[:N*bandW], es.bendB[:N]
	clear(A)
	clear(B)
	for j := 1; j <= nc-2; j++ {
		c := es.ei[j] / (h * h * h)
		for comp, kappa := range [2]float64{es.k1[j], es.k2[j]} {
			rhs := -c * h * h * kappa
			at := 2*(j-2) + comp // node j's row
			if j >= 3 {
				A[(at-2)*bandW] += c
				A[(at-2)*bandW+2] += -2 * c
				A[(at-2)*bandW+4] += c
				B[at-2] += rhs
			}
			if j >= 2 {
				A[at*bandW] += 4 * c
				A[at*bandW+2] += -2 * c
				B[at] += -2 * rhs
			}
			A[(at+2)*bandW] += c
			B[at+2] += rhs
		}
	}
}

// lineSearch returns how far along the Newton step (from the offsets d to the solution x of the
// current contact set) the energy is least: 1 unless the step passes a change of contact that
// turns the energy up again (which is what makes a plain active-set iteration cycle). The energy
// is convex and piecewise quadratic along the step, its slope piecewise linear and increasing.
func (es *elasticSolver) lineSearch(nc int, h, f float64) float64 {
	m := len(es.cos)
	step := func(j int) (float64, float64) {
		if j < 2 {
			return 0, 0
		}
		return es.x[2*(j-2)] - es.d1[j], es.x[2*(j-2)+1] - es.d2[j]
	}
	// Bending: slope B0 + alpha B1.
	var b0, b1 float64
	for j := 1; j <= nc-2; j++ {
		cj := es.ei[j] / (h * h * h)
		sa1, sa2 := step(j - 1)
		sb1, sb2 := step(j)
		sc1, sc2 := step(j + 1)
		r1 := h*h*es.k1[j] + es.d1[j+1] - 2*es.d1[j] + es.d1[j-1]
		r2 := h*h*es.k2[j] + es.d2[j+1] - 2*es.d2[j] + es.d2[j-1]
		q1, q2 := sc1-2*sb1+sa1, sc2-2*sb2+sa2
		b0 += cj * (r1*q1 + r2*q2)
		b1 += cj * (q1*q1 + q2*q2)
	}
	// Contact: the directions that press somewhere along the step.
	p0, sl := es.lsP[:0], es.lsS[:0]
	for j := 2; j < nc; j++ {
		s1, s2 := step(j)
		d1, d2, r := es.d1[j], es.d2[j], es.r[j]
		i := es.node[j]
		for q, w := range es.wall[i*m : (i+1)*m] {
			c, sn := es.cos[q], es.sin[q]
			p := d1*c + d2*sn + r - w
			sq := s1*c + s2*sn
			switch a, b := p > 0, p+sq > 0; {
			case a && b: // pressing all along the step: a linear part of the slope
				b0 += f * p * sq
				b1 += f * sq * sq
			case a || b: // starts or stops pressing along the step
				p0 = append(p0, p)
				sl = append(sl, sq)
			}
		}
	}
	es.lsP, es.lsS = p0, sl
	slope := func(alpha float64) float64 {
		g := b0 + alpha*b1
		for k, p := range p0 {
			if v := p + alpha*sl[k]; v > 0 {
				g += f * v * sl[k]
			}
		}
		return g
	}
	g1 := slope(1)
	if g1 <= 0 {
		return 1
	}
	g0 := slope(0)
	if g0 >= 0 {
		return 1e-3 // not a descent: take a tiny step and let the next round recompute
	}
	// The root of the (piecewise linear, increasing) slope by regula falsi with the Illinois
	// modification: a few evaluations where bisection takes dozens.
	lo, hi := 0.0, 1.0
	side := 0
	a := 1.0
	for range 30 {
		a = (lo*g1 - hi*g0) / (g1 - g0)
		g := slope(a)
		if g > 0 {
			hi, g1 = a, g
			if side > 0 {
				g0 /= 2
			}
			side = 1
		} else {
			lo, g0 = a, g
			if side < 0 {
				g1 /= 2
			}
			side = -1
		}
		if hi-lo < 1e-9 || g == 0 {
			break
		}
	}
	return max(a, 1e-3)
}

// contactSums are one station's active directions summed: sum e e^T and sum (rho - r) e.
type contactSums struct{ k11, k12, k22, b1, b2 float64 }

// contact marks the directions where the file's surface, delta . e + r, passes the wall
// (es.pressing) and sums each node's pressing directions. It returns the first node whose
// directions differ from the last round's (es.pressed; nc: none), whose sums alone it makes
// again, or 0 when all is set (the first round of a solve), which sums every node.
func (es *elasticSolver) contact(nc int, all bool) int {
	m, mw := len(es.cos), es.maskWords
	first := nc
	for j := 0; j < nc; j++ {
		d1, d2, r := es.d1[j], es.d2[j], es.r[j]
		i := es.node[j]
		// No direction can press where the wall is further than the file reaches anywhere.
		gap := es.minWall[i] - r
		near := j >= 2 && (gap < 0 || d1*d1+d2*d2 > gap*gap)
		row := es.wall[i*m : i*m+m]
		changed := all
		for k := 0; k < mw; k++ {
			var word uint64
			if near {
				part := row[k*64 : min(m, k*64+64)]
				cos, sin := es.cos[k*64:], es.sin[k*64:]
				cos, sin = cos[:len(part)], sin[:len(part)]
				for q, w := range part {
					if d1*cos[q]+d2*sin[q]+r > w {
						word |= 1 << uint(q)
					}
				}
			}
			at := j*mw + k
			changed = changed || word != es.pressed[at]
			es.pressing[at] = word
		}
		if changed {
			first = min(first, j)
			es.sums[j] = es.contactSums(row, r, es.pressing[j*mw:(j+1)*mw])
		}
	}
	if all {
		return 0
	}
	return first
}

// contactSums sums the pressing directions of mask on a wall row for a file of radius r, in
// the order of the directions.
func (es *elasticSolver) contactSums(wall []float64, r float64, mask []uint64) contactSums {
	var cs contactSums
	for k, word := range mask {
		for ; word != 0; word &= word - 1 {
			q := k*64 + bits.TrailingZeros64(word)
			cq, sq := es.cos[q], es.sin[q]
			cs.k11 += cq * cq
			cs.k12 += cq * sq
			cs.k22 += sq * sq
			g := wall[q] - r
			cs.b1 += g * cq
			cs.b2 += g * sq
		}
	}
	return cs
}

// bandFactor is an LDL^T factorisation of a symmetric positive definite matrix of
// half-bandwidth 4 and the forward substitution of a right-hand side, kept so that a system
// whose rows changed only from some row on is factored and solved again from that row.
type bandFactor struct {
	l    []float64 // L[i][i-k] at l[i*5+k], room for n+4 rows (the rows past the last read as 0)
	d, e []float64 // D and 1/D
	y    []float64 // L y = b
}

func newBandFactor(n int) bandFactor {
	return bandFactor{l: make([]float64, (n+4)*bandW), d: make([]float64, n), e: make([]float64, n), y: make([]float64, n)}
}

// solve solves A x = b for a matrix stored by rows, a[i*5+k] = A[i][i+k], row by row with the
// rows above it carried in registers (the solve runs hundreds of times a step). Rows before
// from are taken as factored and forward-substituted already: A and b are those of the last
// solve there (from = 0 for a new system).
func (f *bandFactor) solve(a, b, x []float64, n, from int) {
	const W = bandW
	// Row i needs the three rows above it: L[i-1][i-2..i-4] (q11, q12, q13), L[i-2][i-3..i-4]
	// (q21, q22), L[i-3][i-4] (q31), and D of rows i-1..i-4 (d1..d4; e1..e4 their inverses),
	// zero above the first row.
	var q11, q12, q13, q21, q22, q31 float64
	var d1, d2, d3, d4, e1, e2, e3, e4 float64
	var x1, x2, x3, x4 float64 // y[i-1..i-4]
	if from >= 1 {
		q11, q12, q13 = f.l[(from-1)*W+1], f.l[(from-1)*W+2], f.l[(from-1)*W+3]
		d1, e1, x1 = f.d[from-1], f.e[from-1], f.y[from-1]
	}
	if from >= 2 {
		q21, q22 = f.l[(from-2)*W+1], f.l[(from-2)*W+2]
		d2, e2, x2 = f.d[from-2], f.e[from-2], f.y[from-2]
	}
	if from >= 3 {
		q31 = f.l[(from-3)*W+1]
		d3, e3, x3 = f.d[from-3], f.e[from-3], f.y[from-3]
	}
	if from >= 4 {
		d4, e4, x4 = f.d[from-4], f.e[from-4], f.y[from-4]
	}
	// The first rows read their column from a copy with zeros for the rows above the matrix:
	// with those rows' registers zero, their factors come out zero, as the matrix has none.
	var top [4*W + 1]float64
	for i := from; i < n; i++ {
		var c *[4*W + 1]float64 // A[i-4..i][i] at c[(4-k)*W+k] for k rows above
		if i >= 4 {
			c = (*[4*W + 1]float64)(a[(i-4)*W : i*W+1])
		} else {
			clear(top[:])
			copy(top[(4-i)*W:], a[:i*W+1])
			c = &top
		}
		m4 := c[4] * e4 // L[i][i-4], ..., L[i][i-1]
		m3 := (c[W+3] - m4*q31*d4) * e3
		m2 := (c[2*W+2] - m4*q22*d4 - m3*q21*d3) * e2
		m1 := (c[3*W+1] - m4*q13*d4 - m3*q12*d3 - m2*q11*d2) * e1
		di := c[4*W] - m1*m1*d1 - m2*m2*d2 - m3*m3*d3 - m4*m4*d4
		row := (*[W]float64)(f.l[i*W : i*W+W])
		row[1], row[2], row[3], row[4] = m1, m2, m3, m4
		q31, q21, q22, q11, q12, q13 = q21, q11, q12, m1, m2, m3
		d4, d3, d2, d1 = d3, d2, d1, di
		e4, e3, e2, e1 = e3, e2, e1, 1/di
		f.d[i], f.e[i] = di, e1
		v := b[i] - m1*x1 - m2*x2 - m3*x3 - m4*x4 // L y = b
		f.y[i] = v
		x4, x3, x2, x1 = x3, x2, x1, v
	}
	clear(f.l[n*W : (n+4)*W])
	x1, x2, x3, x4 = 0, 0, 0, 0   // x[i+1..i+4]
	for i := n - 1; i >= 0; i-- { // L^T x = y / D
		below := (*[4 * W]float64)(f.l[(i+1)*W : (i+5)*W])
		v := f.y[i]*f.e[i] - below[1]*x1 - below[W+2]*x2 - below[2*W+3]*x3 - below[3*W+4]*x4
		x[i] = v
		x4, x3, x2, x1 = x3, x2, x1, v
	}
}
