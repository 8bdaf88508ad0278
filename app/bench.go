package main

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/opacity/synth"
	"broadline/spectra"
)

// bench is the workbench's computing side, without any widget: a dataset,
// its line store and the synthesis model built from it. The GUI holds one
// and calls compute off the UI goroutine.
type bench struct {
	data  *dataset
	store *linelists.Store
	// loadWarnings are what reading the line lists reported; every
	// computation's warnings repeat them.
	loadWarnings []string

	once  sync.Once
	model *synth.Model
	err   error
}

// newBench loads the line store of d's scenario.
func newBench(d *dataset) (*bench, error) {
	st, rep, err := d.Scenario.LoadStore(d.fsys, d.dir)
	if err != nil {
		return nil, err
	}
	return &bench{data: d, store: st, loadWarnings: rep.Warnings}, nil
}

// synthModel returns the synthesis model, built on first use.
func (b *bench) synthModel() (*synth.Model, error) {
	b.once.Do(func() { b.model, b.err = b.data.Scenario.NewModel(b.store) })
	return b.model, b.err
}

// overlay is a synthetic spectrum as the session's instrument would record
// it, on the observed spectrum's wavelengths.
type overlay struct {
	Wavelength []float64 // vacuum Å (the observed samples inside the model's range)
	Flux       []float64 // erg s⁻¹ cm⁻² Å⁻¹ at the dataset's distance
	Preview    bool
	// Chi2 is Σ((obs − model)/σ)² over unmasked samples, and N their number.
	Chi2     float64
	N        int
	Warnings []string
}

// compute synthesises the session's model for its epoch and compares it
// with the observed spectrum.
func (b *bench) compute(ctx context.Context, s *Session) (*overlay, error) {
	return b.computeWithout(ctx, s, 0)
}

// computeWithout is compute with the lines of element z removed (a
// knock-out; z = 0 removes nothing). The plasma still has the element.
func (b *bench) computeWithout(ctx context.Context, s *Session, z int) (*overlay, error) {
	if err := s.Validate(b.data); err != nil {
		return nil, err
	}
	m, err := b.synthModel()
	if err != nil {
		return nil, err
	}
	sc := b.data.Scenario
	comp, err := opacity.ParseComposition(s.MassFractions)
	if err != nil {
		return nil, err
	}
	ej := sc.Ejecta(s.Epoch)
	ej.BetaPh = s.PhotosphereVelocity
	ej.Temperature = s.Temperature
	set := synth.Settings{Preview: s.Preview, Workers: runtime.GOMAXPROCS(0)}
	if z > 0 {
		set.Without = []int{z}
	}
	res, err := m.Spectrum(ctx, comp, ej, set)
	if err != nil {
		return nil, fmt.Errorf("synthesis: %w", err)
	}
	res.Flux = res.AtDistance(sc.DistanceMpc * spectra.Megaparsec)
	ov, err := compareObserved(b.data.Observed[s.Epoch], res, sc.Instrument.ResolvingPower)
	if err != nil {
		return nil, err
	}
	ov.Warnings = append(slices.Clone(b.loadWarnings), res.Warnings...)
	return ov, nil
}

// compareObserved puts the synthetic spectrum res (flux already at the
// observer) on the observed spectrum's wavelengths inside the model's range,
// smoothed to resolving power R, and sums χ² over the unmasked samples that
// have an uncertainty.
func compareObserved(obs *spectra.Spectrum, res *synth.Result, R float64) (*overlay, error) {
	lo, hi := res.Wavelength[0], res.Wavelength[len(res.Wavelength)-1]
	var idx []int
	var grid []float64
	for i, w := range obs.Wavelength {
		if w >= lo && w <= hi {
			idx = append(idx, i)
			grid = append(grid, w)
		}
	}
	if len(grid) == 0 {
		return nil, fmt.Errorf("the observed spectrum lies outside the model's range")
	}
	flux, _, err := res.Observe(R, grid)
	if err != nil {
		return nil, err
	}
	ov := &overlay{Wavelength: grid, Flux: flux, Preview: res.Preview}
	for k, i := range idx {
		if obs.Masked(i) || obs.Uncertainty == nil || !(obs.Uncertainty[i] > 0) {
			continue
		}
		r := (obs.Flux[i] - flux[k]) / obs.Uncertainty[i]
		if !math.IsNaN(r) {
			ov.Chi2 += r * r
			ov.N++
		}
	}
	return ov, nil
}
