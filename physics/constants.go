package physics

import "gonum.org/v1/gonum/unit/constant"

// Fundamental constants in cgs, converted from the CODATA 2018 values held by
// gonum.org/v1/gonum/unit/constant (which stores them in SI).
const (
	// SpeedOfLight is c in cm s⁻¹ (exact).
	SpeedOfLight = float64(constant.LightSpeedInVacuum) * 1e2
	// Planck is h in erg s (exact).
	Planck = float64(constant.Planck) * 1e7
	// Boltzmann is k in erg K⁻¹ (exact).
	Boltzmann = float64(constant.Boltzmann) * 1e7
	// AtomicMass is the unified atomic mass unit in g.
	AtomicMass = float64(constant.AtomicMass) * 1e3
	// ElectronVolt is one eV in erg (the elementary charge in C times 1e7).
	ElectronVolt = float64(constant.ElementaryCharge) * 1e7
	// ElementaryCharge is e in esu (statcoulomb): e[C] · c[m s⁻¹] · 10.
	ElementaryCharge = float64(constant.ElementaryCharge) * float64(constant.LightSpeedInVacuum) * 10
)

// Constants that gonum does not hold. Each names its source.
const (
	// ElectronMass is mₑ in g (CODATA 2018: 9.1093837015e-31 kg).
	ElectronMass = 9.1093837015e-28
	// StefanBoltzmann is σ in erg cm⁻² s⁻¹ K⁻⁴, derived exactly from the
	// defining constants as σ = 2π⁵k⁴/(15h³c²) (CODATA 2018 lists
	// 5.670374419e-5, a rounding of the same expression).
	StefanBoltzmann = 2 * pi5 * Boltzmann * Boltzmann * Boltzmann * Boltzmann /
		(15 * Planck * Planck * Planck * SpeedOfLight * SpeedOfLight)
	// SolarMass is M☉ in g: the IAU 2015 nominal GM☉ = 1.3271244e26 cm³ s⁻²
	// divided by CODATA 2018 G = 6.67430e-8 cm³ g⁻¹ s⁻² (the value astropy
	// uses, 1.98841e33 g, rounded).
	SolarMass = 1.988409870698051e33
	// Parsec is 1 pc in cm (IAU 2015 Resolution B2: 648000/π au, au = 1.495978707e13 cm exactly).
	Parsec = 648000 / pi * 1.495978707e13
	// Megaparsec is 1 Mpc in cm.
	Megaparsec = 1e6 * Parsec
	// Day is one day in s (86400 s, SI).
	Day = 86400.0
	// Angstrom is 1 Å in cm.
	Angstrom = 1e-8
	// Micron is 1 µm in cm.
	Micron = 1e-4
	// Nanometre is 1 nm in cm.
	Nanometre = 1e-7
	// Jansky is 1 Jy in erg s⁻¹ cm⁻² Hz⁻¹.
	Jansky = 1e-23
)

// Derived combinations used by the physics, spelled out once.
const (
	// ClassicalLineCrossSection is π e²/(mₑ c) in cm² s⁻¹, the factor in the
	// Sobolev optical depth (Castor 1970); 0.0265401 by REFERENCES.md [calc].
	ClassicalLineCrossSection = pi * ElementaryCharge * ElementaryCharge / (ElectronMass * SpeedOfLight)
	// HCOverK is hc/k in Å K, so that hc/(λkT) = HCOverK/(λ[Å]·T).
	HCOverK = Planck * SpeedOfLight / Boltzmann / Angstrom
	// SpeedOfLightKmS is c in km s⁻¹.
	SpeedOfLightKmS = SpeedOfLight / 1e5
	// InvCmToEV converts a wavenumber in cm⁻¹ to an energy in eV: hc/e with
	// c in cm s⁻¹ (1.239841984e-4 eV per cm⁻¹). Divide by it for the
	// reverse.
	InvCmToEV = Planck * SpeedOfLight / ElectronVolt
	// BoltzmannEV is k in eV K⁻¹ (8.617333262e-5), the quotient of gonum's
	// SI values k[J K⁻¹]/e[C].
	BoltzmannEV = float64(constant.Boltzmann) / float64(constant.ElementaryCharge)
)

const (
	pi  = 3.14159265358979323846264338327950288419716939937510582097494459
	pi5 = pi * pi * pi * pi * pi
)
