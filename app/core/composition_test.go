package core

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// TestComposition: the same mix typed differently is the same value; the
// canonical text parses back to itself; the normalised fractions are the
// weights over their sum (hand-worked: 3:1 → 0.75, 0.25); bad text is
// refused with the pair at fault named.
func TestComposition(t *testing.T) {
	a := mustComp(t, "Nd=1, sr=3")
	b := mustComp(t, " Sr=3.0,Nd=1 ")
	if a != b || a.String() != "Sr=3,Nd=1" {
		t.Errorf("%q and %q: want equal, canonical Sr=3,Nd=1", a, b)
	}
	if again := mustComp(t, a.String()); again != a {
		t.Errorf("canonical text does not parse back: %q → %q", a, again)
	}
	syms, xs := a.Fractions()
	if len(syms) != 2 || syms[0] != "Sr" || math.Abs(xs[0]-0.75) > 1e-15 || math.Abs(xs[1]-0.25) > 1e-15 {
		t.Errorf("fractions %v %v, want Sr 0.75, Nd 0.25", syms, xs)
	}
	if got := a.Text(); got != "Sr 0.75, Nd 0.25" {
		t.Errorf("Text %q", got)
	}
	for in, want := range map[string]string{
		"Sr=abc": "Sr=abc", "Qq=1": "Qq", "Sr=1,Sr=2": "twice", "": "no elements", "Sr": "SYMBOL=WEIGHT",
		"Sr=-1": "positive", "Sr=0": "positive", "Sr=NaN": "positive", "Sr=Inf": "positive",
	} {
		if _, err := ParseComposition(in); err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("%q: error %v, want one with %q", in, err, want)
		}
	}
	// In JSON a composition is its text; a bad one is quoted.
	var m Model
	if err := json.Unmarshal([]byte(`{"mass_fractions":"Sr=1,Ca=1"}`), &m); err != nil || m.MassFractions != mustComp(t, "Ca=1,Sr=1") {
		t.Errorf("decoded %v, %v", m.MassFractions, err)
	}
	if err := json.Unmarshal([]byte(`{"mass_fractions":"Sr=abc"}`), &m); err == nil || !strings.Contains(err.Error(), `mass fractions "Sr=abc"`) {
		t.Errorf("bad composition in JSON: %v", err)
	}
}

// TestBadCompositionNeverKept is the repro of a bug of the earlier
// string-typed session: typing "Sr=abc" and keeping a candidate made a
// session that could be saved but never opened again. Now the bad text
// never becomes a composition, so what is kept and saved opens again.
func TestBadCompositionNeverKept(t *testing.T) {
	b := demoBench(t)
	s := NewSession(b)
	if c, err := ParseComposition("Sr=abc"); err == nil {
		s.MassFractions = c
	}
	if _, err := s.Keep(); err != nil {
		t.Fatal(err)
	}
	path := t.TempDir() + "/s.json"
	if err := s.Save(path); err != nil {
		t.Fatal(err)
	}
	if _, err := LoadSession(path, b); err != nil {
		t.Errorf("a saved session does not open again: %v", err)
	}
}

// TestWithFraction: setting Nd to 0.2 in Sr:Ca = 3:1 leaves Sr 0.6, Ca 0.2
// (hand-worked: 0.75·0.8, 0.25·0.8); bad values are refused.
func TestWithFraction(t *testing.T) {
	c, err := mustComp(t, "Sr=3,Ca=1").WithFraction("nd", 0.2)
	if err != nil {
		t.Fatal(err)
	}
	syms, xs := c.Fractions()
	want := map[string]float64{"Sr": 0.6, "Ca": 0.2, "Nd": 0.2}
	for i, s := range syms {
		if math.Abs(xs[i]-want[s]) > 1e-12 {
			t.Errorf("%s %g, want %g", s, xs[i], want[s])
		}
	}
	for _, x := range []float64{0, 1, -0.1, math.NaN()} {
		if _, err := c.WithFraction("Nd", x); err == nil {
			t.Errorf("fraction %g accepted", x)
		}
	}
	// An element already in the mix: it gets exactly x, the others keep
	// their ratio (Sr:Ca = 3:1 of the remaining 0.5).
	c2, err := c.WithFraction("Nd", 0.5)
	if err != nil {
		t.Fatal(err)
	}
	syms, xs = c2.Fractions()
	want = map[string]float64{"Sr": 0.375, "Ca": 0.125, "Nd": 0.5}
	for i, s := range syms {
		if math.Abs(xs[i]-want[s]) > 1e-12 {
			t.Errorf("Nd raised to 0.5: %s %g, want %g", s, xs[i], want[s])
		}
	}
	if _, err := mustComp(t, "Nd=1").WithFraction("Nd", 0.5); err == nil {
		t.Error("a one-element mix given a fraction below 1 was accepted")
	}
}

// TestWithoutAndNamedMixes: removing an element renormalises the rest in
// proportion; the named mixes parse and say they are invented.
func TestWithoutAndNamedMixes(t *testing.T) {
	c := mustComp(t, "Sr=0.5,Nd=0.25,Kr=0.25")
	w, err := c.Without("Sr")
	if err != nil {
		t.Fatal(err)
	}
	syms, x := w.Fractions()
	if len(syms) != 2 || math.Abs(x[0]-0.5) > 1e-12 || math.Abs(x[1]-0.5) > 1e-12 {
		t.Errorf("without Sr: %v %v", syms, x)
	}
	if _, err := c.Without("Ce"); err == nil {
		t.Error("removing an element the mix lacks: no error")
	}
	if _, err := mustComp(t, "Sr=1").Without("Sr"); err == nil {
		t.Error("removing the last element: no error")
	}
	for _, m := range NamedMixes() {
		if !strings.Contains(m.Name, "invented") || m.Composition.IsZero() {
			t.Errorf("named mix %+v", m)
		}
	}
}
