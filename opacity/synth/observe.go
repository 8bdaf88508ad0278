package synth

import (
	"fmt"

	"broadline/physics"
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
	if len(grid) < 2 {
		// A flux-conserving resample needs each pixel's edges, which one
		// point alone does not give.
		return nil, nil, fmt.Errorf("synth: a grid of %d points: resampling needs at least 2", len(grid))
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

// Spectrum returns the result as a spectra.Spectrum on the model's grid (no
// smoothing): the flux in erg s⁻¹ cm⁻² Å⁻¹ (as in r.Flux), or F/F_c when
// normalized, with no uncertainty. The metadata say it is synthetic and, for
// a preview, that it is the absorption-only approximation.
func (r *Result) Spectrum(normalized bool) (*spectra.Spectrum, error) {
	src := "synthetic: photospheric P Cygni model"
	if r.Preview {
		src = "synthetic: absorption-only preview (approximation)"
	}
	unit := spectra.FluxPerAngstrom
	y := r.Flux
	if normalized {
		unit = spectra.FluxNormalized
		y = r.Normalized
	}
	meta := spectra.Metadata{Source: src, FluxUnit: unit, Epoch: r.Ejecta.Time / physics.Day}
	return spectra.New(append([]float64(nil), r.Wavelength...), append([]float64(nil), y...), nil, meta)
}
