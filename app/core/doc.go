// Package core is the workbench without its window: the dataset (the
// analyst's spectra, line lists and fixed model parameters, or the
// built-in invented demo), the one Model value that describes a model
// spectrum (epoch, photosphere velocity and temperature, a checked
// composition), the session that the GUI shows and saves, the candidates,
// and the Bench whose methods synthesise, compare, sweep and identify
// through opacity/synth and opacity/fit.
//
// It imports no GUI toolkit and no plotting library, so the headless
// commands and the tests use it without a display. Units: velocities v/c,
// temperatures K, times days, wavelengths vacuum Å inside (µm in the
// dataset file's model range).
package core
