// Package demo holds the built-in demo of the workbench: invented line
// lists, three invented spectra of a fictional event, and the scenario that
// records their true parameters. Nothing in it is an observation.
// Regenerate with `go run ./tools/demolines` and `go run ./tools/demospectra`.
package demo

import "embed"

// FS holds lines/ (line lists and levels files) and spectra/ (the spectra
// and scenario.json).
//
//go:embed lines spectra
var FS embed.FS

// Dir is the directory of the scenario file inside FS; the scenario's file
// names are relative to it.
const Dir = "spectra"
