package opacity

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"

	"broadline/linelists"
	"broadline/opacity/internal/kernels"
	"broadline/physics"
)

// SpeciesFactors writes N_ion/U (cm⁻³) for each entry of st.SpeciesTable
// into dst: the ion's number density over its partition function, so that
// the population of a level of energy E and weight g is g·(N_ion/U)·e^{−E/kT}.
// Species the plasma does not model (element absent, stage too high) get 0.
// It depends on the plasma only, not on the lines.
func SpeciesFactors(dst []float64, st *linelists.Store, p *Plasma) []float64 {
	dst = grow(dst, len(st.SpeciesTable))
	for i, sp := range st.SpeciesTable {
		n, u, ok := p.Species(sp)
		if !ok {
			dst[i] = 0
			continue
		}
		dst[i] = n / u
	}
	return dst
}

// BoltzmannFactors writes e^{−E_l/kT} for every level of st.Levels into dst.
// It depends on the temperature T (K) only, so it can be reused for every
// density at that temperature.
func BoltzmannFactors(dst []float64, st *linelists.Store, T float64) []float64 {
	e := st.Levels.Energy
	dst = grow(dst, len(e))
	beta := physics.ElectronVolt / (physics.Boltzmann * T) // 1/kT in eV⁻¹
	for l, el := range e {
		dst[l] = kernels.Exp(-el * beta)
	}
	return dst
}

// LevelDensities writes n_l/g_l = (N_ion/U)·e^{−E_l/kT} (cm⁻³) for every
// level of st into dst, from speciesFactor (SpeciesFactors) and boltz
// (BoltzmannFactors). This is the population per statistical weight that
// Sobolev multiplies by gf.
func LevelDensities(dst []float64, st *linelists.Store, speciesFactor, boltz []float64) []float64 {
	lv := st.Levels
	if len(speciesFactor) != len(st.SpeciesTable) {
		panic(fmt.Sprintf("opacity: LevelDensities: %d species factors for %d species", len(speciesFactor), len(st.SpeciesTable)))
	}
	if len(boltz) != len(lv.Energy) || len(lv.Species) != len(lv.Energy) {
		panic(fmt.Sprintf("opacity: LevelDensities: %d Boltzmann factors, %d level species for %d levels", len(boltz), len(lv.Species), len(lv.Energy)))
	}
	dst = grow(dst, len(lv.Energy))
	for l, s := range lv.Species {
		dst[l] = speciesFactor[s] * boltz[l]
	}
	return dst
}

// PlasmaLevelDensities is LevelDensities for plasma p at its own
// temperature, computing the species and Boltzmann factors on the way.
func PlasmaLevelDensities(dst []float64, st *linelists.Store, p *Plasma) []float64 {
	return LevelDensities(dst, st, SpeciesFactors(nil, st, p), BoltzmannFactors(nil, st, p.Temperature))
}

// Lines prepares a store for repeated passes: it holds gf = 10^{log gf} of
// every line, which does not depend on the plasma, so that a pass at a new
// temperature, density or time costs no exponential per line for it. It is
// read-only after NewLines and safe for concurrent use. Keep one per store
// when computing depths or opacities more than once.
type Lines struct {
	Store *linelists.Store
	GF    []float64 // 10^{LogGF[i]}, per line
}

// NewLines prepares st, converting log gf on up to workers goroutines.
func NewLines(ctx context.Context, st *linelists.Store, workers int) (*Lines, error) {
	n := checkStore(st)
	ls := &Lines{Store: st, GF: make([]float64, n)}
	err := parallel(ctx, n, workers, func(lo, hi int) {
		for i, x := range st.LogGF[lo:hi] {
			ls.GF[lo+i] = kernels.Exp(float64(x) * math.Ln10)
		}
	})
	if err != nil {
		return nil, err
	}
	return ls, nil
}

// Sobolev writes the Sobolev optical depth of every line of st into dst
// (len(dst) must be st.Len()), for homologous expansion at time t (s) since
// explosion, in LTE at temperature T (K) (Castor 1970; Jeffery & Branch 1990):
//
//	τ = (π e²/mₑc) · gf · λ · t · (n_l/g_l) · (1 − e^{−hc/λkT})
//
// with λ in cm and levelDensity the n_l/g_l of each level (LevelDensities).
// It prepares the store on every call; use (*Lines).Sobolev to repeat.
func Sobolev(ctx context.Context, dst []float64, st *linelists.Store, levelDensity []float64, T, t float64, workers int) error {
	ls, err := NewLines(ctx, st, workers)
	if err != nil {
		return err
	}
	return ls.Sobolev(ctx, dst, levelDensity, T, t, workers)
}

// Sobolev is the package-level Sobolev for prepared lines. The per-level
// factors are computed once per level; per line it takes three products and
// the stimulated-emission factor, carried from line to line along the
// sorted wavelengths (relative accuracy ~1e-13; see kernels.Depths).
func (ls *Lines) Sobolev(ctx context.Context, dst []float64, levelDensity []float64, T, t float64, workers int) error {
	st := ls.Store
	n := checkStore(st)
	if len(dst) != n || len(ls.GF) != n {
		panic(fmt.Sprintf("opacity: Sobolev: len(dst) = %d, %d gf for %d lines", len(dst), len(ls.GF), n))
	}
	if len(levelDensity) != len(st.Levels.Energy) {
		panic(fmt.Sprintf("opacity: Sobolev: %d level densities for %d levels", len(levelDensity), len(st.Levels.Energy)))
	}
	if err := checkTT(T, t); err != nil {
		return err
	}
	lev := levelTerms(nil, levelDensity, t)
	hck := physics.HCOverK / T
	return parallel(ctx, n, workers, func(lo, hi int) {
		var c kernels.Carry
		kernels.Depths(dst[lo:hi], st.Wavelength[lo:hi], ls.GF[lo:hi], st.Lower[lo:hi], lev, hck, &c)
	})
}

// levelTerms writes (π e²/mₑc)·10⁻⁸·t·n_l/g_l per level into dst, so that
// τ = λ[Å]·gf·lev·stim.
func levelTerms(dst, levelDensity []float64, t float64) []float64 {
	dst = grow(dst, len(levelDensity))
	c := physics.ClassicalLineCrossSection * physics.Angstrom * t
	for l, d := range levelDensity {
		dst[l] = c * d
	}
	return dst
}

// plasmaLevelTerms is levelTerms of PlasmaLevelDensities in one pass over
// the levels, on up to workers goroutines:
// (π e²/mₑc)·10⁻⁸·t·(N_ion/U)·e^{−E_l/kT}.
func plasmaLevelTerms(ctx context.Context, st *linelists.Store, p *Plasma, t float64, workers int) ([]float64, error) {
	lv := st.Levels
	if len(lv.Species) != len(lv.Energy) {
		panic(fmt.Sprintf("opacity: %d level species for %d levels", len(lv.Species), len(lv.Energy)))
	}
	sf := SpeciesFactors(nil, st, p)
	c := physics.ClassicalLineCrossSection * physics.Angstrom * t
	for i := range sf {
		sf[i] *= c
	}
	beta := physics.ElectronVolt / (physics.Boltzmann * p.Temperature)
	dst := make([]float64, len(lv.Energy))
	err := parallel(ctx, len(dst), workers, func(lo, hi int) {
		for l, s := range lv.Species[lo:hi] {
			dst[lo+l] = sf[s] * kernels.Exp(-lv.Energy[lo+l]*beta)
		}
	})
	return dst, err
}

func checkTT(T, t float64) error {
	if !(T > 0) || math.IsInf(T, 0) {
		return fmt.Errorf("opacity: %w: temperature %v K (want a finite value > 0)", ErrInput, T)
	}
	if !(t > 0) || math.IsInf(t, 0) {
		return fmt.Errorf("opacity: %w: time since explosion %v s (want a finite value > 0)", ErrInput, t)
	}
	return nil
}

// checkStore panics when the per-line slices of st differ in length, and
// returns the number of lines.
func checkStore(st *linelists.Store) int {
	n := len(st.Wavelength)
	if len(st.LogGF) != n || len(st.Species) != n || len(st.Lower) != n {
		panic(fmt.Sprintf("opacity: inconsistent store: %d wavelengths, %d log gf, %d species, %d lower levels",
			n, len(st.LogGF), len(st.Species), len(st.Lower)))
	}
	return n
}

// Census counts, per species of a store, the lines whose Sobolev optical
// depth exceeds a threshold.
type Census struct {
	Threshold float64
	Species   []linelists.Species // st.SpeciesTable
	Above     []int               // lines with τ > Threshold, per species
	Total     []int               // all lines, per species
	AboveAll  int                 // Σ Above
}

// CountAbove returns the census of the lines of st whose optical depth tau
// (as from Sobolev) exceeds threshold. Later stages may skip the others.
func CountAbove(st *linelists.Store, tau []float64, threshold float64) Census {
	n := checkStore(st)
	if len(tau) != n {
		panic(fmt.Sprintf("opacity: CountAbove: %d depths for %d lines", len(tau), n))
	}
	c := Census{
		Threshold: threshold,
		Species:   st.SpeciesTable,
		Above:     make([]int, len(st.SpeciesTable)),
		Total:     make([]int, len(st.SpeciesTable)),
	}
	for i, s := range st.Species {
		c.Total[s]++
		if tau[i] > threshold {
			c.Above[s]++
			c.AboveAll++
		}
	}
	return c
}

func grow(dst []float64, n int) []float64 {
	if cap(dst) < n {
		return make([]float64, n)
	}
	return dst[:n]
}

// parallelChunk is the number of items a worker takes at a time; the
// context is checked between chunks.
const parallelChunk = 1 << 15

// parallel calls f on consecutive chunks [lo, hi) covering [0, n), on up to
// workers goroutines (≤ 0: serial; capped at GOMAXPROCS), and returns the
// context's error if it was cancelled.
func parallel(ctx context.Context, n, workers int, f func(lo, hi int)) error {
	chunks := (n + parallelChunk - 1) / parallelChunk
	workers = min(max(workers, 1), runtime.GOMAXPROCS(0), max(chunks, 1))
	var next atomic.Int64
	run := func() {
		for ctx.Err() == nil {
			c := int(next.Add(1)) - 1
			if c >= chunks {
				return
			}
			f(c*parallelChunk, min((c+1)*parallelChunk, n))
		}
	}
	if workers == 1 {
		run()
	} else {
		var wg sync.WaitGroup
		for range workers {
			wg.Add(1)
			go func() { defer wg.Done(); run() }()
		}
		wg.Wait()
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("opacity: %w", err)
	}
	return nil
}
