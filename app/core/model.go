package core

import (
	"fmt"

	"broadline/opacity/synth"
	"broadline/physics"
)

// Model is the one description of a model spectrum the workbench, its
// candidates, its saved sessions and the headless commands share: which
// epoch of the dataset, the photosphere and the element mix. Everything
// else (distance, ejecta mass and velocity range, wavelength range) is
// fixed by the dataset. A Model is comparable: two equal values give the
// same spectrum.
type Model struct {
	// Epoch is the index of the epoch in the dataset (0-based; messages
	// number epochs from 1).
	Epoch int `json:"epoch"`
	// PhotosphereVelocity is v_ph / c.
	PhotosphereVelocity float64 `json:"photosphere_velocity_c"`
	// Temperature is the photosphere's temperature in K.
	Temperature float64 `json:"temperature_k"`
	// MassFractions is the element mix.
	MassFractions Composition `json:"mass_fractions"`
	// Preview selects the absorption-only approximation.
	Preview bool `json:"preview"`
}

// The photosphere temperatures the workbench offers, K.
const MinTemperature, MaxTemperature = 1500.0, 15000.0

// The photosphere velocities the workbench offers: from MinVelocity to
// VelocityGap below the dataset's outer velocity (v/c).
const MinVelocity, VelocityGap = 0.02, 0.01

// MaxVelocity is the highest photosphere velocity the workbench offers for
// dataset d.
func MaxVelocity(d *Dataset) float64 { return d.OuterVelocity - VelocityGap }

// Validate checks m against dataset d, naming the value at fault.
func (m Model) Validate(d *Dataset) error {
	switch {
	case m.Epoch < 0 || m.Epoch >= len(d.Epochs):
		return fmt.Errorf("epoch %d out of range (the dataset has %d)", m.Epoch+1, len(d.Epochs))
	case !(m.PhotosphereVelocity >= MinVelocity) || m.PhotosphereVelocity > MaxVelocity(d):
		return fmt.Errorf("photosphere velocity %gc must lie between %gc and %gc below the outer velocity %gc",
			m.PhotosphereVelocity, MinVelocity, VelocityGap, d.OuterVelocity)
	case !(m.Temperature >= MinTemperature && m.Temperature <= MaxTemperature):
		return fmt.Errorf("temperature %g K outside the workbench's %g–%g K", m.Temperature, MinTemperature, MaxTemperature)
	case m.MassFractions.IsZero():
		return fmt.Errorf("mass fractions: none given")
	}
	return nil
}

// Ejecta is the synthesis's description of model m of dataset d (m must
// be valid).
func (d *Dataset) Ejecta(m Model) synth.Ejecta {
	e := d.Epochs[m.Epoch]
	return synth.Ejecta{
		Time: e.Days * physics.Day, Mass: d.EjectaMass * physics.SolarMass,
		BetaIn: d.InnerVelocity, BetaPh: m.PhotosphereVelocity, BetaMax: d.OuterVelocity,
		DensityIndex: d.DensityIndex, Temperature: m.Temperature, Diluted: d.Diluted,
	}
}

// StartModel is epoch i's model at the dataset's recorded starting values
// (for the demo: the truth).
func (d *Dataset) StartModel(i int) Model {
	e := d.Epochs[i]
	return Model{Epoch: i, PhotosphereVelocity: e.PhotosphereVelocity, Temperature: e.Temperature, MassFractions: d.MassFractions}
}
