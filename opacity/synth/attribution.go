package synth

import (
	"context"
	"fmt"
	"math"
	"sort"
	"sync"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/physics"
)

// KnockOut is the spectrum with one element's lines removed.
type KnockOut struct {
	Z      int
	Symbol string
	Result *Result
}

// KnockOuts returns, for every element of comp (and of the zones of ej
// that reach into the envelope) in order of Z, the spectrum with that
// element's lines removed everywhere (the plasma is solved once, with every
// element present, and shared). The elements are computed in parallel on
// set.Workers goroutines, each integral serially; results are in Z order and
// do not depend on the number of workers.
func (m *Model) KnockOuts(ctx context.Context, comp opacity.Composition, ej Ejecta, set Settings) ([]KnockOut, error) {
	s, err := m.prepare(ctx, comp, ej, set)
	if err != nil {
		return nil, err
	}
	zs := s.elements
	out := make([]KnockOut, len(zs))
	errs := make([]error, len(zs))
	one := set
	one.Workers = 1
	run := func(i int) {
		z := zs[i]
		t := s.tau(m, func(sp linelists.Species) bool { return int(sp.Z) == z })
		r, err := m.integrateState(ctx, s, t, ej, one)
		e, _ := linelists.ElementByZ(z)
		out[i] = KnockOut{Z: z, Symbol: e.Symbol, Result: r}
		errs[i] = err
	}
	forEach(len(zs), set.Workers, run)
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	return out, nil
}

// forEach calls f(0 … n−1) on up to workers goroutines (≤ 1: serially).
func forEach(n, workers int, f func(i int)) {
	if workers <= 1 || n <= 1 {
		for i := range n {
			f(i)
		}
		return
	}
	var wg sync.WaitGroup
	next := make(chan int)
	for range min(workers, n) {
		wg.Go(func() {
			for i := range next {
				f(i)
			}
		})
	}
	for i := range n {
		next <- i
	}
	close(next)
	wg.Wait()
}

// ElementShare is one element's part in the absorption of a window.
type ElementShare struct {
	Z      int
	Symbol string
	// Alone is the absorbed equivalent width (Å) in the window with only
	// this element's lines, EW = ∫ (1 − F/F_c) dλ of the absorption-only
	// approximation.
	Alone float64
	// KnockOut is the absorbed equivalent width (Å) that disappears from the
	// window when the element's lines are removed: EW(all) − EW(without it).
	// Where several elements each saturate the same wavelengths it is near
	// zero for all of them; Alone still tells them apart.
	KnockOut float64
	// Share is Alone over the sum of all elements' Alone (0 … 1): the
	// element's share of the absorbed equivalent width. Because absorption
	// saturates and blends overlap, the separate widths need not add up to
	// the window's total.
	Share float64
}

// LineContribution is one line acting in a window.
type LineContribution struct {
	Species     linelists.Species
	Rest        float64 // rest vacuum wavelength, Å
	LogGF       float64
	LowerEnergy float64 // eV
	// TauPhotosphere is the line's Sobolev optical depth at the photosphere.
	TauPhotosphere float64
	// Acting is the wavelength at which the line absorbs the photosphere
	// most directly, λ₀ shifted by v_ph along the line of sight (λ₀(1 − v_ph/c)
	// to first order, λ₀√((1 − β)/(1 + β)) with the relativistic policy), Å.
	Acting float64
}

// Attribution says which elements and lines make the absorption in a
// wavelength window.
type Attribution struct {
	From, To float64 // window, vacuum Å
	// Absorbed is the window's absorbed equivalent width in Å with every
	// element present (absorption-only approximation).
	Absorbed float64
	Elements []ElementShare     // by decreasing Share
	Lines    []LineContribution // by decreasing TauPhotosphere, at most the number asked for
}

// Attribute returns each element's share of the absorbed equivalent width in
// the observed window [from, to] Å (with only its lines, and lost without
// them) and the nLines lines with the largest Sobolev optical depth at the
// photosphere whose acting wavelength (λ₀ shifted by v_ph, see
// LineContribution.Acting) falls in the window. The shares use the absorption-only
// approximation, which measures what the lines take out of the photosphere's
// light without the scattered emission refilling it.
func (m *Model) Attribute(ctx context.Context, comp opacity.Composition, ej Ejecta, from, to float64, nLines int, set Settings) (*Attribution, error) {
	if !(to > from) || from <= 0 {
		return nil, fmt.Errorf("synth: attribution window [%g, %g] Å is empty", from, to)
	}
	if from < m.from || to > m.to {
		return nil, fmt.Errorf("synth: attribution window [%g, %g] Å lies outside the model's range [%g, %g] Å", from, to, m.from, m.to)
	}
	s, err := m.prepare(ctx, comp, ej, set)
	if err != nil {
		return nil, err
	}
	pv := set
	pv.Preview = true
	pv.Workers = 1
	ew := func(skip func(linelists.Species) bool) (float64, error) {
		r, err := m.integrateState(ctx, s, s.tau(m, skip), ej, pv)
		if err != nil {
			return 0, err
		}
		w := 0.0
		for i, l := range r.Wavelength {
			if l >= from && l <= to {
				w += (1 - r.Normalized[i]) * l * m.step
			}
		}
		return w, nil
	}
	// Index i < n: without element i; n ≤ i < 2n: element i−n alone; 2n: all.
	zs := s.elements
	n := len(zs)
	ews := make([]float64, 2*n+1)
	errs := make([]error, 2*n+1)
	forEach(2*n+1, set.Workers, func(i int) {
		switch {
		case i == 2*n:
			ews[i], errs[i] = ew(nil)
		case i < n:
			z := zs[i]
			ews[i], errs[i] = ew(func(sp linelists.Species) bool { return int(sp.Z) == z })
		default:
			z := zs[i-n]
			ews[i], errs[i] = ew(func(sp linelists.Species) bool { return int(sp.Z) != z })
		}
	})
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	a := &Attribution{From: from, To: to, Absorbed: ews[2*n]}
	sum := 0.0
	for i, z := range zs {
		e, _ := linelists.ElementByZ(z)
		a.Elements = append(a.Elements, ElementShare{Z: z, Symbol: e.Symbol,
			Alone: ews[n+i], KnockOut: max(0, ews[2*n]-ews[i])})
		sum += ews[n+i]
	}
	for i := range a.Elements {
		if sum > 0 {
			a.Elements[i].Share = a.Elements[i].Alone / sum
		}
	}
	sort.SliceStable(a.Elements, func(i, j int) bool { return a.Elements[i].Share > a.Elements[j].Share })
	a.Lines = m.strongestLines(s, ej, from, to, nLines, set.Options.Doppler, nil)
	return a, nil
}

// StrongestLines returns, for each species of species, its nLines lines
// with the largest Sobolev optical depth at the photosphere whose acting
// wavelength (see LineContribution.Acting) lies in [from, to] Å, by
// decreasing τ: the lines Attribute lists, without the equivalent widths
// (one plasma solve, no spectrum). A species without lines there gets
// none.
func (m *Model) StrongestLines(ctx context.Context, comp opacity.Composition, ej Ejecta, from, to float64, nLines int, set Settings, species []linelists.Species) ([][]LineContribution, error) {
	if !(to > from) || from <= 0 {
		return nil, fmt.Errorf("synth: line window [%g, %g] Å is empty", from, to)
	}
	s, err := m.prepare(ctx, comp, ej, set)
	if err != nil {
		return nil, err
	}
	out := make([][]LineContribution, len(species))
	for i, sp := range species {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("synth: strongest lines: %w", err)
		}
		idx, ok := m.store.SpeciesIndex(sp)
		if !ok {
			continue
		}
		out[i] = m.strongestLines(s, ej, from, to, nLines, set.Options.Doppler, func(k uint16) bool { return int(k) == idx })
	}
	return out, nil
}

// strongestLines returns the nLines lines with the largest τ at the
// photosphere whose acting wavelength is in [from, to] (only those of the
// store species k with keep(k), when keep is not nil).
func (m *Model) strongestLines(s *state, ej Ejecta, from, to float64, nLines int, d Doppler, keep func(k uint16) bool) []LineContribution {
	if nLines <= 0 {
		return nil
	}
	st := m.store
	shift := 1 - ej.BetaPh
	if d == Relativistic {
		shift = math.Sqrt((1 - ej.BetaPh) / (1 + ej.BetaPh))
	}
	lo := sort.SearchFloat64s(st.Wavelength, from/shift)
	hi := sort.SearchFloat64s(st.Wavelength, math.Nextafter(to/shift, math.Inf(1)))
	T := ej.TemperatureAt(ej.BetaPh)
	sf := s.sf[0]
	kT := physics.Boltzmann * T / physics.ElectronVolt
	var top []LineContribution
	for l := lo; l < hi; l++ {
		if keep != nil && !keep(st.Species[l]) {
			continue
		}
		f := sf[st.Species[l]]
		if f == 0 {
			continue
		}
		lam := st.Wavelength[l]
		e := st.Levels.Energy[st.Lower[l]]
		tau := s.scale * f * m.gfl[l] * math.Exp(-e/kT) * -math.Expm1(-physics.HCOverK/(lam*T))
		if len(top) == nLines && tau <= top[len(top)-1].TauPhotosphere {
			continue
		}
		c := LineContribution{Species: st.SpeciesTable[st.Species[l]], Rest: lam, LogGF: float64(st.LogGF[l]),
			LowerEnergy: e, TauPhotosphere: tau, Acting: lam * shift}
		k := sort.Search(len(top), func(i int) bool { return top[i].TauPhotosphere < tau })
		if len(top) < nLines {
			top = append(top, LineContribution{})
		}
		copy(top[k+1:], top[k:])
		top[k] = c
	}
	return top
}
