package physics

// Air ↔ vacuum conversion with the IAU standard (Morton 2000, ApJS 130,
// 403, eq. 8, after Birch & Downs 1994): with s = 10⁴/λ_vac (λ in Å),
//
//	n = 1 + 8.34254e-5 + 2.406147e-2/(130 − s²) + 1.5998e-4/(38.9 − s²),
//	λ_air = λ_vac / n.
//
// By the IAU convention wavelengths below 2000 Å are always given in vacuum,
// so both conversions return λ unchanged there.

// AirVacuumLimit is the wavelength (Å) below which no air/vacuum conversion
// is made (IAU convention).
const AirVacuumLimit = 2000.0

// RefractiveIndexAir returns the refractive index of standard air at the
// vacuum wavelength λ (Å) by Morton (2000).
func RefractiveIndexAir(vacuum float64) float64 {
	s := 1e4 / vacuum
	s2 := s * s
	return 1 + 8.34254e-5 + 2.406147e-2/(130-s2) + 1.5998e-4/(38.9-s2)
}

// VacuumToAir converts a vacuum wavelength (Å) to air (Å).
func VacuumToAir(vacuum float64) float64 {
	if vacuum < AirVacuumLimit {
		return vacuum
	}
	return vacuum / RefractiveIndexAir(vacuum)
}

// AirToVacuum converts an air wavelength (Å) to vacuum (Å) by solving
// λ_vac = λ_air · n(λ_vac) with fixed-point iteration (the map contracts by
// about 1e-5 per step), so VacuumToAir(AirToVacuum(λ)) = λ to rounding.
func AirToVacuum(air float64) float64 {
	if air < AirVacuumLimit {
		return air
	}
	v := air * RefractiveIndexAir(air)
	for range 8 {
		next := air * RefractiveIndexAir(v)
		if d := next - v; d < 1e-13*v && d > -1e-13*v {
			return next
		}
		v = next
	}
	return v
}

// AirToVacuumAll converts every wavelength in w from air to vacuum in place.
func AirToVacuumAll(w []float64) {
	for i, x := range w {
		w[i] = AirToVacuum(x)
	}
}
