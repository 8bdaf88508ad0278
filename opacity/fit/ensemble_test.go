package fit

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
)

// gaussian2 is a correlated, anisotropic 2-D Gaussian: the kind of density
// on which Goodman & Weare (2010, §4) demonstrate the affine-invariant
// stretch move. Mean (1, −2), σ = (1, 3), correlation 0.9.
var gaussian2 = struct {
	mu, sd [2]float64
	rho    float64
}{[2]float64{1, -2}, [2]float64{1, 3}, 0.9}

func gaussian2LogP(_ context.Context, x []float64) (float64, error) {
	g := gaussian2
	a := (x[0] - g.mu[0]) / g.sd[0]
	b := (x[1] - g.mu[1]) / g.sd[1]
	return -(a*a - 2*g.rho*a*b + b*b) / (2 * (1 - g.rho*g.rho)), nil
}

func gaussianStart(nw int, seed uint64) [][]float64 {
	rng := rand.New(rand.NewPCG(seed, 5))
	init := make([][]float64, nw)
	for w := range init {
		init[w] = []float64{5 + 0.1*rng.NormFloat64(), 5 + 0.1*rng.NormFloat64()}
	}
	return init
}

// TestEnsembleGaussian samples the 2-D Gaussian from a ball far from its
// mean and checks the sample mean, variances and correlation against the
// density's, within four Monte-Carlo standard errors (σ √(τ/N) for a mean,
// σ² √(2τ/N) for a variance, (1 − ρ²) √(τ/N) for the correlation; N the
// number of samples, τ the integrated autocorrelation time estimated from
// the chain).
func TestEnsembleGaussian(t *testing.T) {
	t.Parallel()
	const nw, steps, burn = 20, 4000, 500
	run, err := runEnsemble(context.Background(), gaussian2LogP, gaussianStart(nw, 3), steps+burn, burn, 2, 42, 2, nil)
	if err != nil {
		t.Fatal(err)
	}
	kept := run.chain[burn:]
	var mean [2]float64
	var taus [2]float64
	n := float64(nw * steps)
	for d := range 2 {
		chains := make([][]float64, nw)
		for w := range nw {
			chains[w] = make([]float64, steps)
			for s := range steps {
				chains[w][s] = kept[s][w][d]
				mean[d] += kept[s][w][d] / n
			}
		}
		taus[d] = integratedTime(chains)
	}
	var cov [2][2]float64
	for _, row := range kept {
		for _, x := range row {
			for i := range 2 {
				for j := range 2 {
					cov[i][j] += (x[i] - mean[i]) * (x[j] - mean[j]) / n
				}
			}
		}
	}
	g := gaussian2
	tau := math.Max(taus[0], taus[1])
	if !(tau > 1 && tau < 100) {
		t.Fatalf("τ = %v steps: not a working sampler", taus)
	}
	for d := range 2 {
		if se := g.sd[d] * math.Sqrt(taus[d]/n); math.Abs(mean[d]-g.mu[d]) > 4*se {
			t.Errorf("mean %d = %.4f, want %.4f ± %.4f", d, mean[d], g.mu[d], 4*se)
		}
		if se := math.Sqrt(2 * taus[d] / n); math.Abs(cov[d][d]/(g.sd[d]*g.sd[d])-1) > 4*se {
			t.Errorf("variance %d = %.4f, want %.4f (relative ± %.3f)", d, cov[d][d], g.sd[d]*g.sd[d], 4*se)
		}
	}
	rho := cov[0][1] / math.Sqrt(cov[0][0]*cov[1][1])
	if se := (1 - g.rho*g.rho) * math.Sqrt(tau/n); math.Abs(rho-g.rho) > 4*se {
		t.Errorf("correlation %.4f, want %.4f ± %.4f", rho, g.rho, 4*se)
	}
	acc := 0.0
	for _, a := range run.accepted {
		acc += float64(a) / float64(steps*nw)
	}
	// Foreman-Mackey et al. (2013) quote acceptance fractions of 0.2–0.5
	// as healthy; a 2-D Gaussian with a = 2 sits well inside (common practice).
	if acc < 0.2 || acc > 0.9 {
		t.Errorf("acceptance fraction %.3f", acc)
	}
	t.Logf("τ = %.2f, %.2f steps; acceptance %.3f; mean %.4f %.4f; ρ %.4f", taus[0], taus[1], acc, mean[0], mean[1], rho)
}

// TestEnsembleDeterministic: the same seed gives the same chain bit for
// bit with 1, 2 and 3 workers; another seed gives another chain.
func TestEnsembleDeterministic(t *testing.T) {
	t.Parallel()
	run := func(seed uint64, workers int) *ensembleRun {
		r, err := runEnsemble(context.Background(), gaussian2LogP, gaussianStart(10, 1), 200, 0, 2, seed, workers, nil)
		if err != nil {
			t.Fatal(err)
		}
		return r
	}
	ref := run(9, 1)
	for _, w := range []int{2, 3} {
		r := run(9, w)
		for s := range ref.chain {
			for k := range ref.chain[s] {
				for d := range 2 {
					if math.Float64bits(r.chain[s][k][d]) != math.Float64bits(ref.chain[s][k][d]) {
						t.Fatalf("%d workers: step %d walker %d differs", w, s, k)
					}
				}
			}
		}
	}
	if other := run(10, 2); other.chain[199][0][0] == ref.chain[199][0][0] {
		t.Error("another seed gave the same chain")
	}
}

// TestEnsembleStops: a cancelled context stops the sampler with an error
// wrapping context.Canceled, and progress counts steps.
func TestEnsembleStops(t *testing.T) {
	t.Parallel()
	ctx, cancel := context.WithCancel(context.Background())
	last := 0
	_, err := runEnsemble(ctx, gaussian2LogP, gaussianStart(8, 1), 1000, 0, 2, 1, 1, func(done, total int) {
		last = done
		if total != 1000 {
			t.Errorf("total %d, want 1000", total)
		}
		if done == 10 {
			cancel()
		}
	})
	if err == nil || !errorsIsCanceled(err) {
		t.Errorf("cancelled run: %v", err)
	}
	if last != 10 {
		t.Errorf("progress reached %d steps after cancelling at 10", last)
	}
}

// TestAutocorrAR1 checks the integrated autocorrelation time on AR(1)
// chains x_t = φ x_{t−1} + √(1−φ²) ε_t, whose τ = (1 + φ)/(1 − φ) (the sum of
// ρ(t) = φ^|t|; e.g. Sokal 1997). Sokal's variance estimate
// var(τ̂)/τ² ≈ 2(2M + 1)/N with the window M ≈ 5τ gives ~3 % relative error for
// 8 chains of 20000 at φ = 0.8, so 12 % is a four-σ bound.
func TestAutocorrAR1(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(4, 4))
	for _, phi := range []float64{0, 0.5, 0.8} {
		chains := make([][]float64, 8)
		for c := range chains {
			x := rng.NormFloat64()
			chains[c] = make([]float64, 20000)
			for i := range chains[c] {
				x = phi*x + math.Sqrt(1-phi*phi)*rng.NormFloat64()
				chains[c][i] = x
			}
		}
		want := (1 + phi) / (1 - phi)
		if got := integratedTime(chains); math.Abs(got/want-1) > 0.12 {
			t.Errorf("φ = %v: τ = %.3f, want %.3f", phi, got, want)
		}
	}
	if !math.IsNaN(integratedTime([][]float64{{1, 1, 1, 1}})) {
		t.Error("τ of a constant chain is not NaN")
	}
}

// TestSplitRHat: chains drawn from one distribution give R̂ ≈ 1; chains
// whose means differ by one standard deviation give R̂ well above 1.1 (the
// usual threshold, common practice; Gelman et al., BDA3 §11.4).
func TestSplitRHat(t *testing.T) {
	t.Parallel()
	rng := rand.New(rand.NewPCG(8, 8))
	same := make([][]float64, 8)
	shifted := make([][]float64, 8)
	for c := range same {
		same[c] = make([]float64, 2000)
		shifted[c] = make([]float64, 2000)
		for i := range same[c] {
			same[c][i] = rng.NormFloat64()
			shifted[c][i] = same[c][i] + float64(c%2)
		}
	}
	if r := splitRHat(same); math.Abs(r-1) > 0.01 {
		t.Errorf("R̂ of identical chains %.4f, want ≈ 1", r)
	}
	// Half the chains shifted by 1σ: B/n ≈ 1/4 + W/n per draw, so
	// R̂ ≈ √(1 + 0.25) ≈ 1.12 (worked by hand).
	if r := splitRHat(shifted); math.Abs(r-math.Sqrt(1.25)) > 0.03 {
		t.Errorf("R̂ of shifted chains %.4f, want ≈ %.4f", r, math.Sqrt(1.25))
	}
}

// TestQuantile checks type-7 quantiles on a hand-worked case:
// (1, 2, 3, 4) has median 2.5 and 25th percentile 1 + 0.75·1 = 1.75.
func TestQuantile(t *testing.T) {
	s := []float64{1, 2, 3, 4}
	if quantile(s, 0.5) != 2.5 || quantile(s, 0.25) != 1.75 || quantile(s, 1) != 4 || quantile(s, 0) != 1 {
		t.Errorf("quantiles %v %v %v %v", quantile(s, 0.5), quantile(s, 0.25), quantile(s, 1), quantile(s, 0))
	}
}
