package opacity

import (
	"errors"
	"math"
	"testing"
)

// FuzzParseComposition: any text either parses to a valid composition
// (ascending Z, positive fractions summing to 1) or gives an
// ErrComposition error; it never panics.
func FuzzParseComposition(f *testing.F) {
	for _, s := range []string{"Ca=0.4,Sr=0.3,Nd=0.3", "nd=1", "Ca=0", "Ca=-1,Sr=2", "Xx=1", "Ca", "=1", ",", "Ca=1e308,Sr=1e308",
		"Ca=1,ca=1", "Ca=NaN", "H=1e-320", " Fe = 2 , Ni=1 "} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		c, err := ParseComposition(s)
		if err != nil {
			if !errors.Is(err, ErrComposition) {
				t.Fatalf("%q: error %v does not wrap ErrComposition", s, err)
			}
			return
		}
		if len(c.Z) == 0 || len(c.Z) != len(c.MassFraction) {
			t.Fatalf("%q: %+v", s, c)
		}
		sum := 0.0
		for i, x := range c.MassFraction {
			if !(x > 0) || (i > 0 && c.Z[i] <= c.Z[i-1]) {
				t.Fatalf("%q: %+v", s, c)
			}
			sum += x
		}
		if math.Abs(sum-1) > 1e-12 {
			t.Fatalf("%q: fractions sum to %v", s, sum)
		}
	})
}
