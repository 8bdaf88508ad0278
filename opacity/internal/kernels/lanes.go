package kernels

import "fmt"

// lanes is the vector width in use: maxLanes unless SetLanes lowered it.
var lanes = maxLanes

// MaxLanes returns the widest vector loop this processor and build have: 8
// (AVX-512 F and DQ), 4 (AVX2 and FMA) or 0 (the portable Go loops only;
// always 0 off amd64 and with the build tag noasm).
func MaxLanes() int { return maxLanes }

// Lanes returns the vector width in use (0, 4 or 8).
func Lanes() int { return lanes }

// SetLanes sets the vector width used from now on: 0 (portable Go loops), 4
// (AVX2) or 8 (AVX-512), at most MaxLanes. It is for tests and benchmarks
// that check or time the narrower loops on a processor that has the wider
// ones; it must not be called while a computation runs.
func SetLanes(w int) error {
	if w != 0 && w != 4 && w != 8 || w > maxLanes {
		return fmt.Errorf("kernels: %d lanes: this processor and build have vector loops of up to %d lanes (0, 4 or 8 are possible)", w, maxLanes)
	}
	lanes = w
	return nil
}
