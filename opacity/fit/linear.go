package fit

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// legendreX maps wavelength w to x ∈ [−1, 1], linear in ln λ, with lo ↦ −1
// and hi ↦ 1 (x = 0 when lo = hi).
func legendreX(w, lo, hi float64) float64 {
	if !(hi > lo) {
		return 0
	}
	a, b := math.Log(lo), math.Log(hi)
	return 2*(math.Log(w)-a)/(b-a) - 1
}

// legendre returns P_k(x) for k = 0 … 3.
func legendre(k int, x float64) float64 {
	switch k {
	case 0:
		return 1
	case 1:
		return x
	case 2:
		return (3*x*x - 1) / 2
	case 3:
		return (5*x*x - 3) * x / 2
	}
	panic("fit: Legendre order above 3")
}

// legendreBasis returns P_k(x(λ_i)) for k = 0 … order over ascending
// wavelengths w, x linear in ln λ from w[0] (−1) to w[len−1] (+1).
func legendreBasis(w []float64, order int) [][]float64 {
	lo, hi := w[0], w[len(w)-1]
	out := make([][]float64, order+1)
	for k := range out {
		out[k] = make([]float64, len(w))
		for i, l := range w {
			out[k][i] = legendre(k, legendreX(l, lo, hi))
		}
	}
	return out
}

// polyCorrection returns Σ_k coef[k] P_k(x).
func polyCorrection(x float64, coef []float64) float64 {
	s := 0.0
	for k, c := range coef {
		s += c * legendre(k, x)
	}
	return s
}

// chi2Fixed returns Σ ((y − m)/σ)².
func chi2Fixed(y, sigma, m []float64) float64 {
	s := 0.0
	for i := range y {
		r := (y[i] - m[i]) / sigma[i]
		s += r * r
	}
	return s
}

// errDegenerate says the model has no flux (or no independent correction
// terms) on the compared samples, so no scale is defined.
var errDegenerate = errors.New("the model flux is zero or degenerate on the compared samples: no flux scale fits")

// linearSolution is the best multiplicative correction of a model.
type linearSolution struct {
	coef   []float64
	chi2   float64
	logDet float64 // ln det A, A the normal matrix
}

// linearFit finds the coefficients c minimising
//
//	χ²(c) = Σ_i ((y_i − m_i Σ_k c_k B_k(i)) / σ_i)²,
//
// which is quadratic in c: with design columns a_k(i) = m_i B_k(i)/σ_i, the
// normal equations A c = g, A_kl = Σ a_k a_l, g_k = Σ a_k y/σ (solved by
// Cholesky). With one column (the scale alone) c = Σ m y/σ² / Σ m²/σ².
// It also returns ln det A, which a flat prior on c turns into the term
// −½ ln det A of the marginal log-likelihood (the Gaussian integral over c).
func linearFit(y, sigma, m []float64, basis [][]float64) (linearSolution, error) {
	K := len(basis)
	A := mat.NewSymDense(K, nil)
	g := mat.NewVecDense(K, nil)
	a := make([]float64, K)
	for i := range y {
		s2 := 1 / (sigma[i] * sigma[i])
		for k := range K {
			a[k] = m[i] * basis[k][i]
		}
		for k := range K {
			g.SetVec(k, g.AtVec(k)+a[k]*y[i]*s2)
			for l := k; l < K; l++ {
				A.SetSym(k, l, A.At(k, l)+a[k]*a[l]*s2)
			}
		}
	}
	var ch mat.Cholesky
	if !ch.Factorize(A) {
		return linearSolution{}, errDegenerate
	}
	var c mat.VecDense
	if err := ch.SolveVecTo(&c, g); err != nil {
		return linearSolution{}, fmt.Errorf("flux scale: %w", err)
	}
	sol := linearSolution{coef: make([]float64, K), logDet: ch.LogDet()}
	for k := range K {
		sol.coef[k] = c.AtVec(k)
	}
	for i := range y {
		f := 0.0
		for k := range K {
			f += sol.coef[k] * basis[k][i]
		}
		r := (y[i] - m[i]*f) / sigma[i]
		sol.chi2 += r * r
	}
	return sol, nil
}
