package analysis

import (
	"math"

	"tapersweep/mesh"
	"tapersweep/mesh/parallel"
)

// squaredDistance returns, for every voxel of g, the squared Euclidean distance in voxel
// units from its centre to the centre of the nearest outside voxel (0 outside). It is the
// exact transform of Felzenszwalb and Huttenlocher, one axis at a time, lines in parallel on
// workers goroutines (0: all cores).
//
// Outside voxels stay 0 through every pass, and a pass changes a line only between its
// first and last inside voxel (the zeros beyond bound them, and the parabolas of zeros
// further out lie above those everywhere in between): so each pass takes only the lines that
// hold an inside voxel, from the voxel before the first to the one after the last. A canal
// fills a few percent of its grid.
func squaredDistance(g *mesh.Grid, workers int) []float32 {
	n := g.NX * g.NY * g.NZ
	d := make([]float32, n)
	const far = 1e20
	// Each line's first and last inside voxel, for lines along x (by j + NY k), y (by
	// i + NX k) and z (by i + NX j); first > last for a line with none. The voxels come in
	// grid order, so along each line in order.
	xs, ys, zs := newLineSpans(g.NY*g.NZ), newLineSpans(g.NX*g.NZ), newLineSpans(g.NX*g.NY)
	idx := 0
	for k := range g.NZ {
		for j := range g.NY {
			for i := range g.NX {
				if g.Inside[idx] {
					d[idx] = far
					xs.add(j+g.NY*k, i)
					ys.add(i+g.NX*k, j)
					zs.add(i+g.NX*j, k)
				}
				idx++
			}
		}
	}
	// Axis x: lines indexed by (j,k); stride 1. Values are still 0 or far, where the lower
	// envelope is the squared distance to the nearest 0 on the line: two sweeps find it.
	xl := xs.used()
	parallel.For(workers, len(xl), func(_, e int) {
		line := int(xl[e])
		a, b := xs.bounds(line, g.NX)
		nearestZero1D(d[line*g.NX+a : line*g.NX+b])
	})
	yl := ys.used()
	parallelLines(workers, len(yl), g.NY, func(e int, f, out []float64, v []int, z []float64) {
		line := int(yl[e])
		i, k := line%g.NX, line/g.NX
		a, b := ys.bounds(line, g.NY)
		edt1D(d, i+g.NX*(a+g.NY*k), g.NX, b-a, f, out, v, z)
	})
	zl := zs.used()
	parallelLines(workers, len(zl), g.NZ, func(e int, f, out []float64, v []int, z []float64) {
		line := int(zl[e])
		a, b := zs.bounds(line, g.NZ)
		edt1D(d, line+g.NX*g.NY*a, g.NX*g.NY, b-a, f, out, v, z)
	})
	return d
}

// lineSpans holds, per line of the grid along one axis, the first and last inside voxel.
type lineSpans struct {
	first, last []int32
}

func newLineSpans(lines int) *lineSpans {
	s := &lineSpans{first: make([]int32, lines), last: make([]int32, lines)}
	for l := range s.first {
		s.first[l], s.last[l] = math.MaxInt32, -1
	}
	return s
}

// add notes inside voxel at place p of line l; places come in increasing order.
func (s *lineSpans) add(l, p int) {
	if s.first[l] > int32(p) {
		s.first[l] = int32(p)
	}
	s.last[l] = int32(p)
}

// used lists the lines that hold an inside voxel.
func (s *lineSpans) used() []int32 {
	var out []int32
	for l, last := range s.last {
		if last >= 0 {
			out = append(out, int32(l))
		}
	}
	return out
}

// bounds is the part of line l (of length n) a pass works on: from the voxel before its first
// inside voxel to the one after its last, within the line.
func (s *lineSpans) bounds(l, n int) (int, int) {
	return max(int(s.first[l])-1, 0), min(int(s.last[l])+2, n)
}

// parallelLines runs fn over lines 0..lines-1 on workers goroutines (0: all cores), giving
// each its own scratch.
func parallelLines(workers, lines, length int, fn func(line int, f, out []float64, v []int, z []float64)) {
	type scratch struct {
		f, out, z []float64
		v         []int
	}
	bufs := make([]*scratch, parallel.Workers(workers, lines))
	parallel.For(workers, lines, func(w, line int) {
		b := bufs[w]
		if b == nil {
			b = &scratch{f: make([]float64, length), out: make([]float64, length), z: make([]float64, length+1), v: make([]int, length)}
			bufs[w] = b
		}
		fn(line, b.f, b.out, b.v, b.z)
	})
}

// nearestZero1D replaces every non-zero value of a line holding only 0 and far by its squared
// distance to the nearest 0, and leaves a line without a 0 as it is: what edt1D gives such a
// line, exactly (integers), for a fraction of the work.
func nearestZero1D(line []float32) {
	n := len(line)
	last := -1
	for q := 0; q < n; q++ {
		if line[q] == 0 {
			last = q
		} else if last >= 0 {
			dq := q - last
			line[q] = float32(dq * dq)
		}
	}
	if last < 0 {
		return // no 0 on the line
	}
	next := -1
	for q := n - 1; q >= 0; q-- {
		if line[q] == 0 {
			next = q
		} else if next >= 0 {
			dq := next - q
			if v := float32(dq * dq); v < line[q] {
				line[q] = v
			}
		}
	}
}

// edt1D is the lower envelope of parabolas along one line of d (start, stride, n).
//
// Values are exact integers (squared distances in voxels), so the envelope gives the exact
// least of (q - p)^2 + f[p] over p, whatever set of parabolas yields it. Only a run of
// non-zero values between two zeros needs working out, and within it only its own
// parabolas and the two zeros that bound it: any parabola beyond a zero lies above that
// zero's everywhere in the run. So each run is done on its own, and the zeros between runs
// (most of a line that grazes the canal) cost nothing.
func edt1D(d []float32, start, stride, n int, f, out []float64, v []int, z []float64) {
	any, far := false, false
	for q := 0; q < n; q++ {
		f[q] = float64(d[start+q*stride])
		if f[q] != 0 {
			any = true
			far = far || f[q] >= 1e19
		}
	}
	if !any {
		return
	}
	if far { // a line never reached by the passes before: the whole line at once
		envelope(f, out, v, z, 0, n, 0, n)
		for q := 0; q < n; q++ {
			d[start+q*stride] = float32(math.Min(out[q], 1e20))
		}
		return
	}
	for q := 0; q < n; {
		if f[q] == 0 {
			q++
			continue
		}
		a := q
		for q < n && f[q] != 0 {
			q++
		}
		envelope(f, out, v, z, max(a-1, 0), min(q+1, n), a, q)
		for r := a; r < q; r++ {
			d[start+r*stride] = float32(math.Min(out[r], 1e20))
		}
	}
}

// envelope is Felzenszwalb and Huttenlocher's lower envelope of the parabolas of f[lo:hi]
// (coordinates are the indices themselves), written into out[from:to].
func envelope(f, out []float64, v []int, z []float64, lo, hi, from, to int) {
	k := 0
	v[0] = lo
	z[0] = math.Inf(-1)
	z[1] = math.Inf(1)
	for q := lo + 1; q < hi; q++ {
		var s float64
		for {
			p := v[k]
			s = ((f[q] + float64(q*q)) - (f[p] + float64(p*p))) / float64(2*(q-p))
			if s <= z[k] && k > 0 {
				k--
				continue
			}
			break
		}
		if s <= z[k] { // k == 0 and the new parabola dominates everywhere
			v[0] = q
			z[0] = math.Inf(-1)
			z[1] = math.Inf(1)
			continue
		}
		k++
		v[k] = q
		z[k] = s
		z[k+1] = math.Inf(1)
	}
	k = 0
	for q := from; q < to; q++ {
		for z[k+1] < float64(q) {
			k++
		}
		dq := float64(q - v[k])
		out[q] = dq*dq + f[v[k]]
	}
}
