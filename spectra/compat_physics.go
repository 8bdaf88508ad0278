package spectra

import "broadline/physics"

// The names below are what the app package used from spectra before the
// constants moved to broadline/physics.
//
// Deprecated: transitional, removed once app uses physics.
const (
	// SpeedOfLight is physics.SpeedOfLight (c in cm s⁻¹).
	//
	// Deprecated: transitional, removed once app uses physics.
	SpeedOfLight = physics.SpeedOfLight
	// SpeedOfLightKmS is physics.SpeedOfLightKmS (c in km s⁻¹).
	//
	// Deprecated: transitional, removed once app uses physics.
	SpeedOfLightKmS = physics.SpeedOfLightKmS
	// Boltzmann is physics.Boltzmann (k in erg K⁻¹).
	//
	// Deprecated: transitional, removed once app uses physics.
	Boltzmann = physics.Boltzmann
	// ElectronVolt is physics.ElectronVolt (1 eV in erg).
	//
	// Deprecated: transitional, removed once app uses physics.
	ElectronVolt = physics.ElectronVolt
	// SolarMass is physics.SolarMass (M☉ in g).
	//
	// Deprecated: transitional, removed once app uses physics.
	SolarMass = physics.SolarMass
	// Megaparsec is physics.Megaparsec (1 Mpc in cm).
	//
	// Deprecated: transitional, removed once app uses physics.
	Megaparsec = physics.Megaparsec
	// Day is physics.Day (one day in s).
	//
	// Deprecated: transitional, removed once app uses physics.
	Day = physics.Day
)
