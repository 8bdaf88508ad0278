package core

import (
	"context"
	"math"
	"testing"

	"broadline/linelists"
)

// TestParseWavelength: numbers with and without units, in vacuum Å (1 µm
// = 10⁴ Å, 1 nm = 10 Å: SI prefixes), and the refusals.
func TestParseWavelength(t *testing.T) {
	um := UnitOf("um")
	for _, c := range []struct {
		in   string
		want float64
	}{
		{"1.083", 10830}, {"10830 Å", 10830}, {"10830A", 10830}, {"1083 nm", 10830}, {"1.083um", 10830},
		{" 1.083 µm ", 10830}, {"1e4 Å", 1e4},
	} {
		got, err := ParseWavelength(c.in, um)
		if err != nil || math.Abs(got-c.want) > 1e-9*c.want {
			t.Errorf("%q: %g, %v; want %g Å", c.in, got, err, c.want)
		}
	}
	if got, err := ParseWavelength("10830", UnitOf("A")); err != nil || got != 10830 {
		t.Errorf("bare number in Å: %g, %v", got, err)
	}
	for _, bad := range []string{"", "abc", "1.0 furlong", "-1 µm", "0", "nm"} {
		if _, err := ParseWavelength(bad, um); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}

// TestStrongestLinesDemo: on the demo's first epoch, the species with lines
// are listed once each, and the strongest lines of one of them act at
// λ₀(1 − v_ph/c) (the synthesis' first-order Doppler policy, Jeffery &
// Branch 1990) inside the model's range, by decreasing τ.
func TestStrongestLinesDemo(t *testing.T) {
	b := demoBench(t)
	sp := b.LineSpecies()
	if len(sp) == 0 {
		t.Fatal("no species with lines")
	}
	seen := map[linelists.Species]bool{}
	for _, s := range sp {
		if seen[s] {
			t.Errorf("%v listed twice", s)
		}
		seen[s] = true
	}
	m := b.Data.StartModel(0)
	lines, err := b.StrongestLines(context.Background(), m, sp, 5)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for i, ls := range lines {
		for k, l := range ls {
			n++
			if l.Species != sp[i] || math.Abs(l.Acting-l.Rest*(1-m.PhotosphereVelocity)) > 1e-9*l.Rest ||
				l.Acting < b.Data.ModelFromUm*1e4 || l.Acting > b.Data.ModelToUm*1e4 ||
				(k > 0 && l.TauPhotosphere > ls[k-1].TauPhotosphere) {
				t.Errorf("%v line %d: %+v", sp[i], k, l)
			}
		}
	}
	if n == 0 {
		t.Error("no lines at all")
	}
}
