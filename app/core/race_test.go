//go:build race

package core

// raceEnabled is true under the race detector, which slows the synthesis
// some twentyfold: the injection–recovery fits are then skipped (make test
// runs them in its pass without the detector).
const raceEnabled = true
