package volume

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/go-gl/mathgl/mgl64"
	"github.com/suyashkumar/dicom"
	"github.com/suyashkumar/dicom/pkg/tag"
)

// dicomHeader is what a DICOM file's header says about its pixels and where they lie
// (DICOM PS3.3 Image Plane and Image Pixel modules). Patient fields stay out unless asked.
type dicomHeader struct {
	path                   string
	rows, cols, frames     int
	bitsAlloc, bitsStored  int
	signed                 bool
	samples                int
	photometric            string
	transferSyntax         string
	rowSpacing, colSpacing float64 // Pixel Spacing: between rows, between columns
	orientation            [6]float64
	hasOrientation         bool
	position               mgl64.Vec3
	hasPosition            bool
	slope, intercept       float64
	sliceSpacing           float64 // Spacing Between Slices, else Slice Thickness; 0 unknown
	tilt                   float64
	seriesUID              string
	seriesDate, modality   string
	sopClass               string
	// framePositions holds each frame's Image Position (Patient) in a multi-frame file.
	framePositions []mgl64.Vec3
	patient        *Patient
}

// elementList is a list of elements: a dataset's top level or one sequence item.
type elementList []*dicom.Element

func (l elementList) find(t tag.Tag) *dicom.Element {
	for _, e := range l {
		if e != nil && e.Tag == t {
			return e
		}
	}
	return nil
}

// items returns the items of sequence t.
func (l elementList) items(t tag.Tag) []elementList {
	e := l.find(t)
	if e == nil || e.Value == nil || e.Value.ValueType() != dicom.Sequences {
		return nil
	}
	seq, ok := e.Value.GetValue().([]*dicom.SequenceItemValue)
	if !ok {
		return nil
	}
	out := make([]elementList, 0, len(seq))
	for _, it := range seq {
		if it == nil {
			continue
		}
		if els, ok := it.GetValue().([]*dicom.Element); ok {
			out = append(out, els)
		}
	}
	return out
}

// strs returns a string-valued element's values, trimmed.
func (l elementList) str(t tag.Tag) string {
	e := l.find(t)
	if e == nil || e.Value == nil || e.Value.ValueType() != dicom.Strings {
		return ""
	}
	v, _ := e.Value.GetValue().([]string)
	return strings.TrimSpace(strings.Trim(strings.Join(v, "\\"), "\x00 "))
}

// floats reads a numeric element (decimal strings, floats or integers).
func (l elementList) floats(t tag.Tag) []float64 {
	e := l.find(t)
	if e == nil || e.Value == nil {
		return nil
	}
	switch e.Value.ValueType() {
	case dicom.Floats:
		v, _ := e.Value.GetValue().([]float64)
		return v
	case dicom.Ints:
		v, _ := e.Value.GetValue().([]int)
		out := make([]float64, len(v))
		for i, x := range v {
			out[i] = float64(x)
		}
		return out
	case dicom.Strings:
		v, _ := e.Value.GetValue().([]string)
		var out []float64
		for _, s := range v {
			for _, part := range strings.Split(s, "\\") {
				part = strings.Trim(part, "\x00 ")
				if part == "" {
					continue
				}
				f, err := strconv.ParseFloat(part, 64)
				if err != nil {
					return nil
				}
				out = append(out, f)
			}
		}
		return out
	}
	return nil
}

// float1 reads the first value of a numeric element, or def when it is missing.
func (l elementList) float1(t tag.Tag, def float64) float64 {
	v := l.floats(t)
	if len(v) == 0 || math.IsNaN(v[0]) || math.IsInf(v[0], 0) {
		return def
	}
	return v[0]
}

// int1 reads the first value of an integer element, or def.
func (l elementList) int1(t tag.Tag, def int) int {
	v := l.floats(t)
	if len(v) == 0 || !(math.Abs(v[0]) < 1<<31) {
		return def
	}
	return int(v[0])
}

// functionalGroup finds element t in sequence group of a per-frame item, then of the shared
// groups (DICOM PS3.3 C.7.6.16, Multi-frame Functional Groups).
func functionalGroup(perFrame, shared elementList, group, t tag.Tag) elementList {
	for _, l := range []elementList{perFrame, shared} {
		for _, it := range l.items(group) {
			if it.find(t) != nil {
				return it
			}
		}
	}
	return nil
}

// Transformation of stored values in functional groups: Pixel Value Transformation Sequence.
var pixelValueTransformationSequence = tag.Tag{Group: 0x0028, Element: 0x9145}

// readDICOMHeader parses one file's header (pixel data skipped).
func readDICOMHeader(path string, ds dicom.Dataset, readPatient bool) (*dicomHeader, error) {
	top := elementList(ds.Elements)
	h := &dicomHeader{path: path}
	h.transferSyntax = top.str(tag.TransferSyntaxUID)
	h.sopClass = top.str(tag.MediaStorageSOPClassUID)
	h.rows = top.int1(tag.Rows, 0)
	h.cols = top.int1(tag.Columns, 0)
	h.frames = top.int1(tag.NumberOfFrames, 1)
	h.bitsAlloc = top.int1(tag.BitsAllocated, 0)
	h.bitsStored = top.int1(tag.BitsStored, h.bitsAlloc)
	h.signed = top.int1(tag.PixelRepresentation, 0) == 1
	h.samples = top.int1(tag.SamplesPerPixel, 1)
	h.photometric = top.str(tag.PhotometricInterpretation)
	h.seriesUID = top.str(tag.SeriesInstanceUID)
	h.modality = top.str(tag.Modality)
	h.seriesDate = dicomDate(top.str(tag.SeriesDate))
	if h.seriesDate == "" {
		h.seriesDate = dicomDate(top.str(tag.StudyDate))
	}
	h.tilt = top.float1(tag.GantryDetectorTilt, 0)
	h.slope = top.float1(tag.RescaleSlope, 1)
	h.intercept = top.float1(tag.RescaleIntercept, 0)
	h.sliceSpacing = top.float1(tag.SpacingBetweenSlices, 0)
	if h.sliceSpacing <= 0 {
		h.sliceSpacing = top.float1(tag.SliceThickness, 0)
	}
	ps := top.floats(tag.PixelSpacing)
	iop := top.floats(tag.ImageOrientationPatient)
	ipp := top.floats(tag.ImagePositionPatient)

	// Multi-frame files keep geometry in functional groups.
	shared := top.items(tag.SharedFunctionalGroupsSequence)
	var sharedList elementList
	if len(shared) > 0 {
		sharedList = shared[0]
	}
	perFrame := top.items(tag.PerFrameFunctionalGroupsSequence)
	var first elementList
	if len(perFrame) > 0 {
		first = perFrame[0]
	}
	if len(perFrame) > 0 || sharedList != nil {
		if g := functionalGroup(first, sharedList, tag.PixelMeasuresSequence, tag.PixelSpacing); g != nil {
			ps = g.floats(tag.PixelSpacing)
			if s := g.float1(tag.SpacingBetweenSlices, 0); s > 0 {
				h.sliceSpacing = s
			} else if s := g.float1(tag.SliceThickness, 0); s > 0 && h.sliceSpacing <= 0 {
				h.sliceSpacing = s
			}
		}
		if g := functionalGroup(first, sharedList, tag.PlaneOrientationSequence, tag.ImageOrientationPatient); g != nil {
			iop = g.floats(tag.ImageOrientationPatient)
		}
		if g := functionalGroup(first, sharedList, pixelValueTransformationSequence, tag.RescaleSlope); g != nil {
			h.slope = g.float1(tag.RescaleSlope, 1)
			h.intercept = g.float1(tag.RescaleIntercept, 0)
		}
		for f, it := range perFrame {
			pos := it.items(tag.PlanePositionSequence)
			if len(pos) == 0 {
				h.framePositions = nil
				break
			}
			p := pos[0].floats(tag.ImagePositionPatient)
			if len(p) != 3 {
				return nil, fmt.Errorf("%s: frame %d has no usable Image Position (Patient)", path, f+1)
			}
			h.framePositions = append(h.framePositions, mgl64.Vec3{p[0], p[1], p[2]})
		}
	}
	if len(ps) >= 2 {
		h.rowSpacing, h.colSpacing = ps[0], ps[1]
	}
	if len(iop) == 6 {
		copy(h.orientation[:], iop)
		h.hasOrientation = true
	}
	if len(ipp) == 3 {
		h.position = mgl64.Vec3{ipp[0], ipp[1], ipp[2]}
		h.hasPosition = true
	}
	if readPatient {
		h.patient = &Patient{
			Name:        top.str(tag.PatientName),
			ID:          top.str(tag.PatientID),
			BirthDate:   dicomDate(top.str(tag.PatientBirthDate)),
			Institution: top.str(tag.InstitutionName),
		}
	}
	return h, nil
}

// dicomDate turns a DA value (YYYYMMDD) into YYYY-MM-DD; anything else gives "".
func dicomDate(s string) string {
	s = strings.TrimSpace(s)
	if len(s) != 8 {
		return ""
	}
	for i := 0; i < 8; i++ {
		if !isDigit(s[i]) {
			return ""
		}
	}
	return s[:4] + "-" + s[4:6] + "-" + s[6:]
}

// axes returns the row and column directions and the slice normal of the header's
// orientation (the normal is row x column, DICOM PS3.3 C.7.6.2.1.1).
func (h *dicomHeader) axes() (row, col, normal mgl64.Vec3, err error) {
	if !h.hasOrientation {
		return row, col, normal, fmt.Errorf("%s: no Image Orientation (Patient): the slices cannot be placed", h.path)
	}
	o := h.orientation
	row = mgl64.Vec3{o[0], o[1], o[2]}
	col = mgl64.Vec3{o[3], o[4], o[5]}
	if math.Abs(row.Len()-1) > 1e-3 || math.Abs(col.Len()-1) > 1e-3 || math.Abs(row.Dot(col)) > 1e-3 {
		return row, col, normal, fmt.Errorf("%s: Image Orientation (Patient) is not two perpendicular unit directions", h.path)
	}
	row, col = row.Normalize(), col.Normalize()
	return row, col, row.Cross(col).Normalize(), nil
}

// checkPixels refuses pixel encodings this reader does not take, naming the file.
func (h *dicomHeader) checkPixels() error {
	switch h.transferSyntax {
	case "1.2.840.10008.1.2", "1.2.840.10008.1.2.1", "1.2.840.10008.1.2.2", "":
	default:
		return fmt.Errorf("%s: compressed or deflated pixel data (transfer syntax %s) is not read: export the series uncompressed", h.path, h.transferSyntax)
	}
	if h.rows <= 0 || h.cols <= 0 || h.rows > 1<<15 || h.cols > 1<<15 {
		return fmt.Errorf("%s: image of %d x %d pixels cannot be read", h.path, h.cols, h.rows)
	}
	if h.frames <= 0 || h.frames > 1<<16 {
		return fmt.Errorf("%s: %d frames cannot be read", h.path, h.frames)
	}
	if h.samples != 1 {
		return fmt.Errorf("%s: %d samples per pixel: a scan has one (grey) value per voxel", h.path, h.samples)
	}
	if h.bitsAlloc != 8 && h.bitsAlloc != 16 {
		return fmt.Errorf("%s: %d bits allocated per pixel: 8 or 16 are read", h.path, h.bitsAlloc)
	}
	if h.bitsStored <= 0 || h.bitsStored > h.bitsAlloc {
		return fmt.Errorf("%s: %d bits stored in %d allocated cannot be read", h.path, h.bitsStored, h.bitsAlloc)
	}
	if h.photometric != "" && h.photometric != "MONOCHROME1" && h.photometric != "MONOCHROME2" {
		return fmt.Errorf("%s: photometric interpretation %s: a scan is MONOCHROME1 or MONOCHROME2", h.path, h.photometric)
	}
	if !(h.rowSpacing > 0) || !(h.colSpacing > 0) || h.rowSpacing > 100 || h.colSpacing > 100 {
		return fmt.Errorf("%s: no usable Pixel Spacing (%g, %g mm)", h.path, h.rowSpacing, h.colSpacing)
	}
	if !(h.slope != 0) || math.IsInf(h.slope, 0) || math.IsInf(h.intercept, 0) {
		return fmt.Errorf("%s: Rescale Slope %g cannot be used", h.path, h.slope)
	}
	return nil
}
