package linelists

import "math"

// isFinite reports whether x is neither NaN nor ±Inf.
func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func float64bits(x float64) uint64 { return math.Float64bits(x) }
