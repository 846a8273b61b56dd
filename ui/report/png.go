package report

import (
	"image/png"
	"io"

	"tapersweep/analysis"
	"tapersweep/ui/scene"
)

// WritePNG draws one step of a run (0: the canal alone) from a named view with its legend and
// writes it as a PNG of width x height pixels.
func WritePNG(w io.Writer, c *analysis.Canal, res *analysis.Result, step int, view string, width, height int) error {
	img, err := scene.Picture(c, res, scene.Options{Step: step}, view, width, height)
	if err != nil {
		return err
	}
	return png.Encode(w, img)
}
