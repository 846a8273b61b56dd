package analysis

import "math"

// WallPlace is a place on the canal wall in the canal's own coordinates: arc length from the
// orifice (mm) and angle about the centerline (radians, 0 to 2 pi; 0 is the inner side of the
// main curve).
type WallPlace struct {
	S, Theta float64
}

// WallPlaceAt is the place of a point inside wall triangle t given by barycentric weights: the
// corners' own (s, theta) interpolated, the angles unwrapped around the heaviest corner so a
// triangle across theta = 0 stays whole.
func (c *Canal) WallPlaceAt(t [3]int32, bary [3]float32) WallPlace {
	ref := 0
	for k := 1; k < 3; k++ {
		if bary[k] > bary[ref] {
			ref = k
		}
	}
	th0 := float64(c.VertexTheta[t[ref]])
	var s, th float64
	for k := 0; k < 3; k++ {
		w := float64(bary[k])
		s += w * float64(c.VertexS[t[k]])
		d := math.Remainder(float64(c.VertexTheta[t[k]])-th0, 2*math.Pi)
		th += w * (th0 + d)
	}
	th = math.Mod(th, 2*math.Pi)
	if th < 0 {
		th += 2 * math.Pi
	}
	return WallPlace{S: s, Theta: th}
}
