package synth

import (
	"context"
	"math"
	"sort"
	"testing"

	"broadline/spectra"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
)

// The test envelope of REFERENCES.md ("Elementary photospheric P Cygni
// model"): τ = τ₀ (v/v_ph)^−5, v_ph = 0.2 c, v_max = 0.35 c.
const (
	testBph  = 0.2
	testBmax = 0.35
	testStep = 3e-4 // 90 km/s bins
)

// powerTau returns τ₀ (β/β_ph)^−5 at every node of env.
func powerTau(env Envelope, tau0 float64) []float64 {
	t := make([]float64, env.Nodes)
	for s := range t {
		t[s] = tau0 * math.Pow(env.Node(s)/env.BetaPh, -5)
	}
	return t
}

// lineSetup bins lines of the given rest wavelengths and τ₀ on a grid
// 6000–16000 Å.
func lineSetup(t *testing.T, nodes int, lines map[float64]float64) *Tau {
	t.Helper()
	return lineSetupRange(t, 6000, 16000, nodes, lines)
}

// lineSetupRange is lineSetup on a grid over [from, to] Å.
func lineSetupRange(t *testing.T, from, to float64, nodes int, lines map[float64]float64) *Tau {
	t.Helper()
	g, err := NewGrid(from, to, testStep)
	if err != nil {
		t.Fatal(err)
	}
	env := Envelope{BetaPh: testBph, BetaMax: testBmax, Nodes: nodes}
	tau, err := NewTau(g, env)
	if err != nil {
		t.Fatal(err)
	}
	for l, t0 := range lines {
		if !tau.AddLine(l, powerTau(env, t0)) {
			t.Fatalf("line %g outside grid", l)
		}
	}
	return tau
}

func profile(t *testing.T, tau *Tau, opt Options) []float64 {
	t.Helper()
	p, err := Profile(context.Background(), tau, 0, tau.Grid.N, opt, 2)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// onGrid returns the grid wavelength nearest to l, so that a line sits
// exactly on a bin centre.
func onGrid(g Grid, l float64) float64 { return g.Wavelength(g.Nearest(l)) }

// TestSingleLineGeometry checks the single-line properties derived in
// REFERENCES.md for the elementary model (Jeffery & Branch 1990; Kasen et al.
// 2002 §2): blue edge at λ₀(1 − v_max/c) (first-order Doppler), red edge of
// the emission with occultation at λ₀(1 + √(v_max² − v_ph²)/c), emission peak
// at λ₀, absorption minimum near λ₀(1 − v_ph/c) for a steep τ(v).
func TestSingleLineGeometry(t *testing.T) {
	t.Parallel()
	g, _ := NewGrid(6000, 16000, testStep)
	l0 := onGrid(g, 10000)
	tau := lineSetup(t, 0+40, map[float64]float64{l0: 5})
	p := profile(t, tau, Options{})
	w := tau.Grid.Wavelengths()
	tol := 2 * testStep // two bins in ln λ

	// Blue edge: the first point from the blue below 1 − 1e-6.
	blue := -1.0
	for i := range p {
		if p[i] < 1-1e-6 {
			blue = w[i]
			break
		}
	}
	if want := l0 * (1 - testBmax); math.Abs(math.Log(blue/want)) > tol {
		t.Errorf("blue edge %g Å, want λ₀(1 − v_max/c) = %g Å", blue, want)
	}
	// Red edge: the last point from the red above 1 + 1e-6.
	red := -1.0
	for i := len(p) - 1; i >= 0; i-- {
		if p[i] > 1+1e-6 {
			red = w[i]
			break
		}
	}
	if want := l0 * (1 + math.Sqrt(testBmax*testBmax-testBph*testBph)); math.Abs(math.Log(red/want)) > tol {
		t.Errorf("red edge %g Å, want λ₀(1 + √(v_max² − v_ph²)/c) = %g Å", red, want)
	}
	// Emission peak at the rest wavelength.
	imax, imin := 0, 0
	for i := range p {
		if p[i] > p[imax] {
			imax = i
		}
		if p[i] < p[imin] {
			imin = i
		}
	}
	if math.Abs(math.Log(w[imax]/l0)) > tol {
		t.Errorf("emission peak at %g Å, want λ₀ = %g Å", w[imax], l0)
	}
	// Absorption minimum near v_ph: for τ ∝ v^−5 the deepest absorption is
	// at a projected velocity somewhat above v_ph (common practice: within
	// ~10 % of v_ph).
	vmin := 1 - w[imin]/l0
	if vmin < testBph || vmin > 1.1*testBph {
		t.Errorf("absorption minimum at v = %.4f c, want in [v_ph, 1.1 v_ph] = [%.3f, %.3f]", vmin, testBph, 1.1*testBph)
	}
	if p[imax] <= 1.05 || p[imin] >= 0.9 {
		t.Errorf("τ₀ = 5 line has peak %g and minimum %g; want a clear P Cygni profile", p[imax], p[imin])
	}
}

// TestRelativisticBlueEdge checks the relativistic option: the blue edge
// moves to λ₀ √((1 − β)/(1 + β)) (REFERENCES.md: 0.734 λ₀ at 0.3 c, versus
// 0.700 λ₀ to first order).
func TestRelativisticBlueEdge(t *testing.T) {
	t.Parallel()
	g, _ := NewGrid(6000, 11000, testStep)
	l0 := onGrid(g, 10000)
	tau := lineSetupRange(t, 6000, 11000, 40, map[float64]float64{l0: 5})
	// In this mode the resonance position is solved at each ray's central
	// impact parameter, so the edge (reached only as p → 0) needs fine rays.
	p := profile(t, tau, Options{Doppler: Relativistic, CoreRays: 200})
	w := tau.Grid.Wavelengths()
	for i := range p {
		if p[i] < 1-1e-6 {
			want := l0 * math.Sqrt((1-testBmax)/(1+testBmax))
			if math.Abs(math.Log(w[i]/want)) > 2*testStep {
				t.Errorf("relativistic blue edge %g Å, want %g Å", w[i], want)
			}
			return
		}
	}
	t.Fatal("no absorption")
}

// equivalentWidth returns ∫ (1 − F/F_c) dλ in Å on a logarithmic grid
// (dλ = λ · step).
func equivalentWidth(g Grid, p []float64) float64 {
	ew := 0.0
	for i, v := range p {
		ew += (1 - v) * g.Wavelength(i) * g.Step
	}
	return ew
}

// absorbedWidth returns ∫ max(0, 1 − F/F_c) dλ, the scale for relative checks.
func absorbedWidth(g Grid, p []float64) float64 {
	ew := 0.0
	for i, v := range p {
		ew += max(0, 1-v) * g.Wavelength(i) * g.Step
	}
	return ew
}

// TestEquivalentWidth checks photon conservation. Derivation (ours, first
// order in v/c): ∫dλ ∫2πp dp ΔI = λ₀ ∫dV (1 − e^{−τ}) I_ph [W(r) − 1_cap], and
// the fraction of a shell of radius r in front of the photosphere's disc is
// exactly W(r); so without occultation the net equivalent width of a pure
// scattering line is zero. With occultation the back hemisphere's emission is
// lost and the net equivalent width is positive.
func TestEquivalentWidth(t *testing.T) {
	t.Parallel()
	g, _ := NewGrid(6000, 16000, testStep)
	l0 := onGrid(g, 10000)
	taus := []float64{0.1, 1, 5, 50}
	if raceEnabled {
		taus = taus[2:3]
	}
	for _, tau0 := range taus {
		tau := lineSetup(t, 40, map[float64]float64{l0: tau0})
		open := profile(t, tau, Options{NoOccultation: true})
		occ := profile(t, tau, Options{})
		scale := absorbedWidth(g, open)
		net := equivalentWidth(g, open)
		if math.Abs(net) > 0.005*scale {
			t.Errorf("τ₀ = %g, no occultation: net EW %g Å, want 0 (absorbed %g Å)", tau0, net, scale)
		}
		if ew := equivalentWidth(g, occ); ew < 0.05*scale {
			t.Errorf("τ₀ = %g, occultation: net EW %g Å, want clearly positive (absorbed %g Å)", tau0, ew, scale)
		}
	}
}

// TestThinLimit checks that in the optically thin limit 1 − e^{−τ} ≈ τ, so
// the absorption depth scales linearly with τ (first-order expansion).
func TestThinLimit(t *testing.T) {
	t.Parallel()
	g, _ := NewGrid(6000, 16000, testStep)
	l0 := onGrid(g, 10000)
	depth := func(tau0 float64) float64 {
		p := profile(t, lineSetup(t, 40, map[float64]float64{l0: tau0}), Options{})
		d := 0.0
		for _, v := range p {
			d = max(d, 1-v)
		}
		return d
	}
	d1, d2 := depth(1e-4), depth(2e-4)
	if !scalar.EqualWithinRel(d2/d1, 2, 1e-3) {
		t.Errorf("thin-limit depth ratio %g for τ doubled, want 2", d2/d1)
	}
	// And it is not linear when thick (the check can fail).
	if r := depth(10) / depth(5); r > 1.5 {
		t.Errorf("thick depth ratio %g, want saturation", r)
	}
}

// TestNoLines checks that with no lines the emergent flux is the bare
// photosphere's, π B_λ(T), and that B_λ matches REFERENCES.md [calc]:
// B_λ(1 µm, 5000 K) = 7.102e13 erg s⁻¹ cm⁻² cm⁻¹ sr⁻¹.
func TestNoLines(t *testing.T) {
	t.Parallel()
	tau := lineSetup(t, 20, nil)
	for _, opt := range []Options{{}, {NoOccultation: true}, {Doppler: Relativistic}} {
		p := profile(t, tau, opt)
		for i, v := range p {
			if !scalar.EqualWithinAbs(v, 1, 1e-13) {
				t.Fatalf("%+v: F/F_c = %v at point %d, want 1", opt, v, i)
			}
		}
	}
	pa, err := AbsorptionProfile(context.Background(), tau, 0, tau.Grid.N, Options{}, 1)
	if err != nil {
		t.Fatal(err)
	}
	for _, v := range pa {
		if !scalar.EqualWithinAbs(v, 1, 1e-13) {
			t.Fatalf("absorption-only F/F_c = %v, want 1", v)
		}
	}
	if b := spectra.PlanckLambda(10000, 5000); !scalar.EqualWithinRel(b, 7.102e13, 1e-3) {
		t.Errorf("B_λ(1 µm, 5000 K) = %g per cm, want 7.102e13", b)
	}
}

// TestSeparatedLines checks that two lines further apart than their
// profiles' widths give the sum of their single-line profiles (each line
// only changes F/F_c within λ₀(1 ± v_max/c)).
func TestSeparatedLines(t *testing.T) {
	t.Parallel()
	g, _ := NewGrid(6000, 16000, testStep)
	l1, l2 := onGrid(g, 7000), onGrid(g, 13000)
	p1 := profile(t, lineSetup(t, 40, map[float64]float64{l1: 3}), Options{})
	p2 := profile(t, lineSetup(t, 40, map[float64]float64{l2: 0.5}), Options{})
	pb := profile(t, lineSetup(t, 40, map[float64]float64{l1: 3, l2: 0.5}), Options{})
	for i := range pb {
		if want := p1[i] + p2[i] - 1; !scalar.EqualWithinAbs(pb[i], want, 1e-12) {
			t.Fatalf("point %d: %g, want sum of profiles %g", i, pb[i], want)
		}
	}
}

// directProfile is an independent check of the binned integral: at observed
// wavelength l it integrates over impact parameter with Gauss–Legendre
// quadrature, finding each line's resonance plane z = 1 − λ/λ_l exactly,
// τ(r) from the analytic power law, and applying the lines in order of
// increasing rest wavelength (REFERENCES.md, "Overlapping lines").
func directProfile(l float64, lines map[float64]float64, occult bool) float64 {
	rest := make([]float64, 0, len(lines))
	for r := range lines {
		rest = append(rest, r)
	}
	sort.Float64s(rest)
	intensity := func(b float64) float64 {
		core := b < testBph
		zph := 0.0
		if core {
			zph = math.Sqrt(testBph*testBph - b*b)
		}
		I := 0.0
		crossed := !core
		for _, r0 := range rest {
			z := 1 - l/r0
			if core && !crossed && z >= zph {
				I++
				crossed = true
			}
			rad := math.Hypot(b, z)
			if rad < testBph || rad > testBmax {
				continue
			}
			if core && z < 0 && occult {
				continue
			}
			tau := lines[r0] * math.Pow(rad/testBph, -5)
			I += (dilution(testBph, rad) - I) * -math.Expm1(-tau)
		}
		if core && !crossed {
			I++
		}
		return I
	}
	f := func(b float64) float64 { return 2 * b * intensity(b) / (testBph * testBph) }
	return quad.Fixed(f, 0, testBph, 400, nil, 0) + quad.Fixed(f, testBph, testBmax, 400, nil, 0)
}

// TestOverlappingLines checks the sequential interaction of two overlapping
// lines against the independent direct integration, and that the result is
// not the sum of the single profiles: the redder line, met later along each
// ray, absorbs part of the bluer line's emission.
func TestOverlappingLines(t *testing.T) {
	t.Parallel()
	g, _ := NewGrid(6000, 16000, testStep)
	lb, lr := onGrid(g, 10000), onGrid(g, 11500)
	lines := map[float64]float64{lb: 3, lr: 3}
	pb := profile(t, lineSetup(t, 40, map[float64]float64{lb: 3}), Options{})
	pr := profile(t, lineSetup(t, 40, map[float64]float64{lr: 3}), Options{})
	both := profile(t, lineSetup(t, 40, lines), Options{})
	// At the bluer line's rest wavelength the redder line absorbs at
	// v = c(1 − λ_b/λ_r) = 0.13 c, in front of the photosphere.
	i := g.Nearest(lb)
	sum := pb[i] + pr[i] - 1
	if !(both[i] < sum-0.02) {
		t.Errorf("at λ_b: sequential %g, sum of profiles %g; want the red line to absorb the blue emission", both[i], sum)
	}
	for _, l := range []float64{0.93 * lb, 0.97 * lb, lb * 1.02, 0.9 * lr, 0.95 * lr, lr, 1.05 * lr} {
		i := g.Nearest(l)
		want := directProfile(g.Wavelength(i), lines, true)
		if !scalar.EqualWithinAbs(both[i], want, 0.01) {
			t.Errorf("λ = %.1f Å: binned %g, direct %g", g.Wavelength(i), both[i], want)
		}
	}
}

// TestConvergence states the defaults: doubling the rays and the velocity
// nodes changes F/F_c by less than 0.5 % anywhere, for a spectrum of many
// overlapping lines of mixed strength.
func TestConvergence(t *testing.T) {
	t.Parallel()
	lines := map[float64]float64{}
	for i := range 60 {
		l := 7000 + 130*float64(i) + 37*math.Sin(float64(i))
		lines[l] = math.Pow(10, 1.5*math.Sin(1.7*float64(i)))
	}
	base := profile(t, lineSetup(t, DefaultNodes, lines), Options{})
	fine := profile(t, lineSetup(t, 2*DefaultNodes, lines),
		Options{CoreRays: 2 * DefaultCoreRays, EnvelopeRays: 2 * DefaultEnvelopeRays})
	worst := 0.0
	for i := range base {
		worst = max(worst, math.Abs(base[i]-fine[i])/fine[i])
	}
	if worst > 0.005 {
		t.Errorf("largest relative change on doubling resolution %.4f, want < 0.005", worst)
	}
	t.Logf("largest relative change on doubling rays and nodes: %.5f", worst)
}

// TestWorkersDeterministic checks that the result does not depend on the
// number of workers.
func TestWorkersDeterministic(t *testing.T) {
	t.Parallel()
	g, _ := NewGrid(6000, 16000, testStep)
	tau := lineSetup(t, 20, map[float64]float64{onGrid(g, 9000): 2, onGrid(g, 9300): 1})
	p1, err := Profile(context.Background(), tau, 0, tau.Grid.N, Options{}, 0)
	if err != nil {
		t.Fatal(err)
	}
	p3, err := Profile(context.Background(), tau, 0, tau.Grid.N, Options{}, 3)
	if err != nil {
		t.Fatal(err)
	}
	for i := range p1 {
		if p1[i] != p3[i] {
			t.Fatalf("point %d differs: %v vs %v", i, p1[i], p3[i])
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Profile(ctx, tau, 0, tau.Grid.N, Options{}, 2); err == nil {
		t.Error("cancelled context: no error")
	}
}

// TestGrouping checks that applying the resonance points in runs (prefix
// sums of τ, one source function per run) agrees with applying every point on
// its own, for the full integral and the preview, to 0.2 % of the continuum.
func TestGrouping(t *testing.T) {
	t.Parallel()
	lines := map[float64]float64{}
	for i := range 60 {
		l := 7000 + 130*float64(i) + 37*math.Sin(float64(i))
		lines[l] = math.Pow(10, 1.5*math.Sin(1.7*float64(i)))
	}
	tau := lineSetup(t, DefaultNodes, lines)
	opts := []Options{{}, {NoOccultation: true}}
	if raceEnabled {
		opts = opts[:1]
	}
	for _, preview := range []bool{false, true} {
		for _, opt := range opts {
			run := Profile
			if preview {
				run = AbsorptionProfile
			}
			fast, err := run(context.Background(), tau, 0, tau.Grid.N, opt, 2)
			if err != nil {
				t.Fatal(err)
			}
			opt.pointwise = true
			ref, err := run(context.Background(), tau, 0, tau.Grid.N, opt, 2)
			if err != nil {
				t.Fatal(err)
			}
			worst, rel := 0.0, 0.0
			for i := range ref {
				worst = max(worst, math.Abs(fast[i]-ref[i]))
				rel = max(rel, math.Abs(fast[i]-ref[i])/ref[i])
			}
			if worst > 0.002 {
				t.Errorf("preview=%v %+v: runs differ from point by point by %.4f of the continuum", preview, opt, worst)
			}
			t.Logf("preview=%v occultation=%v: largest difference %.5f of the continuum, %.5f relative", preview, !opt.NoOccultation, worst, rel)
		}
	}
}

// TestSingleLineDirect compares a whole single-line profile, with and
// without occultation, with the independent direct integration (exact
// resonance planes, analytic τ(r), Gauss–Legendre in p).
func TestSingleLineDirect(t *testing.T) {
	t.Parallel()
	g, _ := NewGrid(6000, 16000, testStep)
	l0 := onGrid(g, 10000)
	lines := map[float64]float64{l0: 2}
	tau := lineSetup(t, DefaultNodes, lines)
	for _, occult := range []bool{true, false} {
		p := profile(t, tau, Options{NoOccultation: !occult})
		worst := 0.0
		for l := 0.64 * l0; l < 1.34*l0; l *= 1.01 {
			i := g.Nearest(l)
			d := directProfile(g.Wavelength(i), lines, occult)
			worst = max(worst, math.Abs(p[i]-d))
		}
		// Near the edges the direct integration itself converges slowly
		// (its integrand jumps); 1 % of the continuum bounds both.
		if worst > 0.01 {
			t.Errorf("occultation=%v: largest difference from the direct integration %.4f of the continuum", occult, worst)
		}
		t.Logf("occultation=%v: largest difference from the direct integration %.5f", occult, worst)
	}
}
