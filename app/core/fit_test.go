package core

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"broadline/opacity/fit"
	"broadline/opacity/synth"
	"broadline/physics"
	"broadline/spectra"
)

// median returns the median of x.
func median(x []float64) float64 {
	y := slices.Clone(x)
	slices.Sort(y)
	return y[len(y)/2]
}

// injectedBench returns a bench over the demo's line lists whose two
// epochs (the demo's first and third, restricted to 0.36–0.7 µm so that
// each synthesis is cheap) are the absorption-only model at a composition
// and flux scales this test chooses — not the demo's — with Gaussian
// noise of 1 % of the median flux. The spectra are made by the model the
// fits use (Bench.FitModel), so the truth is recoverable exactly.
func injectedBench(t *testing.T, truth Composition, scales []float64) *Bench {
	t.Helper()
	demo := demoBench(t)
	d := *demo.Data
	d.ModelFromUm, d.ModelToUm = 0.36, 0.7
	d.Epochs = []Epoch{demo.Data.Epochs[0], demo.Data.Epochs[2]}
	d.MassFractions = truth
	// Uniform ejecta: the demo's lanthanide-rich inner zone would black
	// out the absorption-only spectrum of the late epoch.
	d.InnerMassFractions, d.ZoneBoundary = Composition{}, 0
	var obs []*spectra.Spectrum
	rng := rand.New(rand.NewPCG(11, 12))
	for i := range d.Epochs {
		src := demo.Observed[[]int{0, 2}[i]]
		var w []float64
		for _, x := range src.Wavelength {
			if x > 3700 && x < 6900 {
				w = append(w, x)
			}
		}
		s := &spectra.Spectrum{Wavelength: w, Flux: make([]float64, len(w)), Uncertainty: make([]float64, len(w))}
		obs = append(obs, s)
	}
	b, err := NewBench("injected", &d, obs, demo.Store, nil)
	if err != nil {
		t.Fatal(err)
	}
	fm, err := b.FitModel()
	if err != nil {
		t.Fatal(err)
	}
	comp, err := truth.Mix()
	if err != nil {
		t.Fatal(err)
	}
	for i, s := range obs {
		m := d.StartModel(i)
		m.Preview = true
		// The model on the wavelengths (compared with the still zero
		// spectrum), by the model the fits use.
		ov, err := fit.CompareModel(context.Background(), fm, comp, d.Ejecta(m), synth.Settings{Preview: true, Workers: 2},
			d.DistanceMpc*physics.Megaparsec, s, d.ResolvingPower)
		if err != nil {
			t.Fatal(err)
		}
		if len(ov.Flux) != len(s.Wavelength) {
			t.Fatalf("epoch %d: model on %d of %d samples", i+1, len(ov.Flux), len(s.Wavelength))
		}
		// Noise of 1 % of the median flux on every sample (a signal-to-noise
		// ratio of 100 at the median): a floor, as a detector's read noise
		// and the sky give one, so the deepest troughs do not carry
		// vanishing uncertainties.
		sigma := 0.01 * median(ov.Flux)
		for k, f := range ov.Flux {
			s.Flux[k] = scales[i] * (f + sigma*rng.NormFloat64())
			s.Uncertainty[k] = scales[i] * sigma
		}
	}
	return b
}

// TestFitRecoversInjected is an injection–recovery check through the
// workbench core: Sr at 0.01 (the demo has 0.03) and Nd at 1e-3 (the demo
// 7e-5), flux scales 1.3 and 0.8 (slit losses the free scale must absorb),
// two epochs fitted jointly from a start 0.5 dex off in Sr and Nd. The
// recovered fractions must lie within 0.1 dex of the truth, the scales
// within 2 %, χ²/N near 1 on each epoch; the results are numbered by the
// dataset's epochs and the best models are usable in the workbench. A
// short sampler run then gives a posterior whose intervals hold the truth.
func TestFitRecoversInjected(t *testing.T) {
	if raceEnabled {
		t.Skip("some 400 syntheses: run without the race detector (make test does)")
	}
	truth := mustComp(t, "Ca=0.002,Sr=0.01,Y=0.002,Zr=0.008,Nd=0.001,Kr=0.977")
	b := injectedBench(t, truth, []float64{1.3, 0.8})
	start := b.Data.StartModel(0)
	start.Preview = true
	// 0.5 dex off in both, the fixed elements' ratios as in the truth.
	c, err := truth.WithFraction("Sr", 0.0316)
	if err != nil {
		t.Fatal(err)
	}
	if start.MassFractions, err = c.WithFraction("Nd", 3.16e-4); err != nil {
		t.Fatal(err)
	}
	req := FitRequest{Free: []string{"Sr", "Nd"}, Epochs: []int{0, 1}, Samples: 12, Walkers: 6, Seed: 3}
	var stages []FitStage
	out, err := b.Fit(context.Background(), start, req, func(s FitStage, done, total int) {
		if len(stages) == 0 || stages[len(stages)-1] != s {
			stages = append(stages, s)
		}
		if done < 1 || done > total {
			t.Errorf("progress %s %d of %d", s, done, total)
		}
	})
	if err != nil {
		t.Fatal(err)
	}
	best := out.Best
	t.Logf("%d evaluations, %s; χ²/N %.3f; %v", best.Evaluations, best.Status, best.Chi2N, best.MassFractions)
	for sym, want := range map[string]float64{"Sr": 0.01, "Nd": 0.001} {
		if got := best.MassFractions[sym]; !(math.Abs(math.Log10(got/want)) < 0.1) {
			t.Errorf("X(%s) = %g, injected %g", sym, got, want)
		}
	}
	if len(best.Epochs) != 2 {
		t.Fatalf("%d epoch reports", len(best.Epochs))
	}
	for i, wantScale := range []float64{1.3, 0.8} {
		e := best.Epochs[i]
		if e.Epoch != i+1 || math.Abs(e.FluxScale/wantScale-1) > 0.02 || e.Chi2N > 1.3 {
			t.Errorf("epoch report %+v: want epoch %d, scale %g, χ²/N ≈ 1", e, i+1, wantScale)
		}
	}
	if len(out.Models) != 2 || out.Models[1].Epoch != 1 {
		t.Fatalf("best models %+v", out.Models)
	}
	for _, m := range out.Models {
		if err := m.Validate(b.Data); err != nil {
			t.Errorf("best model is not usable: %v", err)
		}
		if syms, fr := m.MassFractions.Fractions(); len(syms) != 6 || math.Abs(sum(fr)-1) > 1e-6 {
			t.Errorf("best composition %v %v", syms, fr)
		}
	}
	if len(stages) != 2 || stages[0] != StageOptimise || stages[1] != StageSample {
		t.Errorf("progress stages %v, want fit then sample", stages)
	}
	post := out.Posterior
	if post == nil || len(post.Samples) != 12*6 || len(post.Summaries) != 2 {
		t.Fatalf("posterior %+v", post)
	}
	for i, want := range []float64{0.01, 0.001} {
		s := post.Summaries[i]
		if !(s.Lower95 <= s.Median && s.Median <= s.Upper95) || math.Abs(math.Log10(s.Median/want)) > 0.15 {
			t.Errorf("%s: median %g (95 %%: %g–%g), injected %g", s.Name, s.Median, s.Lower95, s.Upper95, want)
		}
	}
}

func sum(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v
	}
	return s
}

// TestFitRequestErrors: every bad request is refused before any synthesis
// with a message naming what is wrong, and a cancelled context stops a fit.
func TestFitRequestErrors(t *testing.T) {
	b := demoBench(t)
	m := b.Data.StartModel(0)
	for _, c := range []struct {
		req  FitRequest
		want string
	}{
		{FitRequest{}, "nothing to fit"},
		{FitRequest{Free: []string{"Qq"}}, "not an element"},
		{FitRequest{Free: []string{"Sr", "Sr"}}, "twice"},
		{FitRequest{Free: []string{"Sr"}, MassFractionLower: 0.1, MassFractionUpper: 0.01}, "bounds"},
		{FitRequest{Free: []string{"Sr"}, MassFractionUpper: 2}, "bounds"},
		{FitRequest{Free: []string{"Sr"}, Epochs: []int{7}}, "epoch 8"},
		{FitRequest{Free: []string{"Sr"}, Epochs: []int{1, 1}}, "twice"},
		{FitRequest{Free: []string{"Sr"}, CorrectionOrder: 4}, "order"},
	} {
		_, _, err := b.Problem(m, c.req)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%+v: error %v, want one saying %q", c.req, err, c.want)
		}
	}
	// Every element free: none left to fill the rest of the mass.
	syms, _ := m.MassFractions.Fractions()
	if _, err := b.Fit(context.Background(), m, FitRequest{Free: syms}, nil); err == nil || !errors.Is(err, fit.ErrProblem) {
		t.Errorf("all elements free: %v", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	m.Preview = true
	_, err := b.Fit(ctx, m, FitRequest{Free: []string{"Sr"}}, func(FitStage, int, int) { cancel() })
	if !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled fit: %v", err)
	}
}

// TestFitModelMatchesSynthModel: the fits' coarser grid (a third of the
// demo's R = 500 resolution element, against the workbench's 1/4500 in
// ln λ) changes χ²/N of the demo's first epoch at its recorded model (full
// formal integral) by less than 1 %, and the model flux on the observed
// samples by less than 1 % of the noise on average.
func TestFitModelMatchesSynthModel(t *testing.T) {
	b := demoBench(t)
	fm, err := b.FitModel()
	if err != nil {
		t.Fatal(err)
	}
	sm, _ := b.SynthModel()
	if fm == sm {
		t.Fatal("the fit model is the workbench's: R = 500 should give a coarser grid")
	}
	m := b.Data.StartModel(0)
	comp, _ := m.MassFractions.Mix()
	var ovs []*Overlay
	for _, mod := range []*synth.Model{sm, fm} {
		ov, err := fit.CompareModel(context.Background(), mod, comp, b.Data.Ejecta(m), synth.Settings{Workers: 2},
			b.Data.DistanceMpc*physics.Megaparsec, b.Observed[0], b.Data.ResolvingPower)
		if err != nil {
			t.Fatal(err)
		}
		ovs = append(ovs, ov)
	}
	a, c := ovs[0], ovs[1]
	t.Logf("χ²/N %.5f (workbench grid), %.5f (fit grid)", a.Reduced(), c.Reduced())
	if math.Abs(c.Reduced()/a.Reduced()-1) > 0.01 {
		t.Errorf("χ²/N %.5f on the fit grid, %.5f on the workbench's", c.Reduced(), a.Reduced())
	}
	obs := b.Observed[0]
	sum, n := 0.0, 0
	for i, w := range a.Wavelength {
		k, found := slices.BinarySearch(obs.Wavelength, w)
		if !found || obs.Uncertainty[k] <= 0 {
			continue
		}
		sum += math.Abs(a.Flux[i]-c.Flux[i]) / obs.Uncertainty[k]
		n++
	}
	if n < 500 || sum/float64(n) > 0.01 {
		t.Errorf("mean |difference| %.4g σ over %d samples, want < 0.01 σ", sum/float64(n), n)
	}
}

// TestFitKeepsInnerZone: a fit of a model with an inner zone frees the
// outer mix, keeps the inner zone in every best model (so "Use best" does
// not drop it) and says so in the warnings.
func TestFitKeepsInnerZone(t *testing.T) {
	if raceEnabled {
		t.Skip("some 100 syntheses: run without the race detector (make test does)")
	}
	demo := demoBench(t)
	d := *demo.Data
	d.ModelToUm = 0.7
	b, err := NewBench("zoned", &d, demo.Observed, demo.Store, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := d.StartModel(2)
	m.Preview = true
	if !m.HasZone() {
		t.Fatal("the demo's late epoch has no inner zone")
	}
	out, err := b.Fit(context.Background(), m, FitRequest{Free: []string{"Sr"}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	bm := out.Models[0]
	if bm.InnerMassFractions != m.InnerMassFractions || bm.ZoneBoundary != m.ZoneBoundary || bm.MassFractions == m.MassFractions {
		t.Errorf("best model %+v from %+v: want the zone kept and the outer mix fitted", bm, m)
	}
	if !strings.Contains(strings.Join(out.Best.Warnings, " "), "inner zone") {
		t.Errorf("warnings %q do not say the inner zone was held fixed", out.Best.Warnings)
	}
}
