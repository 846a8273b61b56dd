package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"

	"tapersweep/mesh"
	"tapersweep/models"
)

// surfaceReport is what `tapersweep surface` prints: the check a user runs first on a new scan.
type surfaceReport struct {
	File              string        `json:"file"`
	Format            string        `json:"format"`
	Solids            int           `json:"solids,omitempty"`
	TrianglesRead     int           `json:"triangles_read"`
	Triangles         int           `json:"triangles"`
	Vertices          int           `json:"vertices"`
	Shells            int           `json:"shells"`
	Closed            bool          `json:"closed"`
	Manifold          bool          `json:"manifold"`
	AreaMM2           float64       `json:"area_mm2"`
	VolumeMM3         *float64      `json:"volume_mm3"` // null when the surface is not closed
	BoundsMM          [2][3]float64 `json:"bounds_mm"`
	BoundaryEdges     int           `json:"boundary_edges"`
	NonManifoldEdges  int           `json:"non_manifold_edges"`
	OppositeEdges     int           `json:"opposite_facing_edges"`
	DegenerateRemoved int           `json:"degenerate_removed"`
	Turned            int           `json:"turned"`
	Warnings          []string      `json:"warnings"`
}

func surfaceCommand() command {
	return command{
		name: "surface",
		summary: "read and check an STL surface and print what it holds: triangles, separate surfaces, closed or not, " +
			"area, volume, edges and warnings",
		usage:   "--canal FILE.stl [--scale K] [--format text|json]",
		example: "tapersweep surface --canal scan.stl --scale 0.001",
		flags: func(fs *flag.FlagSet) func(stdout, stderr io.Writer) int {
			path := fs.String("canal", "", "STL `file` (binary or ASCII)")
			scale := fs.Float64("scale", 1, "multiply coordinates by `K` (0.001 turns micrometres into mm)")
			format := fs.String("format", "text", "output `format`: text or json")
			return func(stdout, stderr io.Writer) int {
				switch {
				case *path == "":
					return usageError(stderr, "surface", "--canal is required")
				case !(*scale > 0) || math.IsInf(*scale, 0):
					return usageError(stderr, "surface", "--scale must be above 0")
				case *format != "text" && *format != "json":
					return usageError(stderr, "surface", "--format must be text or json, not %q", *format)
				}
				rep, err := checkSurface(context.Background(), *path, *scale)
				if err != nil {
					return inputError(stderr, "surface", err)
				}
				printWarnings(stderr, "surface", rep.Warnings)
				if *format == "json" {
					enc := json.NewEncoder(stdout)
					enc.SetIndent("", " ")
					enc.Encode(rep)
					return exitOK
				}
				writeSurfaceText(stdout, rep)
				return exitOK
			}
		},
	}
}

// checkSurface loads an STL as every command does (welded, cleaned, turned outward) and
// states what it holds.
func checkSurface(ctx context.Context, path string, scale float64) (*surfaceReport, error) {
	f, _, err := mesh.OpenInput(path, mesh.MaxSTLBytes)
	if err != nil {
		return nil, err
	}
	head := make([]byte, 512)
	n, _ := io.ReadFull(f, head)
	f.Close()
	if models.IsCanalSpec(head[:n]) {
		return nil, fmt.Errorf("%s: JSON, not an STL surface; the surface command reads STL files", path)
	}
	m, lr, err := mesh.LoadFile(ctx, path, mesh.LoadOptions{Scale: scale})
	if err != nil {
		return nil, err
	}
	s := lr.Surface
	lo, hi := m.Bounds()
	rep := &surfaceReport{File: path, Format: lr.Format, Solids: lr.Solids, TrianglesRead: lr.TrianglesRead,
		Triangles: len(m.Triangles), Vertices: len(m.Vertices), Shells: s.Shells, Closed: s.Closed,
		Manifold: s.Manifold, AreaMM2: mesh.Area(m), BoundsMM: [2][3]float64{lo, hi},
		BoundaryEdges: s.BoundaryEdges, NonManifoldEdges: s.NonManifoldEdges, OppositeEdges: s.InconsistentOrientation,
		DegenerateRemoved: lr.DegenerateRemoved, Turned: lr.Turned, Warnings: lr.Warnings}
	if s.Closed {
		v := s.SignedVolume
		rep.VolumeMM3 = &v
	}
	if rep.Warnings == nil {
		rep.Warnings = []string{}
	}
	return rep, nil
}

func writeSurfaceText(w io.Writer, r *surfaceReport) {
	yes := map[bool]string{true: "yes", false: "no"}
	fmt.Fprintf(w, "%s (%s STL", r.File, r.Format)
	if r.Solids > 1 {
		fmt.Fprintf(w, ", %d solids", r.Solids)
	}
	fmt.Fprintf(w, ")\n")
	fmt.Fprintf(w, "  triangles          %d (%d read, %d with zero area removed, %d turned to face out)\n",
		r.Triangles, r.TrianglesRead, r.DegenerateRemoved, r.Turned)
	fmt.Fprintf(w, "  vertices           %d\n", r.Vertices)
	fmt.Fprintf(w, "  separate surfaces  %d\n", r.Shells)
	fmt.Fprintf(w, "  closed             %s (%d edges border holes)\n", yes[r.Closed], r.BoundaryEdges)
	fmt.Fprintf(w, "  manifold           %s (%d edges shared by more than two triangles)\n", yes[r.Manifold], r.NonManifoldEdges)
	fmt.Fprintf(w, "  area               %.4g mm2\n", r.AreaMM2)
	if r.VolumeMM3 != nil {
		fmt.Fprintf(w, "  volume             %.4g mm3\n", *r.VolumeMM3)
	} else {
		fmt.Fprintf(w, "  volume             - (not closed)\n")
	}
	b := r.BoundsMM
	fmt.Fprintf(w, "  box                x %.4g..%.4g, y %.4g..%.4g, z %.4g..%.4g mm\n", b[0][0], b[1][0], b[0][1], b[1][1], b[0][2], b[1][2])
	for _, wn := range r.Warnings {
		fmt.Fprintf(w, "  warning: %s\n", wn)
	}
}
