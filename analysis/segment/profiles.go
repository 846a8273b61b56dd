package segment

import (
	"context"
	"math"
	"slices"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/mesh/parallel"
	"tapersweep/mesh/volume"
)

// Rays across the path at each station, and how far they look (a root is at most a few mm
// from its canal).
const (
	profileRays  = 64
	profileReach = 4.5
)

// profiles holds the intensity along each ray: val[(station*rays + ray)*n + sample], sample q
// at q*h mm from the path.
type profiles struct {
	stations, rays, n int
	h                 float64
	val               []float32
}

func (p *profiles) ray(st, r int) []float32 {
	o := (st*p.rays + r) * p.n
	return p.val[o : o+p.n]
}

// rayDir is the direction of ray r at station i: cos(theta) N1 + sin(theta) N2.
func rayDir(line *analysis.Centerline, i, r, rays int) mgl64.Vec3 {
	th := 2 * math.Pi * float64(r) / float64(rays)
	return line.N1[i].Mul(math.Cos(th)).Add(line.N2[i].Mul(math.Sin(th)))
}

// sampleProfiles reads the volume along every ray, a quarter voxel apart, smoothed along the
// ray over about half a voxel.
func sampleProfiles(ctx context.Context, v *volume.Volume, line *analysis.Centerline) *profiles {
	h := math.Max(0.25*v.MinSpacing(), 0.005)
	p := &profiles{stations: line.Len(), rays: profileRays, n: int(profileReach/h) + 1, h: h}
	p.val = make([]float32, p.stations*p.rays*p.n)
	parallel.For(0, p.stations, func(_, i int) {
		if ctx.Err() != nil {
			return
		}
		raw := make([]float32, p.n)
		for r := range p.rays {
			d := rayDir(line, i, r, p.rays)
			for q := range p.n {
				raw[q] = float32(v.SampleWorld(line.Points[i].Add(d.Mul(float64(q) * h))))
			}
			out := p.ray(i, r)
			for q := range p.n { // binomial [1 4 6 4 1]/16: sigma of one sample
				a, b, c, d2, e := raw[max(q-2, 0)], raw[max(q-1, 0)], raw[q], raw[min(q+1, p.n-1)], raw[min(q+2, p.n-1)]
				out[q] = (a + 4*b + 6*c + 4*d2 + e) / 16
			}
		}
	})
	return p
}

// classify decides, per station, whether the scan shows the lumen, its threshold and where
// it ends along each ray, the dentine's intensity next to it and the root's outer surface.
//
// The lumen's size comes from its darkness integrated over the cross-section: blurring moves
// darkness around but keeps its sum, so the area A = sum of (dentine - I)/(dentine - canal)
// over the section is the lumen's area however blurred a narrow canal is. The threshold is
// then chosen locally so that the outline it draws holds that area; for a canal several
// voxels wide that is half-way between the canal's and the dentine's intensities. Where the
// area-equivalent diameter is under two voxels, or no dentine closes the section, the canal
// is not resolved.
func (res *Result) classify(p *profiles, dark, bright, tube float64) {
	ns := p.stations
	res.Threshold = make([]float64, ns)
	res.DentineLevel = make([]float64, ns)
	res.Diameter = make([]float64, ns)
	res.Resolved = make([]bool, ns)
	res.LumenRadius = make([][]float64, ns)
	res.RootRadius = make([][]float64, ns)
	near := max(1, int(math.Round(res.Voxel/p.h))) // samples within one voxel of the path
	dtheta := 2 * math.Pi / float64(p.rays)
	within := min(p.n, int(tube/p.h))
	centre := make([]float64, ns)
	// Noise after smoothing is a small fraction of the contrast; a fall by more than this is
	// the wall's outer surface, not noise.
	fall := 0.1 * (bright - dark)
	thin := make([]bool, ns)
	// The dentine next to the canal: the brightest ring from one to five voxels past where
	// the rays leave the dark (rays that leave a path off the middle meet the wall aslant, so
	// its blur stretches along them), each ring's level the median over the rays (so noise
	// does not lift the brightest). A wall thinner than a few blurs never shows the dentine's
	// level: the rays fall again past the crest within eight voxels of the canal, and the
	// station is marked thin.
	parallel.For(0, ns, func(_, i int) {
		t := 0.5 * (dark + bright)
		c := math.Inf(1)
		var edges [][2]int // ray, sample where it leaves the dark
		for r := range p.rays {
			ray := p.ray(i, r)
			for _, x := range ray[:near+1] {
				c = math.Min(c, float64(x))
			}
			if q := firstAbove(ray, 0, within, t); q+3*near < p.n {
				edges = append(edges, [2]int{r, q})
			}
		}
		centre[i] = c
		res.DentineLevel[i] = bright
		if len(edges) == 0 {
			return
		}
		ring := make([]float64, len(edges))
		level := func(k int) float64 {
			for j, e := range edges {
				ring[j] = float64(p.ray(i, e[0])[min(e[1]+k, p.n-1)])
			}
			return median(ring)
		}
		step := max(1, near/2)
		crest, kc := math.Inf(-1), 0
		for k := near; k <= 5*near; k += step {
			if l := level(k); l > crest {
				crest, kc = l, k
			}
		}
		res.DentineLevel[i] = crest
		for k := kc + step; k <= 8*near && !thin[i]; k += step {
			thin[i] = level(k) < crest-fall
		}
	})
	res.DentineLevel = runningMedian(res.DentineLevel, 5)
	// Near the root's tip the rays meet bone rather than dentine, and a thin wall never shows
	// the dentine's level: there it is the canal's elsewhere. Elsewhere the level may fall a
	// little (scans are often darker in the middle of the field).
	typical := percentile(append([]float64(nil), res.DentineLevel...), 0.5)
	for i, d := range res.DentineLevel {
		floor := typical - 0.15*(typical-dark)
		if thin[i] {
			floor = typical
		}
		res.DentineLevel[i] = math.Max(d, floor)
	}
	// The canal's own intensity: the darkest centre along the path (the widest part, where
	// the blur does not reach the middle), or the pulp chamber's next to the orifice when that
	// is darker (a canal narrower than a few voxels never shows its own intensity).
	res.CanalLevel = math.Min(dark, percentile(append([]float64(nil), centre...), 0.02))
	parallel.For(0, ns, func(_, i int) {
		id, ic := res.DentineLevel[i], res.CanalLevel
		if id-ic <= 0 {
			return
		}
		half := 0.5 * (ic + id)
		// Integrate the darkness along each ray out to three voxels past where it crosses the
		// half-way level (within the tube).
		area := 0.0
		for r := range p.rays {
			ray := p.ray(i, r)
			edge := firstAbove(ray, 0, within, half)
			reach := min(p.n-1, edge+3*near)
			if thin[i] {
				reach = wallCrest(ray, edge, reach, fall)
			}
			for q := 0; q <= reach; q++ {
				area += (id - float64(ray[q])) / (id - ic) * ringArea(q, p.h)
			}
		}
		area *= dtheta
		res.Diameter[i] = 2 * math.Sqrt(math.Max(area, 0)/math.Pi)
		// The threshold whose outline holds that area (bisection: the outline grows with it).
		outline := func(t float64) float64 {
			a := 0.0
			for r := range p.rays {
				q := crossing(p.ray(i, r), firstAbove(p.ray(i, r), 0, p.n, t), t) * p.h
				a += 0.5 * q * q * dtheta
			}
			return a
		}
		lo, hi := centre[i], id
		for range 30 {
			mid := 0.5 * (lo + hi)
			if outline(mid) < area {
				lo = mid
			} else {
				hi = mid
			}
		}
		res.Threshold[i] = math.Max(half, 0.5*(lo+hi))
		closed := 0 // rays that meet dentine within the tube
		wall := id - 0.25*(id-ic)
		for r := range p.rays {
			if firstAbove(p.ray(i, r), 0, within, wall) < within {
				closed++
			}
		}
		// Resolved: at least two voxels across, its middle darker than half-way between canal
		// and dentine (a narrower canal is blurred above it), and dentine all round (a dark
		// region that opens on a side is bone, soft tissue or the periodontal space).
		res.Resolved[i] = res.Diameter[i] >= 2*res.Voxel && centre[i] < half && 10*closed >= 9*p.rays
	})
	res.Resolved = majority(res.Resolved, 2)
	res.Threshold = runningMedian(res.Threshold, 2)
	for i := range ns {
		lumen := make([]float64, p.rays)
		if res.Resolved[i] {
			for r := range p.rays {
				ray := p.ray(i, r)
				lumen[r] = crossing(ray, firstAbove(ray, 0, p.n, res.Threshold[i]), res.Threshold[i]) * p.h
			}
		}
		res.LumenRadius[i] = lumen
	}
	parallel.For(0, ns, func(_, i int) {
		root := make([]float64, p.rays)
		for r := range p.rays {
			root[r] = rootEdge(p.ray(i, r), res.LumenRadius[i][r]/p.h, res.DentineLevel[i], res.CanalLevel) * p.h
		}
		res.RootRadius[i] = root
	})
	res.Unresolved = stretches(res.Resolved, analysis.ArcLengths(res.Path))
	res.fillRoot()
}

// wallCrest is where to stop reading a ray's darkness across a thin wall: at the wall's
// brightest sample between from and reach when the ray falls past it by more than fall by
// reach (the outer surface's darkness, blurred inward, is not the canal's; up to the crest the
// canal's darkness lost past it and the outside's gained before it about cancel), else reach.
func wallCrest(ray []float32, from, reach int, fall float64) int {
	crest := min(from, reach)
	for q := crest; q <= reach; q++ {
		if ray[q] > ray[crest] {
			crest = q
		}
	}
	if float64(ray[reach]) < float64(ray[crest])-fall {
		return crest
	}
	return reach
}

// ringArea is the area per radian of ring q of samples h apart along a ray: q h^2 (from
// (q - 1/2) h to (q + 1/2) h), h^2 / 8 for the centre cell.
func ringArea(q int, h float64) float64 {
	if q == 0 {
		return h * h / 8
	}
	return float64(q) * h * h
}

// firstAbove is the first sample from q at or above t, or end when none is before end.
func firstAbove(ray []float32, q, end int, t float64) int {
	for q < end && float64(ray[q]) < t {
		q++
	}
	return q
}

// crossing is where the ray first rises through t at or after sample q (fractional sample).
func crossing(ray []float32, q int, t float64) float64 {
	if q <= 0 {
		return 0
	}
	if q >= len(ray) {
		return float64(len(ray) - 1)
	}
	a, b := float64(ray[q-1]), float64(ray[q])
	if b == a {
		return float64(q)
	}
	return float64(q-1) + (t-a)/(b-a)
}

// rootEdge finds the root's outer surface along a ray starting from the lumen's edge q0
// (fractional sample): past the dentine, the profile falls to the periodontal space (often
// not resolved: then to the bone or soft tissue around); the edge lies where the fall
// crosses the level below. NaN if none.
func rootEdge(ray []float32, q0, dentine, dark float64) float64 {
	drop := dentine - 0.3*(dentine-dark)
	q := int(math.Ceil(q0))
	for q < len(ray) && float64(ray[q]) < drop { // out of the canal's own blur
		q++
	}
	inDentine := q
	for q < len(ray) && float64(ray[q]) >= drop {
		q++
	}
	if q >= len(ray) {
		return math.NaN()
	}
	// Down to the bottom of the fall.
	m := q
	for m+1 < len(ray) && ray[m+1] <= ray[m] {
		m++
	}
	// The periodontal space is soft tissue (as dark as the canal) but mostly thinner than the
	// blur, so the fall bottoms out above that. Half-way from dentine to soft tissue puts the
	// edge too far out, half-way down the fall too far in (by about a third to half a voxel
	// either way on the phantoms of the tests); the edge is taken at the mean of the two.
	bottom := float64(ray[m])
	level := 0.5*(dentine+math.Min(dark, bottom))*0.5 + 0.5*(dentine+bottom)*0.5
	for k := m; k > inDentine; k-- {
		if float64(ray[k-1]) >= level && float64(ray[k]) < level {
			a, b := float64(ray[k-1]), float64(ray[k])
			return float64(k-1) + (a-level)/(a-b)
		}
	}
	return math.NaN()
}

// fillRoot fills rays where no root edge was found from their neighbours around the station,
// then from the nearest stations, and calms single-ray outliers with a median of three.
func (res *Result) fillRoot() {
	ns := len(res.RootRadius)
	for i := range ns {
		row := res.RootRadius[i]
		n := len(row)
		for r := range n {
			if !math.IsNaN(row[r]) {
				continue
			}
			for d := 1; d < n/2; d++ {
				a, b := row[(r-d+n)%n], row[(r+d)%n]
				if !math.IsNaN(a) && !math.IsNaN(b) {
					row[r] = 0.5 * (a + b)
					break
				} else if !math.IsNaN(a) {
					row[r] = a
					break
				} else if !math.IsNaN(b) {
					row[r] = b
					break
				}
			}
		}
	}
	for i := range ns {
		if !math.IsNaN(res.RootRadius[i][0]) {
			continue
		}
		for d := 1; d < ns; d++ {
			if j := i - d; j >= 0 && !math.IsNaN(res.RootRadius[j][0]) {
				res.RootRadius[i] = slices.Clone(res.RootRadius[j])
				break
			}
			if j := i + d; j < ns && !math.IsNaN(res.RootRadius[j][0]) {
				res.RootRadius[i] = slices.Clone(res.RootRadius[j])
				break
			}
		}
	}
	for i := range ns {
		row := slices.Clone(res.RootRadius[i])
		n := len(row)
		for r := range n {
			res.RootRadius[i][r] = median([]float64{row[(r-1+n)%n], row[r], row[(r+1)%n]})
		}
	}
}

// runningMedian smooths a series with a median over 2*half+1 neighbours.
func runningMedian(v []float64, half int) []float64 {
	out := make([]float64, len(v))
	for i := range v {
		out[i] = median(slices.Clone(v[max(0, i-half):min(len(v), i+half+1)]))
	}
	return out
}

// majority replaces each flag by the majority of its 2*half+1 neighbours, so a single noisy
// station neither breaks a resolved canal nor resolves a lost stretch.
func majority(v []bool, half int) []bool {
	out := make([]bool, len(v))
	for i := range v {
		yes, all := 0, 0
		for j := max(0, i-half); j < min(len(v), i+half+1); j++ {
			all++
			if v[j] {
				yes++
			}
		}
		out[i] = 2*yes > all || (2*yes == all && v[i])
	}
	return out
}

// stretches lists the runs of unresolved stations as arc lengths.
func stretches(resolved []bool, s []float64) []analysis.Stretch {
	var out []analysis.Stretch
	for i := 0; i < len(resolved); {
		if resolved[i] {
			i++
			continue
		}
		j := i
		for j+1 < len(resolved) && !resolved[j+1] {
			j++
		}
		out = append(out, analysis.Stretch{From: s[i], To: s[j]})
		i = j + 1
	}
	return out
}
