// Package cli holds the headless sub-commands of broadline (model, sweep,
// identify, prep, lines, plasma, opacity, example, …): one flag-handling
// rule, one exit-status rule (see Main), and every computation through
// the packages below (app/core, opacity/fit, spectra, linelists). It
// imports no GUI toolkit, so a build with -tags nogui runs on a cluster
// node without X11.
package cli
