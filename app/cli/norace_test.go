//go:build !race

package cli

// raceEnabled is true under the race detector (see race_test.go).
const raceEnabled = false
