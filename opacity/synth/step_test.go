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

// TestObserveOnePoint: a grid of one point has no pixel edges, so a
// flux-conserving resample onto it is refused instead of giving 0.
func TestObserveOnePoint(t *testing.T) {
	r := &Result{Wavelength: []float64{4000, 5000, 6000, 7000}, Flux: []float64{1, 1, 1, 1}, Normalized: []float64{1, 1, 1, 1}}
	if _, _, err := r.Observe(0, []float64{5500}); err == nil {
		t.Error("a one-point grid accepted")
	}
	f, _, err := r.Observe(0, []float64{5000, 5500, 6000})
	if err != nil || len(f) != 3 || math.Abs(f[1]-1) > 1e-12 {
		t.Errorf("a flat spectrum on three points: %v %v", f, err)
	}
}
