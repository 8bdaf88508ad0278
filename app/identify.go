package main

import (
	"context"
	"fmt"
	"runtime"
	"strings"

	"broadline/opacity"
	"broadline/opacity/synth"
	"broadline/spectra"
)

// identifyLines is how many of the strongest lines an identification lists
// per feature.
const identifyLines = 4

// identify attributes each observed feature to the model's elements and
// lines: for a window of ± the feature's width around its minimum (clipped
// to the model's range), each element's share of the absorbed equivalent
// width (with only its lines), what removing it takes away, and the lines
// with the largest Sobolev depth at the photosphere acting there (see
// synth.Attribute). progress, when not nil, is called after each feature.
// A feature outside the model's range gets nil.
func (b *bench) identify(ctx context.Context, s *Session, feats []spectra.Feature, progress func(done, total int)) ([]*synth.Attribution, error) {
	if err := s.Validate(b.data); err != nil {
		return nil, err
	}
	m, err := b.synthModel()
	if err != nil {
		return nil, err
	}
	comp, err := opacity.ParseComposition(s.MassFractions)
	if err != nil {
		return nil, err
	}
	sc := b.data.Scenario
	ej := sc.Ejecta(s.Epoch)
	ej.BetaPh, ej.Temperature = s.PhotosphereVelocity, s.Temperature
	return attributeFeatures(ctx, m, comp, ej, synth.Settings{Workers: runtime.GOMAXPROCS(0)},
		feats, sc.ModelFromUm*1e4, sc.ModelToUm*1e4, progress)
}

// attributeFeatures runs m.Attribute for each feature on the window of ±
// its width around its minimum, clipped to the model's range [lo, hi] Å;
// a feature outside the range gets nil. progress, when not nil, is called
// after each feature. The workbench and the identify command share it.
func attributeFeatures(ctx context.Context, m *synth.Model, comp opacity.Composition, ej synth.Ejecta, set synth.Settings,
	feats []spectra.Feature, lo, hi float64, progress func(done, total int)) ([]*synth.Attribution, error) {
	out := make([]*synth.Attribution, len(feats))
	for i, f := range feats {
		from, to := max(f.Wavelength-f.Width, lo), min(f.Wavelength+f.Width, hi)
		if to > from {
			a, err := m.Attribute(ctx, comp, ej, from, to, identifyLines, set)
			if err != nil {
				return nil, fmt.Errorf("feature at %.4f µm: %w", f.Wavelength/1e4, err)
			}
			out[i] = a
		}
		if progress != nil {
			progress(i+1, len(feats))
		}
	}
	return out, nil
}

// elementsText lists the elements that take at least 5 % of a window's
// absorbed equivalent width, largest first: "Sr 62 %, Ca 30 %".
func elementsText(a *synth.Attribution) string {
	if a == nil {
		return "outside the model"
	}
	if !(a.Absorbed > 0) {
		return "no model absorption"
	}
	var parts []string
	for _, e := range a.Elements {
		if e.Share >= 0.05 {
			parts = append(parts, fmt.Sprintf("%s %.0f %%", e.Symbol, 100*e.Share))
		}
	}
	if len(parts) == 0 {
		return "no element above 5 %"
	}
	return strings.Join(parts, ", ")
}

// linesText lists a window's strongest lines: "Sr II 10330.1 Å (τ 1.3)".
func linesText(a *synth.Attribution) string {
	if a == nil || len(a.Lines) == 0 {
		return "—"
	}
	parts := make([]string, len(a.Lines))
	for i, l := range a.Lines {
		parts[i] = fmt.Sprintf("%s %.1f Å (τ %.2g)", l.Species, l.Rest, l.TauPhotosphere)
	}
	return strings.Join(parts, ", ")
}
