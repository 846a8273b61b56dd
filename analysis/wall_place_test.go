package analysis

import (
	"math"
	"testing"
)

// A triangle whose corners straddle theta = 0 (at 350° and 10°) has its middle at 0°, not 180°:
// angles are unwrapped before they are averaged (arithmetic on the circle).
func TestWallPlaceAcrossThetaZero(t *testing.T) {
	deg := math.Pi / 180
	c := &Canal{VertexS: []float32{1, 1, 2}, VertexTheta: []float32{float32(350 * deg), float32(10 * deg), float32(0)}}
	p := c.WallPlaceAt([3]int32{0, 1, 2}, [3]float32{0.5, 0.5, 0})
	if math.Abs(math.Remainder(p.Theta, 2*math.Pi)) > 1e-6 || math.Abs(p.S-1) > 1e-9 {
		t.Errorf("place %+v, want s 1 and theta 0", p)
	}
	q := c.WallPlaceAt([3]int32{0, 1, 2}, [3]float32{0.25, 0.25, 0.5})
	if math.Abs(q.S-1.5) > 1e-6 || q.Theta < 0 || q.Theta >= 2*math.Pi {
		t.Errorf("place %+v, want s 1.5 and theta in [0, 2 pi)", q)
	}
}
