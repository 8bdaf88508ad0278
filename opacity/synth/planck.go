package synth

import (
	"math"

	"broadline/spectra"
)

// planckLambda returns B_λ(T) in erg s⁻¹ cm⁻² Å⁻¹ sr⁻¹ at vacuum wavelength
// lambda (Å): (2hc²/λ⁵)/(e^{hc/λkT} − 1).
func planckLambda(lambda, T float64) float64 {
	l := lambda * spectra.Angstrom
	x := spectra.HCOverK / (lambda * T)
	c := spectra.SpeedOfLight
	return 2 * spectra.Planck * c * c / (l * l * l * l * l) / math.Expm1(x) * spectra.Angstrom
}

// ContinuumFlux returns the flux of the bare photosphere, π B_λ(T), in
// erg s⁻¹ cm⁻² Å⁻¹ at its surface, at each wavelength (Å).
func ContinuumFlux(wavelengths []float64, T float64) []float64 {
	out := make([]float64, len(wavelengths))
	for i, l := range wavelengths {
		out[i] = math.Pi * planckLambda(l, T)
	}
	return out
}
