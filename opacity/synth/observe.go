package synth

import (
	"fmt"

	"broadline/spectra"
)

// Observe returns the flux and normalised flux as a spectrograph of
// resolving power R would record them (Gaussian of FWHM λ/R, spectra.SmoothFlux;
// R ≤ 0 means no smoothing), resampled flux-conservingly onto the ascending
// vacuum wavelengths grid (Å; spectra.ResampleFlux). A nil grid keeps the
// model's grid. Grid points outside the model's range are an error.
func (r *Result) Observe(R float64, grid []float64) (flux, normalized []float64, err error) {
	w := r.Wavelength
	if len(w) == 0 {
		return nil, nil, fmt.Errorf("synth: empty spectrum")
	}
	flux = spectra.SmoothFlux(nil, w, r.Flux, R, nil)
	normalized = spectra.SmoothFlux(nil, w, r.Normalized, R, nil)
	if grid == nil {
		return flux, normalized, nil
	}
	for i, g := range grid {
		if g < w[0] || g > w[len(w)-1] {
			return nil, nil, fmt.Errorf("synth: grid point %d at %g Å outside the model's range [%g, %g] Å", i, g, w[0], w[len(w)-1])
		}
		if i > 0 && !(g > grid[i-1]) {
			return nil, nil, fmt.Errorf("synth: grid not ascending at point %d (%g Å)", i, g)
		}
	}
	return spectra.ResampleFlux(nil, grid, w, flux), spectra.ResampleFlux(nil, grid, w, normalized), nil
}
