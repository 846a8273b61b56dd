package analysis

import (
	"bytes"
	"context"
	"fmt"
	"os"

	"tapersweep/mesh"
	"tapersweep/models"
)

// LoadOptions say how to read a canal file.
type LoadOptions struct {
	Canal CanalOptions
	Scale float64 // multiply STL coordinates (0.001 for micrometres); 0 = 1
	// Shell keeps only one separate surface of an STL: 1 = the largest, 2 = the next, ...;
	// 0 keeps them all.
	Shell    int
	Progress func(stage string, done, total int64)
}

// LoadCanal reads a canal from an STL surface or a canal spec (told apart by content) and
// measures it. Errors name the file.
func LoadCanal(ctx context.Context, path string, opt LoadOptions) (*Canal, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	return LoadCanalBytes(ctx, path, data, opt)
}

// LoadCanalBytes is LoadCanal for content already in memory (a dropped file, a URI reader).
func LoadCanalBytes(ctx context.Context, name string, data []byte, opt LoadOptions) (*Canal, error) {
	if models.LooksLikeJSON(data) {
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
	lo := mesh.LoadOptions{Scale: opt.Scale}
	if opt.Progress != nil {
		lo.Progress = func(done, total int64) { opt.Progress("reading", done, total) }
	}
	m, rep, err := mesh.Load(ctx, name, bytes.NewReader(data), int64(len(data)), lo)
	if err != nil {
		return nil, err
	}
	// NewCanal checks the surface it is given (after a shell is picked), so only what reading
	// found is carried over from the load.
	notes := rep.Notes
	if opt.Shell > 0 {
		shells := mesh.Shells(m)
		if opt.Shell > len(shells) {
			return nil, &CanalError{File: name, Err: fmt.Errorf("surface %d asked for, but the file holds %d", opt.Shell, len(shells))}
		}
		m = m.Subset(shells[opt.Shell-1])
		notes = append(notes, fmt.Sprintf("surface %d of %d kept", opt.Shell, len(shells)))
	}
	c, err := NewCanal(ctx, name, m, opt.Canal)
	if err != nil {
		return nil, err
	}
	c.Warnings = append(c.Warnings, notes...)
	return c, nil
}
