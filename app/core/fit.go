package core

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strings"

	"broadline/linelists"
	"broadline/opacity/fit"
	"broadline/opacity/synth"
	"broadline/physics"
)

// FitRequest says what a fit of the bench's dataset frees and how it
// samples. The composition of the model the fit starts from is shared by
// every chosen epoch (with an inner zone, the outer mix is fitted and the
// inner one held fixed); each epoch has its own days (from the dataset),
// photosphere velocity and temperature (fixed unless freed) and flux scale
// (always free, solved analytically).
type FitRequest struct {
	// Free are the symbols of the elements whose mass fractions are
	// fitted, each between MassFractionLower and MassFractionUpper (0: the
	// defaults 1e-6 and 1), uniform in log₁₀ X.
	Free                                 []string
	MassFractionLower, MassFractionUpper float64
	// Epochs are the dataset's epochs to fit jointly (0-based); empty
	// means the model's epoch alone.
	Epochs []int
	// FitVelocity and FitTemperature free each chosen epoch's photosphere
	// velocity and temperature.
	FitVelocity, FitTemperature bool
	// CorrectionOrder is the order (0–3) of each epoch's smooth
	// multiplicative continuum correction; 0 is a free flux scale alone.
	CorrectionOrder int
	// Samples is the number of sampler steps kept per walker after the
	// fit (0: fit only, no posterior); Walkers the ensemble's size (0: the
	// sampler's default); Seed seeds it (same seed, same samples).
	Samples, Walkers int
	Seed             uint64
}

// FitStage names the part of a fit a progress report is about.
type FitStage string

// The stages of Bench.Fit.
const (
	StageOptimise FitStage = "fit"
	StageSample   FitStage = "sample"
)

// FitOutcome is the result of Bench.Fit.
type FitOutcome struct {
	// Request is what was asked, Start the model it started from.
	Request FitRequest
	Start   Model
	// Epochs are the dataset epochs fitted (0-based), in the order of the
	// results' per-epoch reports.
	Epochs []int
	// Best is the optimiser's result; Posterior the sampler's (nil when
	// Request.Samples is 0).
	Best      *fit.FitResult
	Posterior *fit.Posterior
	// Models are the best-fitting models, one per fitted epoch, ready to
	// be used in the workbench ("Use best").
	Models []Model
}

// Problem returns the inference problem of request r starting from model
// m: m's composition shared by r's epochs, each epoch at m's photosphere
// when it is m's epoch and at the dataset's recorded start otherwise.
func (b *Bench) Problem(m Model, r FitRequest) (*fit.Problem, []int, error) {
	if err := m.Validate(b.Data); err != nil {
		return nil, nil, err
	}
	if len(r.Free) == 0 && !r.FitVelocity && !r.FitTemperature {
		return nil, nil, errors.New("nothing to fit: free at least one element, the velocity or the temperature")
	}
	lo, hi := r.MassFractionLower, r.MassFractionUpper
	if lo == 0 {
		lo = fit.DefaultMassFractionLower
	}
	if hi == 0 {
		hi = fit.DefaultMassFractionUpper
	}
	if !(lo > 0 && lo < hi && hi <= 1) {
		return nil, nil, fmt.Errorf("mass-fraction bounds %g–%g: want 0 < lower < upper ≤ 1", lo, hi)
	}
	if r.CorrectionOrder < 0 || r.CorrectionOrder > fit.MaxCorrectionOrder {
		return nil, nil, fmt.Errorf("continuum correction order %d: want 0–%d", r.CorrectionOrder, fit.MaxCorrectionOrder)
	}
	comp, err := m.MassFractions.Mix()
	if err != nil {
		return nil, nil, err
	}
	p := &fit.Problem{Composition: comp, FitVelocity: r.FitVelocity, FitTemperature: r.FitTemperature,
		Scale: fit.ScaleFree, CorrectionOrder: r.CorrectionOrder,
		Settings: synth.Settings{Preview: m.Preview, Workers: runtime.GOMAXPROCS(0)}}
	seen := map[int]bool{}
	for _, s := range r.Free {
		el, err := linelists.ElementBySymbol(strings.TrimSpace(s))
		if err != nil {
			return nil, nil, fmt.Errorf("free element %q: not an element symbol", s)
		}
		if seen[el.Z] {
			return nil, nil, fmt.Errorf("free element %s given twice", el.Symbol)
		}
		seen[el.Z] = true
		p.Free = append(p.Free, fit.FreeElement{Z: el.Z, Lower: lo, Upper: hi})
	}
	epochs := slices.Clone(r.Epochs)
	if len(epochs) == 0 {
		epochs = []int{m.Epoch}
	}
	used := map[int]bool{}
	for _, e := range epochs {
		if e < 0 || e >= len(b.Data.Epochs) {
			return nil, nil, fmt.Errorf("epoch %d: the dataset has epochs 1–%d", e+1, len(b.Data.Epochs))
		}
		if used[e] {
			return nil, nil, fmt.Errorf("epoch %d given twice", e+1)
		}
		used[e] = true
		em := b.Data.StartModel(e)
		if e == m.Epoch {
			em = m
		}
		em.Epoch, em.MassFractions, em.Preview = e, m.MassFractions, m.Preview
		em.InnerMassFractions, em.ZoneBoundary = m.InnerMassFractions, m.ZoneBoundary
		if err := em.Validate(b.Data); err != nil {
			return nil, nil, fmt.Errorf("epoch %d: %w", e+1, err)
		}
		p.Epochs = append(p.Epochs, fit.Epoch{
			Name:           fmt.Sprintf("epoch %d (%s, day %g)", e+1, b.Data.Epochs[e].File, b.Data.Epochs[e].Days),
			Number:         e + 1,
			Observed:       b.Observed[e],
			ResolvingPower: b.Data.ResolvingPower,
			DistanceCm:     b.Data.DistanceMpc * physics.Megaparsec,
			Ejecta:         b.Data.Ejecta(em),
			// The workbench's own ranges, so that the best values can be
			// used in it (the velocity kept above the inner edge, as the
			// fit requires).
			Velocity:    fit.Bounds{Lower: math.Max(MinVelocity, b.Data.InnerVelocity+0.005), Upper: MaxVelocity(b.Data)},
			Temperature: fit.Bounds{Lower: MinTemperature, Upper: MaxTemperature},
		})
	}
	if p.Model, err = b.FitModel(); err != nil {
		return nil, nil, err
	}
	return p, epochs, nil
}

// Fit fits request r starting from model m: the optimiser first, then,
// when r.Samples > 0, the ensemble sampler started around its best point.
// progress, when not nil, is called with the stage and its work done and
// total. It stops when ctx is done.
func (b *Bench) Fit(ctx context.Context, m Model, r FitRequest, progress func(stage FitStage, done, total int)) (*FitOutcome, error) {
	p, epochs, err := b.Problem(m, r)
	if err != nil {
		return nil, err
	}
	report := func(s FitStage) func(done, total int) {
		if progress == nil {
			return nil
		}
		return func(done, total int) { progress(s, done, total) }
	}
	best, err := p.Fit(ctx, report(StageOptimise))
	if err != nil {
		return nil, err
	}
	out := &FitOutcome{Request: r, Start: m, Epochs: epochs, Best: best}
	if r.Samples > 0 {
		post, err := p.Sample(ctx, fit.SampleOptions{Walkers: r.Walkers, Steps: r.Samples, Seed: r.Seed, Start: best.Best},
			report(StageSample))
		if err != nil {
			return nil, err
		}
		out.Posterior = post
	}
	comp, err := ParseComposition(best.Composition)
	if err != nil {
		return nil, fmt.Errorf("best composition: %w", err)
	}
	if m.HasZone() {
		note := fmt.Sprintf("the inner zone's mass fractions (inside %s) are held fixed: the fit frees the outer mix only", m.BoundaryText())
		best.Warnings = append(best.Warnings, note)
		if out.Posterior != nil {
			out.Posterior.Warnings = append(out.Posterior.Warnings, note)
		}
	}
	for i, e := range epochs {
		ef := best.Epochs[i]
		bm := m
		bm.Epoch, bm.PhotosphereVelocity, bm.Temperature, bm.MassFractions = e, ef.PhotosphereVelocityC, ef.TemperatureK, comp
		// A fitted value a hair outside the workbench's range (rounding
		// in the bounded transform) is put back inside it.
		bm.PhotosphereVelocity = math.Min(math.Max(bm.PhotosphereVelocity, MinVelocity), MaxVelocity(b.Data))
		bm.Temperature = math.Min(math.Max(bm.Temperature, MinTemperature), MaxTemperature)
		out.Models = append(out.Models, bm)
	}
	return out, nil
}
