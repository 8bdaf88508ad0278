package main

import (
	"context"
	"fmt"
	"runtime"
	"slices"
	"sync"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/opacity/fit"
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

// overlay is a model on the observed spectrum's samples with its χ² (see
// fit.Overlay); the bench adds the line lists' warnings to its own.
type overlay = fit.Overlay

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
	ov, err := fit.Compare(b.data.Observed[s.Epoch], res, sc.Instrument.ResolvingPower)
	if err != nil {
		return nil, err
	}
	ov.Warnings = append(slices.Clone(b.loadWarnings), res.Warnings...)
	return ov, nil
}
