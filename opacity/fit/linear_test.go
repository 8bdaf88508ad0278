package fit

import (
	"math"
	"testing"
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
