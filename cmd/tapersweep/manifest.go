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

// Columns of a batch manifest. Only file is required; an empty cell takes the command's flag.
var manifestColumns = []string{"file", "orifice", "apical_end", "working_length_mm", "scale"}

// maxManifestBytes bounds a manifest: a study of 100,000 canals fits in a few MB.
const maxManifestBytes = 16 << 20

// readManifest reads a CSV whose rows name the canals of a study, each with its own orifice,
// apical end (X,Y,Z or "X Y Z" in the file's coordinates), working length and scale. Files are
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
	if _, ok := col["file"]; !ok {
		return nil, fmt.Errorf("%s: line 1: the header has no \"file\" column (columns: %s)", path, strings.Join(manifestColumns, ", "))
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
		file := cell("file")
		if file == "" {
			if strings.Join(rec, "") == "" {
				continue
			}
			return nil, fail("file", "no canal file named")
		}
		if prev, ok := seen[file]; ok {
			return nil, fail("file", "%s is listed again (first on line %d)", file, prev)
		}
		seen[file] = line
		e := batchCanalFile{file: file, path: file, load: base}
		if !filepath.IsAbs(file) {
			e.path = filepath.Join(dir, file)
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
		out = append(out, e)
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%s: the manifest lists no canals", path)
	}
	return out, nil
}
