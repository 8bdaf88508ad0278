package synth

import (
	"math"
	"testing"
)

// TestStepFor: three samples per resolution element (common practice),
// never finer than DefaultStep, DefaultStep for unsmoothed spectra.
func TestStepFor(t *testing.T) {
	for _, c := range []struct{ R, want float64 }{
		{500, 1.0 / 1500}, {1000, 1.0 / 3000}, {1500, DefaultStep}, {10000, DefaultStep}, {0, DefaultStep}, {math.Inf(1), DefaultStep}, {math.NaN(), DefaultStep},
	} {
		if got := StepFor(c.R); got != c.want {
			t.Errorf("StepFor(%g) = %g, want %g", c.R, got, c.want)
		}
	}
}
