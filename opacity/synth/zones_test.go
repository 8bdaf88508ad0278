package synth

import (
	"context"
	"math"
	"strings"
	"testing"

	"broadline/opacity"

	"gonum.org/v1/gonum/floats/scalar"
)

// sameSpectra fails unless a and b agree point by point to relative
// tolerance rel (0: exactly).
func sameSpectra(t *testing.T, what string, a, b *Result, rel float64) {
	t.Helper()
	if len(a.Normalized) != len(b.Normalized) {
		t.Fatalf("%s: %d and %d points", what, len(a.Normalized), len(b.Normalized))
	}
	for i := range a.Normalized {
		if rel == 0 && a.Normalized[i] != b.Normalized[i] || !scalar.EqualWithinRel(a.Normalized[i], b.Normalized[i], rel) {
			t.Fatalf("%s: F/F_c differs at %g Å: %.17g and %.17g", what, a.Wavelength[i], a.Normalized[i], b.Normalized[i])
		}
	}
}

// TestZonesOutsideChangeNothing checks that a zone wholly below the
// photosphere or wholly beyond the outer edge leaves the spectrum, its
// knock-outs and its warnings as the uniform model has them (no node lies
// in it), for the uniform and the diluted temperature.
func TestZonesOutsideChangeNothing(t *testing.T) {
	t.Parallel()
	st := testStore(t, 2000)
	m, err := NewModel(st, 5000, 14000, 0)
	if err != nil {
		t.Fatal(err)
	}
	comp, _ := opacity.ParseComposition("Ca=0.2,Sr=0.3,Nd=0.5")
	other, _ := opacity.ParseComposition("Nd=0.9,Te=0.1")
	ctx := context.Background()
	for _, diluted := range []bool{false, true} {
		ej := testEjecta() // v_ph 0.2, v_max 0.3
		ej.Diluted = diluted
		uni, err := m.Spectrum(ctx, comp, ej, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		for _, zs := range [][]Zone{
			{{Inner: 0.05, Outer: 0.199, Composition: other}},
			{{Inner: 0.301, Outer: math.Inf(1), Composition: other}},
			{{Inner: 0, Outer: 0.15, Composition: other}, {Inner: 0.31, Outer: 0.5, Composition: other}},
		} {
			z := ej
			z.Zones = zs
			r, err := m.Spectrum(ctx, comp, z, Settings{})
			if err != nil {
				t.Fatal(err)
			}
			sameSpectra(t, "zone outside the envelope", uni, r, 0)
			if strings.Join(r.Warnings, "|") != strings.Join(uni.Warnings, "|") {
				t.Errorf("warnings %q, uniform %q", r.Warnings, uni.Warnings)
			}
			kos, err := m.KnockOuts(ctx, comp, z, Settings{Preview: true})
			if err != nil {
				t.Fatal(err)
			}
			if len(kos) != len(comp.Z) {
				t.Errorf("%d knock-outs with a zone outside, want %d (Te of the zone must not appear)", len(kos), len(comp.Z))
			}
		}
	}
}

// TestSingleZoneIsUniform checks that one zone covering the whole
// envelope gives the uniform model of its composition to 1e-12, whatever
// composition is passed for the rest, for the spectrum, the knock-outs and
// the attribution.
func TestSingleZoneIsUniform(t *testing.T) {
	t.Parallel()
	st := testStore(t, 2000)
	m, err := NewModel(st, 5000, 14000, 0)
	if err != nil {
		t.Fatal(err)
	}
	comp, _ := opacity.ParseComposition("Ca=0.2,Sr=0.3,Nd=0.5")
	rest, _ := opacity.ParseComposition("Sr=1")
	ctx := context.Background()
	for _, diluted := range []bool{false, true} {
		ej := testEjecta()
		ej.Diluted = diluted
		uni, err := m.Spectrum(ctx, comp, ej, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		z := ej
		z.Zones = []Zone{{Inner: 0, Outer: math.Inf(1), Composition: comp}}
		r, err := m.Spectrum(ctx, rest, z, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		sameSpectra(t, "one zone", uni, r, 1e-12)
		ku, err := m.KnockOuts(ctx, comp, ej, Settings{Preview: true})
		if err != nil {
			t.Fatal(err)
		}
		kz, err := m.KnockOuts(ctx, rest, z, Settings{Preview: true})
		if err != nil {
			t.Fatal(err)
		}
		if len(kz) != len(ku) {
			t.Fatalf("%d knock-outs, uniform %d", len(kz), len(ku))
		}
		for i := range ku {
			if ku[i].Z != kz[i].Z {
				t.Fatalf("knock-out %d of Z=%d, uniform Z=%d", i, kz[i].Z, ku[i].Z)
			}
			sameSpectra(t, "knock-out of "+ku[i].Symbol, ku[i].Result, kz[i].Result, 1e-12)
		}
		au, err := m.Attribute(ctx, comp, ej, 6400, 7000, 3, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		az, err := m.Attribute(ctx, rest, z, 6400, 7000, 3, Settings{})
		if err != nil {
			t.Fatal(err)
		}
		if !scalar.EqualWithinRel(au.Absorbed, az.Absorbed, 1e-12) || len(au.Elements) != len(az.Elements) || au.Elements[0].Symbol != az.Elements[0].Symbol {
			t.Errorf("attribution with one zone %+v, uniform %+v", az, au)
		}
	}
}

// TestZonePlasma checks that each node's plasma is solved with the
// composition of the zone it lies in (a node on a shared boundary in the
// outer zone): the electron density at each node equals that of
// opacity.Solve with that composition, at the node's density and
// temperature.
func TestZonePlasma(t *testing.T) {
	t.Parallel()
	st := testStore(t, 200)
	m, err := NewModel(st, 5000, 14000, 0)
	if err != nil {
		t.Fatal(err)
	}
	inner, _ := opacity.ParseComposition("Nd=0.3,Sr=0.7")
	mid, _ := opacity.ParseComposition("Ca=1")
	outer, _ := opacity.ParseComposition("Sr=0.1,Te=0.9")
	ej := testEjecta()
	// Nodes (5): 0.2, 0.225, 0.25, 0.275, 0.3. 0.25 is shared by mid and
	// outer: it belongs to outer.
	ej.Zones = []Zone{{Inner: 0.25, Outer: math.Inf(1), Composition: outer}, {Inner: 0.21, Outer: 0.25, Composition: mid}}
	r, err := m.Spectrum(context.Background(), inner, ej, Settings{Nodes: 5, Preview: true})
	if err != nil {
		t.Fatal(err)
	}
	want := []opacity.Composition{inner, mid, outer, outer, outer}
	for k, c := range want {
		beta := r.Velocity[k]
		p, err := opacity.Solve(c, ej.Density(beta), ej.TemperatureAt(beta), m.partitionFunc())
		if err != nil {
			t.Fatal(err)
		}
		if got := r.Plasma[k]; len(got.Elements) != len(c.Z) || got.ElectronDensity != p.ElectronDensity {
			t.Errorf("node %d (%.3f c): %d elements, n_e %g; want %d elements, n_e %g", k, beta, len(got.Elements), got.ElectronDensity, len(c.Z), p.ElectronDensity)
		}
	}
	// Te (no lines) is named once although two nodes have it.
	if len(r.Warnings) == 0 || !strings.Contains(r.Warnings[0], "Te has no lines") {
		t.Errorf("warnings %q", r.Warnings)
	}
}

// TestDetachedZone checks the published shape of a detached line (Jeffery
// & Branch 1990, the elementary model with the line confined to v ≥ v_d
// above the photosphere at v_ph): matter in front of the photosphere then
// moves towards the observer at v_z ≥ √(v_d² − v_ph²), so the Ca II
// triplet confined to v ≥ 0.25 c over a photosphere at 0.2 c absorbs
// nothing redward of λ₀(1 − 0.15) (here 7400–7800 Å: F/F_c ≥ 1), while it
// still absorbs at v_z ≈ 0.27 c, as the uniform model does.
func TestDetachedZone(t *testing.T) {
	t.Parallel()
	st := testStore(t, 0)
	m, err := NewModel(st, 5000, 14000, 0)
	if err != nil {
		t.Fatal(err)
	}
	bare, _ := opacity.ParseComposition("Te=1") // no lines in the store
	withCa, _ := opacity.ParseComposition("Ca=0.2,Te=0.8")
	ej := testEjecta()
	ej.Zones = []Zone{{Inner: 0.25, Outer: math.Inf(1), Composition: withCa}}
	ctx := context.Background()
	det, err := m.Spectrum(ctx, bare, ej, Settings{Nodes: 31})
	if err != nil {
		t.Fatal(err)
	}
	g := m.Grid()
	for i, l := range det.Wavelength {
		if l >= 7400 && l <= 7800 && det.Normalized[i] < 1-1e-9 {
			t.Fatalf("detached Ca II absorbs at %g Å (F/F_c %g), redward of λ₀(1 − 0.15)", l, det.Normalized[i])
		}
	}
	ia := g.Nearest(8544.44 * (1 - 0.27))
	if det.Normalized[ia] > 0.95 {
		t.Errorf("detached Ca II: no absorption at v_z = 0.27 c (F/F_c %g)", det.Normalized[ia])
	}
	ej.Zones = nil
	uni, err := m.Spectrum(ctx, withCa, ej, Settings{Nodes: 31})
	if err != nil {
		t.Fatal(err)
	}
	iv := g.Nearest(8544.44 * (1 - 0.19))
	if uni.Normalized[iv] > det.Normalized[iv]-0.05 {
		t.Errorf("at v_z = 0.19 c the uniform model (F/F_c %g) should absorb more than the detached one (%g)", uni.Normalized[iv], det.Normalized[iv])
	}
}

// TestZonesValidate checks that malformed zones are refused with a reason.
func TestZonesValidate(t *testing.T) {
	t.Parallel()
	c, _ := opacity.ParseComposition("Sr=1")
	for _, tc := range []struct {
		zones []Zone
		want  string
	}{
		{[]Zone{{Inner: 0.3, Outer: 0.2, Composition: c}}, "inner < outer"},
		{[]Zone{{Inner: -0.1, Outer: 0.2, Composition: c}}, "inner < outer"},
		{[]Zone{{Inner: math.NaN(), Outer: 0.2, Composition: c}}, "inner < outer"},
		{[]Zone{{Inner: 0.1, Outer: 0.2}}, "no composition"},
		{[]Zone{{Inner: 0.1, Outer: 0.25, Composition: c}, {Inner: 0.2, Outer: 0.4, Composition: c}}, "overlap"},
		{make([]Zone, maxZones+1), "at most"},
	} {
		ej := testEjecta()
		ej.Zones = tc.zones
		if err := ej.Validate(); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("zones %v: error %v, want %q", tc.zones, err, tc.want)
		}
	}
	ej := testEjecta()
	ej.Zones = []Zone{{Inner: 0.1, Outer: 0.2, Composition: c}, {Inner: 0.2, Outer: math.Inf(1), Composition: c}}
	if err := ej.Validate(); err != nil {
		t.Errorf("adjacent zones refused: %v", err)
	}
}

// TestLastNodeIsOuterEdge checks that the last node is v_max exactly for
// spacings that round above it, so the density there is not zero.
func TestLastNodeIsOuterEdge(t *testing.T) {
	t.Parallel()
	for _, e := range []Envelope{{0.11, 0.35, 16}, {0.1, 0.3, 7}, {0.17, 0.35, 16}, {0.24, 0.35, 33}} {
		if b := e.Node(e.Nodes - 1); b != e.BetaMax {
			t.Errorf("%+v: last node %.17g, want %.17g", e, b, e.BetaMax)
		}
		for s := range e.Nodes {
			if e.Node(s) > e.BetaMax {
				t.Errorf("%+v: node %d at %.17g beyond v_max", e, s, e.Node(s))
			}
		}
	}
}
