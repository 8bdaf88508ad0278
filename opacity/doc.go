// Package opacity computes the ejecta physics the workbench rests on: the LTE
// plasma state of a composition (Saha ionisation, Boltzmann excitation,
// charge neutrality), Sobolev line optical depths in homologous expansion for
// every line of a linelists.Store at once, and the binned expansion opacity
// with a per-element breakdown.
//
// Units and conventions:
//   - cgs throughout: densities in g cm⁻³ (mass) and cm⁻³ (number), T in K,
//     time since explosion t in s, opacities in cm² g⁻¹. Energies of levels
//     and ionisation energies are in eV as held by linelists.
//   - Wavelengths are vacuum ångström (float64), as in linelists.Store.
//   - A composition is a set of element mass fractions normalised to 1.
//   - Ion stages are indexed by charge: index 0 is stage I (neutral), index 4
//     stage V. At most MaxStages stages are modelled, as far as linelists has
//     ionisation energies; a bare nucleus has partition function 1.
//   - Functions that fill a slice take it as dst (first argument) and return
//     it, growing it when it is too short; a slice of the wrong length given
//     where a length is fixed is a programming mistake and panics with an
//     "opacity: ..." message. Bad data or physics input returns an error.
//   - Long computations take a context.Context and workers (≤ 0: serial).
//     Results do not depend on the number of workers.
//
// The exported API, stable once committed:
//
//	Composition, NewComposition, ParseComposition   mass fractions per element
//	PartitionFunc, GroundPartition, StorePartition  partition functions U(species, T)
//	Solve → *Plasma (ElementState per element)       LTE plasma at (composition, ρ, T)
//	Atoms, StoreAtoms, SolveAtoms                    the same with a store's atomic data (overrides)
//	(*Plasma).Species(sp) → n, U; (*Plasma).Element  ion density and U of one species
//	SpeciesFactors, BoltzmannFactors, LevelDensities the reusable pieces of τ: N_ion/U per
//	PlasmaLevelDensities                             species (per plasma), e^{−E/kT} per level
//	                                                 (per T), their product n_l/g_l per level
//	NewLines → *Lines                                a store prepared for repeated passes (gf)
//	Sobolev, (*Lines).Sobolev                        τ of every line into dst
//	CountAbove → Census                              lines with τ above a threshold, per species
//	Grid, LinearGrid, LogGrid                        wavelength bins [Edges[k], Edges[k+1])
//	ExpansionOpacity, (*Lines).Expansion,            binned κ with per-element breakdown
//	ExpansionFromDepths → *Expansion
//	(*Expansion).PlanckMean, (*Expansion).Grey       summaries in cm² g⁻¹
//
// For a velocity-shell model at one temperature: BoltzmannFactors once,
// then per shell Solve (its density), SpeciesFactors, LevelDensities and
// (*Lines).Sobolev. Errors wrap ErrInput, ErrComposition, ErrGrid or
// ErrNotConverged.
//
// Approximations (stated again in docs/opacity.md): local thermodynamic
// equilibrium with one temperature for ionisation and excitation; the Sobolev
// approximation for line transfer in homologous expansion; ion stages above
// those with known ionisation energies are neglected; partition functions are
// only as complete as the levels known (the ground-level weight alone when
// nothing else is given); no continuum or electron-scattering opacity.
package opacity
