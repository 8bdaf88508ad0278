package fit

import (
	"context"
	"fmt"
	"math"
)

// Profile is χ²/N of a model along one parameter (the photosphere velocity
// or temperature, say), with everything else held.
type Profile struct {
	Values []float64 // the parameter, ascending, evenly spaced
	Chi2N  []float64 // χ²/N of the model at each value
	// Best is the value of least χ²/N and BestChi2N its χ²/N: the
	// lowest grid point refined by a golden-section search between its two
	// neighbours (Press et al., Numerical Recipes, §10.2; RefineEvals more
	// syntheses). AtEdge says the lowest grid value is at an end of the
	// range, so the minimum may lie outside it; Best is then that end,
	// unrefined.
	Best, BestChi2N float64
	AtEdge          bool
}

// RefineEvals is the number of evaluations of the golden-section
// refinement: the bracket starts two grid steps wide and ends 0.618⁹ ≈
// 0.013 of that (for a 0.01 c grid of velocities, 2.6e-4 c or ~80 km/s).
const RefineEvals = 10

// MaxSweepSteps bounds the grid of one sweep.
const MaxSweepSteps = 400

// Sweep evaluates chi2n (χ²/N of the model at parameter value x) at steps
// values evenly spaced from lo to hi (0 < lo < hi; the caller checks the
// parameter's own bounds), then refines the lowest by
// a golden-section search between its neighbours (RefineEvals more
// evaluations, none when the lowest is at an end). progress, when not nil,
// is called after each evaluation with the number done and the total. It
// stops when ctx is done (an error wrapping ctx.Err()); an error of chi2n
// stops it too, wrapped with the velocity.
func Sweep(ctx context.Context, lo, hi float64, steps int, chi2n func(context.Context, float64) (float64, error), progress func(done, total int)) (*Profile, error) {
	switch {
	case !(lo > 0) || !(hi > lo) || math.IsInf(hi, 0):
		return nil, fmt.Errorf("fit: sweep: range %g–%g must satisfy 0 < from < to", lo, hi)
	case steps < 3 || steps > MaxSweepSteps:
		return nil, fmt.Errorf("fit: sweep: %d steps (want 3–%d)", steps, MaxSweepSteps)
	}
	sw := &Profile{Values: make([]float64, steps), Chi2N: make([]float64, steps)}
	h := (hi - lo) / float64(steps-1)
	total := steps + RefineEvals
	done := 0
	eval := func(v float64) (float64, error) {
		if err := ctx.Err(); err != nil {
			return 0, fmt.Errorf("fit: sweep: %w", err)
		}
		x, err := chi2n(ctx, v)
		if err != nil {
			return 0, fmt.Errorf("fit: sweep at %.5g: %w", v, err)
		}
		done++
		if progress != nil {
			progress(done, total)
		}
		return x, nil
	}
	best := 0
	for i := range steps {
		v := lo + float64(i)*h
		x, err := eval(v)
		if err != nil {
			return nil, err
		}
		sw.Values[i], sw.Chi2N[i] = v, x
		if x < sw.Chi2N[best] {
			best = i
		}
	}
	sw.Best, sw.BestChi2N = sw.Values[best], sw.Chi2N[best]
	if best == 0 || best == steps-1 {
		sw.AtEdge = true
		if progress != nil {
			progress(total, total)
		}
		return sw, nil
	}
	// Golden-section search in [v_best−h, v_best+h].
	const g = 0.6180339887498949 // (√5 − 1)/2
	a, c := sw.Values[best-1], sw.Values[best+1]
	x1, x2 := c-g*(c-a), a+g*(c-a)
	f1, err := eval(x1)
	if err != nil {
		return nil, err
	}
	f2, err := eval(x2)
	if err != nil {
		return nil, err
	}
	consider := func(v, f float64) {
		if f < sw.BestChi2N {
			sw.Best, sw.BestChi2N = v, f
		}
	}
	consider(x1, f1)
	consider(x2, f2)
	for range RefineEvals - 2 {
		if f1 < f2 {
			c, x2, f2 = x2, x1, f1
			x1 = c - g*(c-a)
			if f1, err = eval(x1); err != nil {
				return nil, err
			}
			consider(x1, f1)
		} else {
			a, x1, f1 = x1, x2, f2
			x2 = a + g*(c-a)
			if f2, err = eval(x2); err != nil {
				return nil, err
			}
			consider(x2, f2)
		}
	}
	return sw, nil
}
