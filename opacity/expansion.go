package opacity

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/integrate/quad"

	"broadline/linelists"
	"broadline/opacity/internal/kernels"
	"broadline/physics"
	"broadline/spectra"
)

// Grid is a set of wavelength bins: bin k is [Edges[k], Edges[k+1]) in
// vacuum ångström. Edges is strictly ascending with at least two entries.
type Grid struct {
	Edges []float64
}

// ErrGrid is the cause of errors about a wavelength grid.
var ErrGrid = errors.New("bad wavelength grid")

// LinearGrid returns bins of the given width (Å) starting at from, enough of
// them to reach to: Edges[k] = from + k·width, and the last edge is the first
// one ≥ to (within 1e-9 of a bin, so that an exact multiple gives no
// sliver). from must be > 0 and to > from.
func LinearGrid(from, to, width float64) (Grid, error) {
	if !(from > 0) || !(to > from) || math.IsInf(to, 0) {
		return Grid{}, fmt.Errorf("opacity: %w: range %v–%v Å (want 0 < from < to)", ErrGrid, from, to)
	}
	if !(width > 0) || math.IsInf(width, 0) {
		return Grid{}, fmt.Errorf("opacity: %w: bin width %v Å (want > 0)", ErrGrid, width)
	}
	nf := math.Ceil((to-from)/width - 1e-9)
	if nf > 1e8 {
		return Grid{}, fmt.Errorf("opacity: %w: %v bins of %v Å in %v–%v Å (at most 1e8)", ErrGrid, nf, width, from, to)
	}
	n := max(int(nf), 1)
	e := make([]float64, n+1)
	for k := range e {
		e[k] = from + float64(k)*width
	}
	return Grid{Edges: e}, nil
}

// LogGrid returns n bins equally spaced in ln λ from from to to (Å), each of
// width Δλ/λ ≈ ln(to/from)/n, i.e. a constant velocity width.
func LogGrid(from, to float64, n int) (Grid, error) {
	if !(from > 0) || !(to > from) || math.IsInf(to, 0) {
		return Grid{}, fmt.Errorf("opacity: %w: range %v–%v Å (want 0 < from < to)", ErrGrid, from, to)
	}
	if n < 1 || n > 1e8 {
		return Grid{}, fmt.Errorf("opacity: %w: %d bins (want 1–1e8)", ErrGrid, n)
	}
	e := make([]float64, n+1)
	r := math.Log(to / from)
	for k := range e {
		e[k] = from * math.Exp(r*float64(k)/float64(n))
	}
	e[n] = to
	return Grid{Edges: e}, nil
}

// Bins returns the number of bins.
func (g Grid) Bins() int { return max(len(g.Edges)-1, 0) }

// Center returns the centre of bin k, (Edges[k]+Edges[k+1])/2.
func (g Grid) Center(k int) float64 { return 0.5 * (g.Edges[k] + g.Edges[k+1]) }

// Width returns the width Δλ of bin k in Å.
func (g Grid) Width(k int) float64 { return g.Edges[k+1] - g.Edges[k] }

func (g Grid) check() error {
	if len(g.Edges) < 2 {
		return fmt.Errorf("opacity: %w: %d edges (want at least 2)", ErrGrid, len(g.Edges))
	}
	for k := 1; k < len(g.Edges); k++ {
		if !(g.Edges[k] > g.Edges[k-1]) || math.IsInf(g.Edges[k], 0) || !(g.Edges[0] > 0) {
			return fmt.Errorf("opacity: %w: edges not positive, finite and strictly ascending at %d", ErrGrid, k)
		}
	}
	return nil
}

// Expansion is a binned expansion opacity with its per-element breakdown.
type Expansion struct {
	Grid        Grid
	Density     float64 // g cm⁻³
	Time        float64 // s since explosion
	Temperature float64 // K
	// Kappa[k] is the expansion opacity of bin k in cm² g⁻¹.
	Kappa []float64
	// Elements lists the Z of each row of ByElement (the composition's
	// elements, ascending); ByElement[r][k] is the same sum restricted to
	// the lines of element Elements[r]. The rows add up to Kappa.
	Elements  []int
	ByElement [][]float64
	// Lines counts the lines inside the grid. Unmodelled counts those
	// among them that contribute nothing because their element is not in
	// the composition or their stage is not modelled.
	Lines, Unmodelled int
}

// ExpansionOpacity returns the binned expansion opacity (Karp et al. 1977,
// ApJ 214, 161; Eastman & Pinto 1993, ApJ 412, 731) of the lines of st in
// plasma p at time t (s) since explosion, on grid g:
//
//	κ_k = 1/(ρ c t) · Σ_{lines in bin k} (λ_l/Δλ_k)(1 − e^{−τ_l})
//
// with τ_l the Sobolev optical depth (see Sobolev) and a line in bin k when
// Edges[k] ≤ λ_l < Edges[k+1]. Bins are divided among workers; each bin is
// summed by one worker in line order, so results do not depend on workers.
// It prepares the store on every call; use (*Lines).Expansion to repeat.
func ExpansionOpacity(ctx context.Context, st *linelists.Store, p *Plasma, t float64, g Grid, workers int) (*Expansion, error) {
	ls, err := NewLines(ctx, st, workers)
	if err != nil {
		return nil, err
	}
	return ls.Expansion(ctx, p, t, g, workers)
}

// Expansion is ExpansionOpacity for prepared lines: the τ of each line is
// computed on the fly (as in Sobolev) and binned in the same pass.
func (ls *Lines) Expansion(ctx context.Context, p *Plasma, t float64, g Grid, workers int) (*Expansion, error) {
	st := ls.Store
	if n := checkStore(st); len(ls.GF) != n {
		panic(fmt.Sprintf("opacity: Expansion: %d gf for %d lines", len(ls.GF), n))
	}
	if err := checkTT(p.Temperature, t); err != nil {
		return nil, err
	}
	if err := g.check(); err != nil {
		return nil, err
	}
	lev, err := plasmaLevelTerms(ctx, st, p, t, workers)
	if err != nil {
		return nil, err
	}
	return binLines(ctx, st, p, t, g, workers, nil, ls.GF, lev, physics.HCOverK/p.Temperature)
}

// ExpansionFromDepths is ExpansionOpacity for optical depths tau already
// computed (one per line of st, e.g. by Sobolev), in plasma p at time t.
func ExpansionFromDepths(ctx context.Context, st *linelists.Store, tau []float64, p *Plasma, t float64, g Grid, workers int) (*Expansion, error) {
	if n := checkStore(st); len(tau) != n {
		panic(fmt.Sprintf("opacity: ExpansionFromDepths: %d depths for %d lines", len(tau), n))
	}
	if err := checkTT(p.Temperature, t); err != nil {
		return nil, err
	}
	if err := g.check(); err != nil {
		return nil, err
	}
	return binLines(ctx, st, p, t, g, workers, tau, nil, nil, 0)
}

// binLines sums (λ_l/Δλ)(1 − e^{−τ_l}) per bin, with τ_l = tau[l] when tau
// is not nil, or else computed as in Sobolev from gf, lev (levelTerms) and
// hck = hc/kT in Å.
func binLines(ctx context.Context, st *linelists.Store, p *Plasma, t float64, g Grid, workers int, tau, gf, lev []float64, hck float64) (*Expansion, error) {
	nb := g.Bins()
	ne := len(p.Elements)
	x := &Expansion{
		Grid: g, Density: p.Density, Time: t, Temperature: p.Temperature,
		Kappa:     make([]float64, nb),
		Elements:  make([]int, ne),
		ByElement: make([][]float64, ne),
	}
	flat := make([]float64, ne*nb)
	for r := range p.Elements {
		x.Elements[r] = p.Elements[r].Z
		x.ByElement[r] = flat[r*nb : (r+1)*nb : (r+1)*nb]
	}
	// row[s] is the breakdown row of species s, or ne when the species is
	// not modelled (its τ is 0; its lines are counted as Unmodelled).
	row := make([]int32, len(st.SpeciesTable))
	skipped := false
	for s, sp := range st.SpeciesTable {
		row[s] = int32(ne)
		if _, _, ok := p.Species(sp); ok {
			row[s] = int32(sort.SearchInts(x.Elements, int(sp.Z)))
		} else {
			skipped = true
		}
	}
	wl := st.Wavelength
	first := sort.SearchFloat64s(wl, g.Edges[0])
	last := sort.SearchFloat64s(wl, g.Edges[nb])
	x.Lines = last - first
	// start[k] is the first line of bin k.
	start := make([]int, nb+1)
	start[0], start[nb] = first, last
	for k := 1; k < nb; k++ {
		start[k] = start[k-1] + sort.SearchFloat64s(wl[start[k-1]:last], g.Edges[k])
	}
	// Chunks of whole bins holding about parallelChunk lines each.
	var chunks []int // bin index where each chunk starts
	for k := 0; k < nb; {
		chunks = append(chunks, k)
		target := start[k] + parallelChunk
		k2 := sort.SearchInts(start[k+1:nb+1], target+1) + k + 1
		k = min(max(k2, k+1), nb)
	}
	chunks = append(chunks, nb)
	nc := len(chunks) - 1
	workers = min(max(workers, 1), runtime.GOMAXPROCS(0), max(nc, 1))
	scale := 1 / (p.Density * physics.SpeedOfLight * t)
	var next atomic.Int64
	var unmodelled atomic.Int64
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			acc := make([]float64, len(st.SpeciesTable)) // per species
			rows := make([]float64, ne+1)
			cnt := 0
			for ctx.Err() == nil {
				c := int(next.Add(1)) - 1
				if c >= nc {
					break
				}
				for k := chunks[c]; k < chunks[c+1]; k++ {
					clear(acc)
					i0, i1 := start[k], start[k+1]
					if tau != nil {
						kernels.AddEscapes(acc, tau[i0:i1], wl[i0:i1], st.Species[i0:i1])
					} else {
						kernels.SumLines(wl[i0:i1], gf[i0:i1], st.Species[i0:i1], st.Lower[i0:i1], lev, hck, acc)
					}
					clear(rows)
					for s, a := range acc {
						rows[row[s]] += a
					}
					f := scale / g.Width(k)
					sum := 0.0
					for r := 0; r < ne; r++ {
						sum += rows[r]
						x.ByElement[r][k] = rows[r] * f
					}
					x.Kappa[k] = sum * f
				}
				if skipped {
					for _, s := range st.Species[start[chunks[c]]:start[chunks[c+1]]] {
						if row[s] == int32(ne) {
							cnt++
						}
					}
				}
			}
			unmodelled.Add(int64(cnt))
		}()
	}
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("opacity: %w", err)
	}
	x.Unmodelled = int(unmodelled.Load())
	return x, nil
}

// PlanckMean returns the Planck-mean opacity over the grid at temperature T
// (K), in cm² g⁻¹: Σ_k κ_k ∫_bin B_λ dλ / Σ_k ∫_bin B_λ dλ. The average is
// over the grid's range only, not over all wavelengths; each bin's integral
// of B_λ is by 8-point Gauss–Legendre quadrature. It is NaN where B_λ
// underflows over the whole grid (T of a few kelvin in the optical).
func (x *Expansion) PlanckMean(T float64) float64 {
	var nodes, weights [8]float64
	quad.Legendre{}.FixedLocations(nodes[:], weights[:], -1, 1)
	num, den := 0.0, 0.0
	for k, kap := range x.Kappa {
		a, b := x.Grid.Edges[k], x.Grid.Edges[k+1]
		mid, half := 0.5*(a+b), 0.5*(b-a)
		w := 0.0
		for i, u := range nodes {
			w += weights[i] * spectra.PlanckLambda(mid+half*u, T)
		}
		w *= half
		num += kap * w
		den += w
	}
	return num / den
}

// Grey returns the opacity averaged over wavelength in [from, to) Å,
// Σ κ_k·overlap_k / Σ overlap_k, where overlap_k is the length of bin k
// inside the range: a single "κ ≈ N cm² g⁻¹" for the range. The range must
// overlap the grid.
func (x *Expansion) Grey(from, to float64) (float64, error) {
	num, den := 0.0, 0.0
	for k, kap := range x.Kappa {
		lo := max(from, x.Grid.Edges[k])
		hi := min(to, x.Grid.Edges[k+1])
		if hi > lo {
			num += kap * (hi - lo)
			den += hi - lo
		}
	}
	if !(den > 0) {
		return 0, fmt.Errorf("opacity: %w: range %v–%v Å does not overlap the grid %v–%v Å",
			ErrGrid, from, to, x.Grid.Edges[0], x.Grid.Edges[len(x.Grid.Edges)-1])
	}
	return num / den, nil
}
