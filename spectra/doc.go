// Package spectra holds what the analyst measured: the Spectrum type and
// everything that reads, converts, calibrates and prepares it, together with
// the physical constants that the whole program shares.
//
// Conventions:
//   - Physics is in cgs units. Inside the program wavelengths are vacuum
//     wavelengths in ångström (float64); air wavelengths are converted on input.
//   - Constants are defined once, in constants.go. The CODATA fundamental
//     constants come from gonum.org/v1/gonum/unit/constant (SI) and are only
//     converted to cgs here; the few it lacks are defined with their source.
//   - Bad data returns an error that names where it was found; a programming
//     mistake (slices of different lengths passed to a helper) panics with a
//     "spectra: ..." message.
//   - A slice written in place is called dst.
package spectra
