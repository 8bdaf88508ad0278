package fit

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"slices"
	"strconv"
)

// Defaults and limits of the sampler.
const (
	// DefaultStretch is the stretch move's scale a (Goodman & Weare 2010).
	DefaultStretch = 2.0
	// DefaultSpread is the initial ball's radius as a fraction of each
	// parameter's range.
	DefaultSpread = 0.01
	// MaxSamplerEvaluations bounds Walkers × (Burn + Steps).
	MaxSamplerEvaluations = 100_000_000
	// MaxStoredValues bounds Walkers × Steps × parameters.
	MaxStoredValues = 50_000_000
	// TauLengths is the chain length, in autocorrelation times, below
	// which the result warns (common practice: the emcee documentation
	// asks for ≳ 50 τ).
	TauLengths = 50
	// upperLimitEdge is the fraction of a log mass fraction's range above
	// its lower bound within which a 2.5th percentile makes the result an
	// upper limit (see Summary).
	upperLimitEdge = 0.05
)

// SampleOptions set up the ensemble sampler.
type SampleOptions struct {
	// Walkers is the ensemble's size: even, at least 2 × parameters + 2
	// (default the larger of 16 and that, rounded up to even).
	Walkers int
	// Steps is the number of steps kept per walker (default 1000); Burn
	// the steps discarded before them (0: Steps/2).
	Steps, Burn int
	// Seed seeds the random numbers (PCG, math/rand/v2): the same seed
	// gives the same samples bit for bit, for any Workers.
	Seed uint64
	// Start is the centre of the walkers' initial ball, in the layout of
	// Problem.Parameters (nil: Problem.Start; e.g. a FitResult's Best);
	// Spread the ball's radius as a fraction of each range (default
	// DefaultSpread). Stretch is the move's scale a (default 2).
	Start   []float64
	Spread  float64
	Stretch float64
	// Workers evaluates walkers in parallel (≤ 0: GOMAXPROCS); each
	// synthesis is then serial.
	Workers int
}

// Summary is one parameter's marginal posterior, in its physical unit: a
// mass fraction (not its logarithm), v/c, or K. Quantiles commute with the
// logarithm, so these are the quantiles of log₁₀ X raised to the power.
type Summary struct {
	Name   string  `json:"name"`
	Unit   string  `json:"unit"`
	Median float64 `json:"median"`
	// Lower68/Upper68 and Lower95/Upper95 are central intervals (the
	// 16th/84th and 2.5th/97.5th percentiles).
	Lower68 float64 `json:"lower_68"`
	Upper68 float64 `json:"upper_68"`
	Lower95 float64 `json:"lower_95"`
	Upper95 float64 `json:"upper_95"`
	// UpperLimit95 is the 95th percentile, a one-sided 95 % upper limit.
	// IsUpperLimit says to quote it instead of the interval: for a mass
	// fraction whose 2.5th percentile of log₁₀ X lies within 5 % of the
	// log range above the lower bound (the posterior piles up at the
	// bound, so the data only bound the fraction from above).
	UpperLimit95 float64 `json:"upper_limit_95"`
	IsUpperLimit bool    `json:"is_upper_limit"`
	// AutocorrelationTime is the integrated autocorrelation time in steps,
	// SplitRHat the split-R̂ over walkers, EffectiveSamples
	// walkers × steps / τ.
	AutocorrelationTime float64 `json:"autocorrelation_time_steps"`
	SplitRHat           float64 `json:"split_rhat"`
	EffectiveSamples    float64 `json:"effective_samples"`
}

// Posterior is the outcome of the ensemble sampler.
type Posterior struct {
	Parameters []Parameter `json:"parameters"`
	Summaries  []Summary   `json:"summaries"`
	// MaxPosterior is the problem evaluated at the sample of highest
	// posterior density: its composition, scales and per-epoch χ²/N.
	MaxPosterior *Evaluation `json:"max_posterior"`
	Walkers      int         `json:"walkers"`
	Steps        int         `json:"steps"`
	Burn         int         `json:"burn"`
	Seed         uint64      `json:"seed"`
	Stretch      float64     `json:"stretch_scale"`
	// AcceptanceFraction is the mean over walkers of the accepted moves'
	// fraction after the burn-in; its least and greatest walker values
	// follow.
	AcceptanceFraction    float64 `json:"acceptance_fraction"`
	AcceptanceFractionMin float64 `json:"acceptance_fraction_min"`
	AcceptanceFractionMax float64 `json:"acceptance_fraction_max"`
	// MaxAutocorrelationTime is the largest τ; ChainInTau = Steps / τ_max.
	MaxAutocorrelationTime float64 `json:"max_autocorrelation_time_steps"`
	ChainInTau             float64 `json:"chain_length_in_tau"`
	// Scale, CorrectionOrder, Prior and Likelihood state the model's
	// statistical choices.
	Scale           string   `json:"scale"`
	CorrectionOrder int      `json:"correction_order"`
	Prior           string   `json:"prior"`
	Likelihood      string   `json:"likelihood"`
	Method          string   `json:"method"`
	Preview         bool     `json:"preview"`
	Warnings        []string `json:"warnings,omitempty"`
	// Samples are the kept positions, Samples[s·Walkers + w] that of
	// walker w after kept step s, in the layout of Parameters;
	// LogPosterior their log posterior density (up to a constant).
	Samples      [][]float64 `json:"-"`
	LogPosterior []float64   `json:"-"`
}

// logPosterior returns the log posterior at x: −∞ outside the prior,
// else −½ Σ_e (χ²_e + ln det A_e), the Gaussian likelihood with each
// epoch's linear coefficients marginalised over flat priors (A_e their
// normal matrix; nothing for a fixed scale). A model without flux on an
// epoch's samples, whose scale is undefined, has zero density.
func (c *compiled) logPosterior(ctx context.Context, x []float64, workers int) (float64, error) {
	evs, err := c.evaluate(ctx, x, false, workers)
	if errors.Is(err, errOutside) {
		return math.Inf(-1), nil
	}
	if err != nil {
		return 0, err
	}
	s := 0.0
	for _, ev := range evs {
		if ev.degenerate {
			return math.Inf(-1), nil
		}
		s += ev.chi2 + ev.logDet
	}
	return -s / 2, nil
}

// Sample draws from the posterior of the problem's free parameters with the
// affine-invariant ensemble sampler (stretch move; see runEnsemble): flat
// priors within the bounds (uniform in log₁₀ X, v_ph and T_ph; Σ X_free < 1),
// a Gaussian likelihood with the spectra's uncertainties, each epoch's
// scale and correction marginalised analytically. progress, when not nil,
// is called after each step with the steps done and Burn + Steps. It stops
// when ctx is done (an error wrapping ctx.Err()).
func (p *Problem) Sample(ctx context.Context, opt SampleOptions, progress func(done, total int)) (*Posterior, error) {
	c, err := p.compile()
	if err != nil {
		return nil, err
	}
	dim := len(c.params)
	o, err := opt.withDefaults(dim)
	if err != nil {
		return nil, err
	}
	centre := c.start
	if o.Start != nil {
		if len(o.Start) != dim {
			return nil, fmt.Errorf("fit: %w: start has %d parameters, the problem %d (%s)", ErrProblem, len(o.Start), dim, describeFree(c.params))
		}
		centre = o.Start
	}
	for i, v := range centre {
		par := c.params[i]
		if bad(v) || v < par.Lower || v > par.Upper {
			return nil, fmt.Errorf("fit: %w: start %s = %g outside its bounds %g–%g", ErrProblem, par.Name, v, par.Lower, par.Upper)
		}
	}
	init, err := c.initialBall(centre, o)
	if err != nil {
		return nil, err
	}
	synthWorkers := 0
	if o.Workers > 1 {
		synthWorkers = 1
	}
	lp := func(ctx context.Context, x []float64) (float64, error) { return c.logPosterior(ctx, x, synthWorkers) }
	total := o.Burn + o.Steps
	run, err := runEnsemble(ctx, lp, init, total, o.Burn, o.Stretch, o.Seed, o.Workers, progress)
	if err != nil {
		return nil, err
	}
	post := &Posterior{Parameters: c.params, Walkers: o.Walkers, Steps: o.Steps, Burn: o.Burn, Seed: o.Seed, Stretch: o.Stretch,
		Scale: p.Scale.String(), CorrectionOrder: p.CorrectionOrder, Preview: p.Settings.Preview,
		Prior:      "uniform within the bounds: in log10 of each free mass fraction (with the free fractions summing below 1), in v_ph and in T_ph",
		Likelihood: "Gaussian with the spectra's uncertainties, the model taken as exact; each epoch's flux scale and continuum correction marginalised analytically over flat priors",
		Method:     "affine-invariant ensemble sampler, stretch move (Goodman & Weare 2010), half-ensemble updates",
		Warnings:   slices.Clone(c.warnings)}
	if p.Scale == ScaleFixed {
		post.CorrectionOrder = 0
		post.Likelihood = "Gaussian with the spectra's uncertainties, the model taken as exact, at a fixed flux scale"
	}
	kept := run.chain[o.Burn:]
	best, bestLnp := 0, math.Inf(-1)
	for s, row := range kept {
		for w, x := range row {
			post.Samples = append(post.Samples, x)
			v := run.lnp[o.Burn+s][w]
			post.LogPosterior = append(post.LogPosterior, v)
			if v > bestLnp {
				best, bestLnp = len(post.Samples)-1, v
			}
		}
	}
	post.summarise(kept, c.params, run.accepted)
	ev, err := c.evaluation(ctx, post.Samples[best])
	if err != nil {
		return nil, err
	}
	post.MaxPosterior = ev
	for _, w := range ev.Warnings {
		if !slices.Contains(post.Warnings, w) {
			post.Warnings = append(post.Warnings, w)
		}
	}
	return post, nil
}

// withDefaults fills in and checks the options.
func (o SampleOptions) withDefaults(dim int) (SampleOptions, error) {
	if o.Walkers == 0 {
		o.Walkers = max(16, 2*dim+2)
		o.Walkers += o.Walkers % 2
	}
	if o.Steps == 0 {
		o.Steps = 1000
	}
	if o.Burn == 0 {
		o.Burn = o.Steps / 2
	}
	if o.Spread == 0 {
		o.Spread = DefaultSpread
	}
	if o.Stretch == 0 {
		o.Stretch = DefaultStretch
	}
	o.Workers = workersFor(o.Workers)
	switch {
	case o.Walkers < 2*dim+2 || o.Walkers%2 != 0:
		return o, fmt.Errorf("fit: %w: %d walkers for %d parameters (want an even number ≥ %d)", ErrProblem, o.Walkers, dim, 2*dim+2)
	case o.Steps < 4 || o.Burn < 0:
		return o, fmt.Errorf("fit: %w: %d steps after %d burn-in steps (want ≥ 4 and ≥ 0)", ErrProblem, o.Steps, o.Burn)
	case float64(o.Walkers)*float64(o.Steps+o.Burn) > MaxSamplerEvaluations:
		return o, fmt.Errorf("fit: %w: %d walkers × %d steps exceed %d evaluations", ErrProblem, o.Walkers, o.Steps+o.Burn, MaxSamplerEvaluations)
	case float64(o.Walkers)*float64(o.Steps)*float64(dim) > MaxStoredValues:
		return o, fmt.Errorf("fit: %w: %d walkers × %d steps × %d parameters exceed %d stored values", ErrProblem, o.Walkers, o.Steps, dim, MaxStoredValues)
	case bad(o.Spread) || !(o.Spread > 0) || o.Spread > 1:
		return o, fmt.Errorf("fit: %w: initial spread %g (want 0 < spread ≤ 1)", ErrProblem, o.Spread)
	case bad(o.Stretch) || !(o.Stretch > 1) || o.Stretch > 10:
		return o, fmt.Errorf("fit: %w: stretch scale %g (want 1 < a ≤ 10)", ErrProblem, o.Stretch)
	}
	return o, nil
}

// initialBall draws the walkers' starting points around centre (Gaussian,
// σ = Spread × range), each inside the bounds and with the free fractions
// summing below 1, from a random stream seeded by Seed.
func (c *compiled) initialBall(centre []float64, o SampleOptions) ([][]float64, error) {
	rng := rand.New(rand.NewPCG(o.Seed, 0x5851f42d4c957f2d))
	init := make([][]float64, o.Walkers)
	for w := range init {
		x := make([]float64, len(centre))
		ok := false
		for try := 0; try < 1000 && !ok; try++ {
			for i, par := range c.params {
				x[i] = centre[i] + o.Spread*(par.Upper-par.Lower)*rng.NormFloat64()
			}
			if !c.inBounds(x) {
				continue
			}
			_, err := c.composition(x)
			ok = err == nil
		}
		if !ok {
			return nil, fmt.Errorf("fit: %w: no starting point inside the prior near %v", ErrProblem, centre)
		}
		init[w] = x
	}
	return init, nil
}

// summarise fills the summaries and diagnostics from the kept chain.
func (post *Posterior) summarise(kept [][][]float64, params []Parameter, accepted []int) {
	nw, ns := post.Walkers, len(kept)
	post.AcceptanceFractionMin, post.AcceptanceFractionMax = math.Inf(1), math.Inf(-1)
	for _, a := range accepted {
		f := float64(a) / float64(ns)
		post.AcceptanceFraction += f / float64(nw)
		post.AcceptanceFractionMin = math.Min(post.AcceptanceFractionMin, f)
		post.AcceptanceFractionMax = math.Max(post.AcceptanceFractionMax, f)
	}
	var rhatBad []string
	for i, par := range params {
		chains := make([][]float64, nw)
		for w := range nw {
			chains[w] = make([]float64, ns)
			for s := range ns {
				chains[w][s] = kept[s][w][i]
			}
		}
		all := make([]float64, 0, nw*ns)
		for _, s := range post.Samples {
			all = append(all, s[i])
		}
		sorted := sortedCopy(all)
		q := func(f float64) float64 { return par.Physical(quantile(sorted, f)) }
		sm := Summary{Name: par.Name, Unit: unitOf(par.Kind), Median: q(0.5), Lower68: q(0.16), Upper68: q(0.84),
			Lower95: q(0.025), Upper95: q(0.975), UpperLimit95: q(0.95),
			AutocorrelationTime: integratedTime(chains), SplitRHat: splitRHat(chains)}
		sm.EffectiveSamples = float64(nw*ns) / sm.AutocorrelationTime
		if par.Kind == KindLogMassFraction {
			sm.IsUpperLimit = quantile(sorted, 0.025) < par.Lower+upperLimitEdge*(par.Upper-par.Lower)
		}
		if sm.AutocorrelationTime > post.MaxAutocorrelationTime || math.IsNaN(sm.AutocorrelationTime) {
			post.MaxAutocorrelationTime = sm.AutocorrelationTime
		}
		if sm.SplitRHat > 1.1 {
			rhatBad = append(rhatBad, par.Name)
		}
		post.Summaries = append(post.Summaries, sm)
	}
	post.ChainInTau = float64(ns) / post.MaxAutocorrelationTime
	if !(post.ChainInTau >= TauLengths) {
		post.Warnings = append(post.Warnings, fmt.Sprintf("the chain (%d steps) is shorter than %d autocorrelation times (τ_max = %.3g steps): the intervals are unreliable; run %d steps or more",
			ns, TauLengths, post.MaxAutocorrelationTime, int(math.Ceil(TauLengths*post.MaxAutocorrelationTime))))
	}
	if len(rhatBad) > 0 {
		post.Warnings = append(post.Warnings, fmt.Sprintf("split-R̂ above 1.1 for %v: the walkers have not mixed", rhatBad))
	}
	if post.AcceptanceFraction < 0.2 || post.AcceptanceFraction > 0.5 {
		post.Warnings = append(post.Warnings, fmt.Sprintf("acceptance fraction %.2f outside 0.2–0.5 (common practice, Foreman-Mackey et al. 2013)", post.AcceptanceFraction))
	}
}

// unitOf names a kind's physical unit.
func unitOf(k ParameterKind) string {
	switch k {
	case KindLogMassFraction:
		return "mass fraction"
	case KindVelocity:
		return "c"
	}
	return "K"
}

// WriteSamplesCSV writes the kept samples as CSV: a header
// "step,walker,<parameter names>,log_posterior", then one row per sample
// (steps counted after the burn-in from 0, walkers from 0), values in the
// parameters' coordinates (log₁₀ X, v/c, K) with full precision.
func (post *Posterior) WriteSamplesCSV(w io.Writer) error {
	bw := bufio.NewWriter(w)
	bw.WriteString("step,walker")
	for _, p := range post.Parameters {
		bw.WriteString("," + p.Name)
	}
	bw.WriteString(",log_posterior\n")
	var buf []byte
	for i, s := range post.Samples {
		buf = strconv.AppendInt(buf[:0], int64(i/post.Walkers), 10)
		buf = append(buf, ',')
		buf = strconv.AppendInt(buf, int64(i%post.Walkers), 10)
		for _, v := range s {
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, v, 'g', -1, 64)
		}
		buf = append(buf, ',')
		buf = strconv.AppendFloat(buf, post.LogPosterior[i], 'g', -1, 64)
		buf = append(buf, '\n')
		if _, err := bw.Write(buf); err != nil {
			return fmt.Errorf("fit: writing samples: %w", err)
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("fit: writing samples: %w", err)
	}
	return nil
}

// Column returns the kept samples of parameter i, in its coordinate.
func (post *Posterior) Column(i int) []float64 {
	out := make([]float64, len(post.Samples))
	for k, s := range post.Samples {
		out[k] = s[i]
	}
	return out
}
