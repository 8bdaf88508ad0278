package fit

import (
	"math"
	"testing"

	"broadline/opacity/synth"
)

// TestLinearFitByHand checks the analytic scale and correction against
// cases worked by hand.
func TestLinearFitByHand(t *testing.T) {
	// Scale alone: m = (1, 2, 3), y = (2, 4, 7), σ = 1. Worked by hand:
	// c = Σ m y / Σ m² = 31/14; χ² = Σ y² − (Σ m y)²/Σ m² = 69 − 961/14 = 5/14;
	// ln det A = ln 14.
	w := []float64{1000, 1000 * math.Exp(0.1), 1000 * math.Exp(0.2)}
	one := []float64{1, 1, 1}
	sol, err := linearFit([]float64{2, 4, 7}, one, []float64{1, 2, 3}, legendreBasis(w, 0))
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(sol.coef[0]-31.0/14) > 1e-12 || math.Abs(sol.chi2-5.0/14) > 1e-12 || math.Abs(sol.logDet-math.Log(14)) > 1e-12 {
		t.Errorf("scale %v, χ² %v, ln det %v; want 31/14, 5/14, ln 14", sol.coef[0], sol.chi2, sol.logDet)
	}
	// σ = 2 everywhere divides χ² by 4 and leaves the scale.
	two := []float64{2, 2, 2}
	sol2, _ := linearFit([]float64{2, 4, 7}, two, []float64{1, 2, 3}, legendreBasis(w, 0))
	if math.Abs(sol2.coef[0]-31.0/14) > 1e-12 || math.Abs(sol2.chi2-5.0/56) > 1e-12 {
		t.Errorf("σ = 2: scale %v, χ² %v; want 31/14, 5/56", sol2.coef[0], sol2.chi2)
	}
	// Order 1 on points equally spaced in ln λ, so x = (−1, 0, 1): a
	// straight-line fit to y = (1, 2, 4) with m = 1 gives, by hand,
	// c₀ = mean y = 7/3, c₁ = Σ x y / Σ x² = 3/2, residuals (1/6, −1/3, 1/6),
	// χ² = 1/36 + 1/9 + 1/36 = 1/6.
	sol, err = linearFit([]float64{1, 2, 4}, one, one, legendreBasis(w, 1))
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(sol.coef[0]-7.0/3) > 1e-12 || math.Abs(sol.coef[1]-1.5) > 1e-12 || math.Abs(sol.chi2-1.0/6) > 1e-12 {
		t.Errorf("order 1: coefficients %v, χ² %v; want (7/3, 3/2), 1/6", sol.coef, sol.chi2)
	}
	// A model times an exact correction 2 + 0.5 x is recovered with χ² = 0.
	m := []float64{1, 2, 3}
	sol, _ = linearFit([]float64{1.5, 4, 7.5}, one, m, legendreBasis(w, 1))
	if math.Abs(sol.coef[0]-2) > 1e-12 || math.Abs(sol.coef[1]-0.5) > 1e-12 || sol.chi2 > 1e-20 {
		t.Errorf("exact correction: %v, χ² %v; want (2, 0.5), 0", sol.coef, sol.chi2)
	}
	// Legendre polynomials: P₂(0.5) = −0.125, P₃(0.5) = −0.4375 (worked by
	// hand from (3x² − 1)/2 and (5x³ − 3x)/2).
	if legendre(2, 0.5) != -0.125 || legendre(3, 0.5) != -0.4375 {
		t.Errorf("P₂(0.5) = %v, P₃(0.5) = %v", legendre(2, 0.5), legendre(3, 0.5))
	}
	// A zero model has no scale.
	if _, err := linearFit([]float64{1, 2, 3}, one, []float64{0, 0, 0}, legendreBasis(w, 0)); err == nil {
		t.Error("a zero model got a scale")
	}
}

// TestOuterSafe: photosphere velocities whose outermost node, computed as
// synth.Envelope.Node computes it, rounds above v_max are moved down by
// ulps; others are left alone. 0.17601429198058277 with v_max = 0.32 and 8
// nodes gives 0.32000000000000006 (found by the sampler).
func TestOuterSafe(t *testing.T) {
	env := synth.Envelope{BetaPh: 0.17601429198058277, BetaMax: 0.32, Nodes: 8}
	if env.Node(7) <= 0.32 {
		t.Log("synth's outer node no longer rounds above v_max here")
	}
	moved := 0
	for i := range 20000 {
		ph := 0.07 + 0.2*float64(i)/20000
		if i == 0 {
			ph = env.BetaPh
		}
		for _, n := range []int{8, 16} {
			got := outerSafe(ph, 0.32, n)
			e := synth.Envelope{BetaPh: got, BetaMax: 0.32, Nodes: n}
			if e.Node(n-1) > 0.32 || math.Abs(got-ph) > 1e-15 {
				t.Fatalf("v_ph %v → %v: outer node %v", ph, got, e.Node(n-1))
			}
			if got != ph {
				moved++
			}
		}
	}
	if moved == 0 {
		t.Error("no velocity needed moving, not even the one the sampler found")
	}
}
