package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"sort"
	"strings"

	"github.com/go-gl/mathgl/mgl64"

	"tapersweep/analysis"
	"tapersweep/analysis/segment"
	"tapersweep/mesh"
	"tapersweep/mesh/volume"
)

// pointList is a flag that may be given several times, one X,Y,Z point each.
type pointList []mgl64.Vec3

func (l *pointList) String() string {
	var parts []string
	for _, p := range *l {
		parts = append(parts, fmt.Sprintf("%g,%g,%g", p[0], p[1], p[2]))
	}
	return strings.Join(parts, " ")
}

func (l *pointList) Set(s string) error {
	p, err := point(s)
	if err != nil {
		return err
	}
	*l = append(*l, *p)
	return nil
}

func segmentCommand() command {
	return command{
		name:    "segment",
		summary: "find canals and the root's outer surface in a scan (DICOM, NIfTI-1, or TIFF/PNG/BMP slices) between the canal ends you give, and write them as STL surfaces",
		usage:   "--scan DIR|FILE --orifice X,Y,Z --apical-end X,Y,Z [--orifice ... --apical-end ...] --out CANAL.stl [--root ROOT.stl] [--voxel MM] [--label TEXT] [--show-patient] [--format json|table]",
		example: "tapersweep segment --scan scans/case7/ --orifice 1.2,4.0,-3.5 --apical-end 3.1,4.4,-17.0 --out case7-canal.stl --root case7-root.stl",
		flags: func(fs *flag.FlagSet) func(stdout, stderr io.Writer) int {
			var sf scanFlags
			sf.register(fs)
			var orifices, apexes pointList
			fs.Var(&orifices, "orifice", "the canal's coronal end `X,Y,Z` in the scan's coordinates (mm); once per canal")
			fs.Var(&apexes, "apical-end", "the canal's apical end `X,Y,Z` in the scan's coordinates (mm); once per canal, in the order of --orifice")
			out := fs.String("out", "", "STL `file` for the canal surfaces (several canals: one surface each, in order)")
			rootOut := fs.String("root", "", "STL `file` for the root's outer surface around each canal (optional)")
			format := fs.String("format", "json", "what to print: json or table")
			return func(stdout, stderr io.Writer) int {
				switch {
				case !sf.set():
					return usageError(stderr, "segment", "--scan is required")
				case len(orifices) == 0 || len(orifices) != len(apexes):
					return usageError(stderr, "segment", "give one --orifice and one --apical-end per canal (%d and %d given)", len(orifices), len(apexes))
				case *out == "":
					return usageError(stderr, "segment", "--out is required")
				case *format != "json" && *format != "table":
					return usageError(stderr, "segment", "--format must be json or table, not %q", *format)
				}
				if code := sf.check(stderr, "segment"); code != exitOK {
					return code
				}
				ctx := context.Background()
				v, err := sf.open(ctx)
				if err != nil {
					return inputError(stderr, "segment", err)
				}
				sum := segmentSummary{Scan: scanSummaryOf(v, *sf.showPatient), CanalFile: *out, RootFile: *rootOut,
					Caution: segment.Caution + " " + analysis.Caution}
				var lumens, roots []*mesh.Mesh
				for k := range orifices {
					res, err := segment.Find(ctx, v, segment.Points{Orifice: orifices[k], Apex: apexes[k]}, segment.Options{})
					if err != nil {
						return inputError(stderr, "segment", fmt.Errorf("canal %d: %w", k+1, err))
					}
					lumens, roots = append(lumens, res.Lumen), append(roots, res.Root)
					sum.Canals = append(sum.Canals, canalSummaryOf(k+1, res))
				}
				name := "tapersweep canal surfaces found in " + v.Info.Label
				if err := writeSTL(*out, name, lumens); err != nil {
					return inputError(stderr, "segment", err)
				}
				if *rootOut != "" {
					if err := writeSTL(*rootOut, "tapersweep root surfaces found in "+v.Info.Label, roots); err != nil {
						return inputError(stderr, "segment", err)
					}
				}
				if *format == "table" {
					writeSegmentTable(stdout, sum)
					return exitOK
				}
				enc := json.NewEncoder(stdout)
				enc.SetIndent("", " ")
				if err := enc.Encode(sum); err != nil {
					return inputError(stderr, "segment", err)
				}
				return exitOK
			}
		},
	}
}

// segmentSummary is what segment prints.
type segmentSummary struct {
	Scan      scanSummary           `json:"scan"`
	Canals    []segmentCanalSummary `json:"canals"`
	CanalFile string                `json:"canal_file"`
	RootFile  string                `json:"root_file,omitempty"`
	Caution   string                `json:"caution"`
}

// scanSummary describes a scan without naming the patient (unless asked).
type scanSummary struct {
	Label      string     `json:"label"`
	Format     string     `json:"format"`
	Dimensions [3]int     `json:"dimensions"`
	VoxelMM    [3]float64 `json:"voxel_mm"`
	SeriesDate string     `json:"series_date,omitempty"`
	Notes      []string   `json:"notes"`
	Patient    string     `json:"patient,omitempty"` // only with --show-patient
}

func scanSummaryOf(v *volume.Volume, showPatient bool) scanSummary {
	s := scanSummary{Label: v.Info.Label, Format: v.Info.Format, Dimensions: [3]int{v.NX, v.NY, v.NZ},
		VoxelMM: v.Spacing, SeriesDate: v.Info.SeriesDate, Notes: append([]string{}, v.Info.Notes...)}
	if showPatient {
		s.Patient = patientLine(v)
	}
	return s
}

// segmentCanalSummary is one canal found.
type segmentCanalSummary struct {
	Canal        int                          `json:"canal"`
	Orifice      [3]float64                   `json:"orifice"`
	ApicalEnd    [3]float64                   `json:"apical_end"`
	PathLengthMM float64                      `json:"path_length_mm"`
	Unresolved   []analysis.UnresolvedSummary `json:"unresolved"`
	// Diameters along the path (area-equivalent, mm), from the orifice, where resolved.
	DiameterAtOrificeMM *float64 `json:"diameter_at_orifice_mm"`
	CanalIntensity      float64  `json:"canal_intensity"`
	DentineIntensity    float64  `json:"dentine_intensity"`
	CanalTriangles      int      `json:"canal_triangles"`
	RootTriangles       int      `json:"root_triangles"`
	Warnings            []string `json:"warnings"`
}

func canalSummaryOf(n int, res *segment.Result) segmentCanalSummary {
	s := analysis.ArcLengths(res.Path)
	L := s[len(s)-1]
	r3 := func(x float64) float64 { return math.Round(x*1000) / 1000 }
	c := segmentCanalSummary{Canal: n, Orifice: [3]float64(res.Path[0]), ApicalEnd: [3]float64(res.Path[len(res.Path)-1]),
		PathLengthMM: r3(L), Unresolved: []analysis.UnresolvedSummary{}, CanalIntensity: math.Round(res.CanalLevel),
		CanalTriangles: len(res.Lumen.Triangles), RootTriangles: len(res.Root.Triangles), Warnings: append([]string{}, res.Warnings...)}
	if res.Resolved[0] {
		d := r3(res.Diameter[0])
		c.DiameterAtOrificeMM = &d
	}
	dent := append([]float64(nil), res.DentineLevel...)
	if len(dent) > 0 {
		c.DentineIntensity = math.Round(median(dent))
	}
	for _, u := range res.Unresolved {
		c.Unresolved = append(c.Unresolved, analysis.UnresolvedSummary{FromApexMM: r3(L - u.From), ToApexMM: r3(L - u.To)})
	}
	return c
}

func median(v []float64) float64 {
	sort.Float64s(v)
	return v[len(v)/2]
}

func writeSegmentTable(w io.Writer, s segmentSummary) {
	sc := s.Scan
	fmt.Fprintf(w, "%s (%s): %d x %d x %d voxels of %.4g x %.4g x %.4g mm", sc.Label, sc.Format,
		sc.Dimensions[0], sc.Dimensions[1], sc.Dimensions[2], sc.VoxelMM[0], sc.VoxelMM[1], sc.VoxelMM[2])
	if sc.SeriesDate != "" {
		fmt.Fprintf(w, ", series of %s", sc.SeriesDate)
	}
	fmt.Fprintln(w)
	if sc.Patient != "" {
		fmt.Fprintln(w, sc.Patient)
	}
	for _, c := range s.Canals {
		fmt.Fprintf(w, "\ncanal %d: path %.2f mm from (%.2f, %.2f, %.2f) to (%.2f, %.2f, %.2f); intensities canal %.0f, dentine %.0f\n",
			c.Canal, c.PathLengthMM, c.Orifice[0], c.Orifice[1], c.Orifice[2], c.ApicalEnd[0], c.ApicalEnd[1], c.ApicalEnd[2],
			c.CanalIntensity, c.DentineIntensity)
		for _, u := range c.Unresolved {
			fmt.Fprintf(w, "  not resolved in the scan from %.2f to %.2f mm from the apical end: the path there is the darkest route only\n", u.FromApexMM, u.ToApexMM)
		}
		for _, warn := range c.Warnings {
			fmt.Fprintf(w, "  note: %s\n", warn)
		}
	}
	fmt.Fprintf(w, "\nwritten: %s", s.CanalFile)
	if s.RootFile != "" {
		fmt.Fprintf(w, ", %s", s.RootFile)
	}
	fmt.Fprintf(w, "\n\n%s\n", s.Caution)
}
