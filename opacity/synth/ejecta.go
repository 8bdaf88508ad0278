package synth

import (
	"fmt"
	"math"

	"broadline/opacity"
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
// is the one passed with the ejecta to Model.Spectrum, except inside the
// velocity ranges of Zones, where each zone's own composition holds
// (stratified ejecta: e.g. a lanthanide-rich inner zone inside a
// lanthanide-poor outer one). The density law is that of the whole ejecta
// either way; a zone changes what the matter is made of, not how much
// there is.
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
	// Zones are velocity ranges with their own composition; nil means the
	// composition is uniform. They must not overlap.
	Zones []Zone
}

// Zone is a shell of the ejecta, Inner ≤ v/c ≤ Outer, with its own
// composition. Outer may be +Inf (the zone reaches the outer edge,
// whatever BetaMax is). A velocity node on the boundary between two zones
// belongs to the outer one.
//
// The plasma is solved and the optical depths tabulated at the envelope's
// velocity nodes and interpolated linearly between them, so a zone
// boundary inside the envelope is resolved to the node spacing
// (BetaMax − BetaPh)/(Nodes − 1): the change of composition is spread over
// one node interval.
type Zone struct {
	Inner, Outer float64 // velocity range, v/c
	Composition  opacity.Composition
}

// maxZones bounds the zones of one ejecta model.
const maxZones = 64

// validateZones checks that the zones are well formed and do not overlap.
func (e Ejecta) validateZones() error {
	if len(e.Zones) > maxZones {
		return fmt.Errorf("synth: %d composition zones (at most %d)", len(e.Zones), maxZones)
	}
	for i, z := range e.Zones {
		switch {
		case !(z.Inner >= 0) || !(z.Outer > z.Inner):
			return fmt.Errorf("synth: zone %d: velocity range %g–%g c must have 0 ≤ inner < outer", i+1, z.Inner, z.Outer)
		case len(z.Composition.Z) == 0 || len(z.Composition.Z) != len(z.Composition.MassFraction):
			return fmt.Errorf("synth: zone %d (%g–%g c): no composition", i+1, z.Inner, z.Outer)
		}
		for j, o := range e.Zones[:i] {
			if z.Inner < o.Outer && o.Inner < z.Outer {
				return fmt.Errorf("synth: zones %d (%g–%g c) and %d (%g–%g c) overlap", j+1, o.Inner, o.Outer, i+1, z.Inner, z.Outer)
			}
		}
	}
	return nil
}

// CompositionAt returns the composition at velocity beta (v/c): that of
// the zone holding beta (the outer one on a shared boundary), or base
// where no zone does.
func (e Ejecta) CompositionAt(beta float64, base opacity.Composition) opacity.Composition {
	best := -1
	for i, z := range e.Zones {
		if beta >= z.Inner && beta <= z.Outer && (best < 0 || z.Inner > e.Zones[best].Inner) {
			best = i
		}
	}
	if best < 0 {
		return base
	}
	return e.Zones[best].Composition
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
	return e.validateZones()
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
