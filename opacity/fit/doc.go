// Package fit compares synthetic spectra with observed ones and fits model
// parameters to them: the χ² of a model against a calibrated, masked
// spectrum with uncertainties (Compare), and the photosphere velocity by a
// grid and a golden-section refinement (Sweep). It imports no GUI code;
// the workbench and the headless commands call it.
//
// χ²/N here measures the match. The model's systematic errors (LTE,
// incomplete atomic data, a sharp photosphere) usually dominate the noise,
// so χ² is not a likelihood and its curvature is not an honest error bar.
package fit
