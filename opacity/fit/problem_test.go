package fit

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"math"
	"strings"
	"sync"
	"testing"

	"broadline/opacity"
	"broadline/opacity/synth"
	"broadline/spectra"
)

var (
	smallOnce  sync.Once
	smallModel *synth.Model
	smallErr   error
)

// testModel returns the small model shared by the tests: 600 lines over
// 7600–11700 Å on a grid of 1/1000 in ln λ (300 km/s).
func testModel(t testing.TB) *synth.Model {
	t.Helper()
	smallOnce.Do(func() { smallModel, smallErr = synth.NewModel(smallStore(t, 600), 7600, 11700, 1.0/1000) })
	if smallErr != nil {
		t.Fatal(smallErr)
	}
	return smallModel
}

// truthComp is the injected composition (invented): Sr 0.3 %, Ca 0.1 %,
// no Nd, and Kr, which has no lines, for the rest.
const truthComp = "Ca=0.001,Sr=0.003,Kr=0.996"

// baseComp is the composition the fits start from: a wrong Sr fraction.
func baseComp(t testing.TB) opacity.Composition {
	c, err := opacity.ParseComposition("Ca=0.001,Sr=0.0005,Kr=0.9985")
	if err != nil {
		t.Fatal(err)
	}
	return c
}

func zOf(t testing.TB, sym string) int {
	c, err := opacity.ParseComposition(sym + "=1")
	if err != nil {
		t.Fatal(err)
	}
	return c.Z[0]
}

// TestProblemErrors: bad inputs give errors wrapping ErrProblem that say
// what is wrong.
func TestProblemErrors(t *testing.T) {
	t.Parallel()
	m := testModel(t)
	inj := makeInjection(t, m, truthComp, []synth.Ejecta{testEjecta(2, 0.18, 4800)}, 30, 1)
	good := func() *Problem {
		return &Problem{Model: m, Composition: baseComp(t), Free: []FreeElement{{Z: zOf(t, "Sr")}},
			Epochs: []Epoch{inj.epochs[0]}, Settings: testSettings}
	}
	if _, err := good().Parameters(); err != nil {
		t.Fatalf("good problem refused: %v", err)
	}
	nan := good()
	nan.Epochs = []Epoch{inj.epochs[0]}
	obs := inj.epochs[0].Observed.Clone()
	obs.Flux[10] = math.NaN()
	obs.Mask = nil
	nan.Epochs[0].Observed = obs
	masked := good()
	obs2 := obs.Clone()
	obs2.SetMask(10, spectra.MaskInvalid)
	masked.Epochs = []Epoch{{Observed: obs2, ResolvingPower: 800, DistanceCm: testDistance, Ejecta: inj.truth[0]}}
	if _, err := masked.Parameters(); err != nil {
		t.Errorf("a masked NaN sample was refused: %v", err)
	}
	for _, c := range []struct {
		name, want string
		mod        func(p *Problem)
	}{
		{"no free parameter", "no free parameter", func(p *Problem) { p.Free = nil }},
		{"lower ≥ upper", "bounds", func(p *Problem) { p.Free[0].Lower, p.Free[0].Upper = 0.1, 0.01 }},
		{"NaN bound", "bounds", func(p *Problem) { p.Free[0].Lower = math.NaN() }},
		{"unknown element", "free element 1", func(p *Problem) { p.Free[0].Z = 200 }},
		{"freed twice", "twice", func(p *Problem) { p.Free = append(p.Free, p.Free[0]) }},
		{"no epochs", "no epochs", func(p *Problem) { p.Epochs = nil }},
		{"no spectrum", "no observed spectrum", func(p *Problem) { p.Epochs[0].Observed = nil }},
		{"NaN flux", "not masked", func(p *Problem) { *p = *nan }},
		{"NaN distance", "distance", func(p *Problem) { p.Epochs[0].DistanceCm = math.NaN() }},
		{"no uncertainties", "uncertainties", func(p *Problem) {
			o := p.Epochs[0].Observed.Clone()
			o.Uncertainty = nil
			p.Epochs[0].Observed = o
		}},
		{"all free", "fixed", func(p *Problem) {
			p.Free = []FreeElement{{Z: zOf(t, "Ca")}, {Z: zOf(t, "Sr")}, {Z: zOf(t, "Kr")}}
		}},
		{"velocity bounds", "velocity bounds", func(p *Problem) {
			p.FitVelocity = true
			p.Epochs[0].Velocity = Bounds{0.2, 0.5}
		}},
		{"temperature bounds", "temperature bounds", func(p *Problem) {
			p.FitTemperature = true
			p.Epochs[0].Temperature = Bounds{5000, 4000}
		}},
		{"correction order", "order", func(p *Problem) { p.CorrectionOrder = 4 }},
		{"correction with fixed scale", "free scale", func(p *Problem) { p.Scale, p.CorrectionOrder = ScaleFixed, 1 }},
		{"no model", "model", func(p *Problem) { p.Model = nil }},
	} {
		p := good()
		p.Epochs = append([]Epoch(nil), p.Epochs...)
		c.mod(p)
		_, err := p.Fit(context.Background(), nil)
		if !errors.Is(err, ErrProblem) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one wrapping ErrProblem that mentions %q", c.name, err, c.want)
		}
		if _, err := p.Sample(context.Background(), SampleOptions{Steps: 10}, nil); !errors.Is(err, ErrProblem) {
			t.Errorf("%s: sampler error %v", c.name, err)
		}
	}
	for _, o := range []SampleOptions{{Walkers: 3}, {Walkers: 7}, {Steps: -5}, {Spread: math.NaN()}, {Stretch: 0.5},
		{Walkers: 1000, Steps: 1_000_000}, {Start: []float64{1, 2}}, {Start: []float64{3}}} {
		if _, err := good().Sample(context.Background(), o, nil); !errors.Is(err, ErrProblem) {
			t.Errorf("options %+v: %v", o, err)
		}
	}
}

// TestCompositionNormalisation: the free element's parameter is its mass
// fraction; the fixed elements keep their ratio and fill the rest.
func TestCompositionNormalisation(t *testing.T) {
	t.Parallel()
	m := testModel(t)
	inj := makeInjection(t, m, truthComp, []synth.Ejecta{testEjecta(2, 0.18, 4800)}, 30, 1)
	base, _ := opacity.ParseComposition("Ca=1,Kr=3")
	p := &Problem{Model: m, Composition: base, Free: []FreeElement{{Z: zOf(t, "Sr")}, {Z: zOf(t, "Nd")}},
		Epochs: inj.epochs, Settings: testSettings}
	c, err := p.compile()
	if err != nil {
		t.Fatal(err)
	}
	comp, err := c.composition([]float64{math.Log10(0.2), math.Log10(0.3)})
	if err != nil {
		t.Fatal(err)
	}
	// Worked by hand: Sr 0.2, Nd 0.3, the rest 0.5 split 1 : 3.
	want := map[string]float64{"Sr": 0.2, "Nd": 0.3, "Ca": 0.125, "Kr": 0.375}
	for sym, x := range want {
		if got := comp.Fraction(zOf(t, sym)); math.Abs(got-x) > 1e-12 {
			t.Errorf("%s: %v, want %v", sym, got, x)
		}
	}
	if _, err := c.composition([]float64{math.Log10(0.6), math.Log10(0.5)}); !errors.Is(err, errOutside) {
		t.Errorf("free fractions summing to 1.1 accepted: %v", err)
	}
}

// TestFitRecovers fits Sr and Nd fractions, v_ph and T_ph of one invented
// epoch (full formal integral, free scale with a first-order correction)
// from a wrong start. The model that made the data is the model fitted, so
// the least χ² must not exceed the χ² at the truth, χ²/N must be near 1
// (within 5 √(2/N), the χ² distribution's spread), and the parameters must
// come within a few times their statistical widths: 0.01 c and 300 K, and
// 0.35 dex in Sr, which is degenerate with T_ph here — measured: along the
// valley from log X = −2.69, T = 5175 K to −2.81, 5195 K χ² changes by
// 0.08, far less than the Δχ² = 1 of one standard deviation.
func TestFitRecovers(t *testing.T) {
	t.Parallel()
	if raceEnabled {
		t.Skip("slow under the race detector")
	}
	m := testModel(t)
	truth := testEjecta(2.5, 0.19, 5200)
	inj := makeInjection(t, m, truthComp, []synth.Ejecta{truth}, 30, 2)
	ep := inj.epochs[0]
	ep.Ejecta.BetaPh, ep.Ejecta.Temperature = 0.16, 4600 // a wrong start
	p := &Problem{Model: m, Composition: baseComp(t), Free: []FreeElement{{Z: zOf(t, "Sr")}, {Z: zOf(t, "Nd")}},
		FitVelocity: true, FitTemperature: true, Epochs: []Epoch{ep}, CorrectionOrder: 1, Settings: testSettings}
	calls, lastTotal := 0, 0
	res, err := p.Fit(context.Background(), func(done, total int) { calls++; lastTotal = total })
	if err != nil {
		t.Fatal(err)
	}
	at, err := p.Evaluate(context.Background(), []float64{math.Log10(0.003), -6, 0.19, 5200})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("best %v χ²/N %.4f (truth %.4f), %d evaluations, %s; epochs %+v", res.Best, res.Chi2N, at.Chi2N, res.Evaluations, res.Status, res.Epochs)
	if res.Chi2 > at.Chi2+1e-6*at.Chi2 {
		t.Errorf("least χ² %.3f above the χ² at the truth %.3f", res.Chi2, at.Chi2)
	}
	if tol := 5 * math.Sqrt(2/float64(res.N)); math.Abs(res.Chi2N-1) > tol {
		t.Errorf("χ²/N = %.4f, want 1 ± %.3f", res.Chi2N, tol)
	}
	if d := math.Abs(res.Best[0] - math.Log10(0.003)); d > 0.35 {
		t.Errorf("log X(Sr) = %.3f, truth %.3f", res.Best[0], math.Log10(0.003))
	}
	if math.Abs(res.Best[2]-0.19) > 0.01 || math.Abs(res.Best[3]-5200) > 300 {
		t.Errorf("v_ph %.4f c, T_ph %.0f K; truth 0.19 c, 5200 K", res.Best[2], res.Best[3])
	}
	if math.Abs(res.Epochs[0].FluxScale-1) > 0.05 {
		t.Errorf("flux scale %.4f, want ≈ 1 (the data are at the model's distance)", res.Epochs[0].FluxScale)
	}
	if calls != res.Evaluations+1 || lastTotal != p.maxEvaluations(4) {
		t.Errorf("progress called %d times for %d evaluations, total %d", calls, res.Evaluations, lastTotal)
	}
	if res.Scale != "free" || res.CorrectionOrder != 1 || len(res.Overlays) != 1 || len(res.Overlays[0].Flux) != len(res.Overlays[0].Wavelength) {
		t.Errorf("result states scale %q, order %d, %d overlays", res.Scale, res.CorrectionOrder, len(res.Overlays))
	}
	if _, err := json.Marshal(res); err != nil {
		t.Error(err)
	}
	// A cancelled context stops the fit with context.Canceled.
	ctx, cancel := context.WithCancel(context.Background())
	n := 0
	_, err = p.Fit(ctx, func(done, total int) {
		if n++; n == 5 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled fit: %v", err)
	}
}

// TestInjectionRecovery samples the posterior of the Sr and Nd fractions
// and v_ph of one invented epoch (absorption-only preview, for speed; free
// scale): the true Sr fraction and velocity lie in the 95 % intervals, Nd,
// absent from the injected model, gets an upper limit, and that limit
// excludes 1e-3 (a fraction whose lines would be plain in the data:
// it changes F/F_c by several per cent at S/N 30).
func TestInjectionRecovery(t *testing.T) {
	t.Parallel()
	if raceEnabled {
		t.Skip("slow under the race detector")
	}
	m := testModel(t)
	set := testSettings
	set.Preview = true
	truth := testEjecta(2, 0.18, 4800)
	inj := makeInjection(t, m, truthComp, []synth.Ejecta{truth}, 30, 3, set)
	p := &Problem{Model: m, Composition: baseComp(t), Free: []FreeElement{{Z: zOf(t, "Sr")}, {Z: zOf(t, "Nd")}},
		FitVelocity: true, Epochs: inj.epochs, Settings: set}
	fr, err := p.Fit(context.Background(), nil)
	if err != nil {
		t.Fatal(err)
	}
	post, err := p.Sample(context.Background(), SampleOptions{Walkers: 8, Steps: 250, Burn: 50, Seed: 5, Start: fr.Best, Spread: 0.002}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range post.Summaries {
		t.Logf("%s: %.4g [%.4g, %.4g] 95 %% [%.4g, %.4g], UL %.3g (%v), τ %.1f, R̂ %.3f", s.Name, s.Median, s.Lower68, s.Upper68,
			s.Lower95, s.Upper95, s.UpperLimit95, s.IsUpperLimit, s.AutocorrelationTime, s.SplitRHat)
	}
	t.Logf("acceptance %.2f, warnings %q", post.AcceptanceFraction, post.Warnings)
	sr, nd, v := post.Summaries[0], post.Summaries[1], post.Summaries[2]
	if !(sr.Lower95 <= 0.003 && 0.003 <= sr.Upper95) || sr.IsUpperLimit {
		t.Errorf("Sr: 95 %% interval %.4g–%.4g misses the truth 0.003 (upper limit %v)", sr.Lower95, sr.Upper95, sr.IsUpperLimit)
	}
	if !(v.Lower95 <= 0.18 && 0.18 <= v.Upper95) {
		t.Errorf("v_ph: 95 %% interval %.4f–%.4f misses the truth 0.18", v.Lower95, v.Upper95)
	}
	if !nd.IsUpperLimit || !(nd.UpperLimit95 < 1e-3) {
		t.Errorf("Nd: upper limit %v at %.3g, want an upper limit below 1e-3", nd.IsUpperLimit, nd.UpperLimit95)
	}
	if post.MaxPosterior == nil || len(post.MaxPosterior.Epochs) != 1 || !(post.AcceptanceFraction > 0) {
		t.Errorf("posterior without its evaluation or acceptance: %+v", post)
	}
	var buf bytes.Buffer
	if err := post.WriteSamplesCSV(&buf); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 1+8*250 || strings.Join(rows[0], ",") != "step,walker,log10_X_Sr,log10_X_Nd,v_ph_c_1,log_posterior" {
		t.Errorf("CSV: %d rows, header %q", len(rows), rows[0])
	}
	if _, err := json.Marshal(post); err != nil {
		t.Error(err)
	}
}

// TestJointBeatsSingle: two invented epochs share one composition; the
// joint posterior of the Sr fraction is narrower (68 % interval in
// log₁₀ X) than that of either epoch alone, and contains the truth.
func TestJointBeatsSingle(t *testing.T) {
	t.Parallel()
	if raceEnabled {
		t.Skip("slow under the race detector")
	}
	m := testModel(t)
	set := testSettings
	set.Preview = true
	ejs := []synth.Ejecta{testEjecta(2, 0.19, 4700), testEjecta(3, 0.17, 4400)}
	inj := makeInjection(t, m, truthComp, ejs, 25, 4, set)
	width := func(epochs []Epoch) (float64, Summary) {
		p := &Problem{Model: m, Composition: baseComp(t), Free: []FreeElement{{Z: zOf(t, "Sr"), Lower: 1e-5, Upper: 0.1}},
			Epochs: epochs, Settings: set}
		post, err := p.Sample(context.Background(), SampleOptions{Walkers: 6, Steps: 120, Burn: 30, Seed: 6,
			Start: []float64{math.Log10(0.003)}, Spread: 0.002}, nil)
		if err != nil {
			t.Fatal(err)
		}
		s := post.Summaries[0]
		return math.Log10(s.Upper68) - math.Log10(s.Lower68), s
	}
	joint, js := width(inj.epochs)
	one, _ := width(inj.epochs[:1])
	two, _ := width(inj.epochs[1:])
	t.Logf("68 %% widths in dex: joint %.4f, epoch 1 %.4f, epoch 2 %.4f", joint, one, two)
	if !(joint < one && joint < two) {
		t.Errorf("joint width %.4f dex not below the single epochs' %.4f and %.4f", joint, one, two)
	}
	if !(js.Lower95 <= 0.003 && 0.003 <= js.Upper95) {
		t.Errorf("joint 95 %% interval %.4g–%.4g misses the truth 0.003", js.Lower95, js.Upper95)
	}
}

// TestSampleDeterministic: the same seed gives the same samples bit for
// bit with 1 and 2 workers, through the whole problem.
func TestSampleDeterministic(t *testing.T) {
	t.Parallel()
	m := testModel(t)
	set := testSettings
	set.Preview = true
	inj := makeInjection(t, m, truthComp, []synth.Ejecta{testEjecta(2, 0.18, 4800)}, 30, 7, set)
	p := &Problem{Model: m, Composition: baseComp(t), Free: []FreeElement{{Z: zOf(t, "Sr")}}, FitTemperature: true,
		Epochs: inj.epochs, Settings: set}
	steps := 12
	if raceEnabled {
		steps = 4
	}
	run := func(workers int) *Posterior {
		post, err := p.Sample(context.Background(), SampleOptions{Walkers: 6, Steps: steps, Burn: 2, Seed: 11, Workers: workers}, nil)
		if err != nil {
			t.Fatal(err)
		}
		return post
	}
	a, b := run(1), run(2)
	for i := range a.Samples {
		for d := range a.Samples[i] {
			if math.Float64bits(a.Samples[i][d]) != math.Float64bits(b.Samples[i][d]) {
				t.Fatalf("sample %d differs between 1 and 2 workers", i)
			}
		}
		if math.Float64bits(a.LogPosterior[i]) != math.Float64bits(b.LogPosterior[i]) {
			t.Fatalf("log posterior %d differs", i)
		}
	}
	// A short chain is flagged.
	if !strings.Contains(strings.Join(a.Warnings, " "), "autocorrelation times") {
		t.Errorf("no warning for a chain of %d steps: %q", steps, a.Warnings)
	}
}
