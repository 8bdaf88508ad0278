package synth

import (
	"fmt"
	"math"
)

// Grid is a logarithmic wavelength grid: point i is at Start·exp(i·Step) Å,
// for i = 0 … N−1. The same grid carries line bins (rest wavelengths) and the
// emergent spectrum (observed wavelengths).
type Grid struct {
	Start float64 // wavelength of point 0, Å
	Step  float64 // spacing in ln λ (dimensionless; c·Step is the velocity step)
	N     int     // number of points
}

// NewGrid returns the grid with spacing step in ln λ whose points cover
// [from, to] Å.
func NewGrid(from, to, step float64) (Grid, error) {
	if !(from > 0) || !(to > from) || math.IsInf(to, 0) {
		return Grid{}, fmt.Errorf("synth: wavelength range [%g, %g] Å is empty or not positive", from, to)
	}
	if !(step > 0) || step > 0.1 {
		return Grid{}, fmt.Errorf("synth: grid step %g in ln λ must be in (0, 0.1]", step)
	}
	n := int(math.Ceil(math.Log(to/from)/step)) + 1
	if n > 1<<24 {
		return Grid{}, fmt.Errorf("synth: grid of %d points is too fine (step %g over [%g, %g] Å)", n, step, from, to)
	}
	return Grid{Start: from, Step: step, N: n}, nil
}

// Wavelength returns the wavelength of point i in Å.
func (g Grid) Wavelength(i int) float64 { return g.Start * math.Exp(float64(i)*g.Step) }

// Wavelengths returns all point wavelengths in Å.
func (g Grid) Wavelengths() []float64 {
	w := make([]float64, g.N)
	for i := range w {
		w[i] = g.Wavelength(i)
	}
	return w
}

// Position returns the fractional index of wavelength lambda (Å).
func (g Grid) Position(lambda float64) float64 { return math.Log(lambda/g.Start) / g.Step }

// Nearest returns the index of the point nearest to lambda in ln λ; it may lie
// outside [0, N).
func (g Grid) Nearest(lambda float64) int { return int(math.Floor(g.Position(lambda) + 0.5)) }

// Sub returns the grid of points [from, to) of g.
func (g Grid) Sub(from, to int) Grid {
	if from < 0 || to > g.N || from > to {
		panic(fmt.Sprintf("synth: sub-grid [%d, %d) outside grid of %d points", from, to, g.N))
	}
	return Grid{Start: g.Wavelength(from), Step: g.Step, N: to - from}
}
