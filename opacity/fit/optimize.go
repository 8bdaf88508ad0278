package fit

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/optimize"
)

// FitResult is the best fit of a problem: least total χ² over the free
// parameters, each epoch's scale and correction solved at every step.
type FitResult struct {
	Parameters []Parameter `json:"parameters"`
	// Best is the parameter vector of least χ² (log₁₀ X, v/c, K).
	Best []float64 `json:"best"`
	// MassFractions are the free elements' fitted fractions, by symbol.
	MassFractions map[string]float64 `json:"mass_fractions"`
	// AtBound names the parameters that ended within 1e-3 of their range
	// of a bound: the minimum may lie beyond it.
	AtBound []string `json:"at_bound,omitempty"`
	// Evaluation is the problem at Best: joint and per-epoch χ²/N, scales.
	Evaluation
	Start []float64 `json:"start"`
	// Scale ("free" or "fixed") and CorrectionOrder state the linear
	// treatment of each epoch's flux.
	Scale           string `json:"scale"`
	CorrectionOrder int    `json:"correction_order"`
	// Evaluations counts the syntheses of all epochs (one evaluation
	// synthesises every epoch); Status is the optimiser's stop reason.
	Evaluations int    `json:"evaluations"`
	Status      string `json:"status"`
	Converged   bool   `json:"converged"`
	Method      string `json:"method"`
	Preview     bool   `json:"preview"`
}

// fitRestarts is the number of times Nelder–Mead restarts from its best
// point with a fresh simplex (against a collapsed simplex, common practice).
const fitRestarts = 1

// simplexStep is the initial simplex's step in the transformed coordinate
// u (θ = lo + (hi − lo)/(1 + e^{−u})): at the middle of a range, 0.12 of it.
const simplexStep = 0.5

// Fit minimises the total χ² of the problem over its free parameters with
// Nelder–Mead (gonum/optimize) in transformed coordinates that keep each
// parameter within its bounds (θ = lo + (hi − lo)/(1 + e^{−u})), starting
// at Start and restarting once from the best point. Points where the free
// fractions sum to ≥ 1 count as +∞. progress, when not nil, is called
// after each evaluation with the number done and the budget
// (MaxEvaluations). It stops when ctx is done (an error wrapping
// ctx.Err()).
func (p *Problem) Fit(ctx context.Context, progress func(done, total int)) (*FitResult, error) {
	c, err := p.compile()
	if err != nil {
		return nil, err
	}
	dim := len(c.params)
	budget := p.maxEvaluations(dim)
	toTheta := func(dst, u []float64) []float64 {
		for i, par := range c.params {
			dst[i] = par.Lower + (par.Upper-par.Lower)/(1+math.Exp(-u[i]))
		}
		return dst
	}
	u0 := make([]float64, dim)
	for i, par := range c.params {
		f := (c.start[i] - par.Lower) / (par.Upper - par.Lower)
		f = math.Min(math.Max(f, 1e-3), 1-1e-3)
		u0[i] = math.Log(f / (1 - f))
	}
	done := 0
	var evalErr error
	theta := make([]float64, dim)
	bestF, bestX := math.Inf(1), slices.Clone(c.start)
	f := func(u []float64) float64 {
		if evalErr != nil {
			return math.Inf(1)
		}
		if err := ctx.Err(); err != nil {
			evalErr = fmt.Errorf("fit: %w", err)
			return math.Inf(1)
		}
		toTheta(theta, u)
		evs, err := c.evaluate(ctx, theta, false, 0)
		done++
		if progress != nil {
			progress(min(done, budget), budget)
		}
		if errors.Is(err, errOutside) {
			return math.Inf(1)
		}
		if err != nil {
			evalErr = err
			return math.Inf(1)
		}
		s := 0.0
		for _, ev := range evs {
			s += ev.chi2
		}
		if s < bestF {
			bestF = s
			copy(bestX, theta)
		}
		return s
	}
	status := optimize.NotTerminated
	for run := 0; run <= fitRestarts && done < budget; run++ {
		if run > 0 {
			for i, par := range c.params {
				fr := (bestX[i] - par.Lower) / (par.Upper - par.Lower)
				fr = math.Min(math.Max(fr, 1e-6), 1-1e-6)
				u0[i] = math.Log(fr / (1 - fr))
			}
		}
		pr := optimize.Problem{Func: f}
		// Converged when 10 + 3·dim iterations in a row lower χ² by less
		// than 0.01 in all: a hundredth of the Δχ² = 1 of one standard
		// deviation, so going on would move the parameters by far less
		// than their errors (a tighter tolerance took 2–4 times the
		// evaluations for Δχ² < 0.1; measured, see TestFitRecovers).
		set := &optimize.Settings{
			FuncEvaluations: budget - done,
			Converger:       &optimize.FunctionConverge{Absolute: 0.01, Relative: 0, Iterations: 10 + 3*dim},
			Recorder:        stopRecorder{&evalErr},
		}
		res, err := optimize.Minimize(pr, slices.Clone(u0), set, &optimize.NelderMead{SimplexSize: simplexStep})
		if evalErr != nil {
			return nil, evalErr
		}
		if err != nil && res == nil {
			return nil, fmt.Errorf("fit: optimiser: %w", err)
		}
		if res != nil {
			status = res.Status
		}
	}
	if math.IsInf(bestF, 1) {
		return nil, fmt.Errorf("fit: no parameter set inside the prior could be evaluated")
	}
	ev, err := c.evaluation(ctx, bestX)
	if err != nil {
		return nil, err
	}
	out := &FitResult{Parameters: c.params, Best: bestX, MassFractions: map[string]float64{}, Evaluation: *ev,
		Start: slices.Clone(c.start), Scale: p.Scale.String(), CorrectionOrder: p.CorrectionOrder,
		Evaluations: done, Status: status.String(), Converged: status == optimize.FunctionConvergence,
		Method: "Nelder–Mead (gonum/optimize) in bounded coordinates, one restart", Preview: p.Settings.Preview}
	if p.Scale == ScaleFixed {
		out.CorrectionOrder = 0
	}
	for i, par := range c.params {
		if par.Kind == KindLogMassFraction {
			out.MassFractions[par.Element] = math.Pow(10, bestX[i])
		}
		if r := par.Upper - par.Lower; bestX[i]-par.Lower < 1e-3*r || par.Upper-bestX[i] < 1e-3*r {
			out.AtBound = append(out.AtBound, par.Name)
		}
	}
	if !out.Converged {
		out.Warnings = append(out.Warnings, fmt.Sprintf("the optimiser stopped without converging (%s after %d evaluations)", status, done))
	}
	if len(out.AtBound) > 0 {
		out.Warnings = append(out.Warnings, fmt.Sprintf("at a bound: %v; the best value may lie beyond it", out.AtBound))
	}
	if progress != nil {
		progress(budget, budget)
	}
	return out, nil
}

// stopRecorder stops the optimiser once an evaluation failed or the
// context ended.
type stopRecorder struct{ err *error }

func (stopRecorder) Init() error { return nil }

func (r stopRecorder) Record(*optimize.Location, optimize.Operation, *optimize.Stats) error {
	return *r.err
}

// maxEvaluations returns MaxEvaluations or its default for dim parameters.
func (p *Problem) maxEvaluations(dim int) int {
	if p.MaxEvaluations > 0 {
		return p.MaxEvaluations
	}
	return max(300, 150*dim)
}
