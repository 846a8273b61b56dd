package volume

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
)

// Options say how to read a scan.
type Options struct {
	// Voxel is the voxel edge in mm of an image stack, whose files do not state it.
	Voxel float64
	// Label names the scan in titles and reports; default: the folder's or file's name.
	Label string
	// ReadPatient fills Info.Patient from a DICOM header. Off by default: nothing that names
	// the patient is kept unless the user asks to show it.
	ReadPatient bool
	// MemoryLimit in bytes; 0: what the system has free.
	MemoryLimit int64
	// Progress is told of files or slices read.
	Progress func(done, total int)
}

// Open reads a scan: a folder of DICOM slices or of TIFF/PNG/BMP images, a DICOM multi-frame
// file, or a NIfTI-1 file (.nii, .nii.gz). Errors name the file and what is wrong with it.
func Open(ctx context.Context, path string, opt Options) (*Volume, error) {
	st, err := os.Stat(path)
	if err != nil {
		return nil, err
	}
	if !st.IsDir() && !st.Mode().IsRegular() {
		return nil, fmt.Errorf("%s: not a regular file or folder", path)
	}
	var v *Volume
	if st.IsDir() {
		v, err = openFolder(ctx, path, opt)
	} else {
		v, err = openFile(ctx, path, opt)
	}
	if err != nil {
		return nil, err
	}
	v.Info.Label = opt.Label
	if v.Info.Label == "" {
		v.Info.Label = scanLabel(path)
	}
	return v, nil
}

// scanLabel names a scan by its folder or file, without extensions.
func scanLabel(path string) string {
	base := filepath.Base(filepath.Clean(path))
	for _, ext := range []string{".gz", ".nii", ".dcm", ".DCM"} {
		base = strings.TrimSuffix(base, ext)
	}
	return base
}

// isImageSlice tells an image slice of a stack by its extension.
func isImageSlice(name string) bool {
	switch strings.ToLower(filepath.Ext(name)) {
	case ".tif", ".tiff", ".png", ".bmp":
		return true
	}
	return false
}

func openFolder(ctx context.Context, dir string, opt Options) (*Volume, error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, err
	}
	var dicoms, images []string
	subfolders := 0
	for _, e := range entries {
		p := filepath.Join(dir, e.Name())
		if e.IsDir() {
			subfolders++
			continue
		}
		if strings.HasPrefix(e.Name(), ".") || !e.Type().IsRegular() {
			continue // hidden files, and pipes or devices a read would wait on
		}
		switch {
		case isImageSlice(e.Name()):
			images = append(images, p)
		case isDICOMFile(p):
			dicoms = append(dicoms, p)
		}
	}
	switch {
	case len(dicoms) > 0 && len(images) > 0:
		return nil, fmt.Errorf("%s: the folder holds both DICOM files and image slices; keep one scan per folder", dir)
	case len(dicoms) > 0:
		return readDICOMSeries(ctx, dir, dicoms, opt)
	case len(images) > 0:
		slices.SortFunc(images, naturalCompare)
		return readStack(ctx, dir, images, opt)
	case subfolders > 0:
		return nil, fmt.Errorf("%s: no DICOM files or image slices in this folder (subfolders are not searched: open the folder that holds the slices)", dir)
	}
	return nil, fmt.Errorf("%s: no DICOM files or image slices (.tif, .png, .bmp) in this folder", dir)
}

func openFile(ctx context.Context, path string, opt Options) (*Volume, error) {
	switch {
	case isNIfTIName(path):
		return readNIfTI(ctx, path, opt)
	case isDICOMFile(path):
		return readDICOMFile(ctx, path, opt)
	case isImageSlice(path):
		return nil, fmt.Errorf("%s: one image is one slice: open the folder that holds the whole stack", path)
	}
	return nil, fmt.Errorf("%s: not a scan this program reads (a DICOM series or multi-frame file, NIfTI-1 .nii or .nii.gz, or a folder of TIFF, PNG or BMP slices)", path)
}

// isDICOMFile tells a DICOM Part 10 file by the "DICM" marker after its 128-byte preamble.
func isDICOMFile(path string) bool {
	f, err := os.Open(path)
	if err != nil {
		return false
	}
	defer f.Close()
	var head [132]byte
	if _, err := io.ReadFull(f, head[:]); err != nil {
		return false
	}
	return bytes.Equal(head[128:132], []byte("DICM"))
}

// naturalCompare orders names with numbers by value: slice2 before slice10.
func naturalCompare(a, b string) int {
	for a != "" && b != "" {
		da, db := isDigit(a[0]), isDigit(b[0])
		if da && db {
			na, ra := leadingDigits(a)
			nb, rb := leadingDigits(b)
			ta, tb := strings.TrimLeft(na, "0"), strings.TrimLeft(nb, "0")
			if len(ta) != len(tb) {
				return len(ta) - len(tb)
			}
			if c := strings.Compare(ta, tb); c != 0 {
				return c
			}
			a, b = ra, rb
			continue
		}
		if a[0] != b[0] {
			return int(a[0]) - int(b[0])
		}
		a, b = a[1:], b[1:]
	}
	return len(a) - len(b)
}

func isDigit(c byte) bool { return c >= '0' && c <= '9' }

func leadingDigits(s string) (string, string) {
	i := 0
	for i < len(s) && isDigit(s[i]) {
		i++
	}
	return s[:i], s[i:]
}
