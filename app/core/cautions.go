package core

// ModelCautions is the text of Help ▸ About the model: the approximations the
// model makes and what an identification made with it means. README.md's
// "Cautions" section says the same.
const ModelCautions = `## What the model assumes

- **Local thermodynamic equilibrium (LTE).** Ion stages follow the Saha equation and levels the
  Boltzmann law at one temperature. Real kilonova ejecta after the first day or two are far from
  LTE; non-thermal ionisation by radioactive decay products is ignored.
- **Sobolev approximation.** Each line interacts at a single point along a ray, where the
  expansion Doppler-shifts it into resonance (Sobolev 1960; Castor 1970). This holds when the
  expansion velocity is much larger than the thermal velocity, as it is here.
- **A sharp photosphere.** The continuum comes from a blackbody surface at one velocity; above
  it, lines scatter but nothing absorbs in the continuum (the elementary photospheric model of
  Jeffery & Branch 1990). Real ejecta have no sharp photosphere.
- **Pure resonance scattering.** A scattered photon leaves at the wavelength it came in with;
  fluorescence and thermal emission in lines are ignored.
- **Homologous expansion** with a power-law density and a composition that is the same at every
  velocity, or two zones (an inner core and the rest) with a sharp boundary, which the model
  resolves only to the spacing of its velocity nodes. Real ejecta mix their components.
- **Incomplete atomic data.** The model knows only the lines and levels in the lists you load.
  Theoretical lists for heavy elements are incomplete, and their wavelengths can be off by
  per cent; partition functions built from a line list alone are lower bounds.

## What an identification means

A match between a synthetic feature and an observed one is a **hypothesis**: it says that the
named element could make the feature under these assumptions. Check it with full
radiative-transfer modelling (non-LTE, time-dependent, with complete atomic data) before
claiming a detection or a mass.
`
