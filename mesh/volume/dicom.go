package volume

import (
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"

	"github.com/go-gl/mathgl/mgl64"
	"github.com/suyashkumar/dicom"
	"github.com/suyashkumar/dicom/pkg/tag"
)

// Media Storage Directory (DICOMDIR) files index a medium and hold no image.
const sopMediaDirectory = "1.2.840.10008.1.3.10"

// parseDICOM parses a file, skipping or keeping its pixel data raw. The parser panics on
// some malformed input; that becomes an error naming the file.
func parseDICOM(path string, withPixels bool) (ds dicom.Dataset, err error) {
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("%s: not a readable DICOM file (%v)", path, r)
		}
	}()
	f, err := os.Open(path)
	if err != nil {
		return ds, err
	}
	defer f.Close()
	st, err := f.Stat()
	if err != nil {
		return ds, err
	}
	if err := checkDICOMLengths(path, f, st.Size()); err != nil {
		return ds, err
	}
	opt := dicom.SkipPixelData()
	if withPixels {
		opt = dicom.SkipProcessingPixelDataValue()
	}
	ds, err = dicom.Parse(f, st.Size(), nil, opt)
	if err != nil {
		return ds, fmt.Errorf("%s: not a readable DICOM file: %w", path, err)
	}
	return ds, nil
}

// slicePlace is one slice of a volume: the file (and frame) it comes from and its position.
type slicePlace struct {
	h     *dicomHeader
	frame int // 0 for single-frame files
	pos   mgl64.Vec3
	d     float64 // position along the slice normal
}

func (p slicePlace) name() string {
	if p.h.frames > 1 {
		return fmt.Sprintf("%s frame %d", p.h.path, p.frame+1)
	}
	return p.h.path
}

// readDICOMSeries reads a folder of single-frame slices of one series.
func readDICOMSeries(ctx context.Context, dir string, files []string, opt Options) (*Volume, error) {
	slices.Sort(files)
	var headers []*dicomHeader
	for i, p := range files {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		ds, err := parseDICOM(p, false)
		if err != nil {
			return nil, err
		}
		h, err := readDICOMHeader(p, ds, opt.ReadPatient && len(headers) == 0)
		if err != nil {
			return nil, err
		}
		if h.sopClass == sopMediaDirectory {
			continue
		}
		if h.frames > 1 {
			return nil, fmt.Errorf("%s: a multi-frame file among single slices: open it on its own", p)
		}
		if h.tilt != 0 {
			return nil, fmt.Errorf("%s: gantry tilt of %g degrees: tilted slices are not read", p, h.tilt)
		}
		headers = append(headers, h)
		if opt.Progress != nil {
			opt.Progress(i+1, 2*len(files))
		}
	}
	if len(headers) == 0 {
		return nil, fmt.Errorf("%s: the DICOM files hold no images", dir)
	}
	ref := headers[0]
	if err := ref.checkPixels(); err != nil {
		return nil, err
	}
	for _, h := range headers[1:] {
		if err := sameSeries(ref, h); err != nil {
			return nil, err
		}
	}
	places := make([]slicePlace, len(headers))
	for i, h := range headers {
		if !h.hasPosition {
			return nil, fmt.Errorf("%s: no Image Position (Patient): the slice cannot be placed", h.path)
		}
		places[i] = slicePlace{h: h, pos: h.position}
	}
	v, err := placeSlices(dir, ref, places, opt)
	if err != nil {
		return nil, err
	}
	v.Info.Format = "DICOM series"
	v.Info.Files = len(headers)
	// Fill the slices in parallel, one file at a time per worker.
	plane := v.NX * v.NY
	err = fillSlices(ctx, len(places), func(k int) error {
		raw, err := readRawPixels(places[k].h)
		if err != nil {
			return err
		}
		return convertFrame(places[k].h, raw, 0, v.Data[k*plane:(k+1)*plane])
	}, func(done int) {
		if opt.Progress != nil {
			opt.Progress(len(files)+done, 2*len(files))
		}
	})
	if err != nil {
		return nil, err
	}
	return v, nil
}

// readDICOMFile reads one multi-frame file.
func readDICOMFile(ctx context.Context, path string, opt Options) (*Volume, error) {
	ds, err := parseDICOM(path, true)
	if err != nil {
		return nil, err
	}
	h, err := readDICOMHeader(path, ds, opt.ReadPatient)
	if err != nil {
		return nil, err
	}
	if err := h.checkPixels(); err != nil {
		return nil, err
	}
	if h.frames < 2 {
		return nil, fmt.Errorf("%s: one slice: open the folder that holds the whole series", path)
	}
	_, _, normal, err := h.axes()
	if err != nil {
		return nil, err
	}
	places := make([]slicePlace, h.frames)
	switch {
	case len(h.framePositions) == h.frames:
		for f, p := range h.framePositions {
			places[f] = slicePlace{h: h, frame: f, pos: p}
		}
	case len(h.framePositions) > 0:
		return nil, fmt.Errorf("%s: %d frames but %d frame positions", path, h.frames, len(h.framePositions))
	case h.hasPosition && h.sliceSpacing > 0:
		// Frames stacked from the first position along the normal (no per-frame positions).
		for f := range places {
			places[f] = slicePlace{h: h, frame: f, pos: h.position.Add(normal.Mul(float64(f) * h.sliceSpacing))}
		}
	default:
		return nil, fmt.Errorf("%s: neither per-frame positions nor a slice spacing: the frames cannot be placed", path)
	}
	v, err := placeSlices(path, h, places, opt)
	if err != nil {
		return nil, err
	}
	v.Info.Format = "DICOM multi-frame"
	v.Info.Files = 1
	raw, err := rawPixelData(path, ds)
	if err != nil {
		return nil, err
	}
	ds = dicom.Dataset{} // let the parsed header go; raw holds the only other copy
	plane := v.NX * v.NY
	for k, p := range places {
		if k%16 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		if err := convertFrame(h, raw, p.frame, v.Data[k*plane:(k+1)*plane]); err != nil {
			return nil, err
		}
		if opt.Progress != nil {
			opt.Progress(k+1, len(places))
		}
	}
	return v, nil
}

// sameSeries refuses a slice that does not belong with the reference slice.
func sameSeries(ref, h *dicomHeader) error {
	mixed := func(what string) error {
		return fmt.Errorf("%s: %s differs from %s (mixed series: keep one series per folder)", h.path, what, filepath.Base(ref.path))
	}
	switch {
	case h.seriesUID != ref.seriesUID:
		return mixed("the series")
	case h.rows != ref.rows || h.cols != ref.cols:
		return mixed("the image size")
	case h.bitsAlloc != ref.bitsAlloc || h.bitsStored != ref.bitsStored || h.signed != ref.signed || h.transferSyntax != ref.transferSyntax:
		return mixed("the pixel encoding")
	case math.Abs(h.rowSpacing-ref.rowSpacing) > 1e-4 || math.Abs(h.colSpacing-ref.colSpacing) > 1e-4:
		return mixed("the pixel spacing")
	case h.slope != ref.slope || h.intercept != ref.intercept:
		return mixed("the intensity scale (Rescale Slope and Intercept)")
	}
	for i := range 6 {
		if h.hasOrientation != ref.hasOrientation || math.Abs(h.orientation[i]-ref.orientation[i]) > 1e-4 {
			return mixed("the slice orientation")
		}
	}
	return nil
}

// placeSlices orders the slices along the slice normal (not by file name or instance
// number, DICOM PS3.3 C.7.6.2), checks that they are evenly spaced without gaps or tilt,
// and allocates the volume.
func placeSlices(name string, ref *dicomHeader, places []slicePlace, opt Options) (*Volume, error) {
	row, col, normal, err := ref.axes()
	if err != nil {
		return nil, err
	}
	if ref.tilt != 0 {
		return nil, fmt.Errorf("%s: gantry tilt of %g degrees: tilted slices are not read", ref.path, ref.tilt)
	}
	if len(places) < 3 {
		return nil, fmt.Errorf("%s: %d slices: a scan needs at least 3", name, len(places))
	}
	for i := range places {
		places[i].d = normal.Dot(places[i].pos)
	}
	slices.SortStableFunc(places, func(a, b slicePlace) int {
		switch {
		case a.d < b.d:
			return -1
		case a.d > b.d:
			return 1
		}
		return 0
	})
	gaps := make([]float64, len(places)-1)
	for k := range gaps {
		gaps[k] = places[k+1].d - places[k].d
	}
	sorted := slices.Clone(gaps)
	slices.Sort(sorted)
	step := sorted[len(sorted)/2]
	for k, g := range gaps {
		a, b := places[k], places[k+1]
		switch {
		case g < 1e-3*math.Max(step, 1e-3):
			return nil, fmt.Errorf("%s and %s lie at the same position (%.4g mm along the slice normal)", a.name(), b.name(), a.d)
		case g > 1.5*step:
			return nil, fmt.Errorf("slices missing between %s and %s: they lie %.4g mm apart where the others lie %.4g mm apart",
				a.name(), b.name(), g, step)
		case math.Abs(g-step) > 0.1*step:
			return nil, fmt.Errorf("%s and %s lie %.4g mm apart where the others lie %.4g mm apart: unevenly spaced slices are not read",
				a.name(), b.name(), g, step)
		}
	}
	// Each slice must sit on the normal through the first: a sideways drift is a tilted
	// gantry or a sheared series.
	tol := 0.01 * math.Min(ref.rowSpacing, ref.colSpacing) * float64(len(places))
	tol = math.Max(tol, 1e-3)
	for _, p := range places[1:] {
		off := p.pos.Sub(places[0].pos)
		side := off.Sub(normal.Mul(off.Dot(normal)))
		if side.Len() > tol && side.Len() > 0.05*math.Abs(off.Dot(normal)) {
			return nil, fmt.Errorf("%s is offset %.3g mm sideways from the first slice's normal: tilted or sheared slices are not read", p.name(), side.Len())
		}
	}
	if err := checkFits(name, ref.cols, ref.rows, len(places), opt.MemoryLimit); err != nil {
		return nil, err
	}
	v := &Volume{
		NX: ref.cols, NY: ref.rows, NZ: len(places),
		Spacing:   [3]float64{ref.colSpacing, ref.rowSpacing, (places[len(places)-1].d - places[0].d) / float64(len(places)-1)},
		Origin:    places[0].pos,
		Axes:      [3]mgl64.Vec3{row, col, normal},
		Slope:     ref.slope,
		Intercept: ref.intercept,
	}
	if ref.signed {
		v.Intercept -= ref.slope * float64(int(1)<<(ref.bitsAlloc-1))
	}
	v.Info.SeriesDate = ref.seriesDate
	v.Info.Modality = ref.modality
	v.Info.Patient = ref.patient
	if ref.photometric == "MONOCHROME1" {
		v.Info.Notes = append(v.Info.Notes, "the series is stored for display as MONOCHROME1 (low values bright); intensities are used as rescaled")
	}
	if err := v.checkGeometry(name); err != nil {
		return nil, err
	}
	v.Data = make([]uint16, v.NX*v.NY*v.NZ)
	return v, nil
}

// readRawPixels reads one file's pixel data as it is stored.
func readRawPixels(h *dicomHeader) ([]byte, error) {
	ds, err := parseDICOM(h.path, true)
	if err != nil {
		return nil, err
	}
	return rawPixelData(h.path, ds)
}

func rawPixelData(path string, ds dicom.Dataset) ([]byte, error) {
	e, err := ds.FindElementByTag(tag.PixelData)
	if err != nil || e.Value == nil || e.Value.ValueType() != dicom.PixelData {
		return nil, fmt.Errorf("%s: no pixel data", path)
	}
	info, ok := e.Value.GetValue().(dicom.PixelDataInfo)
	if !ok || info.IsEncapsulated || !info.IntentionallyUnprocessed {
		return nil, fmt.Errorf("%s: compressed (encapsulated) pixel data is not read: export the series uncompressed", path)
	}
	return info.UnprocessedValueData, nil
}

var errShortPixels = errors.New("pixel data shorter than the image size says")

// convertFrame turns frame f of raw pixel data into 16-bit stored values: signed values are
// offset by half the range (the volume's intercept accounts for it), bits above Bits Stored
// are dropped.
func convertFrame(h *dicomHeader, raw []byte, f int, out []uint16) error {
	n := h.rows * h.cols
	bytesPer := h.bitsAlloc / 8
	start := f * n * bytesPer
	if len(out) != n || start+n*bytesPer > len(raw) {
		return fmt.Errorf("%s: %w (%d bytes for %d frames of %d x %d)", h.path, errShortPixels, len(raw), h.frames, h.cols, h.rows)
	}
	src := raw[start : start+n*bytesPer]
	var order binary.ByteOrder = binary.LittleEndian
	if h.transferSyntax == "1.2.840.10008.1.2.2" {
		order = binary.BigEndian
	}
	bits := h.bitsStored
	mask := uint32(1)<<bits - 1
	half := int32(1) << (h.bitsAlloc - 1)
	for i := range n {
		var u uint32
		if bytesPer == 2 {
			u = uint32(order.Uint16(src[2*i:]))
		} else {
			u = uint32(src[i])
		}
		u &= mask
		if h.signed {
			s := int32(u)
			if u&(1<<(bits-1)) != 0 {
				s -= int32(1) << bits
			}
			out[i] = uint16(s + half)
		} else {
			out[i] = uint16(u)
		}
	}
	return nil
}
