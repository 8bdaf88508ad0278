package core

import (
	"context"
	"fmt"
	"runtime"
	"slices"
	"strconv"
	"strings"

	"broadline/linelists"
	"broadline/opacity/synth"
	"broadline/spectra"
)

// TickLines is how many of each species' strongest lines the plot marks.
const TickLines = 12

// LineSpecies lists the species (element and ion stage) that have lines in
// the store, by Z then stage: what the plot can mark.
func (b *Bench) LineSpecies() []linelists.Species {
	out := slices.Clone(b.Store.SpeciesTable)
	slices.SortFunc(out, func(a, c linelists.Species) int {
		if a.Z != c.Z {
			return int(a.Z) - int(c.Z)
		}
		return int(a.Charge) - int(c.Charge)
	})
	return slices.Compact(out)
}

// StrongestLines returns, for each of species, its n lines with the
// largest Sobolev optical depth at model m's photosphere whose acting
// wavelength (λ₀ shifted by v_ph, synth.LineContribution.Acting) lies in
// the dataset's model range, by decreasing τ (synth.Model.StrongestLines:
// one plasma solve, no spectrum).
func (b *Bench) StrongestLines(ctx context.Context, m Model, species []linelists.Species, n int) ([][]synth.LineContribution, error) {
	if err := m.Validate(b.Data); err != nil {
		return nil, err
	}
	sm, err := b.SynthModel()
	if err != nil {
		return nil, err
	}
	comp, err := m.MassFractions.Mix()
	if err != nil {
		return nil, err
	}
	lines, err := sm.StrongestLines(ctx, comp, b.Data.Ejecta(m), b.Data.ModelFromUm*1e4, b.Data.ModelToUm*1e4, n,
		synth.Settings{Workers: runtime.GOMAXPROCS(0)}, species)
	if err != nil {
		return nil, fmt.Errorf("strongest lines: %w", err)
	}
	return lines, nil
}

// ParseWavelength reads a vacuum wavelength such as "1.083", "10830 Å",
// "1083 nm" or "1.083 µm" (a unit spectra.ParseWaveUnit knows, spaces
// allowed before it; a bare number is in unit def) and returns it in Å.
// It must be positive and finite.
func ParseWavelength(s string, def WaveUnit) (float64, error) {
	t := strings.TrimSpace(s)
	i := len(t)
	for i > 0 && !strings.ContainsAny(t[i-1:i], "0123456789.") {
		i--
	}
	num, unit := strings.TrimSpace(t[:i]), strings.TrimSpace(t[i:])
	x, err := strconv.ParseFloat(num, 64)
	if err != nil {
		return 0, fmt.Errorf("wavelength %q: %q is not a number (want e.g. 1.083 µm or 10830 Å)", s, num)
	}
	perA := def.PerA
	if unit != "" {
		u, err := spectra.ParseWaveUnit(unit)
		if err != nil {
			return 0, fmt.Errorf("wavelength %q: unknown unit %q (want Å, nm or µm)", s, unit)
		}
		perA = 1 / u.Factor()
	}
	a := x / perA
	if !(a > 0) || a > 1e12 {
		return 0, fmt.Errorf("wavelength %q is not a positive wavelength", s)
	}
	return a, nil
}
