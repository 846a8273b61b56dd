package volume

import (
	"context"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/go-gl/mathgl/mgl64"
)

// refSeries reads a DICOM folder with pydicom, orders the slices by their position along the
// slice normal (DICOM PS3.3 C.7.6.2: Image Position and Orientation (Patient)), applies the
// Rescale Slope and Intercept and prints geometry and voxel values at sample places.
const refSeries = `
import sys, json, glob, os
import numpy as np, pydicom
path = sys.argv[1]
files = [pydicom.dcmread(f) for f in sorted(glob.glob(os.path.join(path, '*')))] if os.path.isdir(path) else [pydicom.dcmread(path)]
if len(files) == 1 and int(getattr(files[0], 'NumberOfFrames', 1)) > 1:
    ds = files[0]
    sh = ds.SharedFunctionalGroupsSequence[0]
    iop = [float(x) for x in sh.PlaneOrientationSequence[0].ImageOrientationPatient]
    ps = [float(x) for x in sh.PixelMeasuresSequence[0].PixelSpacing]
    tr = sh.PixelValueTransformationSequence[0]
    slope, inter = float(tr.RescaleSlope), float(tr.RescaleIntercept)
    pos = [np.array([float(x) for x in f.PlanePositionSequence[0].ImagePositionPatient]) for f in ds.PerFrameFunctionalGroupsSequence]
    arr = ds.pixel_array.astype(float) * slope + inter
    frames = list(arr)
else:
    ds = files[0]
    iop = [float(x) for x in ds.ImageOrientationPatient]
    ps = [float(x) for x in ds.PixelSpacing]
    pos = [np.array([float(x) for x in f.ImagePositionPatient]) for f in files]
    frames = [f.pixel_array.astype(float) * float(f.RescaleSlope) + float(f.RescaleIntercept) for f in files]
n = np.cross(iop[:3], iop[3:])
order = np.argsort([p.dot(n) for p in pos])
vol = np.stack([frames[k] for k in order])  # [k, row j, column i]
rng = np.random.default_rng(3)
idx = [[int(rng.integers(0, vol.shape[2])), int(rng.integers(0, vol.shape[1])), int(rng.integers(0, vol.shape[0]))] for _ in range(200)]
print(json.dumps({"shape": [vol.shape[2], vol.shape[1], vol.shape[0]], "spacing": [ps[1], ps[0]],
  "origin": pos[order[0]].tolist(), "last": pos[order[-1]].tolist(), "iop": iop,
  "idx": idx, "val": [float(vol[k, j, i]) for i, j, k in idx], "mean": float(vol.mean())}))
`

type refVolume struct {
	Shape   [3]int
	Spacing [2]float64
	Origin  [3]float64
	Last    [3]float64
	IOP     [6]float64
	Idx     [][3]int
	Val     []float64
	Mean    float64
}

// compareWithReference checks a loaded volume against what the reference library read.
func compareWithReference(t *testing.T, v *Volume, ref refVolume, tol float64) {
	t.Helper()
	if v.NX != ref.Shape[0] || v.NY != ref.Shape[1] || v.NZ != ref.Shape[2] {
		t.Fatalf("dimensions %d x %d x %d, reference %v", v.NX, v.NY, v.NZ, ref.Shape)
	}
	if math.Abs(v.Spacing[0]-ref.Spacing[0]) > 1e-6 || math.Abs(v.Spacing[1]-ref.Spacing[1]) > 1e-6 {
		t.Errorf("pixel spacing %v, reference %v", v.Spacing, ref.Spacing)
	}
	if d := v.Origin.Sub(mgl64.Vec3(ref.Origin)).Len(); d > 1e-4 {
		t.Errorf("first voxel at %v, reference %v", v.Origin, ref.Origin)
	}
	if d := v.World(mgl64.Vec3{0, 0, float64(v.NZ - 1)}).Sub(mgl64.Vec3(ref.Last)).Len(); d > 1e-3 {
		t.Errorf("last slice at %v, reference %v", v.World(mgl64.Vec3{0, 0, float64(v.NZ - 1)}), ref.Last)
	}
	for a := range 3 {
		if d := v.Axes[0][a] - ref.IOP[a]; math.Abs(d) > 1e-5 {
			t.Errorf("row direction %v, reference %v", v.Axes[0], ref.IOP[:3])
		}
		if d := v.Axes[1][a] - ref.IOP[3+a]; math.Abs(d) > 1e-5 {
			t.Errorf("column direction %v, reference %v", v.Axes[1], ref.IOP[3:])
		}
	}
	for n, ijk := range ref.Idx {
		if got := v.At(ijk[0], ijk[1], ijk[2]); math.Abs(got-ref.Val[n]) > tol {
			t.Fatalf("voxel %v: %g, reference %g", ijk, got, ref.Val[n])
		}
	}
	sum := 0.0
	for _, s := range v.Data {
		sum += v.Value(s)
	}
	if mean := sum / float64(len(v.Data)); math.Abs(mean-ref.Mean) > tol+1e-6*math.Abs(ref.Mean) {
		t.Errorf("mean intensity %g, reference %g", mean, ref.Mean)
	}
}

// A series whose file names and instance numbers are shuffled, stored signed with a slope of
// 0.5, read as pydicom (Debian python3-pydicom) reads it.
func TestSeriesAgainstPydicom(t *testing.T) {
	dir := phantom(t, "--voxel", "0.3", "--factor", "2", "--formats", "series,multiframe", "--signed", "--slope", "0.5", "--intercept", "-1000")
	v := open(t, filepath.Join(dir, "series"), Options{})
	var ref refVolume
	pythonJSON(t, refSeries, &ref, filepath.Join(dir, "series"))
	compareWithReference(t, v, ref, 1e-9)
	if v.Info.Format != "DICOM series" || v.Info.SeriesDate != "2024-06-11" || v.Info.Label != "series" {
		t.Errorf("info %+v", v.Info)
	}
	if v.Info.Patient != nil {
		t.Error("patient fields were read without being asked for")
	}

	mf := open(t, filepath.Join(dir, "multiframe.dcm"), Options{})
	var refMF refVolume
	pythonJSON(t, refSeries, &refMF, filepath.Join(dir, "multiframe.dcm"))
	compareWithReference(t, mf, refMF, 1e-9)
	// The same scan stored as one multi-frame file in reversed frame order.
	if mf.NX != v.NX || mf.NZ != v.NZ || mf.Origin.Sub(v.Origin).Len() > 1e-6 {
		t.Fatalf("multi-frame geometry %v %v differs from the series %v %v", mf.Origin, mf.NZ, v.Origin, v.NZ)
	}
	for i := range v.Data {
		if mf.Value(mf.Data[i]) != v.Value(v.Data[i]) {
			t.Fatalf("voxel %d: multi-frame %g, series %g", i, mf.Value(mf.Data[i]), v.Value(v.Data[i]))
		}
	}
}

// An oblique grid (rows turned 30 degrees about z): the axes and positions are the header's.
func TestTiltedAxesAgainstPydicom(t *testing.T) {
	dir := phantom(t, "--voxel", "0.3", "--factor", "1", "--formats", "series", "--orientation", "tilted")
	v := open(t, filepath.Join(dir, "series"), Options{})
	var ref refVolume
	pythonJSON(t, refSeries, &ref, filepath.Join(dir, "series"))
	compareWithReference(t, v, ref, 1e-9)
	if math.Abs(v.Axes[0][1]-0.5) > 1e-5 {
		t.Errorf("row direction %v: want turned 30 degrees", v.Axes[0])
	}
}

// dcmdump (Debian dcmtk) reads the same header values as the reader.
func TestHeaderAgainstDcmdump(t *testing.T) {
	tool, err := exec.LookPath("dcmdump")
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal("dcmdump (Debian dcmtk) is needed for this check")
		}
		t.Skip("dcmdump not installed")
	}
	dir := phantom(t, "--voxel", "0.3", "--factor", "2", "--formats", "series,multiframe", "--signed", "--slope", "0.5", "--intercept", "-1000")
	files, _ := filepath.Glob(filepath.Join(dir, "series", "*.dcm"))
	for _, f := range files[:3] {
		out, err := exec.Command(tool, "+P", "0028,0010", "+P", "0028,0011", "+P", "0028,0030", "+P", "0020,0032",
			"+P", "0020,0037", "+P", "0028,1052", "+P", "0028,1053", "+P", "0028,0103", "+P", "0028,0100", f).Output()
		if err != nil {
			t.Fatal(err)
		}
		vals := map[string][]float64{}
		re := regexp.MustCompile(`\((\w{4},\w{4})\) \w\w (?:\[([^\]]*)\]|(\d+))`)
		for _, m := range re.FindAllStringSubmatch(string(out), -1) {
			s := m[2] + m[3]
			for _, p := range strings.Split(s, `\`) {
				x, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
				if err == nil {
					vals[m[1]] = append(vals[m[1]], x)
				}
			}
		}
		ds, err := parseDICOM(f, false)
		if err != nil {
			t.Fatal(err)
		}
		h, err := readDICOMHeader(f, ds, false)
		if err != nil {
			t.Fatal(err)
		}
		check := func(tag string, got ...float64) {
			want := vals[tag]
			if len(want) != len(got) {
				t.Errorf("%s %s: dcmdump %v, reader %v", filepath.Base(f), tag, want, got)
				return
			}
			for i := range got {
				if math.Abs(got[i]-want[i]) > 1e-9 {
					t.Errorf("%s %s: dcmdump %v, reader %v", filepath.Base(f), tag, want, got)
				}
			}
		}
		b := 0.0
		if h.signed {
			b = 1
		}
		check("0028,0010", float64(h.rows))
		check("0028,0011", float64(h.cols))
		check("0028,0030", h.rowSpacing, h.colSpacing)
		check("0020,0032", h.position[0], h.position[1], h.position[2])
		check("0020,0037", h.orientation[:]...)
		check("0028,1052", h.intercept)
		check("0028,1053", h.slope)
		check("0028,0103", b)
		check("0028,0100", float64(h.bitsAlloc))
	}
}

// copyDir copies a folder of files.
func copyDir(t *testing.T, from string) string {
	t.Helper()
	to := t.TempDir()
	files, _ := os.ReadDir(from)
	for _, f := range files {
		b, err := os.ReadFile(filepath.Join(from, f.Name()))
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(to, f.Name()), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return to
}

// editDICOM changes one header element with pydicom.
func editDICOM(t *testing.T, path, code string) {
	t.Helper()
	script := "import sys, pydicom\nds = pydicom.dcmread(sys.argv[1])\n" + code + "\nds.save_as(sys.argv[1])\n"
	if out, err := exec.Command(debianPython, "-c", script, path).CombinedOutput(); err != nil {
		t.Fatalf("%v %s", err, out)
	}
}

// sliceAt returns the file of the series that lies k-th along the slice normal.
func sliceAt(t *testing.T, dir string, k int) string {
	t.Helper()
	files, _ := filepath.Glob(filepath.Join(dir, "*.dcm"))
	type fz struct {
		f string
		z float64
	}
	var all []fz
	for _, f := range files {
		ds, err := parseDICOM(f, false)
		if err != nil {
			t.Fatal(err)
		}
		h, _ := readDICOMHeader(f, ds, false)
		all = append(all, fz{f, h.position[2]})
	}
	for i := range all {
		for j := i + 1; j < len(all); j++ {
			if all[j].z < all[i].z {
				all[i], all[j] = all[j], all[i]
			}
		}
	}
	return all[k].f
}

// Bad series are refused with a message naming the file (DICOM PS3.3: one series, evenly
// spaced slices along the normal; gantry tilt changes the geometry).
func TestSeriesRefusals(t *testing.T) {
	dir := phantom(t, "--voxel", "0.3", "--factor", "1", "--formats", "series")
	other := phantom(t, "--voxel", "0.3", "--factor", "1", "--formats", "series", "--seed", "8")
	src := filepath.Join(dir, "series")
	cases := []struct {
		name  string
		edit  func(t *testing.T, d string) string // returns the file the message must name
		wants []string
	}{
		{"mixed series", func(t *testing.T, d string) string {
			f := sliceAt(t, filepath.Join(other, "series"), 5)
			b, _ := os.ReadFile(f)
			os.WriteFile(filepath.Join(d, "ZZ-other.dcm"), b, 0o644)
			return "ZZ-other.dcm"
		}, []string{"mixed series"}},
		{"missing slice", func(t *testing.T, d string) string {
			f := sliceAt(t, d, 10)
			os.Remove(f)
			return filepath.Base(sliceAt(t, d, 9))
		}, []string{"slices missing"}},
		{"gantry tilt", func(t *testing.T, d string) string {
			f := sliceAt(t, d, 0)
			editDICOM(t, f, "ds.GantryDetectorTilt = '12'")
			return ""
		}, []string{"gantry tilt", "not read"}},
		{"sheared", func(t *testing.T, d string) string {
			f := sliceAt(t, d, 20)
			editDICOM(t, f, "p = [float(x) for x in ds.ImagePositionPatient]\np[0] += 1.5\nds.ImagePositionPatient = [str(x) for x in p]")
			return filepath.Base(f)
		}, []string{"sideways"}},
		{"same position", func(t *testing.T, d string) string {
			f := sliceAt(t, d, 20)
			g := sliceAt(t, d, 21)
			editDICOM(t, g, "import pydicom as p2\nds.ImagePositionPatient = p2.dcmread('"+f+"').ImagePositionPatient")
			return ""
		}, []string{"same position"}},
		{"compressed", func(t *testing.T, d string) string {
			f := sliceAt(t, d, 3)
			editDICOM(t, f, "from pydicom.encaps import encapsulate\nds.PixelData = encapsulate([ds.PixelData])\nds['PixelData'].VR = 'OB'\nds['PixelData'].is_undefined_length = True\nds.file_meta.TransferSyntaxUID = '1.2.840.10008.1.2.5'")
			return filepath.Base(f)
		}, []string{"compressed"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := copyDir(t, src)
			file := c.edit(t, d)
			_, err := Open(context.Background(), d, Options{})
			if err == nil {
				t.Fatal("accepted")
			}
			msg := err.Error()
			for _, w := range append(c.wants, file) {
				if !strings.Contains(msg, w) {
					t.Errorf("message %q does not say %q", msg, w)
				}
			}
		})
	}
}

// Patient fields are read only when asked, and the volume's description never holds them.
func TestPatientOnlyWhenAsked(t *testing.T) {
	dir := phantom(t, "--voxel", "0.3", "--factor", "1", "--formats", "series", "--patient", madeUpPatient)
	v := open(t, filepath.Join(dir, "series"), Options{})
	if v.Info.Patient != nil {
		t.Fatal("patient read without being asked")
	}
	for _, f := range strings.Split(madeUpPatient, "|") {
		if strings.Contains(v.Describe(), f) || strings.Contains(v.Describe(), "1901-02-03") {
			t.Errorf("description %q names the patient", v.Describe())
		}
	}
	w := open(t, filepath.Join(dir, "series"), Options{ReadPatient: true, Label: "case 7"})
	p := w.Info.Patient
	if p == nil || p.Name != "ZEBULON^QUARTERMAINE" || p.ID != "ZQ-4471-0093" || p.BirthDate != "1901-02-03" || p.Institution != "Quarry Hill Invented Clinic" {
		t.Errorf("patient %+v", p)
	}
	if w.Info.Label != "case 7" {
		t.Errorf("label %q", w.Info.Label)
	}
}

// A volume that would not fit is refused before anything is allocated.
func TestRefusesWhatWouldNotFit(t *testing.T) {
	dir := phantom(t, "--voxel", "0.3", "--factor", "1", "--formats", "series")
	_, err := Open(context.Background(), filepath.Join(dir, "series"), Options{MemoryLimit: 100_000})
	if err == nil || !strings.Contains(err.Error(), "memory") || !strings.Contains(err.Error(), "series") {
		t.Fatalf("error %v", err)
	}
}
