package volume

import (
	"bufio"
	"compress/gzip"
	"context"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"os"
	"strings"

	"github.com/go-gl/mathgl/mgl64"
)

// NIfTI-1 header fields used here (NIfTI-1 Data Format, NIfTI DFWG 2004): a 348-byte header,
// then the voxels from vox_offset. Offsets in bytes.
const (
	niftiHeaderSize = 348
	niftiDim        = 40  // short dim[8]
	niftiDatatype   = 70  // short
	niftiBitpix     = 72  // short
	niftiPixdim     = 76  // float pixdim[8]
	niftiVoxOffset  = 108 // float
	niftiSclSlope   = 112 // float
	niftiSclInter   = 116 // float
	niftiXYZTUnits  = 123 // char
	niftiQformCode  = 252 // short
	niftiSformCode  = 254 // short
	niftiQuatern    = 256 // float quatern_b, c, d, qoffset_x, y, z
	niftiSrow       = 280 // float srow_x[4], srow_y[4], srow_z[4]
	niftiMagic      = 344 // "n+1\0" (one file) or "ni1\0" (header and image apart)
)

// NIfTI-1 data types read here.
const (
	niftiUint8   = 2
	niftiInt16   = 4
	niftiInt32   = 8
	niftiFloat32 = 16
	niftiFloat64 = 64
	niftiInt8    = 256
	niftiUint16  = 512
	niftiUint32  = 768
)

// niftiHeader is the part of the header that places and scales the voxels.
type niftiHeader struct {
	order      binary.ByteOrder
	dims       [3]int
	datatype   int
	bytesPer   int
	voxOffset  int64
	slope, off float64
	affine     [3][4]float64 // voxel index -> world mm
	notes      []string
}

// readNIfTI reads a .nii or .nii.gz file. Values of 8 and 16 bits are kept as they are;
// wider integers and floats are mapped linearly onto 16 bits over their range (read in two
// passes, so the file's own values are never held whole).
func readNIfTI(ctx context.Context, path string, opt Options) (*Volume, error) {
	open := func() (io.ReadCloser, error) { return openMaybeGzip(path) }
	r, err := open()
	if err != nil {
		return nil, err
	}
	var head [niftiHeaderSize]byte
	_, err = io.ReadFull(r, head[:])
	r.Close()
	if err != nil {
		return nil, fmt.Errorf("%s: shorter than a NIfTI-1 header (%d bytes): %w", path, niftiHeaderSize, err)
	}
	h, err := parseNIfTIHeader(path, head[:])
	if err != nil {
		return nil, err
	}
	if err := checkFits(path, h.dims[0], h.dims[1], h.dims[2], opt.MemoryLimit); err != nil {
		return nil, err
	}
	v := &Volume{NX: h.dims[0], NY: h.dims[1], NZ: h.dims[2], Slope: h.slope, Intercept: h.off}
	for a := range 3 {
		col := mgl64.Vec3{h.affine[0][a], h.affine[1][a], h.affine[2][a]}
		v.Spacing[a] = col.Len()
		v.Axes[a] = col.Normalize()
	}
	v.Origin = mgl64.Vec3{h.affine[0][3], h.affine[1][3], h.affine[2][3]}
	v.Info.Format = "NIfTI-1"
	v.Info.Files = 1
	v.Info.Notes = h.notes
	if err := v.checkGeometry(path); err != nil {
		return nil, err
	}
	n := v.NX * v.NY * v.NZ
	v.Data = make([]uint16, n)

	// Wide types: a first pass finds the range that is mapped onto 16 bits.
	lo, hi := 0.0, 65535.0
	wide := h.bytesPer > 2
	if wide {
		lo, hi = math.Inf(1), math.Inf(-1)
		err := niftiScan(ctx, open, path, h, n, func(i int, x float64) {
			if !math.IsNaN(x) && !math.IsInf(x, 0) {
				lo, hi = math.Min(lo, x), math.Max(hi, x)
			}
		})
		if err != nil {
			return nil, err
		}
		if lo > hi {
			return nil, fmt.Errorf("%s: no voxel holds a finite number", path)
		}
		if hi == lo {
			hi = lo + 1
		}
		// stored s stands for file value lo + s*(hi-lo)/65535, then the header's own scale.
		q := (hi - lo) / 65535
		v.Intercept = h.slope*lo + h.off
		v.Slope = h.slope * q
		if h.datatype == niftiFloat32 || h.datatype == niftiFloat64 || hi-lo > 65535 {
			v.Info.Notes = append(v.Info.Notes, fmt.Sprintf("values mapped onto 16 bits: steps of %.3g", math.Abs(v.Slope)))
		}
	}
	signedOff := 0.0
	switch h.datatype {
	case niftiInt16:
		signedOff = 32768
		v.Intercept -= h.slope * 32768
	case niftiInt8:
		signedOff = 128
		v.Intercept -= h.slope * 128
	}
	q := (hi - lo) / 65535
	err = niftiScan(ctx, open, path, h, n, func(i int, x float64) {
		if wide {
			if math.IsNaN(x) {
				x = lo
			}
			x = math.Round((x - lo) / q)
			v.Data[i] = uint16(math.Max(0, math.Min(65535, x)))
			return
		}
		v.Data[i] = uint16(x + signedOff)
	})
	if err != nil {
		return nil, err
	}
	if err := v.checkGeometry(path); err != nil {
		return nil, err
	}
	return v, nil
}

// openMaybeGzip opens a file, decompressing it when it starts with the gzip magic.
func openMaybeGzip(path string) (io.ReadCloser, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	br := bufio.NewReaderSize(f, 1<<20)
	magic, _ := br.Peek(2)
	if len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		gz, err := gzip.NewReader(br)
		if err != nil {
			f.Close()
			return nil, fmt.Errorf("%s: %w", path, err)
		}
		return struct {
			io.Reader
			io.Closer
		}{bufio.NewReaderSize(gz, 1<<20), f}, nil
	}
	return struct {
		io.Reader
		io.Closer
	}{br, f}, nil
}

// niftiScan streams the voxels in file order (i fastest) to fn.
func niftiScan(ctx context.Context, open func() (io.ReadCloser, error), path string, h *niftiHeader, n int, fn func(i int, x float64)) error {
	r, err := open()
	if err != nil {
		return err
	}
	defer r.Close()
	if _, err := io.CopyN(io.Discard, r, h.voxOffset); err != nil {
		return fmt.Errorf("%s: ends before its voxels (vox_offset %d)", path, h.voxOffset)
	}
	buf := make([]byte, 1<<20-(1<<20)%8)
	i := 0
	for i < n {
		if i%(1<<22) == 0 {
			if err := ctx.Err(); err != nil {
				return err
			}
		}
		want := min(len(buf), (n-i)*h.bytesPer)
		got, err := io.ReadFull(r, buf[:want])
		if err != nil {
			return fmt.Errorf("%s: ends after %d of %d voxels", path, i+got/h.bytesPer, n)
		}
		for p := 0; p < got; p += h.bytesPer {
			fn(i, niftiValue(h, buf[p:]))
			i++
		}
	}
	return nil
}

// niftiValue decodes one voxel value of the header's type.
func niftiValue(h *niftiHeader, b []byte) float64 {
	o := h.order
	switch h.datatype {
	case niftiUint8:
		return float64(b[0])
	case niftiInt8:
		return float64(int8(b[0]))
	case niftiInt16:
		return float64(int16(o.Uint16(b)))
	case niftiUint16:
		return float64(o.Uint16(b))
	case niftiInt32:
		return float64(int32(o.Uint32(b)))
	case niftiUint32:
		return float64(o.Uint32(b))
	case niftiFloat32:
		return float64(math.Float32frombits(o.Uint32(b)))
	case niftiFloat64:
		return math.Float64frombits(o.Uint64(b))
	}
	return 0
}

// parseNIfTIHeader checks the header and works out where the voxels lie.
func parseNIfTIHeader(path string, b []byte) (*niftiHeader, error) {
	h := &niftiHeader{order: binary.LittleEndian}
	switch {
	case binary.LittleEndian.Uint32(b) == niftiHeaderSize:
	case binary.BigEndian.Uint32(b) == niftiHeaderSize:
		h.order = binary.BigEndian
	default:
		return nil, fmt.Errorf("%s: not a NIfTI-1 file (sizeof_hdr is not 348; NIfTI-2 is not read)", path)
	}
	magic := string(b[niftiMagic : niftiMagic+4])
	switch magic {
	case "n+1\x00":
	case "ni1\x00":
		return nil, fmt.Errorf("%s: header and image in separate files (.hdr/.img) are not read: save it as one .nii", path)
	default:
		return nil, fmt.Errorf("%s: no NIfTI-1 magic (\"n+1\") at byte %d", path, niftiMagic)
	}
	o := h.order
	i16 := func(off int) int { return int(int16(o.Uint16(b[off:]))) }
	f32 := func(off int) float64 { return float64(math.Float32frombits(o.Uint32(b[off:]))) }
	nd := i16(niftiDim)
	dim := func(k int) int { return i16(niftiDim + 2*k) }
	if nd < 3 || nd > 7 {
		return nil, fmt.Errorf("%s: dim[0] = %d: a 3D volume is read", path, nd)
	}
	for k := 4; k <= nd; k++ {
		if dim(k) > 1 {
			return nil, fmt.Errorf("%s: %d x %d x %d x %d ...: a 4D series is not read, only one 3D volume", path, dim(1), dim(2), dim(3), dim(k))
		}
	}
	for a := range 3 {
		h.dims[a] = dim(a + 1)
		if h.dims[a] < 1 {
			return nil, fmt.Errorf("%s: dimension %d is %d", path, a+1, h.dims[a])
		}
	}
	h.datatype = i16(niftiDatatype)
	switch h.datatype {
	case niftiUint8, niftiInt8:
		h.bytesPer = 1
	case niftiInt16, niftiUint16:
		h.bytesPer = 2
	case niftiInt32, niftiUint32, niftiFloat32:
		h.bytesPer = 4
	case niftiFloat64:
		h.bytesPer = 8
	default:
		return nil, fmt.Errorf("%s: datatype %d is not read (8-64 bit integers and floats are)", path, h.datatype)
	}
	if bp := i16(niftiBitpix); bp != 8*h.bytesPer {
		return nil, fmt.Errorf("%s: bitpix %d does not match datatype %d", path, bp, h.datatype)
	}
	vo := f32(niftiVoxOffset)
	if !(vo >= niftiHeaderSize) || vo > 1<<30 {
		return nil, fmt.Errorf("%s: vox_offset %g is not a place in the file", path, vo)
	}
	h.voxOffset = int64(vo)
	h.slope, h.off = f32(niftiSclSlope), f32(niftiSclInter)
	if h.slope == 0 || math.IsNaN(h.slope) || math.IsInf(h.slope, 0) { // 0: no scaling (NIfTI-1)
		h.slope, h.off = 1, 0
	}
	if math.IsNaN(h.off) || math.IsInf(h.off, 0) {
		h.off = 0
	}
	// Spatial units: bits 0-2 of xyzt_units (1 m, 2 mm, 3 micrometre; 0 unknown).
	unit := 1.0
	switch b[niftiXYZTUnits] & 7 {
	case 1:
		unit = 1000
	case 3:
		unit = 0.001
	case 0:
		h.notes = append(h.notes, "the file does not state its length unit; millimetres assumed")
	}
	pix := func(k int) float64 { return f32(niftiPixdim + 4*k) }
	switch {
	case i16(niftiSformCode) > 0:
		for r := range 3 {
			for c := range 4 {
				h.affine[r][c] = f32(niftiSrow+16*r+4*c) * unit
			}
		}
	case i16(niftiQformCode) > 0:
		qb, qc, qd := f32(niftiQuatern), f32(niftiQuatern+4), f32(niftiQuatern+8)
		qa2 := 1 - (qb*qb + qc*qc + qd*qd)
		qa := 0.0
		if qa2 > 0 {
			qa = math.Sqrt(qa2)
		}
		qfac := 1.0
		if pix(0) < 0 {
			qfac = -1
		}
		rot := [3][3]float64{
			{qa*qa + qb*qb - qc*qc - qd*qd, 2 * (qb*qc - qa*qd), 2 * (qb*qd + qa*qc)},
			{2 * (qb*qc + qa*qd), qa*qa + qc*qc - qb*qb - qd*qd, 2 * (qc*qd - qa*qb)},
			{2 * (qb*qd - qa*qc), 2 * (qc*qd + qa*qb), qa*qa + qd*qd - qc*qc - qb*qb},
		}
		sc := [3]float64{pix(1), pix(2), pix(3) * qfac}
		for r := range 3 {
			for c := range 3 {
				h.affine[r][c] = rot[r][c] * sc[c] * unit
			}
			h.affine[r][3] = f32(niftiQuatern+12+4*r) * unit
		}
	default: // method 1 of the standard: pixdim scaling only
		for a := range 3 {
			h.affine[a][a] = pix(a+1) * unit
		}
		h.notes = append(h.notes, "no qform or sform: voxels placed by their size alone")
	}
	for r := range 3 {
		for c := range 4 {
			if x := h.affine[r][c]; math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, fmt.Errorf("%s: the voxel-to-world matrix holds a value that is not a number", path)
			}
		}
	}
	return h, nil
}

// isNIfTIName tells .nii and .nii.gz names.
func isNIfTIName(path string) bool {
	l := strings.ToLower(path)
	return strings.HasSuffix(l, ".nii") || strings.HasSuffix(l, ".nii.gz")
}
