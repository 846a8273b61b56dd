package analysis

import (
	"fmt"

	"tapersweep/models"
)

// CanalError is a problem with one canal: the file's name, once, and what went wrong, wrapped
// so that errors.As finds a *UnitsError or a *mesh.GridTooLargeError inside. Messages name no
// command-line options: a front-end words the fix in its own controls (cmd/tapersweep's
// describe adds --scale, --shell).
type CanalError struct {
	File string
	Err  error
}

func (e *CanalError) Error() string { return e.File + ": " + e.Err.Error() }
func (e *CanalError) Unwrap() error { return e.Err }

// Sizes a root canal can have, in mm: no canal spans more than MaxCanalLengthMM (a whole tooth
// is under 35 mm long) and none less than half a millimetre.
const (
	maxCanalExtent = models.MaxCanalLengthMM
	minCanalExtent = 0.5
)

// UnitsError is a surface whose size says it is not in millimetres.
type UnitsError struct {
	Extent float64 // the diagonal of its bounding box, in the file's units
}

// TooLarge tells a surface too large for mm (likely micrometres) from one too small (likely
// centimetres or metres).
func (e *UnitsError) TooLarge() bool { return e.Extent > maxCanalExtent }

func (e *UnitsError) Error() string {
	if e.TooLarge() {
		return fmt.Sprintf("the mesh spans %.0f units, far more than a tooth in mm", e.Extent)
	}
	return fmt.Sprintf("the mesh spans only %.3g units, far less than a canal in mm", e.Extent)
}

// SpecOptionError is an option for STL surfaces given for a canal spec.
type SpecOptionError struct {
	Option string // "scale" or "shell"
}

func (e *SpecOptionError) Error() string {
	if e.Option == "scale" {
		return "a scale factor applies to STL surfaces; a canal spec is already in mm"
	}
	return "a surface number applies to STL surfaces; a canal spec has one"
}
