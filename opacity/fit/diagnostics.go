package fit

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/dsp/fourier"
)

// autocorrWindow is the constant c of Sokal's automatic window: the sum
// of the autocorrelation function stops at the first lag M ≥ c τ(M)
// (Sokal 1997, "Monte Carlo methods in statistical mechanics"; c = 5 as
// in the emcee documentation, Foreman-Mackey et al. 2013).
const autocorrWindow = 5

// autocorrFunc returns the normalised autocorrelation function ρ(t) of x
// for lags 0 … len(x)−1, by FFT with zero padding to a power of two ≥ 2n
// (no circular wrap).
func autocorrFunc(x []float64) []float64 {
	n := len(x)
	m := 1
	for m < 2*n {
		m <<= 1
	}
	mean := 0.0
	for _, v := range x {
		mean += v
	}
	mean /= float64(n)
	seq := make([]float64, m)
	for i, v := range x {
		seq[i] = v - mean
	}
	fft := fourier.NewFFT(m)
	c := fft.Coefficients(nil, seq)
	for i, v := range c {
		c[i] = complex(real(v)*real(v)+imag(v)*imag(v), 0)
	}
	acf := fft.Sequence(nil, c)[:n]
	out := make([]float64, n)
	if !(acf[0] > 0) {
		return out // a constant chain
	}
	for i := range out {
		out[i] = acf[i] / acf[0]
	}
	return out
}

// integratedTime estimates the integrated autocorrelation time
// τ = 1 + 2 Σ_{t≥1} ρ(t) of one parameter from several chains (walkers)
// of equal length: the chains' autocorrelation functions are averaged,
// then summed up to Sokal's automatic window (the estimator of the emcee
// documentation, Foreman-Mackey et al. 2013 and its 2019 revision). It is
// NaN for chains shorter than 2 or constant chains.
func integratedTime(chains [][]float64) float64 {
	if len(chains) == 0 || len(chains[0]) < 2 {
		return math.NaN()
	}
	n := len(chains[0])
	f := make([]float64, n)
	for _, ch := range chains {
		for i, v := range autocorrFunc(ch) {
			f[i] += v
		}
	}
	if f[0] == 0 {
		return math.NaN()
	}
	f0 := f[0]
	for i := range f {
		f[i] /= f0
	}
	tau := 1.0
	for m := 1; m < n; m++ {
		tau += 2 * f[m]
		if float64(m) >= autocorrWindow*tau {
			return tau
		}
	}
	return tau
}

// splitRHat returns the split potential scale reduction factor R̂ of one
// parameter (Gelman et al., Bayesian Data Analysis, 3rd ed., §11.4): each
// chain is cut into halves, and with n draws per half-chain, W the mean of
// the half-chains' variances and B/n the variance of their means,
//
//	R̂ = √(((n − 1)/n W + B/n) / W).
//
// Walkers of an ensemble are not independent chains, so this is a rough
// check (common practice). It is NaN for half-chains shorter than 2.
func splitRHat(chains [][]float64) float64 {
	var halves [][]float64
	for _, ch := range chains {
		h := len(ch) / 2
		halves = append(halves, ch[:h], ch[len(ch)-h:])
	}
	if len(halves) == 0 || len(halves[0]) < 2 {
		return math.NaN()
	}
	n := float64(len(halves[0]))
	m := float64(len(halves))
	means := make([]float64, len(halves))
	W, grand := 0.0, 0.0
	for i, h := range halves {
		mu := 0.0
		for _, v := range h {
			mu += v
		}
		mu /= n
		s2 := 0.0
		for _, v := range h {
			s2 += (v - mu) * (v - mu)
		}
		W += s2 / (n - 1)
		means[i] = mu
		grand += mu
	}
	W /= m
	grand /= m
	B := 0.0
	for _, mu := range means {
		B += (mu - grand) * (mu - grand)
	}
	B *= n / (m - 1)
	if !(W > 0) {
		return math.NaN()
	}
	return math.Sqrt(((n-1)/n*W + B/n) / W)
}

// quantile returns the q-quantile of ascending sorted data by linear
// interpolation between order statistics (Hyndman & Fan 1996, definition 7).
func quantile(sorted []float64, q float64) float64 {
	n := len(sorted)
	if n == 0 {
		return math.NaN()
	}
	h := q * float64(n-1)
	i := int(math.Floor(h))
	if i >= n-1 {
		return sorted[n-1]
	}
	return sorted[i] + (h-float64(i))*(sorted[i+1]-sorted[i])
}

// sortedCopy returns x sorted ascending.
func sortedCopy(x []float64) []float64 {
	s := append([]float64(nil), x...)
	sort.Float64s(s)
	return s
}
