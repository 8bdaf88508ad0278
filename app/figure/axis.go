package figure

import (
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"

	"broadline/spectra"
)

// FluxLabel is the y-axis label of the spectrum figures for a common
// power of ten exp: "flux (10⁻¹⁷ erg/s/cm²/Å)" means that a tick labelled
// 3 is 3 × 10⁻¹⁷ erg/s/cm²/Å. exp 0 gives the bare unit.
func FluxLabel(exp int) string {
	if exp == 0 {
		return "flux (erg/s/cm²/Å)"
	}
	return "flux (10" + Superscript(exp) + " erg/s/cm²/Å)"
}

// Superscript writes the integer n in superscript digits and sign
// (Unicode U+2070–U+207B and the Latin-1 ¹, ², ³): -17 → "⁻¹⁷".
func Superscript(n int) string {
	const digits = "⁰¹²³⁴⁵⁶⁷⁸⁹"
	sup := []rune(digits)
	var b strings.Builder
	s := strconv.Itoa(n)
	for _, r := range s {
		if r == '-' {
			b.WriteRune('⁻')
			continue
		}
		b.WriteRune(sup[r-'0'])
	}
	return b.String()
}

// CommonExponent is the power of ten that the tick labels of an axis up
// to top share: floor(log10(top)), or 0 when top lies in [0.01, 1000)
// (numbers that read well as they are) or is not a positive finite number.
func CommonExponent(top float64) int {
	if !(top > 0) || math.IsInf(top, 0) || (top >= 0.01 && top < 1000) {
		return 0
	}
	return int(math.Floor(math.Log10(top)))
}

// ScaledTicks are the default tick positions with the major ticks
// labelled in units of 10^Exp, so "6e-17" reads "6" under an axis label
// that names the 10⁻¹⁷ (see FluxLabel).
type ScaledTicks struct {
	Exp int
}

// Ticks implements plot.Ticker.
func (st ScaledTicks) Ticks(lo, hi float64) []plot.Tick {
	// Choose the ticks in the scaled unit, where the default ticker's
	// 1-2-5 steps are round numbers, then scale their positions back.
	scale := math.Pow(10, float64(st.Exp))
	ticks := plot.DefaultTicks{}.Ticks(lo/scale, hi/scale)
	for i := range ticks {
		v := ticks[i].Value
		ticks[i].Value = v * scale
		if ticks[i].Label == "" {
			continue
		}
		// Round away floating-point residue (2.9999999999) and "-0".
		v = math.Round(v*1e9) / 1e9
		if v == 0 {
			v = 0
		}
		ticks[i].Label = strconv.FormatFloat(v, 'g', -1, 64)
	}
	return ticks
}

// yRange accumulates the extent of what a figure draws on its y axis.
type yRange struct {
	lo, hi float64
}

func newYRange() *yRange { return &yRange{lo: 0, hi: math.Inf(-1)} }

// add takes the finite values of y, skipping index i where skip(i) is
// true (skip may be nil).
func (r *yRange) add(y []float64, skip func(int) bool) {
	for i, v := range y {
		if math.IsNaN(v) || math.IsInf(v, 0) || (skip != nil && skip(i)) {
			continue
		}
		r.lo, r.hi = math.Min(r.lo, v), math.Max(r.hi, v)
	}
}

// addObserved takes obs's unmasked flux: masked samples (telluric bands,
// bad pixels) may hold anything and are not what the axis should fit.
func (r *yRange) addObserved(obs *spectra.Spectrum) {
	r.add(obs.Flux, obs.Masked)
}

// apply sets p's y axis to span everything added, from zero (or the
// lowest value, when negative) to 15 % above the highest (room for the
// legend), with tick labels in units of a common power of ten named in
// the axis label.
func (r *yRange) apply(p *plot.Plot) {
	p.Y.Min = r.lo
	p.Y.Max = 1.15 * r.hi
	if r.lo < 0 {
		p.Y.Min = r.lo - 0.05*(r.hi-r.lo)
	}
	exp := CommonExponent(r.hi)
	p.Y.Label.Text = FluxLabel(exp)
	p.Y.Tick.Marker = ScaledTicks{Exp: exp}
}
