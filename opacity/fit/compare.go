package fit

import (
	"fmt"
	"math"

	"broadline/opacity/synth"
	"broadline/spectra"
)

// Overlay is a synthetic spectrum as an instrument would record it on an
// observed spectrum's wavelengths, with the χ² of the comparison.
type Overlay struct {
	Wavelength []float64 // vacuum Å: the observed samples inside the model's range
	Flux       []float64 // model flux on those samples, in the units of res.Flux
	Preview    bool      // the model is the absorption-only preview
	// Chi2 is Σ((F_obs − F_model)/σ)² over the samples that are not masked
	// and have an uncertainty > 0, and N is their number.
	Chi2     float64
	N        int
	Warnings []string
}

// Reduced returns χ²/N (NaN when no sample was compared).
func (o *Overlay) Reduced() float64 {
	if o.N == 0 {
		return math.NaN()
	}
	return o.Chi2 / float64(o.N)
}

// Compare puts the synthetic spectrum res (its Flux already scaled to the
// observer, e.g. with AtDistance) on the observed spectrum's wavelengths
// inside the model's range, smoothed to resolving power R (0: not
// smoothed; see synth.Result.Observe), and sums χ² over the observed
// samples that are not masked and have an uncertainty. It fails when the
// observed spectrum lies outside the model's range.
func Compare(obs *spectra.Spectrum, res *synth.Result, R float64) (*Overlay, error) {
	if len(res.Wavelength) == 0 {
		return nil, fmt.Errorf("fit: empty model spectrum")
	}
	lo, hi := res.Wavelength[0], res.Wavelength[len(res.Wavelength)-1]
	var idx []int
	var grid []float64
	for i, w := range obs.Wavelength {
		if w >= lo && w <= hi {
			idx = append(idx, i)
			grid = append(grid, w)
		}
	}
	if len(grid) == 0 {
		return nil, fmt.Errorf("fit: the observed spectrum lies outside the model's range %.4g–%.4g Å", lo, hi)
	}
	flux, _, err := res.Observe(R, grid)
	if err != nil {
		return nil, fmt.Errorf("fit: %w", err)
	}
	ov := &Overlay{Wavelength: grid, Flux: flux, Preview: res.Preview}
	for k, i := range idx {
		if obs.Masked(i) || obs.Uncertainty == nil || !(obs.Uncertainty[i] > 0) {
			continue
		}
		r := (obs.Flux[i] - flux[k]) / obs.Uncertainty[i]
		if !math.IsNaN(r) {
			ov.Chi2 += r * r
			ov.N++
		}
	}
	return ov, nil
}
