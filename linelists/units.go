package linelists

import (
	"math"

	"gonum.org/v1/gonum/unit/constant"
)

// Physical constants this package needs, derived from the CODATA 2018 values
// in gonum.org/v1/gonum/unit/constant (this package may not import the
// project's spectra package, which holds the cgs set).
const (
	// boltzmannEV is k in eV K⁻¹ (8.617333262e-5).
	boltzmannEV = float64(constant.Boltzmann) / float64(constant.ElementaryCharge)
	// invCmToEV converts a wavenumber in cm⁻¹ to an energy in eV: h c / e
	// with c in cm s⁻¹ (1.239841984e-4).
	invCmToEV = float64(constant.Planck) * float64(constant.LightSpeedInVacuum) * 100 / float64(constant.ElementaryCharge)
)

// airToVacuum converts an air wavelength in Å to vacuum with the IAU
// standard formula of Morton (2000, ApJS 130, 403; after Birch & Downs 1994):
// n = 1 + 8.34254e-5 + 2.406147e-2/(130 − s²) + 1.5998e-4/(38.9 − s²),
// s = 10⁴/λ_vac in µm⁻¹. The formula gives n as a function of the vacuum
// wavelength, so λ_vac = λ_air · n(λ_vac) is solved by fixed-point iteration
// (three steps reach 1e-9 Å, since dn/dλ is tiny). Below 2000 Å the
// standard does not apply and air and vacuum wavelengths are equal.
func airToVacuum(air float64) float64 {
	if !(air >= 2000) {
		return air
	}
	vac := air
	for i := 0; i < 4; i++ {
		vac = air * refractiveIndexAir(vac)
	}
	return vac
}

// vacuumToAir is the inverse of airToVacuum: λ_air = λ_vac / n(λ_vac).
func vacuumToAir(vac float64) float64 {
	if !(vac >= 2000) {
		return vac
	}
	return vac / refractiveIndexAir(vac)
}

func refractiveIndexAir(vac float64) float64 {
	s := 1e4 / vac
	s2 := s * s
	return 1 + 8.34254e-5 + 2.406147e-2/(130-s2) + 1.5998e-4/(38.9-s2)
}

// isFinite reports whether x is neither NaN nor ±Inf.
func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func float64bits(x float64) uint64 { return math.Float64bits(x) }
