package opacity

import (
	"context"
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/linelists"
	"broadline/physics"
)

// cmToEV converts a level energy in cm⁻¹ to eV (E = hc·σ).
const cmToEV = physics.Planck * physics.SpeedOfLight / physics.ElectronVolt

// TestSobolevCaII checks the worked number of REFERENCES.md [calc]: Ca II
// 8544.44 Å (vacuum), log gf = −0.36 (from memory there), lower level
// 3d ²D5/2 at 13710.88 cm⁻¹ (NIST, as listed in REFERENCES.md), g_l = 6,
// t = 1 d: τ/n_l = 0.01425 cm³ before stimulated emission, and the
// stimulated-emission factor at 5000 K is 0.9655.
func TestSobolevCaII(t *testing.T) {
	caII := linelists.Species{Z: 20, Charge: 1}
	el := 13710.88 * cmToEV
	st := makeStore([]testLine{{caII, 8544.44, -0.36, el, 6}})
	p, err := Solve(mustComp(t, "Ca=1"), 1e-13, 5000, nil)
	if err != nil {
		t.Fatal(err)
	}
	tau := make([]float64, 1)
	if err := Sobolev(context.Background(), tau, st, PlasmaLevelDensities(nil, st, p), 5000, physics.Day, 1); err != nil {
		t.Fatal(err)
	}
	n, u, _ := p.Species(caII)
	nl := 6 * n / u * math.Exp(-el*physics.ElectronVolt/(physics.Boltzmann*5000))
	if got := tau[0] / nl; !scalar.EqualWithinAbsOrRel(got, 0.01425*0.9655, 0, 5e-4) {
		t.Errorf("τ/n_l = %.6g cm³, want 0.01425 × 0.9655 = %.6g (REFERENCES.md [calc])", got, 0.01425*0.9655)
	}
	// At a temperature where stimulated emission is negligible for this
	// line (hc/λkT = 84 at 200 K), the ratio is 0.01425 itself.
	lev := LevelDensities(nil, st, []float64{1}, []float64{1}) // n_l/g_l = 1 cm⁻³
	if err := Sobolev(context.Background(), tau, st, lev, 200, physics.Day, 1); err != nil {
		t.Fatal(err)
	}
	if got := tau[0] / 6; !scalar.EqualWithinAbsOrRel(got, 0.01425, 0, 5e-4) {
		t.Errorf("τ/n_l without stimulated emission = %.6g cm³, want 0.01425", got)
	}
}

// directTau evaluates the Sobolev optical depth of line i straight from the
// formula, τ = (π e²/mₑc) gf λ t n_l/g_l (1 − e^{−hc/λkT}), with its own
// arithmetic: 10^logGF by math.Pow, the Boltzmann factor per line, λ in cm.
func directTau(st *linelists.Store, p *Plasma, i int, t float64) float64 {
	T := p.Temperature
	sp := st.SpeciesTable[st.Species[i]]
	n, u, ok := p.Species(sp)
	if !ok {
		return 0
	}
	e := st.Levels.Energy[st.Lower[i]]
	lamCM := st.Wavelength[i] * 1e-8
	sigma := math.Pi * physics.ElementaryCharge * physics.ElementaryCharge / (physics.ElectronMass * physics.SpeedOfLight)
	boltz := math.Exp(-e * physics.ElectronVolt / (physics.Boltzmann * T))
	stim := 1 - math.Exp(-physics.Planck*physics.SpeedOfLight/(lamCM*physics.Boltzmann*T))
	return sigma * math.Pow(10, float64(st.LogGF[i])) * lamCM * t * n / u * boltz * stim
}

func TestSobolevMatchesDirect(t *testing.T) {
	st := randomStore(5000, speciesOf("Ca", "Sr", "Nd", "Fe"), 40, 7)
	// Fe is in the store but not the composition: its lines get τ = 0.
	p, err := Solve(mustComp(t, "Ca=0.4,Sr=0.3,Nd=0.3"), 1e-13, 6000, nil)
	if err != nil {
		t.Fatal(err)
	}
	lev := PlasmaLevelDensities(nil, st, p)
	tau1 := make([]float64, st.Len())
	tau2 := make([]float64, st.Len())
	ctx := context.Background()
	if err := Sobolev(ctx, tau1, st, lev, p.Temperature, 2*physics.Day, 0); err != nil {
		t.Fatal(err)
	}
	if err := Sobolev(ctx, tau2, st, lev, p.Temperature, 2*physics.Day, 4); err != nil {
		t.Fatal(err)
	}
	zeros := 0
	for i := range tau1 {
		want := directTau(st, p, i, 2*physics.Day)
		if !scalar.EqualWithinAbsOrRel(tau1[i], want, 1e-300, 1e-12) {
			t.Fatalf("line %d: τ = %.15g, direct %.15g", i, tau1[i], want)
		}
		if math.Float64bits(tau1[i]) != math.Float64bits(tau2[i]) {
			t.Fatalf("line %d: τ differs between 1 and 4 workers", i)
		}
		if tau1[i] == 0 {
			zeros++
		}
	}
	if zeros == 0 || zeros == st.Len() {
		t.Errorf("%d zero depths of %d; Fe lines (absent from the composition) should be exactly those", zeros, st.Len())
	}

	// The reusable pieces: Boltzmann factors per level and N/U per species.
	b := BoltzmannFactors(nil, st, 6000)
	f := SpeciesFactors(nil, st, p)
	for l, e := range st.Levels.Energy {
		if want := math.Exp(-e * physics.ElectronVolt / (physics.Boltzmann * 6000)); !scalar.EqualWithinAbsOrRel(b[l], want, 0, 1e-13) {
			t.Fatalf("level %d: Boltzmann factor %v, want %v", l, b[l], want)
		}
		if want := f[st.Levels.Species[l]] * b[l]; lev[l] != want {
			t.Fatalf("level %d: n_l/g_l %v, want %v", l, lev[l], want)
		}
	}
	for s, sp := range st.SpeciesTable {
		n, u, ok := p.Species(sp)
		if want := n / u; ok && f[s] != want || !ok && f[s] != 0 {
			t.Errorf("%v: species factor %v, want %v", sp, f[s], want)
		}
	}

	// Census against a direct count.
	c := CountAbove(st, tau1, 1)
	total, above := 0, 0
	for s := range st.SpeciesTable {
		n, a := 0, 0
		for i, x := range st.Species {
			if int(x) == s {
				n++
				if tau1[i] > 1 {
					a++
				}
			}
		}
		if c.Total[s] != n || c.Above[s] != a {
			t.Errorf("%v: census %d/%d, direct count %d/%d", st.SpeciesTable[s], c.Above[s], c.Total[s], a, n)
		}
		total += n
		above += a
	}
	if total != st.Len() || c.AboveAll != above || above == 0 || above == st.Len() {
		t.Errorf("census: %d above of %d (direct %d of %d); the test wants some on each side", c.AboveAll, st.Len(), above, total)
	}

	cctx, cancel := context.WithCancel(ctx)
	cancel()
	if err := Sobolev(cctx, tau1, st, lev, 6000, physics.Day, 2); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled context: %v", err)
	}
	if err := Sobolev(ctx, tau1, st, lev, 6000, 0, 2); !errors.Is(err, ErrInput) {
		t.Errorf("t = 0: %v", err)
	}
}

// TestDenseStore exercises the stimulated-emission factor carried from line
// to line (steps of ~0.1 Å, where it is not recomputed, over runs of up to
// 1024 lines): Sobolev depths against the formula evaluated directly, and
// the fused expansion opacity against binning those direct depths.
func TestDenseStore(t *testing.T) {
	n := 400_000
	if testing.Short() {
		n = 100_000
	}
	st := randomStore(n, speciesOf("Ca", "Sr"), 50, 9)
	p, err := Solve(mustComp(t, "Ca=0.5,Sr=0.5"), 1e-13, 4500, nil)
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	tau := make([]float64, st.Len())
	if err := Sobolev(ctx, tau, st, PlasmaLevelDensities(nil, st, p), p.Temperature, physics.Day, 2); err != nil {
		t.Fatal(err)
	}
	direct := make([]float64, st.Len())
	worst := 0.0
	for i := range tau {
		direct[i] = directTau(st, p, i, physics.Day)
		rel := math.Abs(tau[i]-direct[i]) / direct[i]
		worst = max(worst, rel)
		if rel > 1e-12 {
			t.Fatalf("line %d (%.3f Å): τ = %.15g, direct %.15g", i, st.Wavelength[i], tau[i], direct[i])
		}
	}
	t.Logf("worst relative error of τ: %g", worst)
	g := must(LinearGrid(3000, 25000, 50))
	a, err := ExpansionOpacity(ctx, st, p, physics.Day, g, 2)
	if err != nil {
		t.Fatal(err)
	}
	b, err := ExpansionFromDepths(ctx, st, direct, p, physics.Day, g, 2)
	if err != nil {
		t.Fatal(err)
	}
	for k := range a.Kappa {
		if !scalar.EqualWithinAbsOrRel(a.Kappa[k], b.Kappa[k], 1e-300, 1e-12) {
			t.Errorf("bin %d: fused κ %.15g, from direct depths %.15g", k, a.Kappa[k], b.Kappa[k])
		}
	}
}
