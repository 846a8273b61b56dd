package volume

import (
	"context"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/go-gl/mathgl/mgl64"
	"golang.org/x/image/bmp"
	"golang.org/x/image/tiff"
)

// readStack reads a folder of slice images, in natural name order (slice2 before slice10),
// as slices along z at opt.Voxel mm. Grey images of 8 or 16 bits keep their values; colour
// images are read as their luminance.
func readStack(ctx context.Context, dir string, files []string, opt Options) (*Volume, error) {
	if !(opt.Voxel > 0) || math.IsInf(opt.Voxel, 0) || opt.Voxel > 10 {
		return nil, fmt.Errorf("%s: a stack of image slices does not state its voxel size: give it in mm (--voxel 0.02)", dir)
	}
	w, h, err := imageSize(files[0])
	if err != nil {
		return nil, err
	}
	if len(files) < 3 {
		return nil, fmt.Errorf("%s: %d slices: a scan needs at least 3", dir, len(files))
	}
	if err := checkFits(dir, w, h, len(files), opt.MemoryLimit); err != nil {
		return nil, err
	}
	v := &Volume{
		NX: w, NY: h, NZ: len(files),
		Spacing: [3]float64{opt.Voxel, opt.Voxel, opt.Voxel},
		Axes:    [3]mgl64.Vec3{{1, 0, 0}, {0, 1, 0}, {0, 0, 1}},
		Slope:   1,
	}
	v.Info.Format = strings.ToUpper(strings.TrimPrefix(strings.ToLower(filepath.Ext(files[0])), ".")) + " stack"
	v.Info.Files = len(files)
	v.Data = make([]uint16, w*h*len(files))
	plane := w * h
	err = fillSlices(ctx, len(files), func(k int) error {
		return readSlice(files[k], w, h, v.Data[k*plane:(k+1)*plane])
	}, func(done int) {
		if opt.Progress != nil {
			opt.Progress(done, len(files))
		}
	})
	if err != nil {
		return nil, err
	}
	if err := v.checkGeometry(dir); err != nil {
		return nil, err
	}
	return v, nil
}

// decodeImage decodes a slice by its extension.
func decodeImage(path string, r io.Reader, config bool) (image.Image, image.Config, error) {
	var img image.Image
	var cfg image.Config
	var err error
	ext := strings.ToLower(filepath.Ext(path))
	switch {
	case ext == ".png" && config:
		cfg, err = png.DecodeConfig(r)
	case ext == ".png":
		img, err = png.Decode(r)
	case ext == ".bmp" && config:
		cfg, err = bmp.DecodeConfig(r)
	case ext == ".bmp":
		img, err = bmp.Decode(r)
	case config:
		cfg, err = tiff.DecodeConfig(r)
	default:
		img, err = tiff.Decode(r)
	}
	return img, cfg, err
}

func imageSize(path string) (int, int, error) {
	f, err := os.Open(path)
	if err != nil {
		return 0, 0, err
	}
	defer f.Close()
	_, cfg, err := decodeImage(path, f, true)
	if err != nil {
		return 0, 0, fmt.Errorf("%s: not a readable image: %v", path, err)
	}
	if cfg.Width <= 0 || cfg.Height <= 0 || cfg.Width > 1<<15 || cfg.Height > 1<<15 {
		return 0, 0, fmt.Errorf("%s: image of %d x %d pixels cannot be read", path, cfg.Width, cfg.Height)
	}
	return cfg.Width, cfg.Height, nil
}

// readSlice decodes one image into out (row by row, 16-bit values).
func readSlice(path string, w, h int, out []uint16) (err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("%s: not a readable image (%v)", path, r)
		}
	}()
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	defer f.Close()
	// The size is checked before decoding, so a slice claiming a huge size is not allocated.
	if _, cfg, err := decodeImage(path, f, true); err != nil {
		return fmt.Errorf("%s: not a readable image: %v", path, err)
	} else if cfg.Width != w || cfg.Height != h {
		return fmt.Errorf("%s: %d x %d pixels where the first slice has %d x %d (mixed stack)", path, cfg.Width, cfg.Height, w, h)
	}
	if _, err := f.Seek(0, io.SeekStart); err != nil {
		return err
	}
	img, _, err := decodeImage(path, f, false)
	if err != nil {
		return fmt.Errorf("%s: not a readable image: %v", path, err)
	}
	b := img.Bounds()
	if b.Dx() != w || b.Dy() != h {
		return fmt.Errorf("%s: %d x %d pixels where the first slice has %d x %d (mixed stack)", path, b.Dx(), b.Dy(), w, h)
	}
	switch im := img.(type) {
	case *image.Gray16:
		for y := range h {
			row := im.Pix[y*im.Stride : y*im.Stride+2*w]
			for x := range w {
				out[y*w+x] = uint16(row[2*x])<<8 | uint16(row[2*x+1])
			}
		}
	case *image.Gray:
		for y := range h {
			row := im.Pix[y*im.Stride : y*im.Stride+w]
			for x := range w {
				out[y*w+x] = uint16(row[x])
			}
		}
	case *image.Paletted:
		for y := range h {
			for x := range w {
				g := color.GrayModel.Convert(im.Palette[im.ColorIndexAt(b.Min.X+x, b.Min.Y+y)]).(color.Gray)
				out[y*w+x] = uint16(g.Y)
			}
		}
	default:
		for y := range h {
			for x := range w {
				g := color.Gray16Model.Convert(img.At(b.Min.X+x, b.Min.Y+y)).(color.Gray16)
				out[y*w+x] = g.Y
			}
		}
	}
	return nil
}
