package core

import (
	"fmt"
	"slices"
	"strconv"
	"strings"

	"broadline/linelists"
	"broadline/opacity"
)

// Composition is a checked element mix as the analyst gives it: weights per
// element (any positive numbers; the model normalises them to mass
// fractions). It is a comparable value: two compositions with the same
// elements and weights are ==, whatever order or spacing they were typed
// in. The zero Composition is empty and invalid in a model; build one with
// ParseComposition.
type Composition struct {
	// text is the canonical form "Sr=0.05,Nd=0.001": elements by Z, weights
	// written to round-trip exactly, so parsing it again gives it back.
	text string
}

// ParseComposition reads comma-separated SYMBOL=WEIGHT pairs such as
// "Ca=0.4, Sr=0.3, Nd=0.3" (symbols in any case). An unknown element, a
// repeated one, a weight that is not a positive finite number, or an empty
// list is an error naming the pair at fault.
func ParseComposition(s string) (Composition, error) {
	type pair struct {
		z int
		w float64
	}
	var ps []pair
	for _, f := range strings.Split(s, ",") {
		f = strings.TrimSpace(f)
		if f == "" {
			continue
		}
		sym, val, ok := strings.Cut(f, "=")
		if !ok {
			return Composition{}, fmt.Errorf("%q: want SYMBOL=WEIGHT, e.g. Sr=0.05", f)
		}
		e, err := linelists.ElementBySymbol(strings.TrimSpace(sym))
		if err != nil {
			return Composition{}, fmt.Errorf("%q: unknown element %q", f, strings.TrimSpace(sym))
		}
		w, err := strconv.ParseFloat(strings.TrimSpace(val), 64)
		if err != nil || !(w > 0) || w > 1e300 {
			return Composition{}, fmt.Errorf("%q: the weight must be a positive number", f)
		}
		for _, p := range ps {
			if p.z == e.Z {
				return Composition{}, fmt.Errorf("%s is given twice", e.Symbol)
			}
		}
		ps = append(ps, pair{e.Z, w})
	}
	if len(ps) == 0 {
		return Composition{}, fmt.Errorf("no elements: give e.g. \"Ca=0.4,Sr=0.3,Nd=0.3\"")
	}
	slices.SortFunc(ps, func(a, b pair) int { return a.z - b.z })
	z := make([]int, len(ps))
	w := make([]float64, len(ps))
	var b strings.Builder
	for i, p := range ps {
		z[i], w[i] = p.z, p.w
		e, _ := linelists.ElementByZ(p.z)
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteString(e.Symbol + "=" + strconv.FormatFloat(p.w, 'g', -1, 64))
	}
	if _, err := opacity.NewComposition(z, w); err != nil {
		return Composition{}, err
	}
	return Composition{text: b.String()}, nil
}

// String is the canonical text, which ParseComposition reads back as c.
func (c Composition) String() string { return c.text }

// IsZero reports whether c is the empty (invalid) composition.
func (c Composition) IsZero() bool { return c.text == "" }

// Mix returns the normalised mass fractions for the physics.
func (c Composition) Mix() (opacity.Composition, error) {
	if c.IsZero() {
		return opacity.Composition{}, fmt.Errorf("no composition given")
	}
	return opacity.ParseComposition(c.text)
}

// MarshalText writes the canonical text (sessions and dataset files keep
// compositions as strings).
func (c Composition) MarshalText() ([]byte, error) { return []byte(c.text), nil }

// UnmarshalText parses b as ParseComposition does; the error quotes the
// text at fault (files keep compositions under mass_fractions and
// inner_mass_fractions, and encoding/json does not say which key a text
// value came from).
func (c *Composition) UnmarshalText(b []byte) error {
	v, err := ParseComposition(string(b))
	if err != nil {
		return fmt.Errorf("mass fractions %q: %w", b, err)
	}
	*c = v
	return nil
}

// Fractions returns the element symbols and normalised mass fractions of
// c, largest first.
func (c Composition) Fractions() (symbols []string, fractions []float64) {
	m, err := c.Mix()
	if err != nil {
		return nil, nil
	}
	idx := make([]int, len(m.Z))
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(a, b int) int {
		switch {
		case m.MassFraction[a] > m.MassFraction[b]:
			return -1
		case m.MassFraction[a] < m.MassFraction[b]:
			return 1
		}
		return 0
	})
	for _, i := range idx {
		e, _ := linelists.ElementByZ(m.Z[i])
		symbols = append(symbols, e.Symbol)
		fractions = append(fractions, m.MassFraction[i])
	}
	return symbols, fractions
}

// Text is the composition as captions and lists give it: the normalised
// mass fractions, largest first, to three significant digits.
func (c Composition) Text() string {
	syms, xs := c.Fractions()
	parts := make([]string, len(syms))
	for i := range syms {
		parts[i] = fmt.Sprintf("%s %.3g", syms[i], xs[i])
	}
	return strings.Join(parts, ", ")
}

// WithFraction returns c with element sym at mass fraction x (0 < x < 1)
// and the other elements' normalised fractions scaled by 1 − x, so their
// ratios stay as they were. An element not in c is added.
func (c Composition) WithFraction(sym string, x float64) (Composition, error) {
	e, err := linelists.ElementBySymbol(sym)
	if err != nil {
		return Composition{}, fmt.Errorf("unknown element %q", sym)
	}
	if !(x > 0 && x < 1) {
		return Composition{}, fmt.Errorf("mass fraction of %s %g: want 0 < X < 1", e.Symbol, x)
	}
	syms, xs := c.Fractions()
	// The others share 1 − x in their present ratios: scaled by
	// (1 − x)/(1 − x_old), x_old the element's fraction now (0 if absent).
	old := 0.0
	for i, s := range syms {
		if s == e.Symbol {
			old = xs[i]
		}
	}
	var parts []string
	for i, s := range syms {
		if s != e.Symbol {
			parts = append(parts, s+"="+strconv.FormatFloat(xs[i]*(1-x)/(1-old), 'g', -1, 64))
		}
	}
	if len(parts) == 0 {
		return Composition{}, fmt.Errorf("mass fraction of %s %g: the composition has no other element to make up the rest", e.Symbol, x)
	}
	parts = append(parts, e.Symbol+"="+strconv.FormatFloat(x, 'g', -1, 64))
	return ParseComposition(strings.Join(parts, ","))
}

// Without returns c without element sym (the others keep their weights,
// so their normalised fractions rise in proportion); removing the last
// element, or one c does not hold, is an error.
func (c Composition) Without(sym string) (Composition, error) {
	syms, xs := c.Fractions()
	var parts []string
	found := false
	for i, s := range syms {
		if s == sym {
			found = true
			continue
		}
		parts = append(parts, s+"="+strconv.FormatFloat(xs[i], 'g', -1, 64))
	}
	switch {
	case !found:
		return Composition{}, fmt.Errorf("%s is not in the mix", sym)
	case len(parts) == 0:
		return Composition{}, fmt.Errorf("%s is the only element: the mix cannot be empty", sym)
	}
	return ParseComposition(strings.Join(parts, ","))
}

// NamedMix is a starting composition of our own with a name and a note.
type NamedMix struct {
	Name, Note  string
	Composition Composition
}

// NamedMixes are starting compositions for the workbench's composition
// controls. They are INVENTED round-number mixes for a first look, shaped
// only qualitatively after the trade's usual light (first-peak, lanthanide-
// poor) and heavy (lanthanide-rich) components; they are not results of
// any nucleosynthesis calculation or fit.
func NamedMixes() []NamedMix {
	mk := func(name, note, text string) NamedMix {
		c, err := ParseComposition(text)
		if err != nil {
			panic("core: named mix " + name + ": " + err.Error())
		}
		return NamedMix{Name: name, Note: note, Composition: c}
	}
	return []NamedMix{
		mk("light, lanthanide-poor (invented)", "first-peak elements with a trace of lanthanides: blue, fast-fading spectra",
			"Ca=0.002,Se=0.25,Kr=0.25,Sr=0.05,Y=0.005,Zr=0.01,Mo=0.05,Ru=0.05,Pd=0.05,Te=0.2,Xe=0.0829,Nd=1e-4"),
		mk("lanthanide-rich (invented)", "a few per cent of lanthanides: red, slowly evolving spectra",
			"Se=0.1,Kr=0.12,Sr=0.02,Zr=0.005,Ru=0.05,Te=0.3,Xe=0.3,Ce=0.02,Nd=0.05,Sm=0.03,Eu=0.005"),
		mk("strontium only (invented)", "one light element in an inert filler, to isolate its lines",
			"Sr=0.05,Kr=0.95"),
	}
}
