package synth

import (
	"fmt"
	"math"

	"broadline/physics"
)

// Ejecta describes homologously expanding ejecta with a sharp photosphere:
// r = v t; mass density ρ(v, t) = A v^−n t^−3 between BetaIn and BetaMax,
// with A fixed by the total mass,
//
//	M = 4π A ∫ v^{2−n} dv  (from v_in to v_max),
//
// so a uniform sphere (n = 0, v_in = 0) has ρ = 3M/(4π (v_max t)³). The
// photosphere sits at BetaPh inside the range; lines form between BetaPh and
// BetaMax, so moving the photosphere leaves ρ(v) unchanged. The composition
// is uniform in velocity.
type Ejecta struct {
	Time         float64 // time since explosion, s
	Mass         float64 // total ejecta mass, g
	BetaIn       float64 // inner edge of the density law, v/c (0 allowed for n < 3)
	BetaPh       float64 // photosphere, v/c
	BetaMax      float64 // outer edge, v/c
	DensityIndex float64 // n in ρ ∝ v^−n (0: uniform)
	// Temperature is the photosphere's blackbody temperature T_ph in K.
	Temperature float64
	// Diluted selects the excitation/ionisation temperature
	// T(r) = W(r)^{1/4} T_ph (radiative equilibrium with a diluted
	// blackbody); false means T(r) = T_ph throughout the envelope.
	Diluted bool
}

// Validate reports whether the parameters describe valid ejecta.
func (e Ejecta) Validate() error {
	switch {
	case !(e.Time > 0) || math.IsInf(e.Time, 0):
		return fmt.Errorf("synth: time since explosion %g s must be positive and finite", e.Time)
	case !(e.Mass > 0) || math.IsInf(e.Mass, 0):
		return fmt.Errorf("synth: ejecta mass %g g must be positive and finite", e.Mass)
	case !(e.Temperature > 0) || math.IsInf(e.Temperature, 0):
		return fmt.Errorf("synth: photosphere temperature %g K must be positive and finite", e.Temperature)
	case !(e.BetaIn >= 0):
		return fmt.Errorf("synth: inner velocity %g c must be ≥ 0", e.BetaIn)
	case !(e.BetaPh > e.BetaIn) && !(e.BetaPh == e.BetaIn && e.BetaIn > 0):
		return fmt.Errorf("synth: photosphere velocity %g c must be positive and not below the inner velocity %g c", e.BetaPh, e.BetaIn)
	case !(e.BetaMax > e.BetaPh) || !(e.BetaMax < 1):
		return fmt.Errorf("synth: outer velocity %g c must exceed the photosphere velocity %g c and be below c", e.BetaMax, e.BetaPh)
	case !(e.DensityIndex >= 0) || e.DensityIndex > 30:
		return fmt.Errorf("synth: density index %g must be in [0, 30]", e.DensityIndex)
	case e.DensityIndex >= 3 && e.BetaIn == 0:
		return fmt.Errorf("synth: density index %g ≥ 3 needs an inner velocity above 0 (the mass would diverge)", e.DensityIndex)
	}
	return nil
}

// massIntegral returns ∫ β^{2−n} dβ from BetaIn to BetaMax.
func (e Ejecta) massIntegral() float64 {
	n := e.DensityIndex
	if math.Abs(n-3) < 1e-12 {
		return math.Log(e.BetaMax / e.BetaIn)
	}
	p := 3 - n
	return (math.Pow(e.BetaMax, p) - math.Pow(e.BetaIn, p)) / p
}

// Density returns the mass density (g cm⁻³) at velocity beta (v/c), 0
// outside [BetaIn, BetaMax].
func (e Ejecta) Density(beta float64) float64 {
	if beta < e.BetaIn || beta > e.BetaMax {
		return 0
	}
	ct := physics.SpeedOfLight * e.Time
	return e.Mass / (4 * math.Pi * ct * ct * ct * e.massIntegral()) * math.Pow(beta, -e.DensityIndex)
}

// TemperatureAt returns the excitation/ionisation temperature (K) at
// velocity beta ≥ BetaPh: T_ph, or W(r)^{1/4} T_ph when Diluted.
func (e Ejecta) TemperatureAt(beta float64) float64 {
	if !e.Diluted {
		return e.Temperature
	}
	return math.Pow(dilution(e.BetaPh, beta), 0.25) * e.Temperature
}

// PhotosphereRadius returns R_ph = v_ph t in cm.
func (e Ejecta) PhotosphereRadius() float64 { return e.BetaPh * physics.SpeedOfLight * e.Time }
