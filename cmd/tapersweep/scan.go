package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/analysis/segment"
	"tapersweep/mesh"
	"tapersweep/mesh/volume"
)

// scanFlags are the flags of every command that can take a scan instead of a canal surface.
type scanFlags struct {
	path        *string
	voxel       *float64
	label       *string
	showPatient *bool
	// patient is the patient line of the last scan opened, set only with --show-patient.
	patient string
}

func (sf *scanFlags) register(fs *flag.FlagSet) {
	sf.path = fs.String("scan", "", "a scan instead of a canal file: a `folder` of DICOM slices or of TIFF/PNG/BMP slices (with --voxel), a DICOM multi-frame file or a NIfTI-1 file (.nii, .nii.gz); needs --orifice and --apical-end")
	sf.voxel = fs.Float64("voxel", 0, "voxel edge in `mm` of a stack of image slices (their files do not state it)")
	sf.label = fs.String("label", "", "name of the scan in outputs (default: its folder's or file's name)")
	sf.showPatient = fs.Bool("show-patient", false, "put the patient's name and ID from the scan's header on the outputs (off by default: no patient identifier is written)")
}

func (sf *scanFlags) set() bool { return *sf.path != "" }

// checkScan refuses flags that do not go with a scan.
func (sf *scanFlags) check(stderr io.Writer, cmd string) int {
	if *sf.voxel < 0 || *sf.voxel > 10 {
		return usageError(stderr, cmd, "--voxel must be a size in mm above 0")
	}
	return exitOK
}

func (sf *scanFlags) open(ctx context.Context) (*volume.Volume, error) {
	return volume.Open(ctx, *sf.path, volume.Options{Voxel: *sf.voxel, Label: *sf.label, ReadPatient: *sf.showPatient})
}

// scanSource states where a canal found in a scan comes from: the scan's label, format,
// dimensions, voxel size and date; the patient only when asked.
func scanSource(v *volume.Volume, showPatient bool) string {
	s := v.Describe()
	if showPatient {
		s += "; " + patientLine(v)
	}
	return s
}

// patientLine names the patient as the scan's header does, for outputs the user asked to
// carry it.
func patientLine(v *volume.Volume) string {
	p := v.Info.Patient
	if p == nil || (p.Name == "" && p.ID == "") {
		return "patient: not named in the scan"
	}
	return fmt.Sprintf("patient: %s (ID %s)", strings.ReplaceAll(p.Name, "^", " "), p.ID)
}

// loadScanCanal opens a scan, finds the canal between the two points and measures it.
func loadScanCanal(ctx context.Context, sf *scanFlags, orifice, apex *mgl64.Vec3, opt analysis.CanalOptions) (*analysis.Canal, error) {
	if orifice == nil || apex == nil {
		return nil, errors.New("a scan needs --orifice and --apical-end: the canal's two ends in the scan's coordinates (mm)")
	}
	v, err := sf.open(ctx)
	if err != nil {
		return nil, err
	}
	res, err := segment.Find(ctx, v, segment.Points{Orifice: *orifice, Apex: *apex}, segment.Options{})
	if err != nil {
		return nil, err
	}
	c, err := res.Measure(ctx, v.Info.Label, opt)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", v.Info.Label, err)
	}
	c.Source = scanSource(v, *sf.showPatient)
	if *sf.showPatient {
		sf.patient = patientLine(v)
	}
	c.Warnings = append(c.Warnings, segment.Caution)
	return c, nil
}

// writeSTL writes meshes as one binary STL (each mesh a separate surface), named in its header.
func writeSTL(path, name string, meshes []*mesh.Mesh) error {
	all := mesh.Join(meshes...)
	return writeOutput(path, func(w io.Writer) error { return mesh.WriteSTL(w, all, name) })
}
