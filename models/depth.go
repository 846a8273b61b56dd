package models

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Depth is how deep a file goes: either a fixed number of mm from the orifice, or working length
// plus an offset ("WL", "WL-1.5", "WL+0.5"; past working length is allowed).
type Depth struct {
	FromWL bool    // relative to working length
	MM     float64 // mm from the orifice, or the offset from working length when FromWL
}

// MaxDepthMM bounds a depth or an offset: no canal is that long, so a larger value is a typo.
const MaxDepthMM = 100.0

// DepthMM returns a depth of mm millimetres from the orifice.
func DepthMM(mm float64) Depth { return Depth{MM: mm} }

// DepthWL returns working length plus offset mm.
func DepthWL(offset float64) Depth { return Depth{FromWL: true, MM: offset} }

// ParseDepth reads "17.5", "WL", "WL-1.5" or "WL+0.5" (spaces allowed, "wl" accepted).
func ParseDepth(s string) (Depth, error) {
	t := strings.TrimSpace(s)
	if len(t) >= 2 && strings.EqualFold(t[:2], "WL") {
		rest := strings.TrimSpace(t[2:])
		if rest == "" {
			return DepthWL(0), nil
		}
		sign := rest[0]
		if sign != '+' && sign != '-' {
			return Depth{}, fmt.Errorf("%q: after WL expect + or - and a number of mm, like WL-1.5", s)
		}
		v, err := parseDepthNumber(strings.TrimSpace(rest[1:]), false)
		if err != nil {
			return Depth{}, fmt.Errorf("%q: offset from WL: %v", s, err)
		}
		if sign == '-' {
			v = -v
		}
		return DepthWL(v), nil
	}
	v, err := parseDepthNumber(t, true)
	if err != nil {
		return Depth{}, fmt.Errorf("%q: want mm from the orifice or WL, WL-1.5, WL+0.5: %v", s, err)
	}
	return checkAbsoluteDepth(v)
}

// parseDepthNumber reads a plain decimal number (no NaN, Inf, hex; a leading sign only when
// signed) of at most MaxDepthMM.
func parseDepthNumber(s string, signed bool) (float64, error) {
	body := s
	if signed && strings.HasPrefix(body, "-") {
		body = body[1:]
	}
	if body == "" || body[0] == '+' || body[0] == '-' || strings.ContainsAny(body, "xXpPnNiI_") {
		return 0, fmt.Errorf("not a plain number")
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return 0, fmt.Errorf("not a plain number")
	}
	if v > MaxDepthMM {
		return 0, fmt.Errorf("%g mm is more than %g mm", v, MaxDepthMM)
	}
	return v, nil
}

func checkAbsoluteDepth(v float64) (Depth, error) {
	switch {
	case math.IsNaN(v) || math.IsInf(v, 0):
		return Depth{}, fmt.Errorf("must be a finite number")
	case v <= 0:
		return Depth{}, fmt.Errorf("must be above 0 mm from the orifice (got %g)", v)
	case v > MaxDepthMM:
		return Depth{}, fmt.Errorf("%g mm is more than %g mm", v, MaxDepthMM)
	}
	return DepthMM(v), nil
}

// Validate checks a depth built in code as ParseDepth checks a written one.
func (d Depth) Validate() error {
	if !d.FromWL {
		_, err := checkAbsoluteDepth(d.MM)
		return err
	}
	switch {
	case math.IsNaN(d.MM) || math.IsInf(d.MM, 0):
		return fmt.Errorf("the offset from WL must be a finite number")
	case math.Abs(d.MM) > MaxDepthMM:
		return fmt.Errorf("offset from WL: %g mm is more than %g mm", math.Abs(d.MM), MaxDepthMM)
	}
	return nil
}

// LengthTolerance is how close two lengths in mm must be to count as the same: sums of arc
// lengths differ by rounding, far below any scan's resolution.
const LengthTolerance = 1e-9

// Resolve returns the depth in mm from the orifice for a canal of the given working length.
func (d Depth) Resolve(workingLength float64) float64 {
	if d.FromWL {
		return workingLength + d.MM
	}
	return d.MM
}

// String writes the depth the way ParseDepth reads it.
func (d Depth) String() string {
	num := strconv.FormatFloat(math.Abs(d.MM), 'f', -1, 64)
	if !d.FromWL {
		return strconv.FormatFloat(d.MM, 'f', -1, 64)
	}
	switch {
	case d.MM == 0:
		return "WL"
	case d.MM < 0:
		return "WL-" + num
	}
	return "WL+" + num
}

// MarshalJSON writes a depth from the orifice as a number and one from working length as a string.
func (d Depth) MarshalJSON() ([]byte, error) {
	if math.IsNaN(d.MM) || math.IsInf(d.MM, 0) {
		return nil, fmt.Errorf("depth %v is not a finite number", d.MM)
	}
	if !d.FromWL {
		return []byte(strconv.FormatFloat(d.MM, 'f', -1, 64)), nil
	}
	return json.Marshal(d.String())
}

// UnmarshalJSON reads a number (mm from the orifice) or a string such as "WL-1".
func (d *Depth) UnmarshalJSON(data []byte) error {
	data = bytes.TrimSpace(data)
	if len(data) == 0 {
		return fmt.Errorf("missing value")
	}
	switch data[0] {
	case '"':
		var s string
		if err := json.Unmarshal(data, &s); err != nil {
			return fmt.Errorf("not a valid string")
		}
		v, err := ParseDepth(s)
		if err != nil {
			return err
		}
		*d = v
		return nil
	case 'n', 't', 'f', '[', '{':
		return fmt.Errorf("want a number of mm or a string like \"WL-1\"")
	}
	var f float64
	if err := json.Unmarshal(data, &f); err != nil {
		return fmt.Errorf("not a valid number")
	}
	v, err := checkAbsoluteDepth(f)
	if err != nil {
		return err
	}
	*d = v
	return nil
}
