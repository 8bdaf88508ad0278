package spectra

import (
	"math"

	"broadline/physics"
)

// PlanckLambda returns the Planck function B_λ(T) in cgs,
// erg s⁻¹ cm⁻² cm⁻¹ sr⁻¹ (per cm of wavelength), for a vacuum wavelength
// in Å and a temperature in K:
//
//	B_λ = (2hc²/λ⁵) / (exp(hc/λkT) − 1).
//
// It returns 0 for T ≤ 0 and where the exponential underflows the result.
func PlanckLambda(wavelength, temperature float64) float64 {
	if temperature <= 0 || wavelength <= 0 {
		return 0
	}
	lcm := wavelength * physics.Angstrom
	x := physics.HCOverK / (wavelength * temperature)
	if x > 700 {
		return 0
	}
	l2 := lcm * lcm
	return 2 * physics.Planck * physics.SpeedOfLight * physics.SpeedOfLight / (l2 * l2 * lcm) / math.Expm1(x)
}

// PlanckLambdaPerAngstrom returns B_λ(T) in erg s⁻¹ cm⁻² Å⁻¹ sr⁻¹, that is
// PlanckLambda × 1e-8.
func PlanckLambdaPerAngstrom(wavelength, temperature float64) float64 {
	return PlanckLambda(wavelength, temperature) * physics.Angstrom
}

// PlanckNu returns B_ν(T) in erg s⁻¹ cm⁻² Hz⁻¹ sr⁻¹ for a frequency in Hz:
// B_ν = (2hν³/c²)/(exp(hν/kT) − 1).
func PlanckNu(frequency, temperature float64) float64 {
	if temperature <= 0 || frequency <= 0 {
		return 0
	}
	x := physics.Planck * frequency / (physics.Boltzmann * temperature)
	if x > 700 {
		return 0
	}
	return 2 * physics.Planck * frequency * frequency * frequency / (physics.SpeedOfLight * physics.SpeedOfLight) / math.Expm1(x)
}

// BlackbodyFlux returns the flux density F_λ in erg s⁻¹ cm⁻² Å⁻¹ received
// at distance d (cm) from a sphere of radius r (cm) radiating as a
// blackbody at temperature T (K): F_λ = π B_λ (r/d)².
func BlackbodyFlux(wavelength, temperature, radius, distance float64) float64 {
	q := radius / distance
	return math.Pi * PlanckLambdaPerAngstrom(wavelength, temperature) * q * q
}

// BlackbodyFluxes writes BlackbodyFlux for every wavelength in wave into dst
// and returns dst; dst is allocated when nil and must otherwise have the
// length of wave.
func BlackbodyFluxes(dst, wave []float64, temperature, radius, distance float64) []float64 {
	if dst == nil {
		dst = make([]float64, len(wave))
	}
	if len(dst) != len(wave) {
		panic("spectra: BlackbodyFluxes: len(dst) != len(wave)")
	}
	q := radius / distance
	f := math.Pi * q * q
	for i, w := range wave {
		dst[i] = f * PlanckLambdaPerAngstrom(w, temperature)
	}
	return dst
}

// WienPeak returns the wavelength (Å) at which B_λ(T) peaks,
// λ_max = b/T with Wien's constant b = hc/(k x₅), x₅ = 4.965114231744276
// the root of x = 5(1 − e⁻ˣ).
func WienPeak(temperature float64) float64 {
	const x5 = 4.965114231744276303698759131322893944
	return physics.HCOverK / (x5 * temperature)
}
