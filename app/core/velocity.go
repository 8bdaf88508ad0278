package core

import (
	"broadline/physics"
	"fmt"
	"strconv"
	"strings"
)

// ParseVelocity reads "0.2c" or "60000km/s" (spaces allowed before the unit)
// and returns v/c, which must lie in [0, 1).
func ParseVelocity(s string) (float64, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	var num string
	var scale float64
	switch {
	case strings.HasSuffix(t, "km/s"):
		num, scale = strings.TrimSuffix(t, "km/s"), 1/physics.SpeedOfLightKmS
	case strings.HasSuffix(t, "c"):
		num, scale = strings.TrimSuffix(t, "c"), 1
	default:
		return 0, fmt.Errorf("velocity %q needs a unit: a fraction of c like 0.2c, or km/s like 60000km/s", s)
	}
	x, err := strconv.ParseFloat(strings.TrimSpace(num), 64)
	if err != nil {
		return 0, fmt.Errorf("velocity %q: %q is not a number (want e.g. 0.2c or 60000km/s)", s, strings.TrimSpace(num))
	}
	b := x * scale
	if !(b >= 0) || b >= 1 {
		return 0, fmt.Errorf("velocity %q is %g c; want 0 ≤ v < c", s, b)
	}
	return b, nil
}
