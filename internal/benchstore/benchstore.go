// Package benchstore makes the invented line stores the benchmarks time
// the synthesis, the fits and the grids with. They are random numbers
// shaped like a big theoretical list (most lines weak, low levels up to a
// few eV), NOT atomic data.
package benchstore

import (
	"math"
	"math/rand/v2"

	"broadline/linelists"
)

// Species are the ions of the store: Sr, Y, Zr, Ba, La, Ce, Nd and Sm, singly
// and doubly ionised.
var Species = []string{"Sr II", "Y II", "Zr II", "Ba II", "La II", "Ce II", "Nd II", "Sm II",
	"Sr III", "Y III", "Zr III", "Ba III", "La III", "Ce III", "Nd III", "Sm III"}

// New returns an invented store of n lines over 2500–50000 Å (uniform in
// ln λ) in the 16 Species, 400 levels each at energies 6·u₁u₂ eV (u uniform,
// so most levels lie low), with log gf = −5 + 5u³ so that most lines are
// weak. The same n gives the same store.
func New(n int) *linelists.Store {
	rng := rand.New(rand.NewPCG(2, 3))
	bl := linelists.NewBuilder()
	levels := make([][]float64, len(Species))
	for s := range Species {
		levels[s] = make([]float64, 400)
		for k := range levels[s] {
			levels[s][k] = 6 * rng.Float64() * rng.Float64()
		}
		levels[s][0] = 0
	}
	for range n {
		s := rng.IntN(len(Species))
		bl.Add(linelists.Line{
			Wavelength:  2500 * math.Exp(rng.Float64()*math.Log(20)),
			LogGF:       -5 + 5*math.Pow(rng.Float64(), 3),
			Species:     linelists.MustSpecies(Species[s]),
			LowerEnergy: levels[s][rng.IntN(400)],
			LowerG:      float32(2*rng.IntN(6) + 2),
		})
	}
	st, _ := bl.Build()
	return st
}
