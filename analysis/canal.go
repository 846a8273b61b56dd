// Package analysis turns a canal surface into a measured canal (centerline, frames, radius
// map, curvature measures) and runs file sequences through it. It is pure computation: no
// files, no screens. Canal and Result are immutable once built and safe to share.
package analysis

import (
	"context"
	"fmt"
	"math"
	"sync"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/mesh"
	"tapersweep/mesh/parallel"
	"tapersweep/models"
)

// DefaultAngles is the number of directions around each station in the radius map.
const DefaultAngles = 128

// Canal is one measured canal. Everything the sweep needs is precomputed here once.
type Canal struct {
	Name          string
	Mesh          *mesh.Mesh
	Wall          *mesh.BVH
	Line          *Centerline
	Measures      Measures
	WorkingLength float64
	Angles        int
	// Rho[i*Angles+j] is the distance from station i along direction j (theta = 2 pi j/Angles)
	// to the wall, mm.
	Rho []float32
	// Each wall vertex's own place: arc length and angle (radians, 0..2 pi).
	VertexS, VertexTheta []float32
	Voxel                float64 // voxel edge used for the centerline, mm
	// SurfaceDetail is the median edge of the wall's triangles, mm: for a segmented scan about
	// its voxel size. 0 for parametric canals, whose mesh detail is ours.
	SurfaceDetail float64
	Warnings      []string // about the mesh and the extraction, in plain words
	// Unresolved lists the stretches (arc length from the orifice) where the scan the canal
	// was found in does not show its lumen; there it follows the scan's darkest path only.
	Unresolved []Stretch
	// Source says where a canal found in a scan comes from (the scan's label, format, size and
	// date); empty for surfaces and specs.
	Source string
	// Exact is the known centerline of a parametric canal, sampled every StationSpacing from
	// the orifice (nil for scans). Kept for checks, never used by the analysis.
	Exact []mgl64.Vec3
	// Root is the root's outer surface around the canal (nil when none is known), and
	// Thickness the wall left to it from the canal as scanned (station-major like Rho, mm;
	// negative where the canal passes outside the root), each cell at most wallMapTolerance
	// (or a tenth of the wall) above the exact distance, the thinnest exactly.
	Root        *Root
	Thickness   []float32
	scannedWall *wallMap     // with each cell's bounds and a nearby root point
	wallAtLimit *wallAtLimit // the same, exact about the last limit a run asked for
}

// CanalOptions tune how a canal is measured.
type CanalOptions struct {
	Extract       ExtractOptions
	Angles        int     // 0 = DefaultAngles
	WorkingLength float64 // mm; 0 = the spec's or the centerline's length
	// Workers is the number of goroutines the measuring may keep busy; 0 uses every core. The
	// canal does not depend on it.
	Workers int
	// Root is the root's outer surface (nil: none known), named by RootSource in the outputs.
	Root       *mesh.Mesh
	RootSource string
	// checked is the surface's check when already made on this very mesh (by the load), so
	// it is not made again; nil: the canal checks its mesh.
	checked *mesh.Report
}

// NewCanal measures a closed canal mesh whose units are not known to be mm (a scan): a size no
// canal has in mm is refused with a *UnitsError. Errors are *CanalError naming the file.
func NewCanal(ctx context.Context, name string, m *mesh.Mesh, opt CanalOptions) (*Canal, error) {
	c, err := newCanal(ctx, name, m, opt, true)
	if err != nil {
		return nil, &CanalError{File: name, Err: err}
	}
	return c, nil
}

// newCanal measures a mesh; checkSize refuses a size no canal has in mm (a spec's mesh is in mm
// by definition and bounded by its own limits).
func newCanal(ctx context.Context, name string, m *mesh.Mesh, opt CanalOptions, checkSize bool) (*Canal, error) {
	if len(m.Triangles) == 0 {
		return nil, fmt.Errorf("the mesh has no triangles")
	}
	if checkSize {
		if err := checkUnits(m); err != nil {
			return nil, err
		}
	}
	c := &Canal{Name: name, Mesh: m, Angles: opt.Angles}
	if c.Angles <= 0 {
		c.Angles = DefaultAngles
	}
	// The BVH is not needed until the centerline's sections are outlined, nor the surface's
	// check until the very end: with a core to spare the BVH is built while the voxel
	// searches run, then the check is made while the line is measured and the vertices
	// placed. On a huge mesh the searches are done first, and the check is made on their
	// goroutine while the BVH is still building. The check and the centerline's size both use
	// sums over the triangles (area, volume, degenerate triangles), taken in one pass first;
	// a surface checked by its load is not checked again.
	var sums mesh.TriangleSums
	summed := make(chan struct{})
	sum := func() {
		sums = mesh.SumTriangles(m)
		close(summed)
	}
	var check mesh.Report
	var checkOnce sync.Once
	if opt.checked != nil {
		check = *opt.checked
		checkOnce.Do(func() {})
	}
	validate := func() {
		checkOnce.Do(func() {
			<-summed
			check = mesh.ValidateWithSums(m, sums)
		})
	}
	ready := make(chan struct{})
	prepare := func() {
		c.Wall = mesh.NewBVH(m)
		close(ready)
		validate()
	}
	if parallel.Workers(opt.Workers, 2) > 1 {
		go prepare()
		sum()
	} else {
		sum()
		prepare()
	}
	wall := func() *mesh.BVH {
		select {
		case <-ready:
		default:
			validate()
			<-ready
		}
		return c.Wall
	}
	pts, info, err := extractCenterline(ctx, m, sums.Area, sums.Volume, wall, opt.Extract, opt.Workers)
	<-ready
	if err != nil {
		return nil, fmt.Errorf("centerline: %w", err)
	}
	c.Voxel = info.voxel
	c.SurfaceDetail = info.noise
	c.Warnings = append(c.Warnings, info.warnings...)
	if len(pts) < 4 {
		return nil, fmt.Errorf("the canal is shorter than %.2f mm", 3*StationSpacing)
	}
	c.Line = newCenterline(pts, StationSpacing, curvatureWindow(info.noise), info.measuredFrom, info.measuredTo,
		endZone*info.endRadius[0], endZone*info.endRadius[1], opt.Workers)
	// The measures read only the line, as the radius map and the vertices' places do: with a
	// core to spare they are taken while those are made (most of the measures' work is one
	// search at a time).
	measured := make(chan struct{})
	measure := func() {
		c.Measures = Measure(c.Line, schneiderTolerance(c.Voxel, c.SurfaceDetail))
		close(measured)
	}
	if parallel.Workers(opt.Workers, 2) > 1 {
		go measure()
	} else {
		measure()
	}
	var holes bool
	if err := ctx.Err(); err == nil {
		holes = c.buildRadiusMap(opt.Workers)
		c.placeVertices(opt.Workers)
	}
	<-measured
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	// The surface's check, made meanwhile, is only read now; its warnings come first.
	validate()
	c.Warnings = append(check.Warnings(), c.Warnings...)
	c.Warnings = append(c.Warnings, c.Measures.Warnings()...)
	c.WorkingLength = c.Line.Length()
	if opt.WorkingLength > 0 {
		c.WorkingLength = opt.WorkingLength
	}
	// A working length a hair beyond the measured centerline (a spec's exact length against the
	// extracted one) is the apical end.
	if over := c.WorkingLength - c.Line.Length(); over > 0 && over < 0.1 {
		c.WorkingLength = c.Line.Length()
	}
	if c.WorkingLength > c.Line.Length()+models.LengthTolerance {
		c.Warnings = append(c.Warnings, fmt.Sprintf(
			"working length %.2f mm is longer than the canal's centerline (%.2f mm)", c.WorkingLength, c.Line.Length()))
	}
	if holes {
		c.Warnings = append(c.Warnings, "some rays from the centerline found no wall: the surface may have holes")
	}
	if opt.Root != nil {
		if err := c.attachRoot(opt.Root, opt.RootSource, opt.Workers); err != nil {
			return nil, err
		}
	}
	return c, nil
}

// CanalFromSpec builds the mesh of a parametric canal and measures it as a scan would be
// measured, except that the spec states its ends: s = 0 is the orifice whatever the
// diameters, so the ends are never guessed. The exact centerline is kept alongside for checks.
func CanalFromSpec(ctx context.Context, name string, spec *models.CanalSpec, opt CanalOptions) (*Canal, error) {
	m := spec.Mesh(StationSpacing, 96)
	if root := spec.RootMesh(StationSpacing, 192); root != nil && opt.Root == nil {
		opt.Root, opt.RootSource = root, "the canal spec"
	}
	if opt.WorkingLength == 0 {
		opt.WorkingLength = spec.WorkingLength()
	}
	if opt.Extract.Orifice == nil && opt.Extract.Apex == nil {
		orifice, _, _ := spec.At(0)
		apex, _, _ := spec.At(spec.Length())
		opt.Extract.Orifice, opt.Extract.Apex = &orifice, &apex
	}
	c, err := newCanal(ctx, name, m, opt, false)
	if err != nil {
		return nil, &CanalError{File: name, Err: err}
	}
	if spec.Name != "" {
		c.Name = spec.Name
	}
	c.Exact, _, _ = spec.Centerline(StationSpacing)
	c.SurfaceDetail = 0
	return c, nil
}

// RhoAt is the wall distance at arc length s and angle theta (radians), interpolated
// bilinearly in the radius map.
func (c *Canal) RhoAt(s, theta float64) float64 { return c.MapAt(c.Rho, s, theta) }

// MapAt interpolates any station-major map of this canal (the radius map, a step's depth of
// cut or prepared canal) bilinearly at arc length s and angle theta (radians).
func (c *Canal) MapAt(m []float32, s, theta float64) float64 {
	return c.mapAt(m, c.stationPlace(s), c.anglePlace(theta))
}

// mapPlace is where a point falls between the map's stations (i, i+1, the weight a of i+1) or
// between its directions (j, j1, the weight b of j1).
type mapPlace struct {
	i, i1 int
	w     float64
}

// stationPlace is where arc length s falls between the stations.
func (c *Canal) stationPlace(s float64) mapPlace {
	n := c.Line.Len()
	fs := math.Max(0, math.Min(s/c.Line.DS, float64(n-1)))
	i := min(int(fs), n-2)
	return mapPlace{i, i + 1, fs - float64(i)}
}

// anglePlace is where angle theta (radians) falls between the map's directions.
func (c *Canal) anglePlace(theta float64) mapPlace {
	ft := math.Mod(theta/(2*math.Pi)*float64(c.Angles), float64(c.Angles))
	if ft < 0 {
		ft += float64(c.Angles)
	}
	j := int(ft) % c.Angles
	return mapPlace{j, (j + 1) % c.Angles, ft - math.Floor(ft)}
}

// mapAt interpolates map m bilinearly at a place between stations and one between directions.
func (c *Canal) mapAt(m []float32, st, an mapPlace) float64 {
	a, b := st.w, an.w
	r := func(i, j int) float64 { return float64(m[i*c.Angles+j]) }
	return (1-a)*((1-b)*r(st.i, an.i)+b*r(st.i, an.i1)) + a*((1-b)*r(st.i1, an.i)+b*r(st.i1, an.i1))
}

// MeanRadius is the mean wall distance at station i.
func (c *Canal) MeanRadius(i int) float64 {
	sum := 0.0
	for _, r := range c.Rho[i*c.Angles : (i+1)*c.Angles] {
		sum += float64(r)
	}
	return sum / float64(c.Angles)
}

// checkUnits refuses a mesh whose size says it is not in millimetres.
func checkUnits(m *mesh.Mesh) error {
	lo, hi := m.Bounds()
	size := hi.Sub(lo).Len()
	switch {
	case math.IsNaN(size) || math.IsInf(size, 0):
		return fmt.Errorf("the mesh has coordinates that are not numbers")
	case size > maxCanalExtent || size < minCanalExtent:
		return &UnitsError{Extent: size}
	}
	return nil
}
