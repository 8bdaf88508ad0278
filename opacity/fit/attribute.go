package fit

import (
	"context"
	"fmt"

	"broadline/opacity"
	"broadline/opacity/synth"
	"broadline/spectra"
)

// AttributeFeatures attributes each observed feature to the model's
// elements and lines: for the window of ± the feature's width around its
// minimum, clipped to the model's range [lo, hi] Å, it runs m.Attribute
// (each element's share of the absorbed equivalent width with only its
// lines, what removing it takes away, and the nLines lines with the largest
// Sobolev depth at the photosphere acting there). A feature outside the
// range gets nil. progress, when not nil, is called after each feature.
func AttributeFeatures(ctx context.Context, m *synth.Model, comp opacity.Composition, ej synth.Ejecta, set synth.Settings,
	feats []spectra.Feature, lo, hi float64, nLines int, progress func(done, total int)) ([]*synth.Attribution, error) {
	out := make([]*synth.Attribution, len(feats))
	for i, f := range feats {
		from, to := max(f.Wavelength-f.Width, lo), min(f.Wavelength+f.Width, hi)
		if to > from {
			a, err := m.Attribute(ctx, comp, ej, from, to, nLines, set)
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

// CompareModel synthesises the spectrum of comp and ej with m, puts it at
// distance d (cm) from the observer, and compares it with obs at resolving
// power R (see Compare): the one path from a model to a χ² that the
// workbench and the headless commands share. The overlay's warnings are
// the synthesis's.
func CompareModel(ctx context.Context, m *synth.Model, comp opacity.Composition, ej synth.Ejecta, set synth.Settings,
	d float64, obs *spectra.Spectrum, R float64) (*Overlay, error) {
	ov, _, err := CompareModelSpectrum(ctx, m, comp, ej, set, d, obs, R)
	return ov, err
}

// CompareModelSpectrum is CompareModel that also returns the synthetic
// spectrum, its Flux already put at distance d (e.g. to resample it
// elsewhere with Observe).
func CompareModelSpectrum(ctx context.Context, m *synth.Model, comp opacity.Composition, ej synth.Ejecta, set synth.Settings,
	d float64, obs *spectra.Spectrum, R float64) (*Overlay, *synth.Result, error) {
	res, err := m.Spectrum(ctx, comp, ej, set)
	if err != nil {
		return nil, nil, fmt.Errorf("synthesis: %w", err)
	}
	res.Flux = res.AtDistance(d)
	ov, err := Compare(obs, res, R)
	if err != nil {
		return nil, nil, err
	}
	ov.Warnings = res.Warnings
	return ov, res, nil
}
