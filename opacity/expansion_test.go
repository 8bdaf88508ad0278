package opacity

import (
	"context"
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"

	"broadline/linelists"
	"broadline/opacity/internal/kernels"
	"broadline/physics"
	"broadline/spectra"
)

// TestExpansionOneBinByHand checks two bins worked by hand from the binned
// formula (Eastman & Pinto 1993, eq. for the expansion opacity):
//
//	ρ = 1e-13 g cm⁻³, t = 86400 s: ρct = 1e-13 × 2.99792458e10 × 86400 = 259.020684 g cm⁻².
//	Bin [8500, 8600) Å, Δλ = 100 Å, lines 8520 Å (τ = 0.5) and 8580 Å (τ = 3):
//	  8520 (1 − e^−0.5) = 8520 × 0.39346934 = 3352.3588
//	  8580 (1 − e^−3)   = 8580 × 0.95021293 = 8152.8270
//	  κ = (3352.3588 + 8152.8270)/100/259.020684 = 0.4441802 cm² g⁻¹.
//	Bin [8600, 8700): a line exactly on the edge, 8600 Å (τ = 1), belongs here:
//	  κ = 8600 × 0.63212056/100/259.020684 = 0.2098766 cm² g⁻¹.
//	A line at 8700 Å, the last edge, is outside the grid.
func TestExpansionOneBinByHand(t *testing.T) {
	caII := linelists.Species{Z: 20, Charge: 1}
	st := makeStore([]testLine{
		{caII, 8520, 0, 0, 2}, {caII, 8580, 0, 0, 2}, {caII, 8600, 0, 0, 2}, {caII, 8700, 0, 0, 2},
	})
	p, err := Solve(mustComp(t, "Ca=1"), 1e-13, 5000, nil)
	if err != nil {
		t.Fatal(err)
	}
	g, err := LinearGrid(8500, 8700, 100)
	if err != nil {
		t.Fatal(err)
	}
	x, err := ExpansionFromDepths(context.Background(), st, []float64{0.5, 3, 1, 7}, p, 86400, g, 1)
	if err != nil {
		t.Fatal(err)
	}
	for k, want := range []float64{0.4441802, 0.2098766} {
		if !scalar.EqualWithinAbsOrRel(x.Kappa[k], want, 0, 5e-7) {
			t.Errorf("bin %d: κ = %.7g, by hand %.7g", k, x.Kappa[k], want)
		}
		if x.ByElement[0][k] != x.Kappa[k] {
			t.Errorf("bin %d: the only element's breakdown %v ≠ κ %v", k, x.ByElement[0][k], x.Kappa[k])
		}
	}
	if x.Lines != 3 || x.Unmodelled != 0 {
		t.Errorf("Lines = %d, Unmodelled = %d; want 3 and 0", x.Lines, x.Unmodelled)
	}
}

// binThin is the optically thin expansion opacity summed independently:
// Σ τ_l λ_l/(ρ c t Δλ) with τ from directTau, lines placed in bins by a
// linear scan of the edges.
func binThin(st *linelists.Store, p *Plasma, t float64, g Grid) []float64 {
	out := make([]float64, g.Bins())
	for i, lam := range st.Wavelength {
		for k := 0; k < g.Bins(); k++ {
			if g.Edges[k] <= lam && lam < g.Edges[k+1] {
				out[k] += directTau(st, p, i, t) * lam / (p.Density * physics.SpeedOfLight * t * g.Width(k))
			}
		}
	}
	return out
}

func TestExpansionLimits(t *testing.T) {
	ctx := context.Background()
	st := randomStore(4000, speciesOf("Ca", "Sr", "Nd"), 30, 3)
	p, err := Solve(mustComp(t, "Ca=0.4,Sr=0.3,Nd=0.3"), 1e-13, 5000, nil)
	if err != nil {
		t.Fatal(err)
	}
	g, err := LinearGrid(4000, 24000, 500)
	if err != nil {
		t.Fatal(err)
	}
	lev := PlasmaLevelDensities(nil, st, p)
	tau := make([]float64, st.Len())
	if err := Sobolev(ctx, tau, st, lev, p.Temperature, physics.Day, 1); err != nil {
		t.Fatal(err)
	}
	tmax, tmin := 0.0, math.Inf(1)
	for _, x := range tau {
		tmax = max(tmax, x)
		tmin = min(tmin, x)
	}

	// Thin limit: scale t so that every τ ≤ 1e-9; then κ is the summed
	// Sobolev line opacity (π e²/mₑc) Σ gf n_l/g_l λ² stim/(ρ c Δλ), in
	// which t cancels (REFERENCES.md [calc]).
	tThin := physics.Day * 1e-9 / tmax
	thin, err := ExpansionOpacity(ctx, st, p, tThin, g, 2)
	if err != nil {
		t.Fatal(err)
	}
	thin2, err := ExpansionOpacity(ctx, st, p, tThin/10, g, 2)
	if err != nil {
		t.Fatal(err)
	}
	want := binThin(st, p, tThin, g)
	nonzero := 0
	for k := range want {
		if !scalar.EqualWithinAbsOrRel(thin.Kappa[k], want[k], 1e-300, 1e-8) {
			t.Errorf("thin bin %d: κ = %.10g, summed line opacity %.10g", k, thin.Kappa[k], want[k])
		}
		if !scalar.EqualWithinAbsOrRel(thin2.Kappa[k], thin.Kappa[k], 1e-300, 1e-8) {
			t.Errorf("thin bin %d: κ depends on t: %.10g vs %.10g", k, thin.Kappa[k], thin2.Kappa[k])
		}
		if want[k] > 0 {
			nonzero++
		}
	}
	if nonzero < g.Bins()/2 {
		t.Fatalf("only %d of %d bins have lines; the test store is too thin", nonzero, g.Bins())
	}

	// Thick limit: scale t so that every τ ≥ 100; then κ = Σ λ_l/(ρ c t Δλ),
	// i.e. (number of lines in bin)·⟨λ⟩/(ρ c t Δλ) (REFERENCES.md [calc]).
	tThick := physics.Day * 100 / tmin
	thick, err := ExpansionOpacity(ctx, st, p, tThick, g, 2)
	if err != nil {
		t.Fatal(err)
	}
	for k := 0; k < g.Bins(); k++ {
		sum, n := 0.0, 0
		for _, lam := range st.Wavelength {
			if g.Edges[k] <= lam && lam < g.Edges[k+1] {
				sum += lam
				n++
			}
		}
		want := float64(n) * (sum / max(float64(n), 1)) / (p.Density * physics.SpeedOfLight * tThick * g.Width(k))
		if !scalar.EqualWithinAbsOrRel(thick.Kappa[k], want, 1e-300, 1e-12) {
			t.Errorf("thick bin %d: κ = %.12g, N λ/(ρctΔλ) = %.12g (%d lines)", k, thick.Kappa[k], want, n)
		}
	}

	// The fused computation equals binning Sobolev's depths; rows add to κ;
	// one worker and two give identical bits.
	for _, grid := range []Grid{g, must(LogGrid(3500, 26000, 333))} {
		a, err := ExpansionOpacity(ctx, st, p, physics.Day, grid, 1)
		if err != nil {
			t.Fatal(err)
		}
		b, err := ExpansionFromDepths(ctx, st, tau, p, physics.Day, grid, 2)
		if err != nil {
			t.Fatal(err)
		}
		c, err := ExpansionOpacity(ctx, st, p, physics.Day, grid, 2)
		if err != nil {
			t.Fatal(err)
		}
		for k := range a.Kappa {
			if !scalar.EqualWithinAbsOrRel(a.Kappa[k], b.Kappa[k], 1e-300, 1e-12) {
				t.Errorf("bin %d: fused κ %.14g, from depths %.14g", k, a.Kappa[k], b.Kappa[k])
			}
			if math.Float64bits(a.Kappa[k]) != math.Float64bits(c.Kappa[k]) {
				t.Errorf("bin %d: κ differs between 1 and 2 workers", k)
			}
			rows := 0.0
			for r := range a.Elements {
				rows += a.ByElement[r][k]
			}
			if !scalar.EqualWithinAbsOrRel(rows, a.Kappa[k], 1e-300, 1e-12) {
				t.Errorf("bin %d: breakdown sums to %v, κ = %v", k, rows, a.Kappa[k])
			}
		}
	}
}

func must[T any](v T, err error) T {
	if err != nil {
		panic(err)
	}
	return v
}

// TestExpansionDoubling: in the thin limit, doubling the mass fraction of a
// trace element doubles its row of the breakdown (the electron density, set
// by the main constituent, does not move) and leaves the others unchanged.
func TestExpansionDoubling(t *testing.T) {
	ctx := context.Background()
	st := randomStore(3000, speciesOf("Ca", "Sr", "Fe"), 20, 11)
	g := must(LinearGrid(3000, 25000, 1000))
	var rows [2][]float64 // Ca, Sr
	for i, comp := range []string{"Sr=1,Ca=1e-7", "Sr=1,Ca=2e-7"} {
		p, err := Solve(mustComp(t, comp), 1e-13, 6000, nil)
		if err != nil {
			t.Fatal(err)
		}
		x, err := ExpansionOpacity(ctx, st, p, 1e-6, g, 2) // t = 1 µs: thin
		if err != nil {
			t.Fatal(err)
		}
		if x.Elements[0] != 20 || x.Elements[1] != 38 {
			t.Fatalf("rows %v, want [20 38]", x.Elements)
		}
		if i == 0 {
			rows[0], rows[1] = x.ByElement[0], x.ByElement[1]
			// Fe is in the store but not the composition.
			fe := 0
			for k, s := range st.Species {
				if st.SpeciesTable[s].Z == 26 && st.Wavelength[k] >= 3000 && st.Wavelength[k] < g.Edges[g.Bins()] {
					fe++
				}
			}
			if x.Unmodelled != fe || fe == 0 {
				t.Errorf("Unmodelled = %d, want the %d Fe lines", x.Unmodelled, fe)
			}
			continue
		}
		for k := range g.Bins() {
			if rows[0][k] == 0 {
				continue
			}
			if r := x.ByElement[0][k] / rows[0][k]; !scalar.EqualWithinAbsOrRel(r, 2, 0, 1e-5) {
				t.Errorf("bin %d: Ca row ratio %v after doubling X(Ca), want 2", k, r)
			}
			if !scalar.EqualWithinAbsOrRel(x.ByElement[1][k], rows[1][k], 1e-300, 1e-5) {
				t.Errorf("bin %d: Sr row moved from %v to %v", k, rows[1][k], x.ByElement[1][k])
			}
		}
	}
}

func TestGrids(t *testing.T) {
	g, err := LinearGrid(4000, 25000, 100)
	if err != nil || g.Bins() != 210 || g.Edges[210] != 25000 || g.Center(0) != 4050 || g.Width(5) != 100 {
		t.Errorf("LinearGrid(4000, 25000, 100): %d bins, last edge %v, %v", g.Bins(), g.Edges[len(g.Edges)-1], err)
	}
	// A range that is not a whole number of bins gets a last bin past "to".
	g, err = LinearGrid(4000, 4250, 100)
	if err != nil || g.Bins() != 3 || g.Edges[3] != 4300 {
		t.Errorf("LinearGrid(4000, 4250, 100) edges %v, %v", g.Edges, err)
	}
	lg, err := LogGrid(1000, 16000, 4)
	if err != nil || lg.Bins() != 4 {
		t.Fatal(err)
	}
	for k, want := range []float64{1000, 2000, 4000, 8000, 16000} {
		if !scalar.EqualWithinAbsOrRel(lg.Edges[k], want, 0, 1e-13) {
			t.Errorf("LogGrid edge %d = %v, want %v", k, lg.Edges[k], want)
		}
	}
	for _, c := range [][3]float64{{0, 10, 1}, {10, 10, 1}, {10, 5, 1}, {10, 20, 0}, {10, 20, -1}, {10, 20, math.NaN()}, {1, 1e12, 1e-3}} {
		if _, err := LinearGrid(c[0], c[1], c[2]); !errors.Is(err, ErrGrid) {
			t.Errorf("LinearGrid%v: %v, want ErrGrid", c, err)
		}
	}
	if _, err := LogGrid(100, 50, 3); !errors.Is(err, ErrGrid) {
		t.Errorf("LogGrid with to < from: %v", err)
	}
	p, _ := Solve(mustComp(t, "Ca=1"), 1e-13, 5000, nil)
	st := makeStore([]testLine{{linelists.Species{Z: 20, Charge: 1}, 5000, 0, 0, 2}})
	if _, err := ExpansionOpacity(context.Background(), st, p, physics.Day, Grid{Edges: []float64{5, 4}}, 1); !errors.Is(err, ErrGrid) {
		t.Errorf("descending edges: %v", err)
	}
}

// TestPlanckMeanAndGrey checks the summaries: a constant κ is its own mean;
// a step in κ gives the fraction of ∫B_λ on its side, checked against
// gonum's adaptive-free fine quadrature of spectra.PlanckLambda; the grey
// average weights bins by their overlap with the range.
func TestPlanckMeanAndGrey(t *testing.T) {
	x := &Expansion{Grid: Grid{Edges: []float64{5000, 10000, 20000}}, Kappa: []float64{3, 3}}
	if m := x.PlanckMean(6000); !scalar.EqualWithinAbsOrRel(m, 3, 0, 1e-14) {
		t.Errorf("Planck mean of constant 3 = %v", m)
	}
	x.Kappa = []float64{1, 0}
	b := func(l float64) float64 { return spectra.PlanckLambda(l, 6000) }
	want := quad.Fixed(b, 5000, 10000, 400, nil, 0) / quad.Fixed(b, 5000, 20000, 400, nil, 0)
	if m := x.PlanckMean(6000); !scalar.EqualWithinAbsOrRel(m, want, 0, 1e-6) {
		t.Errorf("Planck mean of a step = %.8g, want %.8g", m, want)
	}
	x.Kappa = []float64{2, 8}
	// [7500, 12500): 2500 Å of bin 0 (κ 2) and 2500 Å of bin 1 (κ 8) → 5.
	if g, err := x.Grey(7500, 12500); err != nil || !scalar.EqualWithinAbsOrRel(g, 5, 0, 1e-14) {
		t.Errorf("Grey(7500, 12500) = %v, %v; want 5", g, err)
	}
	// [0, 1e6) covers everything: (2×5000 + 8×10000)/15000 = 6.
	if g, err := x.Grey(0, 1e6); err != nil || !scalar.EqualWithinAbsOrRel(g, 6, 0, 1e-14) {
		t.Errorf("Grey over all = %v, %v; want 6", g, err)
	}
	if _, err := x.Grey(30000, 40000); !errors.Is(err, ErrGrid) {
		t.Errorf("Grey outside the grid: %v", err)
	}
}

// TestExpansionPortable: with the vector loops switched off (as on a
// processor without AVX2) the expansion opacity is the same to 1e-12 per
// bin, on a store whose bins hold runs of every length modulo four.
func TestExpansionPortable(t *testing.T) {
	ctx := context.Background()
	st := randomStore(20001, speciesOf("Ca", "Sr", "Nd"), 40, 13)
	p, err := Solve(mustComp(t, "Ca=0.4,Sr=0.3,Nd=0.3"), 1e-13, 5000, nil)
	if err != nil {
		t.Fatal(err)
	}
	ls, err := NewLines(ctx, st, 2)
	if err != nil {
		t.Fatal(err)
	}
	g := must(LinearGrid(3000, 25000, 7.3))
	lanes := laneWidths(t)
	x := make([]*Expansion, len(lanes))
	for v, w := range lanes {
		if err := kernels.SetLanes(w); err != nil {
			t.Fatal(err)
		}
		if x[v], err = ls.Expansion(ctx, p, physics.Day, g, 2); err != nil {
			t.Fatal(err)
		}
	}
	if len(lanes) == 1 {
		t.Skip("no AVX2 and FMA: only the portable loops exist here")
	}
	for v := 1; v < len(lanes); v++ {
		for k := range x[0].Kappa {
			if !scalar.EqualWithinAbsOrRel(x[v].Kappa[k], x[0].Kappa[k], 1e-300, 1e-12) {
				t.Errorf("bin %d: %d-lane κ %.15g, portable %.15g", k, lanes[v], x[v].Kappa[k], x[0].Kappa[k])
			}
		}
	}
}

// laneWidths returns the vector widths of the kernels to test: 0 (the
// portable loops) and every width up to the processor's own, and restores
// the width in use at the end of the test.
func laneWidths(t *testing.T) []int {
	own := kernels.Lanes()
	t.Cleanup(func() {
		if err := kernels.SetLanes(own); err != nil {
			t.Error(err)
		}
	})
	lanes := []int{0}
	for _, w := range []int{4, 8} {
		if w <= kernels.MaxLanes() {
			lanes = append(lanes, w)
		}
	}
	if len(lanes) < 3 {
		t.Logf("this processor and build have vector loops of %d lanes: the wider ones are not checked here", kernels.MaxLanes())
	}
	return lanes
}
