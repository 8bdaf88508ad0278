//go:build race

package synth

// raceEnabled is true under the race detector, which slows the numerical
// loops some twentyfold; the heaviest tests then check fewer cases.
const raceEnabled = true
