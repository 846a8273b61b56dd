package analysis

import (
	"math"

	"tapersweep/models"
)

// Kernel measures how a file meets a canal's wall: the one set of engagement sums behind
// analysis.Run and the planner (analysis/plan). It holds what every sum over one canal needs,
// computed once: the directions of the radius map, each station's share of arc length, the
// contact threshold and the cutting coefficient. A Kernel is read-only once built.
type Kernel struct {
	line     *Centerline
	na       int
	cos, sin []float64
	dTheta   float64
	weight   []float64 // trapezoid length of each station, mm
	thr, ct  float64
	// The canal's own wall from the orifice to working length, for the share not yet touched:
	// each cell's area and their sum.
	rho0      []float32
	wallArea  []float64
	totalWall float64
}

// NewKernel prepares the sums for canal c with the settings of opt (zero settings take their
// defaults, as in Run).
func NewKernel(c *Canal, opt RunOptions) *Kernel {
	opt = opt.WithDefaults()
	k := &Kernel{line: c.Line, na: c.Angles, dTheta: 2 * math.Pi / float64(c.Angles),
		thr: opt.ContactThreshold, ct: opt.CuttingCoefficient}
	k.cos = make([]float64, c.Angles)
	k.sin = make([]float64, c.Angles)
	for j := range k.cos {
		th := float64(j) * k.dTheta
		k.cos[j], k.sin[j] = math.Cos(th), math.Sin(th)
	}
	s := c.Line.S
	n := len(s)
	k.weight = make([]float64, n)
	for i := range s {
		lo, hi := s[max(0, i-1)], s[min(n-1, i+1)]
		k.weight[i] = (hi - lo) / 2
	}
	k.rho0 = c.Rho
	last := c.Line.Station(c.WorkingLength)
	k.wallArea = make([]float64, (last+1)*c.Angles)
	for i := 0; i <= last; i++ {
		kc, ks := c.Line.KN1[i], c.Line.KN2[i]
		for j := 0; j < c.Angles; j++ {
			rho := float64(c.Rho[i*c.Angles+j])
			a := rho * max(0, 1-(kc*k.cos[j]+ks*k.sin[j])*rho) * k.weight[i]
			k.wallArea[i*c.Angles+j] = a
			k.totalWall += a
		}
	}
	return k
}

// ContactThreshold is the depth of cut, mm, below which a cell counts as untouched.
func (k *Kernel) ContactThreshold() float64 { return k.thr }

// Placed is a file with its tip at one depth, laid on the kernel's stations.
type Placed struct {
	Depth float64 // tip depth, mm from the orifice
	// Radius is the file's radius at stations 0 .. tip (the last station it reaches).
	Radius []float32
	// TipWeight is the arc length the tip's station stands for: it ends at the tip.
	TipWeight float64
	// Cutting is the first station inside the flutes: stations before it hold the shank, past
	// the cutting length, which touches the wall but does not cut it.
	Cutting int
	// Off1, Off2 are the file's axis off the centerline along N1 and N2 at each station, mm
	// (nil: the file follows the centerline).
	Off1, Off2 []float64
}

// Tip is the index of the last station the file reaches (-1: none).
func (f *Placed) Tip() int { return len(f.Radius) - 1 }

// Place lays file in on the stations with its tip at depth D (mm from the orifice, at most the
// canal's length): its radius d(D - s)/2 at every station it reaches.
func (k *Kernel) Place(in models.Instrument, D float64) Placed {
	s := k.line.S
	f := Placed{Depth: D}
	for i := 0; i < len(s) && s[i] <= D+1e-9; i++ {
		f.Radius = append(f.Radius, float32(in.Diameter(D-s[i])/2))
		if in.CuttingLength > 0 && D-s[i] > in.CuttingLength+1e-9 {
			f.Cutting = i + 1
		}
	}
	if tip := f.Tip(); tip >= 0 {
		f.TipWeight = math.Max(0, math.Min(k.weight[tip], D-s[tip]+k.weight[tip]/2))
	}
	return f
}

// Engagement is what one file does to the wall.
type Engagement struct {
	// First and Last are the first and last stations with a cell cut deeper than the contact
	// threshold by the fluted part (-1: none).
	First, Last int
	// ShankFirst and ShankLast are the same for the shank's contact (-1: none).
	ShankFirst, ShankLast int
	AreaMM2, VolumeMM3    float64 // engaged area and removed volume
	MaxCutMM              float64 // deepest cut of the fluted part
	TorqueNcm             float64 // cutting torque, N*cm at the kernel's coefficient
	// NewlyTouchedMM2 is the canal's own wall, orifice to working length, that this file is the
	// first to cut deeper than the contact threshold (counted when Traces are kept).
	NewlyTouchedMM2 float64
}

// Cuts reports whether any cell is cut deeper than the contact threshold.
func (e *Engagement) Cuts() bool { return e.First >= 0 }

// LengthMM is the engaged length: the extent of the stations that cut.
func (e *Engagement) LengthMM(line *Centerline) float64 {
	if e.First < 0 {
		return 0
	}
	return line.S[e.Last] - line.S[e.First]
}

// ShankContactMM is the extent of the stations where the shank touches the wall.
func (e *Engagement) ShankContactMM(line *Centerline) float64 {
	if e.ShankFirst < 0 {
		return 0
	}
	return line.S[e.ShankLast] - line.S[e.ShankFirst]
}

// Traces are the per-cell and per-station records a sweep may keep (any may be nil).
type Traces struct {
	// Cut receives the depth of cut and Prepared the file's reach where the fluted part passes
	// the wall; both are station-major like the wall, Prepared already a copy of it.
	Cut, Prepared []float32
	// StationTorque receives the cutting torque of each station, N*mm.
	StationTorque []float64
}

// Sweep measures file f against wall (a radius map on the kernel's stations). A cell is
// engaged where the file's surface passes the wall by more than the contact threshold; on a
// curved centerline the file's surface element carries the metric factor of a curved tube,
// dA = t (1 - k t cos(theta)) dtheta ds (k cos(theta) from the curvature vector in the frame,
// so any bend direction is handled), the removed volume per cell is
// [(t^2 - rho^2)/2 - k cos(theta) (t^3 - rho^3)/3] dtheta ds, and the cutting torque per cell
// is c_t r dA, with t the file's reach from the centerline in that direction (its radius r
// when centred) and rho the wall's distance. Past the cutting length the shank's contact is
// recorded apart and adds no area, volume, torque or cut.
//
// pre, when not nil, widens the wall on the fly by the fluted part of an earlier centred file
// (the larger of the two), which spares materialising a canal per candidate in the planner;
// it is meant for a centred f.
func (k *Kernel) Sweep(wall []float32, pre, f *Placed, out *Traces) Engagement {
	e := Engagement{First: -1, Last: -1, ShankFirst: -1, ShankLast: -1}
	na := k.na
	tip := f.Tip()
	// The sums in locals, and the kernel's fields read once (the stores to the traces would
	// make the compiler read them again at every cell).
	var area, volume, maxCut, torque float64
	cos, sin, dTheta, thr, ct := k.cos, k.sin, k.dTheta, k.thr, k.ct
	rho0, wallArea := k.rho0, k.wallArea
	cells := out != nil && out.Cut != nil // the cells' cut and reach are kept
	var stationTorque []float64
	if out != nil {
		stationTorque = out.StationTorque
	}
	for i := 0; i <= tip; i++ {
		r32 := f.Radius[i]
		var p float32
		if pre != nil && i < len(pre.Radius) && i >= pre.Cutting {
			p = pre.Radius[i]
		}
		off := f.Off1 != nil && (f.Off1[i] != 0 || f.Off2[i] != 0)
		if r32 <= p && !off {
			continue // the earlier file already took the wall past this radius all round
		}
		r := float64(r32)
		w := k.weight[i]
		if i == tip {
			w = f.TipWeight
		}
		row := wall[i*na : (i+1)*na]
		if i < f.Cutting {
			if k.shankTouches(row, p, r, f, i) {
				if e.ShankFirst < 0 {
					e.ShankFirst = i
				}
				e.ShankLast = i
			}
			continue
		}
		kc, ks := k.line.KN1[i], k.line.KN2[i]
		var o1, o2, oo float64
		reach := r // the furthest the file's surface gets from the centerline here
		if off {
			o1, o2 = f.Off1[i], f.Off2[i]
			oo = o1*o1 + o2*o2
			reach += math.Sqrt(oo)
		}
		rr := r * r
		engaged := false
		var cellTorque float64 // this station's, added up in the order of the cells
		if stationTorque != nil {
			cellTorque = stationTorque[i]
		}
		for j, rho32 := range row {
			if p > rho32 {
				rho32 = p
			}
			rho := float64(rho32)
			if rho >= reach {
				continue
			}
			cj, sj := cos[j], sin[j]
			t := r
			if off {
				// The far side of the offset circle in this direction.
				pj := o1*cj + o2*sj
				q2 := oo - pj*pj
				if q2 >= rr {
					continue
				}
				t = pj + math.Sqrt(rr-q2)
			}
			cut := t - rho
			if cut <= 0 {
				continue
			}
			if cells {
				idx := i*na + j
				out.Cut[idx] = float32(cut)
				out.Prepared[idx] = float32(t)
				if idx < len(wallArea) {
					if r0 := float64(rho0[idx]); float64(row[j])-r0 <= thr && t-r0 > thr {
						e.NewlyTouchedMM2 += wallArea[idx]
					}
				}
			}
			if cut <= thr {
				continue
			}
			engaged = true
			bend := kc*cj + ks*sj
			dA := t * (1 - bend*t) * dTheta * w
			area += dA
			volume += ((t*t-rho*rho)/2 - bend*(t*t*t-rho*rho*rho)/3) * dTheta * w
			if cut > maxCut {
				maxCut = cut
			}
			dT := ct * r * dA
			torque += dT
			cellTorque += dT
		}
		if stationTorque != nil {
			stationTorque[i] = cellTorque
		}
		if engaged {
			if e.First < 0 {
				e.First = i
			}
			e.Last = i
		}
	}
	e.AreaMM2, e.VolumeMM3, e.MaxCutMM = area, volume, maxCut
	e.TorqueNcm = torque / 10 // N*mm -> N*cm
	return e
}

// shankTouches reports whether the shank at station i passes the wall by more than the
// contact threshold in any direction.
func (k *Kernel) shankTouches(row []float32, p float32, r float64, f *Placed, i int) bool {
	var o1, o2 float64
	if f.Off1 != nil {
		o1, o2 = f.Off1[i], f.Off2[i]
	}
	for j, rho32 := range row {
		rho := float64(max(rho32, p))
		if o1*k.cos[j]+o2*k.sin[j]+r-rho > k.thr {
			return true
		}
	}
	return false
}

// Widen writes into dst the wall after centred file f: the larger of the wall and the file's
// radius wherever its fluted part reaches (the shank does not cut).
func (k *Kernel) Widen(dst, wall []float32, f *Placed) {
	copy(dst, wall)
	na := k.na
	for i := f.Cutting; i < len(f.Radius); i++ {
		ri := f.Radius[i]
		row := dst[i*na : (i+1)*na]
		for j, rho := range row {
			if ri > rho {
				row[j] = ri
			}
		}
	}
}

// UntouchedShare is the share of the wall area, orifice to working length, that no file has cut
// deeper than the contact threshold (a standard micro-CT outcome), in percent, given the area
// first touched so far (the sum of the steps' NewlyTouchedMM2).
func (k *Kernel) UntouchedShare(touchedMM2 float64) float64 {
	if k.totalWall == 0 {
		return 100
	}
	return 100 * math.Max(0, k.totalWall-touchedMM2) / k.totalWall
}
