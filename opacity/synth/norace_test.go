//go:build !race

package synth

// raceEnabled is true under the race detector (see race_test.go).
const raceEnabled = false
