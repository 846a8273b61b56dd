package models

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// TaperSegment starts a stretch of constant taper at FromTip mm from the file's tip; it runs to
// the next segment's start (or the end of the flutes).
type TaperSegment struct {
	FromTip float64
	Taper   float64
}

// Instrument is one file's geometry and material. Lengths in mm.
type Instrument struct {
	Size  int     // ISO size: tip diameter in hundredths of a mm
	Taper float64 // mm of diameter per mm of length; the tip taper when Tapers is set
	// Tapers, when not empty, replaces Taper with piecewise taper segments in increasing FromTip.
	Tapers []TaperSegment
	// CuttingLength ends the flutes; beyond it the file has the shaft diameter. 0: flutes throughout.
	CuttingLength float64
	// MaxFluteD caps the flute diameter. 0: no cap.
	MaxFluteD float64
	// ShaftD is the diameter beyond the cutting length. 0: the flute diameter where the flutes end.
	ShaftD  float64
	Section Section
	Alloy   Alloy
}

// Defaults for a file whose description leaves them out.
const (
	DefaultCuttingLength = 16.0 // mm; ISO 3630-1 asks for at least 16 mm of flutes
	DefaultMaxFluteD     = 1.2  // mm
)

// Taper limits. CommonMaxTaper is the steepest taper files are commonly made with (orifice
// shapers); a steeper one is accepted with a warning, since a typed 0.6 for .06 is the likelier
// story. MaxTaper is refused: no file is made that steep.
const (
	CommonMaxTaper = 0.12
	MaxTaper       = 0.2
	// TaperTolerance: tapers closer than this are the same taper (decimal fractions such as
	// 0.06 are not exact in binary).
	TaperTolerance = 1e-9
)

// DefaultMaxFluteFor returns the default flute cap for a size: DefaultMaxFluteD, or the tip
// diameter where that is larger, so that large sizes keep their tip.
func DefaultMaxFluteFor(size int) float64 {
	return math.Max(DefaultMaxFluteD, float64(size)/100)
}

// NewInstrument returns a constant-taper file with the default cutting length, flute cap,
// round section and superelastic alloy.
func NewInstrument(size int, taper float64) Instrument {
	alloy, _ := BuiltinAlloy(AlloyNiTiSuperelastic)
	return Instrument{
		Size:          size,
		Taper:         taper,
		CuttingLength: DefaultCuttingLength,
		MaxFluteD:     DefaultMaxFluteFor(size),
		Section:       Section{Name: SectionRound},
		Alloy:         alloy,
	}
}

// TipDiameter is d0 = size/100 mm.
func (in Instrument) TipDiameter() float64 {
	return float64(in.Size) / 100
}

// IsVariableTaper reports whether the taper changes along the flutes.
func (in Instrument) IsVariableTaper() bool {
	for _, t := range in.Tapers {
		if t.Taper != in.Tapers[0].Taper {
			return true
		}
	}
	return false
}

// fluteDiameter is d0 plus the integral of the taper from the tip to u, without caps. It and
// cappedFlute take a pointer, so that Diameter (thousands of calls a step) copies the file's
// description once, not at every call within.
func (in *Instrument) fluteDiameter(u float64) float64 {
	d := in.TipDiameter()
	if len(in.Tapers) == 0 {
		return d + in.Taper*u
	}
	for i, seg := range in.Tapers {
		start := seg.FromTip
		if i == 0 {
			start = 0 // the first segment always begins at the tip
		}
		if u <= start {
			break
		}
		end := u
		if i+1 < len(in.Tapers) && in.Tapers[i+1].FromTip < end {
			end = in.Tapers[i+1].FromTip
		}
		if end > start {
			d += seg.Taper * (end - start)
		}
	}
	return d
}

// cappedFlute applies MaxFluteD.
func (in *Instrument) cappedFlute(u float64) float64 {
	d := in.fluteDiameter(u)
	if in.MaxFluteD > 0 && d > in.MaxFluteD {
		return in.MaxFluteD
	}
	return d
}

// Diameter returns the file's diameter in mm at u mm from its tip: d0 + taper*u (piecewise for
// Tapers, continuous at each join), capped at MaxFluteD, and the shaft diameter beyond the
// cutting length. There is no file before its tip: u < 0 gives 0.
func (in Instrument) Diameter(u float64) float64 {
	if u < 0 {
		return 0
	}
	if in.CuttingLength > 0 && u > in.CuttingLength {
		if in.ShaftD > 0 {
			return in.ShaftD
		}
		return in.cappedFlute(in.CuttingLength)
	}
	return in.cappedFlute(u)
}

// TaperAt returns the flute taper in force at u mm from the tip (before any cap).
func (in Instrument) TaperAt(u float64) float64 {
	if len(in.Tapers) == 0 {
		return in.Taper
	}
	t := in.Tapers[0].Taper
	for _, seg := range in.Tapers[1:] {
		if u < seg.FromTip {
			break
		}
		t = seg.Taper
	}
	return t
}

// Label names the file by size and taper: "25/.06"; a variable taper lists its tapers from the
// tip up: "25/.04-.06".
func (in Instrument) Label() string {
	size := fmt.Sprintf("%02d", in.Size)
	if !in.IsVariableTaper() {
		t := in.Taper
		if len(in.Tapers) > 0 {
			t = in.Tapers[0].Taper
		}
		return size + "/" + TaperLabel(t)
	}
	parts := make([]string, 0, len(in.Tapers))
	for _, seg := range in.Tapers {
		l := TaperLabel(seg.Taper)
		if len(parts) == 0 || parts[len(parts)-1] != l {
			parts = append(parts, l)
		}
	}
	return size + "/" + strings.Join(parts, "-")
}

// TaperLabel writes a taper the way the trade does: 0.06 as ".06", 0.1 as ".10", 0.045 as ".045".
func TaperLabel(t float64) string {
	s := strconv.FormatFloat(t, 'f', -1, 64)
	if !strings.Contains(s, ".") || len(s)-strings.Index(s, ".") < 3 {
		s = strconv.FormatFloat(t, 'f', 2, 64)
	}
	return strings.TrimPrefix(s, "0")
}

// TorsionCapacity returns the torque in N*cm that brings the section at u mm from the tip to the
// shear stress tauUltMPa: tau * Z_t(d(u)), with Z_t = pi d^3/16 times the section's factor.
func (in Instrument) TorsionCapacity(u, tauUltMPa float64) float64 {
	d := in.Diameter(u)
	if d <= 0 {
		return 0
	}
	return tauUltMPa * in.Section.TorsionModulus(d) / 10 // N*mm -> N*cm
}

// SecondMoment returns the bending second moment of area in mm^4 of the section at u.
func (in Instrument) SecondMoment(u float64) float64 {
	return in.Section.SecondMoment(in.Diameter(u))
}
