// Package fit compares synthetic spectra with observed ones and fits model
// parameters to them: the χ² of a model against a calibrated, masked
// spectrum with uncertainties (Compare), the photosphere velocity by a
// grid and a golden-section refinement (Sweep), and inference over several
// epochs (Problem): one composition shared by all epochs with some mass
// fractions free, optionally each epoch's photosphere velocity and
// temperature, and each epoch's flux scale and Legendre continuum
// correction solved by linear least squares at every evaluation. Fit
// minimises χ² (Nelder–Mead, gonum/optimize); Sample draws the posterior
// with an affine-invariant ensemble sampler (stretch move) and reports
// medians, 68 %/95 % intervals, upper limits and convergence diagnostics.
// It imports no GUI code; the workbench and the headless commands call it.
//
// Units: mass fractions (parameters in log₁₀ X), velocities v/c,
// temperatures K, fluxes in the observed spectrum's units. Results are
// deterministic for a given seed, whatever the number of workers.
//
// χ²/N here measures the match. The model's systematic errors (LTE,
// incomplete atomic data, a sharp photosphere) usually dominate the noise,
// so χ² is not a likelihood and its curvature is not an honest error bar;
// the posterior of Sample assumes it is (uncertainties right, model exact)
// and says so in its Likelihood field.
package fit
