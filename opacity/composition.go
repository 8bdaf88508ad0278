package opacity

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"

	"broadline/linelists"
)

// Composition is a set of element mass fractions. Z is ascending and has no
// repeats; MassFraction[i] belongs to Z[i], is positive, and the fractions
// sum to 1. Build one with NewComposition or ParseComposition.
type Composition struct {
	Z            []int
	MassFraction []float64
}

// ErrComposition is the cause of every error about a composition's values.
var ErrComposition = errors.New("bad composition")

// NewComposition returns the composition with the given elements and
// weights, normalised so the mass fractions sum to 1. Weights may be any
// non-negative numbers (percentages, parts); elements with weight 0 are
// dropped. An unknown Z, a repeated element, a negative or non-finite weight
// or a sum that is not positive is an error wrapping ErrComposition.
func NewComposition(z []int, weights []float64) (Composition, error) {
	if len(z) != len(weights) {
		panic("opacity: NewComposition: len(z) != len(weights)")
	}
	type pair struct {
		z int
		w float64
	}
	var ps []pair
	sum := 0.0
	seen := map[int]bool{}
	for i, zi := range z {
		e, err := linelists.ElementByZ(zi)
		if err != nil {
			return Composition{}, fmt.Errorf("%w: %w", ErrComposition, err)
		}
		w := weights[i]
		if math.IsNaN(w) || math.IsInf(w, 0) || w < 0 {
			return Composition{}, fmt.Errorf("%w: %s has weight %v (want a finite number ≥ 0)", ErrComposition, e.Symbol, w)
		}
		if seen[zi] {
			return Composition{}, fmt.Errorf("%w: %s given twice", ErrComposition, e.Symbol)
		}
		seen[zi] = true
		if w > 0 {
			ps = append(ps, pair{zi, w})
			sum += w
		}
	}
	if !(sum > 0) || math.IsInf(sum, 0) {
		return Composition{}, fmt.Errorf("%w: the weights sum to %v (want a positive, finite sum)", ErrComposition, sum)
	}
	sort.Slice(ps, func(i, j int) bool { return ps[i].z < ps[j].z })
	c := Composition{Z: make([]int, len(ps)), MassFraction: make([]float64, len(ps))}
	for i, p := range ps {
		c.Z[i] = p.z
		c.MassFraction[i] = p.w / sum
	}
	return c, nil
}

// ParseComposition reads a composition written as comma-separated
// SYMBOL=WEIGHT pairs, e.g. "Ca=0.4,Sr=0.3,Nd=0.3" (symbols in any case,
// spaces allowed). The weights are normalised as in NewComposition.
func ParseComposition(s string) (Composition, error) {
	var z []int
	var w []float64
	for i, item := range strings.Split(s, ",") {
		item = strings.TrimSpace(item)
		if item == "" {
			return Composition{}, fmt.Errorf("%w: item %d is empty (want SYMBOL=WEIGHT, e.g. Sr=0.3)", ErrComposition, i+1)
		}
		sym, val, ok := strings.Cut(item, "=")
		if !ok {
			return Composition{}, fmt.Errorf("%w: item %d %q has no '=' (want SYMBOL=WEIGHT, e.g. Sr=0.3)", ErrComposition, i+1, item)
		}
		e, err := linelists.ElementBySymbol(strings.TrimSpace(sym))
		if err != nil {
			return Composition{}, fmt.Errorf("%w: item %d: %w", ErrComposition, i+1, err)
		}
		v, err := strconv.ParseFloat(strings.TrimSpace(val), 64)
		if err != nil {
			return Composition{}, fmt.Errorf("%w: item %d: weight %q of %s is not a number", ErrComposition, i+1, strings.TrimSpace(val), e.Symbol)
		}
		z = append(z, e.Z)
		w = append(w, v)
	}
	return NewComposition(z, w)
}

// Fraction returns the mass fraction of element z (0 if absent).
func (c Composition) Fraction(z int) float64 {
	i := sort.SearchInts(c.Z, z)
	if i < len(c.Z) && c.Z[i] == z {
		return c.MassFraction[i]
	}
	return 0
}

// String writes the composition as ParseComposition reads it, with the
// normalised fractions, e.g. "Ca=0.4,Sr=0.3,Nd=0.3".
func (c Composition) String() string {
	var b strings.Builder
	for i, z := range c.Z {
		if i > 0 {
			b.WriteByte(',')
		}
		e, _ := linelists.ElementByZ(z)
		b.WriteString(e.Symbol)
		b.WriteByte('=')
		b.WriteString(strconv.FormatFloat(c.MassFraction[i], 'g', -1, 64))
	}
	return b.String()
}
