//go:build race

package cli

// raceEnabled is true under the race detector, which slows the synthesis
// some twentyfold: the fit runs are then skipped (make test
// runs them in its pass without the detector).
const raceEnabled = true
