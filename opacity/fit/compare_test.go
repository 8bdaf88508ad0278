package fit

import (
	"math"
	"testing"

	"broadline/opacity/synth"
	"broadline/spectra"
)

// TestCompareByHand: a flat model (2.0) against five observed samples, worked
// by hand. 4900 Å lies outside the model (5000–6000 Å) and is left out of
// the overlay; 5400 Å is masked (telluric) and 5600 Å has σ = 0, so neither
// counts; the rest give χ² = ((2.5 − 2)/0.5)² + ((1 − 2)/0.25)² = 1 + 16 = 17
// over N = 2.
func TestCompareByHand(t *testing.T) {
	var w, f, n []float64
	for l := 5000.0; l <= 6000; l += 10 {
		w, f, n = append(w, l), append(f, 2), append(n, 1)
	}
	res := &synth.Result{Wavelength: w, Flux: f, Normalized: n}
	obs := &spectra.Spectrum{
		Wavelength:  []float64{4900, 5200, 5400, 5600, 5800},
		Flux:        []float64{9, 2.5, 3.0, 1.0, 1.0},
		Uncertainty: []float64{1, 0.5, 0.1, 0, 0.25},
	}
	obs.SetMask(2, spectra.MaskTelluric)
	ov, err := Compare(obs, res, 0)
	if err != nil {
		t.Fatal(err)
	}
	if len(ov.Wavelength) != 4 || ov.Wavelength[0] != 5200 {
		t.Errorf("overlay samples %v, want the four inside the model", ov.Wavelength)
	}
	for i, x := range ov.Flux {
		if math.Abs(x-2) > 1e-12 {
			t.Errorf("model at %v Å = %v, want 2", ov.Wavelength[i], x)
		}
	}
	if math.Abs(ov.Chi2-17) > 1e-9 || ov.N != 2 || math.Abs(ov.Reduced()-8.5) > 1e-9 {
		t.Errorf("χ² %v over %d (χ²/N %v), want 17 over 2", ov.Chi2, ov.N, ov.Reduced())
	}
	obs.Wavelength = []float64{7000, 7100}
	obs.Flux, obs.Uncertainty, obs.Mask = []float64{1, 1}, []float64{1, 1}, nil
	if _, err := Compare(obs, res, 0); err == nil {
		t.Error("a spectrum outside the model's range was compared")
	}
	if got := (&Overlay{}).Reduced(); !math.IsNaN(got) {
		t.Errorf("χ²/N of nothing = %v, want NaN", got)
	}
}
