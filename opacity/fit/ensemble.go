package fit

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"sync"
)

// logDensity is an unnormalised log probability density; −∞ outside its
// support. An error stops the sampler.
type logDensity func(ctx context.Context, x []float64) (float64, error)

// ensembleRun is the output of the stretch-move sampler.
type ensembleRun struct {
	// chain[s][w] is walker w's position after step s (all steps, burn-in
	// included); lnp[s][w] its log density.
	chain    [][][]float64
	lnp      [][]float64
	accepted []int // per walker, over the steps from countFrom on
}

// runEnsemble runs the affine-invariant ensemble sampler of Goodman &
// Weare (2010, Comm. Appl. Math. Comput. Sci. 5, 65) with the stretch move,
// parallelised over half-ensembles as in Foreman-Mackey et al. (2013, PASP
// 125, 306, §3): the walkers are split into two halves; each walker X_k of
// one half is moved to
//
//	Y = X_j + z (X_k − X_j),  z ~ g(z) ∝ 1/√z on [1/a, a],
//
// X_j drawn from the other half, and accepted with probability
// min(1, z^{d−1} p(Y)/p(X_k)); then the other half moves using the first
// one's new positions. Every random number is drawn serially, in walker
// order, before the half's densities are evaluated (in parallel, by
// workers goroutines): the chain is the same for any number of workers.
// init holds the starting positions (an even number ≥ 4 of walkers, each
// with a finite density). Acceptances are counted from step countFrom on
// (after the burn-in). progress is called after each step.
func runEnsemble(ctx context.Context, lp logDensity, init [][]float64, steps, countFrom int, a float64, seed uint64, workers int,
	progress func(done, total int)) (*ensembleRun, error) {
	nw := len(init)
	if nw < 4 || nw%2 != 0 {
		panic("fit: the ensemble needs an even number ≥ 4 of walkers")
	}
	dim := len(init[0])
	rng := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	cur := make([][]float64, nw)
	curLnp := make([]float64, nw)
	for w := range nw {
		cur[w] = append([]float64(nil), init[w]...)
	}
	if err := parallelEval(ctx, lp, cur, curLnp, workers); err != nil {
		return nil, err
	}
	for w, v := range curLnp {
		if math.IsInf(v, -1) || math.IsNaN(v) {
			return nil, fmt.Errorf("fit: sampler: walker %d starts where the density is %g", w+1, v)
		}
	}
	run := &ensembleRun{chain: make([][][]float64, steps), lnp: make([][]float64, steps), accepted: make([]int, nw)}
	half := nw / 2
	prop := make([][]float64, half)
	for i := range prop {
		prop[i] = make([]float64, dim)
	}
	propLnp := make([]float64, half)
	zs := make([]float64, half)
	us := make([]float64, half)
	for s := range steps {
		for h := range 2 {
			self, other := h*half, (1-h)*half
			for i := range half {
				k := self + i
				j := other + rng.IntN(half)
				r := rng.Float64()
				z := (a - 1) * r
				z = (z + 1) * (z + 1) / a
				zs[i], us[i] = z, rng.Float64()
				for d := range dim {
					prop[i][d] = cur[j][d] + z*(cur[k][d]-cur[j][d])
				}
			}
			if err := parallelEval(ctx, lp, prop, propLnp, workers); err != nil {
				return nil, err
			}
			for i := range half {
				k := self + i
				q := float64(dim-1)*math.Log(zs[i]) + propLnp[i] - curLnp[k]
				if !math.IsNaN(q) && (q >= 0 || math.Log(us[i]) < q) {
					copy(cur[k], prop[i])
					curLnp[k] = propLnp[i]
					if s >= countFrom {
						run.accepted[k]++
					}
				}
			}
		}
		pos := make([][]float64, nw)
		flat := make([]float64, nw*dim)
		for w := range nw {
			pos[w] = flat[w*dim : (w+1)*dim]
			copy(pos[w], cur[w])
		}
		run.chain[s] = pos
		run.lnp[s] = append([]float64(nil), curLnp...)
		if progress != nil {
			progress(s+1, steps)
		}
	}
	return run, nil
}

// parallelEval sets out[i] = lp(xs[i]) using workers goroutines, each
// taking a fixed stride of indices; the first error (by index) is returned.
func parallelEval(ctx context.Context, lp logDensity, xs [][]float64, out []float64, workers int) error {
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("fit: sampler: %w", err)
	}
	errs := make([]error, len(xs))
	n := max(1, min(workers, len(xs)))
	var wg sync.WaitGroup
	for g := range n {
		f := func() {
			for i := g; i < len(xs); i += n {
				out[i], errs[i] = lp(ctx, xs[i])
			}
		}
		if n == 1 {
			f()
		} else {
			wg.Go(f)
		}
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return fmt.Errorf("fit: sampler: %w", err)
		}
	}
	return nil
}
