package plan

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"tapersweep/models"
)

// ParseTarget reads a target such as "30/.04", "30/0.04" or "30/04" (taper in hundredths).
func ParseTarget(s string) (Target, error) {
	size, taper, ok := strings.Cut(strings.TrimSpace(s), "/")
	if !ok {
		return Target{}, fmt.Errorf("target %q: want SIZE/TAPER such as 30/.04", s)
	}
	n, err := strconv.Atoi(strings.TrimSpace(size))
	if err != nil || n <= 0 || n > 999 {
		return Target{}, fmt.Errorf("target %q: the size must be a whole number from 1 to 999", s)
	}
	taper = strings.TrimSpace(taper)
	t, err := strconv.ParseFloat(taper, 64)
	if err != nil || strings.ContainsAny(taper, "eEnNiIxX+-_") {
		return Target{}, fmt.Errorf("target %q: the taper must be a number such as .04", s)
	}
	if !strings.Contains(taper, ".") {
		t /= 100 // "30/04": hundredths, as the trade writes sizes
	}
	if !(t > 0) || t > models.MaxTaper || math.IsInf(t, 0) {
		return Target{}, fmt.Errorf("target %q: the taper must be above 0 and at most %g mm per mm", s, models.MaxTaper)
	}
	return Target{Size: n, Taper: t}, nil
}
