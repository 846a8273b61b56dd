package main

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"tapersweep/analysis"
	"tapersweep/mesh"
)

// Columns of a batch manifest. Each row names a canal file or a scan; an empty cell takes the
// command's flag.
var manifestColumns = []string{"file", "scan", "voxel_mm", "label", "orifice", "apical_end", "working_length_mm", "scale"}

// maxManifestBytes bounds a manifest: a study of 100,000 canals fits in a few MB.
const maxManifestBytes = 16 << 20

// readManifest reads a CSV whose rows name the canals of a study, each with its own orifice,
// apical end (X,Y,Z or "X Y Z" in the file's coordinates), working length and scale. A row may
// name a scan instead of a canal file: the canal is then found between its orifice and apical
// end, which the row must give (several rows may name one scan, a canal each). Paths are
// relative to the manifest's folder. Errors name the manifest, the line and the column.
func readManifest(path string, base analysis.LoadOptions) ([]batchCanalFile, error) {
	f, _, err := mesh.OpenInput(path, maxManifestBytes)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	r := csv.NewReader(io.LimitReader(f, maxManifestBytes))
	r.FieldsPerRecord = -1
	r.Comment = '#'
	header, err := r.Read()
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	col := map[string]int{}
	for i, h := range header {
		h = strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\uFEFF")))
		if !slices.Contains(manifestColumns, h) {
			return nil, fmt.Errorf("%s: line 1, column %d: unknown column %q; the columns are %s",
				path, i+1, h, strings.Join(manifestColumns, ", "))
		}
		if _, dup := col[h]; dup {
			return nil, fmt.Errorf("%s: line 1: column %q appears twice", path, h)
		}
		col[h] = i
	}
	_, hasFile := col["file"]
	_, hasScan := col["scan"]
	if !hasFile && !hasScan {
		return nil, fmt.Errorf("%s: line 1: the header has no \"file\" or \"scan\" column (columns: %s)", path, strings.Join(manifestColumns, ", "))
	}
	dir := filepath.Dir(path)
	var out []batchCanalFile
	seen := map[string]int{}
	for {
		rec, err := r.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %w", path, err)
		}
		line, _ := r.FieldPos(0)
		cell := func(name string) string {
			if i, ok := col[name]; ok && i < len(rec) {
				return strings.TrimSpace(rec[i])
			}
			return ""
		}
		fail := func(name, format string, a ...any) error {
			return fmt.Errorf("%s: line %d, column %s: %s", path, line, name, fmt.Sprintf(format, a...))
		}
		file, scan := cell("file"), cell("scan")
		switch {
		case file == "" && scan == "":
			if strings.Join(rec, "") == "" {
				continue
			}
			return nil, fail("file", "no canal file or scan named")
		case file != "" && scan != "":
			return nil, fail("scan", "a row names a canal file or a scan, not both")
		}
		key := file
		if scan != "" {
			// One scan may hold several canals: a row is one canal, told apart by its ends.
			key = scan + " " + cell("orifice") + " " + cell("apical_end")
		}
		if prev, ok := seen[key]; ok {
			return nil, fail(map[bool]string{true: "file", false: "scan"}[file != ""], "%s is listed again (first on line %d)", key, prev)
		}
		seen[key] = line
		e := batchCanalFile{file: file, path: file, load: base}
		if scan != "" {
			e.file, e.path = fmt.Sprintf("%s (line %d)", scan, line), scan
		}
		if label := cell("label"); label != "" {
			e.file = label
		}
		if !filepath.IsAbs(e.path) {
			e.path = filepath.Join(dir, e.path)
		}
		for _, name := range []string{"orifice", "apical_end"} {
			v := strings.Join(strings.Fields(strings.ReplaceAll(cell(name), ",", " ")), ",")
			if v == "" {
				continue
			}
			p, err := point(v)
			if err != nil {
				return nil, fail(name, "%q is not three numbers X Y Z", cell(name))
			}
			if name == "orifice" {
				e.load.Canal.Extract.Orifice = p
			} else {
				e.load.Canal.Extract.Apex = p
			}
		}
		if v := cell("working_length_mm"); v != "" {
			wl, err := strconv.ParseFloat(v, 64)
			if err != nil || !(wl > 0) || wl > 100 {
				return nil, fail("working_length_mm", "%q is not a length in mm above 0 and at most 100", v)
			}
			e.load.Canal.WorkingLength = wl
		}
		if v := cell("scale"); v != "" {
			k, err := strconv.ParseFloat(v, 64)
			if err != nil || !(k > 0) || k > 1000 {
				return nil, fail("scale", "%q is not a factor above 0 and at most 1000", v)
			}
			e.load.Scale = k
		}
		if v := cell("voxel_mm"); v != "" && scan == "" {
			return nil, fail("voxel_mm", "a voxel size goes with a scan (a stack of image slices), not a canal file")
		}
		if scan != "" {
			if e.load.Canal.Extract.Orifice == nil || e.load.Canal.Extract.Apex == nil {
				return nil, fail(map[bool]string{true: "orifice", false: "apical_end"}[e.load.Canal.Extract.Orifice == nil],
					"a scan needs the canal's two ends (orifice and apical_end, X,Y,Z in the scan's coordinates, mm)")
			}
			if cell("scale") != "" {
				return nil, fail("scale", "a scan states its own voxel size; scale goes with STL files")
			}
			voxel := 0.0
			if v := cell("voxel_mm"); v != "" {
				var err error
				if voxel, err = strconv.ParseFloat(v, 64); err != nil || !(voxel > 0) || voxel > 10 {
					return nil, fail("voxel_mm", "%q is not a voxel size in mm above 0 and at most 10", v)
				}
			}
			label, noPatient := e.file, false
			e.scan = &scanFlags{path: &e.path, voxel: &voxel, label: &label, showPatient: &noPatient}
		}
		out = append(out, e)
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%s: the manifest lists no canals", path)
	}
	return out, nil
}
