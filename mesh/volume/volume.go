// Package volume holds 3D scans (CBCT, micro-CT) as a grid of intensities in mm, and reads
// them: DICOM series (a folder of slices or one multi-frame file), NIfTI-1 (.nii, .nii.gz)
// and stacks of 8/16-bit TIFF, PNG or BMP slices.
//
// Privacy: readers take from a file's header only what places and scales the voxels and the
// series date. Patient fields are read only when Options.ReadPatient asks for them, and no
// error message quotes a header value that could name a person.
package volume

import (
	"fmt"
	"math"

	"github.com/go-gl/mathgl/mgl64"
)

// Volume is a scan: Data[i + NX*(j + NY*k)] is the stored value of voxel (i, j, k), whose
// centre lies at Origin + i*Spacing[0]*Axes[0] + j*Spacing[1]*Axes[1] + k*Spacing[2]*Axes[2]
// in the scan's own patient or world coordinates (mm). The intensity is
// Slope*stored + Intercept (Hounsfield-like units for CT when the file says so).
// Stored values are 16 bits whatever the file held, so a 600x600x500 CBCT takes 360 MB.
type Volume struct {
	NX, NY, NZ       int
	Spacing          [3]float64    // mm between voxel centres along i, j, k
	Origin           mgl64.Vec3    // centre of voxel (0, 0, 0)
	Axes             [3]mgl64.Vec3 // unit directions of i, j, k (orthogonal)
	Data             []uint16
	Slope, Intercept float64
	Info             Info
}

// Info describes a scan without naming the patient.
type Info struct {
	Label      string // the folder's or file's name, or the user's label
	Format     string // "DICOM series", "DICOM multi-frame", "NIfTI-1", "TIFF stack", ...
	SeriesDate string // YYYY-MM-DD when the file states it
	Modality   string // DICOM modality (CT, ...) when stated
	Files      int    // files read
	Notes      []string
	// Patient is filled only when Options.ReadPatient is set; show it only when the user asks.
	Patient *Patient
}

// Patient holds the identifying fields of a DICOM header.
type Patient struct {
	Name, ID, BirthDate, Institution string
}

// Describe is a one-line description for titles and reports: label, format, dimensions,
// voxel size and series date. It never names the patient.
func (v *Volume) Describe() string {
	s := fmt.Sprintf("%s (%s): %d x %d x %d voxels of %s mm", v.Info.Label, v.Info.Format, v.NX, v.NY, v.NZ, v.voxelText())
	if v.Info.SeriesDate != "" {
		s += ", series of " + v.Info.SeriesDate
	}
	return s
}

func (v *Volume) voxelText() string {
	sx, sy, sz := v.Spacing[0], v.Spacing[1], v.Spacing[2]
	if math.Abs(sx-sy) < 1e-6*sx && math.Abs(sx-sz) < 1e-6*sx {
		return fmt.Sprintf("%.4g", sx)
	}
	return fmt.Sprintf("%.4g x %.4g x %.4g", sx, sy, sz)
}

// MinSpacing is the finest voxel edge, mm.
func (v *Volume) MinSpacing() float64 {
	return math.Min(v.Spacing[0], math.Min(v.Spacing[1], v.Spacing[2]))
}

// MaxSpacing is the coarsest voxel edge, mm.
func (v *Volume) MaxSpacing() float64 {
	return math.Max(v.Spacing[0], math.Max(v.Spacing[1], v.Spacing[2]))
}

// Index is the position of voxel (i, j, k) in Data.
func (v *Volume) Index(i, j, k int) int { return i + v.NX*(j+v.NY*k) }

// Value is the intensity of a stored value.
func (v *Volume) Value(stored uint16) float64 { return v.Slope*float64(stored) + v.Intercept }

// At is the intensity of voxel (i, j, k); voxels beyond the grid read as the nearest one.
func (v *Volume) At(i, j, k int) float64 {
	i = max(0, min(v.NX-1, i))
	j = max(0, min(v.NY-1, j))
	k = max(0, min(v.NZ-1, k))
	return v.Value(v.Data[v.Index(i, j, k)])
}

// World is the position in mm of a point given in voxel index coordinates (fractions allowed).
func (v *Volume) World(p mgl64.Vec3) mgl64.Vec3 {
	return v.Origin.Add(v.Axes[0].Mul(p[0] * v.Spacing[0])).
		Add(v.Axes[1].Mul(p[1] * v.Spacing[1])).
		Add(v.Axes[2].Mul(p[2] * v.Spacing[2]))
}

// IndexOf is the voxel index coordinates of a point in mm (the inverse of World).
func (v *Volume) IndexOf(w mgl64.Vec3) mgl64.Vec3 {
	d := w.Sub(v.Origin)
	return mgl64.Vec3{d.Dot(v.Axes[0]) / v.Spacing[0], d.Dot(v.Axes[1]) / v.Spacing[1], d.Dot(v.Axes[2]) / v.Spacing[2]}
}

// Contains tells whether a point in mm lies within the grid (between the outer voxel centres).
func (v *Volume) Contains(w mgl64.Vec3) bool {
	p := v.IndexOf(w)
	return p[0] >= 0 && p[1] >= 0 && p[2] >= 0 &&
		p[0] <= float64(v.NX-1) && p[1] <= float64(v.NY-1) && p[2] <= float64(v.NZ-1)
}

// Sample is the intensity at index coordinates p by trilinear interpolation; beyond the grid
// the nearest voxel is read.
func (v *Volume) Sample(p mgl64.Vec3) float64 {
	fx := math.Max(0, math.Min(p[0], float64(v.NX-1)))
	fy := math.Max(0, math.Min(p[1], float64(v.NY-1)))
	fz := math.Max(0, math.Min(p[2], float64(v.NZ-1)))
	i, j, k := min(int(fx), max(v.NX-2, 0)), min(int(fy), max(v.NY-2, 0)), min(int(fz), max(v.NZ-2, 0))
	a, b, c := fx-float64(i), fy-float64(j), fz-float64(k)
	i1, j1, k1 := min(i+1, v.NX-1), min(j+1, v.NY-1), min(k+1, v.NZ-1)
	d := v.Data
	at := func(i, j, k int) float64 { return float64(d[i+v.NX*(j+v.NY*k)]) }
	s := (1-c)*((1-b)*((1-a)*at(i, j, k)+a*at(i1, j, k))+b*((1-a)*at(i, j1, k)+a*at(i1, j1, k))) +
		c*((1-b)*((1-a)*at(i, j, k1)+a*at(i1, j, k1))+b*((1-a)*at(i, j1, k1)+a*at(i1, j1, k1)))
	return v.Slope*s + v.Intercept
}

// SampleWorld is Sample at a point in mm.
func (v *Volume) SampleWorld(w mgl64.Vec3) float64 { return v.Sample(v.IndexOf(w)) }

// Handedness is +1 when the axes i, j, k turn right-handed in world coordinates, -1 otherwise
// (a mesh built in index space must flip its triangles then).
func (v *Volume) Handedness() float64 {
	if v.Axes[0].Cross(v.Axes[1]).Dot(v.Axes[2]) < 0 {
		return -1
	}
	return 1
}

// Range is the smallest and largest intensity in the volume.
func (v *Volume) Range() (lo, hi float64) {
	if len(v.Data) == 0 {
		return 0, 0
	}
	mn, mx := v.Data[0], v.Data[0]
	for _, s := range v.Data {
		mn, mx = min(mn, s), max(mx, s)
	}
	a, b := v.Value(mn), v.Value(mx)
	return math.Min(a, b), math.Max(a, b)
}

// checkGeometry refuses spacings and axes that cannot place voxels.
func (v *Volume) checkGeometry(name string) error {
	if v.NX < 1 || v.NY < 1 || v.NZ < 1 {
		return fmt.Errorf("%s: %d x %d x %d voxels: every dimension must be at least 1", name, v.NX, v.NY, v.NZ)
	}
	for a := range 3 {
		s := v.Spacing[a]
		if !(s > 0) || math.IsInf(s, 0) || s > 100 {
			return fmt.Errorf("%s: voxel spacing %g mm along axis %d: want a positive size in mm", name, s, a+1)
		}
		if l := v.Axes[a].Len(); math.IsNaN(l) || math.Abs(l-1) > 1e-3 {
			return fmt.Errorf("%s: the direction of axis %d is not a unit vector", name, a+1)
		}
	}
	for a := range 3 {
		for b := a + 1; b < 3; b++ {
			if math.Abs(v.Axes[a].Dot(v.Axes[b])) > 1e-3 {
				return fmt.Errorf("%s: axes %d and %d are not perpendicular (a sheared or tilted grid is not read)", name, a+1, b+1)
			}
		}
	}
	for a := range 3 {
		if math.IsNaN(v.Origin[a]) || math.IsInf(v.Origin[a], 0) {
			return fmt.Errorf("%s: the position of the first voxel is not a number", name)
		}
	}
	if !(v.Slope != 0) || math.IsInf(v.Slope, 0) || math.IsNaN(v.Intercept) || math.IsInf(v.Intercept, 0) {
		return fmt.Errorf("%s: intensity scale %g x + %g cannot be used", name, v.Slope, v.Intercept)
	}
	return nil
}
