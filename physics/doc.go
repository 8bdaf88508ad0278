// Package physics is the leaf that every computational package shares: the
// physical constants in cgs units, the wavelength media (vacuum, air) and the
// air ↔ vacuum conversion. It imports no other broadline package, so that
// linelists, spectra and opacity can all use it.
//
// Units:
//   - cgs throughout: lengths in cm, masses in g, times in s, energies in
//     erg, charges in esu (statcoulomb), temperatures in K. The few
//     exceptions say so in their names: SpeedOfLightKmS (km s⁻¹),
//     BoltzmannEV (eV K⁻¹), InvCmToEV (eV per cm⁻¹), HCOverK (Å K).
//   - Wavelengths given to the air ↔ vacuum conversion are in ångström.
//
// Sources:
//   - The CODATA 2018 fundamental constants (c, h, k, u, e) come from
//     gonum.org/v1/gonum/unit/constant, which holds them in SI; they are
//     only converted to cgs here (constants.go). Do not type one anywhere
//     else.
//   - Constants gonum lacks name their source beside them: mₑ (CODATA 2018),
//     M☉ (IAU 2015 nominal GM☉ over CODATA 2018 G), the parsec (IAU 2015
//     Resolution B2), σ (derived exactly from k, h, c), and exact unit
//     factors (day, Å, µm, nm, Jy). All are checked against Debian's
//     python3-astropy (testdata/constants/gen_constants.py).
//   - Air ↔ vacuum: the IAU standard refractive index of Morton (2000, ApJS
//     130, 403, eq. 8, after Birch & Downs 1994); no conversion below
//     2000 Å (IAU convention). Checked against specutils and handbook pairs.
//
// API:
//
//	SpeedOfLight, Planck, Boltzmann, AtomicMass, ElectronVolt,
//	ElementaryCharge, ElectronMass, StefanBoltzmann, SolarMass, Parsec,
//	Megaparsec, Day, Angstrom, Micron, Nanometre, Jansky     cgs constants
//	ClassicalLineCrossSection, HCOverK, SpeedOfLightKmS,
//	InvCmToEV, BoltzmannEV                                    derived combinations
//	Medium (MediumDefault, Vacuum, Air), ParseMedium, ErrMedium
//	AirToVacuum, VacuumToAir, AirToVacuumAll,
//	RefractiveIndexAir, AirVacuumLimit                        Morton (2000)
package physics
