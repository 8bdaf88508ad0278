package core

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"broadline/linelists"
	"broadline/opacity/synth"
)

// WaveUnit is a unit for showing wavelengths: its name, the factor from Å,
// and the decimals that keep 1 Å visible at 1 µm.
type WaveUnit struct {
	Name     string
	PerA     float64 // value in this unit of 1 Å
	Decimals int
}

// WaveUnits are the wavelength units the workbench offers; µm is the
// default (the field's usual unit for 0.4–2.5 µm spectra). Their keys are
// what sessions save.
var WaveUnits = map[string]WaveUnit{
	"um": {"µm", 1e-4, 4},
	"nm": {"nm", 0.1, 1},
	"A":  {"Å", 1, 0},
}

// WaveUnitKeys are the keys of WaveUnits in the order menus offer them.
var WaveUnitKeys = []string{"um", "nm", "A"}

// UnitOf returns the unit saved as key ("" or unknown: µm).
func UnitOf(key string) WaveUnit {
	if u, ok := WaveUnits[key]; ok {
		return u
	}
	return WaveUnits["um"]
}

// Cautions is the caption line every exported figure ends with.
const Cautions = "Model: LTE, Sobolev approximation, sharp photosphere, incomplete atomic data. " +
	"A matched feature is a hypothesis to be checked with full radiative transfer."

// CaptionTail is the end of every exported figure's caption: the dataset's
// label (for the demo: that it is invented) and the model's cautions.
func (d *Dataset) CaptionTail() []string { return []string{d.Label(), Cautions} }

// Caption is the caption line of model m under label in a figure.
func (m Model) Caption(label string) string {
	if m.HasZone() {
		return fmt.Sprintf("%s: v_ph = %.3f c, T = %.0f K, mass fractions above %.3f c %s; inside %s",
			label, m.PhotosphereVelocity, m.Temperature, m.ZoneBoundary, m.MassFractions.Text(), m.InnerMassFractions.Text())
	}
	return fmt.Sprintf("%s: v_ph = %.3f c, T = %.0f K, mass fractions %s", label, m.PhotosphereVelocity, m.Temperature, m.MassFractions.Text())
}

// ZoneText says which zone of model m the photosphere lies in, for the
// workbench's status line: "" for uniform ejecta.
func (m Model) ZoneText() string {
	switch {
	case !m.HasZone():
		return ""
	case m.PhotosphereVelocity <= m.ZoneBoundary:
		return fmt.Sprintf("photosphere inside the inner zone (below %.3f c): lines from both zones", m.ZoneBoundary)
	}
	return fmt.Sprintf("photosphere above the inner zone (%.3f c): only the outer mix forms lines", m.ZoneBoundary)
}

// FirstSentence returns s up to and including its first full stop.
func FirstSentence(s string) string {
	for i := 0; i+1 < len(s); i++ {
		if s[i] == '.' && s[i+1] == ' ' {
			return s[:i+1]
		}
	}
	return s
}

// ElementsText lists the elements that take at least 5 % of a window's
// absorbed equivalent width, largest first: "Sr 62 %, Ca 30 %".
func ElementsText(a *synth.Attribution) string {
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

// LinesText lists a window's strongest lines: "Sr II 10330.1 Å (τ 1.3)".
func LinesText(a *synth.Attribution) string {
	if a == nil || len(a.Lines) == 0 {
		return "—"
	}
	parts := make([]string, len(a.Lines))
	for i, l := range a.Lines {
		parts[i] = fmt.Sprintf("%s %.1f Å (τ %.2g)", l.Species, l.Rest, l.TauPhotosphere)
	}
	return strings.Join(parts, ", ")
}

// ElementSymbol is the symbol of element z ("" if unknown).
func ElementSymbol(z int) string {
	e, err := linelists.ElementByZ(z)
	if err != nil {
		return ""
	}
	return e.Symbol
}

// CandidateRows describes each candidate by what sets it apart from the
// others: its label, epoch, photosphere, and the mass fractions of the
// elements whose fractions differ between the candidates (by Z, with
// their values; "same mix as the others" when none does), plus the inner
// zone when the candidates differ there. A lone candidate shows its whole
// mix.
func CandidateRows(d *Dataset, cs []Candidate) []string {
	fr := make([]map[string]float64, len(cs))
	all := map[string]bool{}
	for i, c := range cs {
		fr[i] = map[string]float64{}
		syms, x := c.MassFractions.Fractions()
		for k, s := range syms {
			fr[i][s] = x[k]
			all[s] = true
		}
	}
	// The elements whose fractions differ, in order of Z.
	var differ []string
	for s := range all {
		for i := 1; i < len(cs); i++ {
			a, b := fr[0][s], fr[i][s]
			if math.Abs(a-b) > 1e-9*math.Max(a, b) {
				differ = append(differ, s)
				break
			}
		}
	}
	slices.SortFunc(differ, func(a, b string) int {
		ea, _ := linelists.ElementBySymbol(a)
		eb, _ := linelists.ElementBySymbol(b)
		return ea.Z - eb.Z
	})
	zones := false
	for _, c := range cs[min(1, len(cs)):] {
		zones = zones || c.InnerMassFractions != cs[0].InnerMassFractions || c.ZoneBoundary != cs[0].ZoneBoundary
	}
	out := make([]string, len(cs))
	for i, c := range cs {
		var b strings.Builder
		fmt.Fprintf(&b, "%s · %g d · %.3f c · %.0f K · ", c.Label, d.Epochs[c.Epoch].Days, c.PhotosphereVelocity, c.Temperature)
		switch {
		case len(cs) == 1:
			b.WriteString(c.MassFractions.Text())
		case len(differ) == 0:
			b.WriteString("same mix as the others")
		default:
			for k, s := range differ {
				if k > 0 {
					b.WriteString(", ")
				}
				fmt.Fprintf(&b, "%s %.3g", s, fr[i][s])
			}
		}
		if zones {
			if c.HasZone() {
				fmt.Fprintf(&b, " · inner zone to %s: %s", c.BoundaryText(), c.InnerMassFractions.Text())
			} else {
				b.WriteString(" · uniform")
			}
		}
		out[i] = b.String()
	}
	return out
}
