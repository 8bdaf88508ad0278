package core

import (
	"fmt"
	"strconv"
	"strings"

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
	// MassFractions is the element mix: of the whole ejecta, or, with an
	// inner zone, of the ejecta outside it.
	MassFractions Composition `json:"mass_fractions"`
	// InnerMassFractions, when not empty, is the element mix of an inner
	// zone of the ejecta, from the centre up to and including ZoneBoundary
	// (v/c): two-zone (stratified) ejecta, e.g. a lanthanide-rich core
	// inside a lanthanide-poor outer layer. Both are zero in a uniform
	// model (and in sessions saved before zones existed).
	InnerMassFractions Composition `json:"inner_mass_fractions,omitzero"`
	ZoneBoundary       float64     `json:"zone_boundary_c,omitzero"`
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
	return m.ValidateZone(d)
}

// HasZone reports whether m has an inner zone of its own composition.
func (m Model) HasZone() bool { return !m.InnerMassFractions.IsZero() }

// ValidateZone checks the inner zone: both its composition and its
// boundary, or neither; the boundary between the dataset's inner and outer
// velocities.
func (m Model) ValidateZone(d *Dataset) error {
	switch {
	case !m.HasZone() && m.ZoneBoundary == 0:
		return nil
	case !m.HasZone():
		return fmt.Errorf("zone boundary %gc given without the inner zone's mass fractions", m.ZoneBoundary)
	case !(m.ZoneBoundary > d.InnerVelocity && m.ZoneBoundary < d.OuterVelocity):
		return fmt.Errorf("zone boundary %gc must lie between the inner velocity %gc and the outer velocity %gc",
			m.ZoneBoundary, d.InnerVelocity, d.OuterVelocity)
	}
	return nil
}

// WithoutZone returns m with the inner zone's composition replaced by
// the outer one: uniform ejecta.
func (m Model) WithoutZone() Model {
	m.InnerMassFractions, m.ZoneBoundary = Composition{}, 0
	return m
}

// Ejecta is the synthesis's description of model m of dataset d (m must
// be valid): with an inner zone, one synth.Zone from 0 to the boundary
// (the composition passed with the ejecta, m.MassFractions, holds outside).
func (d *Dataset) Ejecta(m Model) synth.Ejecta {
	e := d.Epochs[m.Epoch]
	ej := synth.Ejecta{
		Time: e.Days * physics.Day, Mass: d.EjectaMass * physics.SolarMass,
		BetaIn: d.InnerVelocity, BetaPh: m.PhotosphereVelocity, BetaMax: d.OuterVelocity,
		DensityIndex: d.DensityIndex, Temperature: m.Temperature, Diluted: d.Diluted,
	}
	if m.HasZone() {
		// A parsed Composition always mixes (ParseComposition checked it).
		c, _ := m.InnerMassFractions.Mix()
		ej.Zones = []synth.Zone{{Inner: 0, Outer: m.ZoneBoundary, Composition: c}}
	}
	return ej
}

// StartModel is epoch i's model at the dataset's recorded starting values
// (for the demo: the truth).
func (d *Dataset) StartModel(i int) Model {
	e := d.Epochs[i]
	return Model{Epoch: i, PhotosphereVelocity: e.PhotosphereVelocity, Temperature: e.Temperature, MassFractions: d.MassFractions,
		InnerMassFractions: d.InnerMassFractions, ZoneBoundary: d.ZoneBoundary}
}

// WithCompositions returns m with the element mixes the analyst typed:
// main for the ejecta (outside the inner zone, if any), inner for the
// inner zone ("" or blank: uniform ejecta, boundary ignored) and boundary
// its outer edge ("0.16c" or "48000km/s"). An error names the entry at
// fault and m is not changed.
func (m Model) WithCompositions(d *Dataset, main, inner, boundary string) (Model, error) {
	c, err := ParseComposition(main)
	if err != nil {
		return m, fmt.Errorf("mass fractions: %w", err)
	}
	out := m.WithoutZone()
	out.MassFractions = c
	if strings.TrimSpace(inner) == "" {
		return out, nil
	}
	if out.InnerMassFractions, err = ParseComposition(inner); err != nil {
		return m, fmt.Errorf("inner zone mass fractions: %w", err)
	}
	if out.ZoneBoundary, err = ParseVelocity(boundary); err != nil {
		return m, fmt.Errorf("zone boundary: %w", err)
	}
	if err := out.ValidateZone(d); err != nil {
		return m, err
	}
	return out, nil
}

// BoundaryText is the zone boundary as the workbench's entry shows it
// ("0.16c"; "" without a zone), which ParseVelocity reads back.
func (m Model) BoundaryText() string {
	if !m.HasZone() {
		return ""
	}
	return strconv.FormatFloat(m.ZoneBoundary, 'g', -1, 64) + "c"
}
