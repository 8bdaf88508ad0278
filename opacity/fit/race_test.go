//go:build race

package fit

// raceEnabled is true under the race detector, which slows the synthesis
// some twentyfold: the injection–recovery tests are then skipped.
const raceEnabled = true
