// Package synth computes photospheric spectra of homologously expanding
// ejecta: the elementary P Cygni model of a sharp blackbody photosphere inside
// a purely resonance-scattering envelope, in the Sobolev approximation, with
// occultation by the photosphere and sequential interaction of overlapping
// lines along each ray (Jeffery & Branch 1990; Kasen et al. 2002, ApJ 565,
// 380). It also holds the ejecta model (density power law normalised to the
// total mass, uniform or diluted temperature), the wiring from a composition
// and a line store to a spectrum, the "absorption only" preview, knock-out
// spectra and the attribution of features to elements and lines.
//
// Conventions:
//   - Wavelengths are vacuum wavelengths in ångström (float64). Lines are
//     binned onto a logarithmic wavelength grid, λ_i = Start·exp(i·Step);
//     one step in ln λ is one step c·Step in velocity, so the resonance
//     geometry depends only on the offset between bins.
//   - Velocities inside the package are fractions of the speed of light
//     (β = v/c); lengths in the formal integral are in units of c·t, so a
//     radius equals its velocity. Physics elsewhere is cgs; times in s unless
//     a name says days.
//   - Doppler policy: by default the first-order formula λ = λ₀(1 − v_z/c)
//     of the published elementary model; the relativistic formula
//     λ = λ₀ γ (1 − v_z/c) is an option (see Doppler). Intensities are not
//     transformed between frames in either case.
//   - Normalised flux is F/F_c, the flux over the flux of the bare
//     photosphere; flux is π B_λ(T_ph) · F/F_c in erg s⁻¹ cm⁻² Å⁻¹ at the
//     photosphere, scaled by (R_ph/D)² when a distance is given.
//   - Long computations take a context.Context and a workers count (≤ 0 means
//     serial); work is split by wavelength and merged in index order, so a
//     result does not depend on the number of workers.
//   - Bad parameters return an error; a programming mistake (slices of
//     mismatched length) panics with a "synth: ..." message.
package synth
