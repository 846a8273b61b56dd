package analysis

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"strings"

	"tapersweep/mesh"
	"tapersweep/models"
)

// LoadOptions say how to read a canal file.
type LoadOptions struct {
	Canal CanalOptions
	Scale float64 // multiply STL coordinates (0.001 for micrometres); 0 = 1
	// Shell keeps only one separate surface of an STL: 1 = the largest, 2 = the next, ...;
	// 0 keeps them all.
	Shell int
	// Force measures a surface whose measures cannot be trusted (ErrUntrustedSurface)
	// instead of refusing it; its warnings say why.
	Force    bool
	Progress func(stage string, done, total int64)
}

// ErrUntrustedSurface marks a surface that can be read but not measured with confidence: it
// is not closed (the inside, and so the centerline, is guessed), or welding removed most of
// its triangles. Callers may go on when the user asks (LoadOptions.Force).
var ErrUntrustedSurface = errors.New("its measures cannot be trusted")

// maxSpecBytes bounds a canal spec read from disk; the largest valid spec is far smaller.
const maxSpecBytes = 1 << 20

// sniffBytes is how much of a file decides what it is.
const sniffBytes = 4096

// LoadCanal reads a canal from an STL surface or a canal spec (told apart by content) and
// measures it. The file is streamed (an STL is never held whole in memory), refused when it
// is not a regular file or is larger than a canal file can be, and cancelling ctx stops the
// read. Errors name the file.
func LoadCanal(ctx context.Context, path string, opt LoadOptions) (*Canal, error) {
	f, size, err := mesh.OpenInput(path, mesh.MaxSTLBytes)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	head := make([]byte, min(size, sniffBytes))
	if _, err := io.ReadFull(f, head); err != nil {
		return nil, fmt.Errorf("%s: cannot read: %w", path, err)
	}
	if kind := sniff(head); kind != sniffSTL {
		if size > maxSpecBytes {
			return nil, fmt.Errorf("%s: %d bytes of JSON, more than a canal spec can need (%d)", path, size, maxSpecBytes)
		}
		data := make([]byte, size)
		if _, err := f.ReadAt(data, 0); err != nil {
			return nil, fmt.Errorf("%s: cannot read: %w", path, err)
		}
		return loadSpec(ctx, path, data, opt)
	}
	lo := mesh.LoadOptions{Scale: opt.Scale}
	if opt.Progress != nil {
		lo.Progress = func(done, total int64) { opt.Progress("reading", done, total) }
	}
	m, rep, err := mesh.Load(ctx, path, f, size, lo)
	if err != nil {
		return nil, err
	}
	return canalFromSurface(ctx, path, m, rep, opt)
}

// LoadCanalBytes is LoadCanal for content already in memory (a dropped file, a URI reader).
func LoadCanalBytes(ctx context.Context, name string, data []byte, opt LoadOptions) (*Canal, error) {
	if sniff(data[:min(len(data), sniffBytes)]) != sniffSTL {
		return loadSpec(ctx, name, data, opt)
	}
	lo := mesh.LoadOptions{Scale: opt.Scale}
	if opt.Progress != nil {
		lo.Progress = func(done, total int64) { opt.Progress("reading", done, total) }
	}
	m, rep, err := mesh.Load(ctx, name, bytes.NewReader(data), int64(len(data)), lo)
	if err != nil {
		return nil, err
	}
	return canalFromSurface(ctx, name, m, rep, opt)
}

// What the start of a canal file says it is.
const (
	sniffSTL      = iota
	sniffJSON     // UTF-8 JSON (with or without a byte-order mark)
	sniffUTF16    // text in UTF-16: JSON saved by an editor in the wrong encoding
	sniffNotAnObj // JSON, but not an object: null, a list, a number, a string
)

// sniff tells JSON from an STL by the first bytes. An STL starts with "solid" or an 80-byte
// binary header; JSON starts, after blanks, with one of { [ " n t f - or a digit.
func sniff(head []byte) int {
	if bytes.HasPrefix(head, []byte{0xFE, 0xFF}) || bytes.HasPrefix(head, []byte{0xFF, 0xFE}) {
		return sniffUTF16
	}
	// UTF-16 without a mark: every other byte is zero around a JSON opener.
	if len(head) >= 4 && (head[0] == 0 && (head[1] == '{' || head[1] == '[') || (head[0] == '{' || head[0] == '[') && head[1] == 0) {
		return sniffUTF16
	}
	t := bytes.TrimLeft(bytes.TrimPrefix(head, []byte("\xef\xbb\xbf")), " \t\r\n")
	if len(t) == 0 {
		return sniffSTL // empty: the STL reader says so
	}
	switch t[0] {
	case '{':
		return sniffJSON
	case '[', '"':
		return sniffNotAnObj
	}
	// A bare JSON value: null, true, false or a number.
	if json.Valid(bytes.TrimSpace(t)) {
		return sniffNotAnObj
	}
	return sniffSTL
}

// loadSpec parses a canal spec, telling apart the JSON files that are not one.
func loadSpec(ctx context.Context, name string, data []byte, opt LoadOptions) (*Canal, error) {
	switch sniff(data[:min(len(data), sniffBytes)]) {
	case sniffUTF16:
		return nil, fmt.Errorf("%s: the file is UTF-16 text; save it as UTF-8 (a canal spec is JSON in UTF-8)", name)
	case sniffNotAnObj:
		return nil, fmt.Errorf("%s: JSON, but not a canal spec: a canal spec is one JSON object {\"segments\": [...], ...}", name)
	}
	var keys map[string]json.RawMessage
	if json.Unmarshal(bytes.TrimPrefix(data, []byte("\xef\xbb\xbf")), &keys) == nil {
		if _, seg := keys["segments"]; !seg {
			if _, steps := keys["steps"]; steps {
				return nil, fmt.Errorf("%s: this is a sequence, not a canal (it lists \"steps\"); give it as the sequence", name)
			}
		}
	}
	spec, err := models.ParseCanalSpec(name, data)
	if err != nil {
		return nil, err
	}
	if opt.Scale != 0 && opt.Scale != 1 {
		return nil, fmt.Errorf("%s: --scale applies to STL surfaces; a canal spec is already in mm", name)
	}
	if opt.Shell != 0 {
		return nil, fmt.Errorf("%s: --shell applies to STL surfaces; a canal spec has one", name)
	}
	return CanalFromSpec(ctx, name, spec, opt.Canal)
}

// canalFromSurface keeps the asked-for shell, refuses a surface that cannot be trusted
// (unless forced) and measures it.
func canalFromSurface(ctx context.Context, name string, m *mesh.Mesh, rep mesh.LoadReport, opt LoadOptions) (*Canal, error) {
	// NewCanal checks the surface it is given (after a shell is picked), so only what reading
	// found is carried over from the load.
	notes := rep.Notes
	surface := rep.Surface
	if opt.Shell > 0 {
		shells := mesh.Shells(m)
		if opt.Shell > len(shells) {
			return nil, fmt.Errorf("%s: surface %d asked for, but the file holds %d", name, opt.Shell, len(shells))
		}
		m = m.Subset(shells[opt.Shell-1])
		notes = append(notes, fmt.Sprintf("surface %d of %d kept", opt.Shell, len(shells)))
		surface = mesh.Validate(m)
	}
	if why := untrusted(surface, rep); why != "" {
		if !opt.Force {
			also := ""
			if len(rep.Notes) > 0 {
				also = " (reading found: " + strings.Join(rep.Notes, "; ") + ")"
			}
			return nil, fmt.Errorf("%s: %s%s, so %w", name, why, also, ErrUntrustedSurface)
		}
		notes = append(notes, "measured although "+why+": treat every figure as doubtful")
	}
	c, err := NewCanal(ctx, name, m, opt.Canal)
	if err != nil {
		return nil, err
	}
	c.Warnings = append(c.Warnings, notes...)
	return c, nil
}

// untrusted says why a surface's measures cannot be trusted, or "".
func untrusted(s mesh.Report, rep mesh.LoadReport) string {
	switch {
	case s.BoundaryEdges > 0:
		return fmt.Sprintf("the surface is not closed (%d edges border holes or open ends; the inside, and so the "+
			"centerline and every radius, would be guessed)", s.BoundaryEdges)
	case 2*rep.DegenerateRemoved > rep.TrianglesRead:
		return fmt.Sprintf("%d of its %d triangles had zero area or a repeated corner and were removed "+
			"(the file's coordinates are probably damaged or far too coarse)", rep.DegenerateRemoved, rep.TrianglesRead)
	}
	return ""
}
