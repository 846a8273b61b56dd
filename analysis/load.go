package analysis

import (
	"bytes"
	"context"
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
	if models.LooksLikeJSON(head) {
		if err := models.CheckSpecSize(path, size); err != nil {
			return nil, err
		}
		data := make([]byte, size)
		if _, err := f.ReadAt(data, 0); err != nil {
			return nil, fmt.Errorf("%s: cannot read: %w", path, err)
		}
		return loadSpec(ctx, path, data, opt)
	}
	lo := mesh.LoadOptions{Scale: opt.Scale, Workers: opt.Canal.Workers}
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
	if models.LooksLikeJSON(data[:min(len(data), sniffBytes)]) {
		return loadSpec(ctx, name, data, opt)
	}
	lo := mesh.LoadOptions{Scale: opt.Scale, Workers: opt.Canal.Workers}
	if opt.Progress != nil {
		lo.Progress = func(done, total int64) { opt.Progress("reading", done, total) }
	}
	m, rep, err := mesh.Load(ctx, name, bytes.NewReader(data), int64(len(data)), lo)
	if err != nil {
		return nil, err
	}
	return canalFromSurface(ctx, name, m, rep, opt)
}

// loadSpec parses a canal spec; the spec's reader words what is not one (a sequence given as
// the canal, JSON that is no object, UTF-16 text).
func loadSpec(ctx context.Context, name string, data []byte, opt LoadOptions) (*Canal, error) {
	spec, err := models.ParseCanalSpec(name, data)
	if err != nil {
		return nil, err
	}
	if opt.Scale != 0 && opt.Scale != 1 {
		return nil, &CanalError{File: name, Err: &SpecOptionError{Option: "scale"}}
	}
	if opt.Shell != 0 {
		return nil, &CanalError{File: name, Err: &SpecOptionError{Option: "shell"}}
	}
	return CanalFromSpec(ctx, name, spec, opt.Canal)
}

// canalFromSurface keeps the asked-for shell, refuses a surface that cannot be trusted
// (unless forced) and measures it.
func canalFromSurface(ctx context.Context, name string, m *mesh.Mesh, rep mesh.LoadReport, opt LoadOptions) (*Canal, error) {
	// The check of the surface measured (the load's, or the kept shell's) is handed to the
	// canal, which would otherwise make it again; what reading found is carried over as notes.
	notes := rep.Notes
	surface := rep.Surface
	if opt.Canal.Root == nil && surface.Shells > 1 {
		// A surface that encloses the canal is the root's: the canal is measured on its own.
		if canal, root, more := splitNested(m, opt.Shell); root != nil {
			m, opt.Canal.Root, opt.Canal.RootSource = canal, root, "the root's surface in "+name
			notes = append(notes, more...)
			surface = mesh.Validate(m)
			opt.Shell = 0
		}
	}
	if opt.Shell > 0 {
		shells := mesh.Shells(m)
		if opt.Shell > len(shells) {
			return nil, &CanalError{File: name, Err: fmt.Errorf("surface %d asked for, but the file holds %d", opt.Shell, len(shells))}
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
			return nil, &CanalError{File: name, Err: fmt.Errorf("%s%s, so %w", why, also, ErrUntrustedSurface)}
		}
		notes = append(notes, "measured although "+why+": treat every figure as doubtful")
	}
	opt.Canal.checked = &surface
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
