package analysis

import "math"

// rivalBend is a bend apart from the tightest bend's own stretch (stations ownLo..ownHi)
// that a fit narrower than the chosen pair reads as the tightest of the line. A fit wide
// enough to hold still over a long gentle bend flattens a short tight one, and cannot read it
// whole within its half-width of an end (304-034: an arc of r 2.82 mm and 1.1 mm ending 0.6
// mm from the apical end, at a 0.113 mm voxel; the chosen 1.3 mm fit took the gentle r 4.32
// bend, r 4.42 in [3.85, 5.04], while the 0.75 mm fit read the short one at r 3.4). A fit
// counts when its wander stays under rivalNoise of its reading, the next wider fit finds its
// peak on the same stretch (the wander does not put two fits' peaks in one place), the
// reading does not fall with the half-width as a corner's does (rivalDecline), and the stretch
// does not reach the end of where the fit is read whole (there the peak may be the rise into
// an end: 303-021, one bend of r 7.69 mm, read at r 2.3-5.6 mm 0.65-0.9 mm from the orifice by
// the 0.3-0.75 mm fits). The rival is the fit's stretch of stations and
// the high end of its own band (fitBand of the fit alone), the highest where several fits
// find one.
func (c *Centerline) rivalBend(ownLo, ownHi int) (stretch [2]int, khi float64, ok bool) {
	for i, f := range c.fits[:c.scale] {
		g := c.fits[i+1]
		switch {
		case f.peak <= 0 || f.noise > rivalNoise*f.peak || f.atEdge:
		case f.to >= ownLo && f.from <= ownHi: // the tightest bend itself
		case g.to < f.from || g.from > f.to: // the wider fit's peak is elsewhere
		case math.Log(g.peak/f.peak)/math.Log(g.window/f.window) < -rivalDecline: // a corner
		default:
			if _, h := fitBand(f, f, c.DS); !ok || h > khi {
				stretch, khi, ok = [2]int{f.from, f.to}, h, true
			}
		}
	}
	return stretch, khi, ok
}

// rivalNoise is the most of its reading a narrower fit's wander may make for the fit to
// count as evidence of a rival bend: five standard deviations of the wander's curvature,
// where the largest of a few hundred stations of wander alone reaches about three.
const rivalNoise = 0.2

// rivalDecline is how fast a rival's reading may fall as the fit widens, per unit of log
// half-width: a fit reads an arc longer than itself the same at any half-width (0) and a
// corner it cannot resolve as its turn over the half-width (-1, analytic geometry); a reading
// falling faster than half-way is a corner, such as the kink an end's making leaves in the
// line (301-045, one bend of r 8.74 mm: the 0.3-0.75 mm fits read r 1.8-6.0 mm 1 mm from the
// apical end).
const rivalDecline = 0.5
