//go:build !race

package fit

// raceEnabled is true under the race detector (see race_test.go).
const raceEnabled = false
