package synth

import (
	"context"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/physics"
	"broadline/spectra"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
)

// testStore returns a small store: the Ca II triplet and three Sr II lines
// (vacuum wavelengths and log gf from REFERENCES.md, log gf from memory),
// with the lower-level energies of their 3d/4d levels (NIST, from memory),
// plus nWeak invented weak Nd II lines (seeded) between 4000 and 24000 Å.
func testStore(t testing.TB, nWeak int) *linelists.Store {
	t.Helper()
	b := linelists.NewBuilder()
	ca := linelists.MustSpecies("Ca II")
	sr := linelists.MustSpecies("Sr II")
	nd := linelists.MustSpecies("Nd II")
	add := func(sp linelists.Species, l, lgf, e float64, g float32) {
		b.Add(linelists.Line{Wavelength: l, LogGF: lgf, Species: sp, LowerEnergy: e, LowerG: g})
	}
	// Ground levels so partition functions have them.
	add(ca, 3934.78, 0.135, 0, 2)
	add(ca, 8500.36, -1.318, 1.692, 4)
	add(ca, 8544.44, -0.360, 1.700, 6)
	add(ca, 8664.52, -0.622, 1.692, 4)
	add(sr, 4078.86, 0.151, 0, 2)
	add(sr, 10039.40, -1.31, 1.805, 4)
	add(sr, 10330.14, -0.35, 1.839, 6)
	add(sr, 10917.86, -0.64, 1.805, 4)
	rng := rand.New(rand.NewPCG(1, 1))
	for range nWeak {
		l := 4000 * math.Exp(rng.Float64()*math.Log(6))
		add(nd, l, -6-2*rng.Float64(), 3*rng.Float64(), float32(2*rng.IntN(8)+2))
	}
	st, _ := b.Build()
	return st
}

func testEjecta() Ejecta {
	return Ejecta{
		Time: 1.5 * physics.Day, Mass: 0.03 * physics.SolarMass,
		BetaIn: 0.05, BetaPh: 0.2, BetaMax: 0.3, DensityIndex: 3, Temperature: 5000,
	}
}

// TestDensityScale checks the density law against REFERENCES.md [calc]:
// 0.01 M☉ in a uniform sphere to 0.1 c at 1 d has ρ = 2.7e-13 g cm⁻³, ∝ t⁻³;
// and that 4π ∫ r² ρ dr recovers the mass for other indices (gonum quad).
func TestDensityScale(t *testing.T) {
	t.Parallel()
	e := Ejecta{Time: physics.Day, Mass: 0.01 * physics.SolarMass, BetaPh: 0.05, BetaMax: 0.1, Temperature: 5000}
	if err := e.Validate(); err != nil {
		t.Fatal(err)
	}
	if rho := e.Density(0.07); !scalar.EqualWithinRel(rho, 2.7e-13, 0.02) {
		t.Errorf("uniform sphere density %g, want 2.7e-13 g cm⁻³", rho)
	}
	e2 := e
	e2.Time = 2 * physics.Day
	if r := e.Density(0.07) / e2.Density(0.07); !scalar.EqualWithinRel(r, 8, 1e-12) {
		t.Errorf("ρ(1 d)/ρ(2 d) = %g, want 8 (t⁻³)", r)
	}
	for _, n := range []float64{0, 1.5, 3, 5, 8} {
		e := testEjecta()
		e.DensityIndex = n
		ct := physics.SpeedOfLight * e.Time
		m := quad.Fixed(func(b float64) float64 {
			r := b * ct
			return 4 * math.Pi * r * r * e.Density(b) * ct
		}, e.BetaIn, e.BetaMax, 200, nil, 0)
		if !scalar.EqualWithinRel(m, e.Mass, 1e-6) {
			t.Errorf("n = %g: ∫ρ dV = %g g, want %g", n, m, e.Mass)
		}
	}
	bad := testEjecta()
	bad.BetaIn = 0
	if bad.Validate() == nil {
		t.Error("n = 3 with v_in = 0 accepted")
	}
	bad = testEjecta()
	bad.BetaMax = 0.15
	if bad.Validate() == nil {
		t.Error("v_max < v_ph accepted")
	}
	// Diluted temperature: W(v_ph) = 1/2, so T = 2^{−1/4} T_ph there.
	d := testEjecta()
	d.Diluted = true
	if T := d.TemperatureAt(d.BetaPh); !scalar.EqualWithinRel(T, 5000*math.Pow(0.5, 0.25), 1e-12) {
		t.Errorf("diluted T at the photosphere %g, want %g", T, 5000*math.Pow(0.5, 0.25))
	}
}

// TestBinnedDepths checks the binned optical depths against the opacity
// package's per-line Sobolev depths (Castor 1970) at the same plasma: the
// sum over the lines of each bin, to the accuracy of taking the
// stimulated-emission factor at the bin centre.
func TestBinnedDepths(t *testing.T) {
	t.Parallel()
	st := testStore(t, 3000)
	m, err := NewModel(st, 4000, 24000, 0)
	if err != nil {
		t.Fatal(err)
	}
	comp, _ := opacity.ParseComposition("Ca=0.2,Sr=0.3,Nd=0.5")
	for _, diluted := range []bool{false, true} {
		ej := testEjecta()
		ej.Diluted = diluted
		s, err := m.prepare(context.Background(), comp, ej, Settings{Nodes: 5})
		if err != nil {
			t.Fatal(err)
		}
		for _, without := range []int{0, 38} {
			tau := s.tau(m, func(sp linelists.Species) bool { return int(sp.Z) == without })
			for k := range 5 {
				p := s.plasma[k]
				lev := opacity.PlasmaLevelDensities(nil, st, p)
				per := make([]float64, st.Len())
				if err := opacity.Sobolev(context.Background(), per, st, lev, p.Temperature, ej.Time, 1); err != nil {
					t.Fatal(err)
				}
				want := make([]float64, tau.Grid.N)
				for l, v := range per {
					if int(st.SpeciesTable[st.Species[l]].Z) != without {
						want[tau.Grid.Nearest(st.Wavelength[l])] += v
					}
				}
				got := tau.Node(k)
				for b := range want {
					if !scalar.EqualWithinAbsOrRel(got[b], want[b], 1e-300, 2e-4) {
						t.Fatalf("diluted=%v without Z=%d node %d bin %d: binned τ %g, Sobolev sum %g",
							diluted, without, k, b, got[b], want[b])
					}
				}
			}
		}
	}
}

// TestModelSpectrum checks the wiring: the flux is π B_λ(T_ph) times F/F_c
// (REFERENCES.md blackbody), the Ca II triplet makes an absorption near
// 8544(1 − v_ph/c), a spectrum without all elements is the bare continuum,
// the knock-out of Ca restores the continuum at the triplet's absorption, and
// the result does not depend on the number of workers.
func TestModelSpectrum(t *testing.T) {
	t.Parallel()
	st := testStore(t, 2000)
	m, err := NewModel(st, 5000, 14000, 0)
	if err != nil {
		t.Fatal(err)
	}
	comp, _ := opacity.ParseComposition("Ca=0.2,Sr=0.3,Nd=0.5")
	ej := testEjecta()
	ctx := context.Background()
	r, err := m.Spectrum(ctx, comp, ej, Settings{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	for i, l := range r.Wavelength {
		want := math.Pi * spectra.PlanckLambdaPerAngstrom(l, ej.Temperature) * r.Normalized[i]
		if !scalar.EqualWithinRel(r.Flux[i], want, 1e-12) {
			t.Fatalf("flux at %g Å %g, want π B_λ F/F_c = %g", l, r.Flux[i], want)
		}
	}
	// The test store has no levels file, so every partition function with
	// lines is a lower bound; Nd II has lines but the composition has no Te.
	if len(r.Warnings) != 1 || !strings.Contains(r.Warnings[0], "lower bounds") || !strings.Contains(r.Warnings[0], "Ca II") {
		t.Errorf("warnings %q", r.Warnings)
	}
	withTe, _ := opacity.ParseComposition("Ca=0.2,Sr=0.3,Nd=0.5,Te=1")
	rte, err := m.Spectrum(ctx, withTe, ej, Settings{Preview: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(rte.Warnings) != 2 || !strings.Contains(rte.Warnings[0], "Te has no lines") {
		t.Errorf("warnings with Te: %q", rte.Warnings)
	}
	// Several elements without lines are named in one warning.
	withMore, _ := opacity.ParseComposition("Ca=0.2,Sr=0.3,Nd=0.5,Te=1,Xe=1")
	rmore, err := m.Spectrum(ctx, withMore, ej, Settings{Preview: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(rmore.Warnings) != 2 || !strings.Contains(rmore.Warnings[0], "Te, Xe have no lines") {
		t.Errorf("warnings with Te and Xe: %q", rmore.Warnings)
	}
	sp, err := r.Spectrum(true)
	if err != nil {
		t.Fatal(err)
	}
	if sp.Len() != len(r.Wavelength) || sp.Flux[10] != r.Normalized[10] || sp.Meta.FluxUnit != spectra.FluxNormalized ||
		!scalar.EqualWithinRel(sp.Meta.Epoch, 1.5, 1e-12) {
		t.Errorf("as spectrum: %d samples, unit %v, epoch %g", sp.Len(), sp.Meta.FluxUnit, sp.Meta.Epoch)
	}
	g := m.Grid()
	ia := g.Nearest(8544.44 * (1 - 1.1*ej.BetaPh))
	if r.Normalized[ia] > 0.9 {
		t.Errorf("no Ca II absorption at %g Å: F/F_c = %g", g.Wavelength(ia), r.Normalized[ia])
	}
	serial, err := m.Spectrum(ctx, comp, ej, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	for i := range r.Normalized {
		if r.Normalized[i] != serial.Normalized[i] {
			t.Fatalf("workers change the result at point %d", i)
		}
	}
	none, err := m.Spectrum(ctx, comp, ej, Settings{Without: comp.Z})
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range none.Normalized {
		if !scalar.EqualWithinAbs(v, 1, 1e-13) {
			t.Fatalf("without every element F/F_c = %g at point %d, want 1", v, i)
		}
	}
	kos, err := m.KnockOuts(ctx, comp, ej, Settings{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if len(kos) != 3 || kos[0].Symbol != "Ca" || kos[1].Symbol != "Sr" || kos[2].Symbol != "Nd" {
		t.Fatalf("knock-outs %v", kos)
	}
	noCa := kos[0].Result.Normalized[ia]
	if noCa < 0.97 || noCa <= r.Normalized[ia] {
		t.Errorf("without Ca F/F_c at the triplet's absorption %g (with Ca %g), want ≈ 1", noCa, r.Normalized[ia])
	}
	single, err := m.Spectrum(ctx, comp, ej, Settings{Without: []int{38}})
	if err != nil {
		t.Fatal(err)
	}
	for i := range single.Normalized {
		if single.Normalized[i] != kos[1].Result.Normalized[i] {
			t.Fatalf("knock-out of Sr differs from Spectrum without Sr at point %d", i)
		}
	}
	pv, err := m.Spectrum(ctx, comp, ej, Settings{Preview: true})
	if err != nil {
		t.Fatal(err)
	}
	if !pv.Preview || pv.Normalized[ia] > r.Normalized[ia]+1e-9 {
		t.Errorf("preview at the absorption %g, full %g: absorption-only must be at least as deep", pv.Normalized[ia], r.Normalized[ia])
	}
}

// TestAttribute checks the attribution in a window around the Ca II
// triplet's absorption: Ca dominates, and the strongest lines listed are the
// triplet's, with acting wavelength λ₀(1 − v_ph/c).
func TestAttribute(t *testing.T) {
	t.Parallel()
	st := testStore(t, 2000)
	m, err := NewModel(st, 5000, 14000, 0)
	if err != nil {
		t.Fatal(err)
	}
	comp, _ := opacity.ParseComposition("Ca=0.2,Sr=0.3,Nd=0.5")
	ej := testEjecta()
	a, err := m.Attribute(context.Background(), comp, ej, 6400, 7000, 3, Settings{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if a.Elements[0].Symbol != "Ca" || a.Elements[0].Share < 0.5 || a.Elements[0].KnockOut < 0.5*a.Absorbed {
		t.Errorf("window 6400–7000 Å: elements %+v, want Ca first with most of the absorption", a.Elements)
	}
	sum := 0.0
	for _, e := range a.Elements {
		sum += e.Share
		if e.Alone > a.Absorbed*(1+1e-9) {
			t.Errorf("%s alone absorbs %g Å, more than all elements together (%g Å)", e.Symbol, e.Alone, a.Absorbed)
		}
	}
	if !scalar.EqualWithinAbs(sum, 1, 1e-12) {
		t.Errorf("shares sum to %g", sum)
	}
	if len(a.Lines) != 3 {
		t.Fatalf("lines %+v", a.Lines)
	}
	for _, l := range a.Lines {
		if l.Species.String() != "Ca II" || !scalar.EqualWithinRel(l.Acting, l.Rest*(1-ej.BetaPh), 1e-12) {
			t.Errorf("line %+v: want a Ca II triplet line acting at λ₀(1 − v_ph/c)", l)
		}
	}
	if a.Lines[0].Rest != 8544.44 || a.Lines[0].TauPhotosphere < a.Lines[1].TauPhotosphere {
		t.Errorf("strongest line %+v, want 8544.44 Å (largest gf of the triplet) first", a.Lines[0])
	}
	if _, err := m.Attribute(context.Background(), comp, ej, 7000, 6600, 3, Settings{}); err == nil {
		t.Error("empty window accepted")
	}
}

// TestStrongestLines: per species, the lines StrongestLines lists are the
// ones Attribute lists in the same window (the same τ at the photosphere,
// by decreasing τ), acting at λ₀(1 − v_ph/c) (the first-order Doppler
// policy, Jeffery & Branch 1990); a species without lines gets none.
func TestStrongestLines(t *testing.T) {
	t.Parallel()
	st := testStore(t, 2000)
	m, err := NewModel(st, 5000, 14000, 0)
	if err != nil {
		t.Fatal(err)
	}
	comp, _ := opacity.ParseComposition("Ca=0.2,Sr=0.3,Nd=0.5")
	ej := testEjecta()
	ctx := context.Background()
	a, err := m.Attribute(ctx, comp, ej, 6400, 7000, 3, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	ca2 := a.Lines[0].Species
	none := linelists.Species{Z: 1, Charge: 0}
	got, err := m.StrongestLines(ctx, comp, ej, 6400, 7000, 3, Settings{}, []linelists.Species{ca2, none})
	if err != nil {
		t.Fatal(err)
	}
	if len(got) != 2 || len(got[1]) != 0 {
		t.Fatalf("got %+v, want Ca II's lines and none for %v", got, none)
	}
	var want []LineContribution
	for _, l := range a.Lines {
		if l.Species == ca2 {
			want = append(want, l)
		}
	}
	if len(got[0]) < len(want) {
		t.Fatalf("Ca II: %d lines, Attribute lists %d", len(got[0]), len(want))
	}
	for i, l := range want {
		if got[0][i] != l {
			t.Errorf("line %d: %+v, Attribute gives %+v", i, got[0][i], l)
		}
	}
	for i, l := range got[0] {
		if l.Species != ca2 || !scalar.EqualWithinRel(l.Acting, l.Rest*(1-ej.BetaPh), 1e-12) || (i > 0 && l.TauPhotosphere > got[0][i-1].TauPhotosphere) {
			t.Errorf("line %d: %+v", i, l)
		}
	}
	if _, err := m.StrongestLines(ctx, comp, ej, 7000, 6400, 3, Settings{}, nil); err == nil {
		t.Error("empty window accepted")
	}
}
