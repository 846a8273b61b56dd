package scene

import (
	"image/color"
	"math"

	"tapersweep/mesh"
	"tapersweep/ui/render"
)

// NeighbourWall is the wall of another canal of the same tooth: a cool grey, lighter than the
// file's metal and off the depth-of-cut scale, so it never reads as a cut or as the file.
var NeighbourWall = color.RGBA{150, 158, 170, 255}

// neighbourOpacity keeps the other canals faint: where they run shows, the shown canal's
// colours stay in front.
const neighbourOpacity = 0.25

// addNeighbours draws the other canals of the tooth see-through and outlined, and widens the
// bounds to hold them, so fitting the view frames the tooth's canals together. They are not
// clipped by "cut open" (the cut follows the shown canal's own centerline) and are never
// picked as the wall.
func addNeighbours(b *Built, others []*mesh.Mesh) {
	for _, m := range others {
		if m == nil || len(m.Triangles) == 0 {
			continue
		}
		b.Scene.Objects = append(b.Scene.Objects, render.Object{Mesh: m, Color: NeighbourWall,
			Opacity: neighbourOpacity, Outline: true})
		lo, hi := m.Bounds()
		for k := 0; k < 3; k++ {
			b.Lo[k], b.Hi[k] = math.Min(b.Lo[k], lo[k]), math.Max(b.Hi[k], hi[k])
		}
	}
}
