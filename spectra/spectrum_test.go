package spectra

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/physics"
)

func TestNewReversesAndMasksInvalid(t *testing.T) {
	w := []float64{3, 2, 1}
	f := []float64{30, math.NaN(), 10}
	u := []float64{1, 1, -1}
	s, err := New(w, f, u, Metadata{})
	if err != nil {
		t.Fatal(err)
	}
	if s.Wavelength[0] != 1 || s.Flux[0] != 10 || s.Uncertainty[0] != -1 {
		t.Errorf("not reversed: %v %v %v", s.Wavelength, s.Flux, s.Uncertainty)
	}
	// Sample 0 (negative σ) and 1 (NaN flux) are masked but kept.
	if s.Len() != 3 || !s.Masked(0) || !s.Masked(1) || s.Masked(2) {
		t.Errorf("mask %v, want [invalid invalid 0] and 3 samples", s.Mask)
	}
	if got := s.Mask[1].String(); got != "invalid" {
		t.Errorf("reason %q", got)
	}
	if _, err := New([]float64{1, 3, 2}, []float64{1, 1, 1}, nil, Metadata{}); err == nil {
		t.Error("non-monotonic wavelengths accepted")
	}
	if _, err := New([]float64{1, 2}, []float64{1}, nil, Metadata{}); err == nil {
		t.Error("length mismatch accepted")
	}
}

func TestMaskReasonString(t *testing.T) {
	if got := (MaskTelluric | MaskInvalid).String(); got != "invalid+telluric" {
		t.Errorf("got %q", got)
	}
}

func TestTelluricMaskKeepsSamples(t *testing.T) {
	w := LinearGrid(9000, 12000, 3001) // 1 Å steps
	s, err := New(w, make([]float64, len(w)), nil, Metadata{})
	if err != nil {
		t.Fatal(err)
	}
	n := s.MaskTelluric()
	// 9300–9700 and 11100–11600 Å inclusive at 1 Å spacing: 401 + 501.
	if n != 902 || s.Len() != 3001 || s.CountMasked(MaskTelluric) != 902 {
		t.Errorf("masked %d (count %d) of %d", n, s.CountMasked(MaskTelluric), s.Len())
	}
	if s.MaskTelluric() != 0 {
		t.Error("second call flagged samples again")
	}
}

// TestPlanck checks B_λ against REFERENCES.md [calc]: B_λ(1 µm, 5000 K) =
// 7.102e13 erg s⁻¹ cm⁻² cm⁻¹ sr⁻¹, and λ_max(5000 K) = 0.5796 µm (Wien's
// b = 0.2897771955 cm K, CODATA 2018).
func TestPlanck(t *testing.T) {
	if got := PlanckLambda(1e4, 5000); !scalar.EqualWithinRel(got, 7.102e13, 1e-3) {
		t.Errorf("B_λ(1 µm, 5000 K) = %g, want 7.102e13", got)
	}
	if got := WienPeak(5000); !scalar.EqualWithinRel(got, 0.2897771955/5000/physics.Angstrom, 1e-9) {
		t.Errorf("Wien peak %g Å", got)
	}
	// The peak is a maximum of PlanckLambda.
	p := WienPeak(5000)
	if !(PlanckLambda(p, 5000) > PlanckLambda(p*1.001, 5000) && PlanckLambda(p, 5000) > PlanckLambda(p*0.999, 5000)) {
		t.Error("WienPeak is not the maximum of B_λ")
	}
	// B_ν dν = B_λ dλ: B_ν = B_λ λ²/c.
	lcm := 1e4 * physics.Angstrom
	nu := physics.SpeedOfLight / lcm
	if got, want := PlanckNu(nu, 5000), PlanckLambda(1e4, 5000)*lcm*lcm/physics.SpeedOfLight; !scalar.EqualWithinRel(got, want, 1e-12) {
		t.Errorf("B_ν = %g, want %g", got, want)
	}
	// ∫ π B_λ dλ = σT⁴ (Stefan–Boltzmann), by the trapezoid rule on a log grid.
	g := LogGrid(100, 1e7, 200000)
	var sum float64
	for i := 1; i < len(g); i++ {
		sum += 0.5 * (PlanckLambda(g[i], 5000) + PlanckLambda(g[i-1], 5000)) * (g[i] - g[i-1]) * physics.Angstrom
	}
	if want := physics.StefanBoltzmann * math.Pow(5000, 4) / math.Pi; !scalar.EqualWithinRel(sum, want, 1e-4) {
		t.Errorf("∫B_λ dλ = %g, want σT⁴/π = %g", sum, want)
	}
}

func TestResampleConservesFlux(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	w := make([]float64, 500)
	f := make([]float64, 500)
	x := 4000.0
	for i := range w {
		x += 0.5 + rng.Float64()
		w[i] = x
		f[i] = 1 + rng.Float64()
	}
	inE := binEdges(nil, w)
	// Output grid strictly inside the input's bins, coarse and uneven.
	grid := LogGrid(inE[0]+3, inE[len(inE)-1]-3, 97)
	outE := binEdges(nil, grid)
	out := ResampleFlux(nil, grid, w, f)
	// Integral of the input step function over [outE[0], outE[n]].
	var want float64
	for j := range w {
		lo, hi := math.Max(inE[j], outE[0]), math.Min(inE[j+1], outE[len(outE)-1])
		if hi > lo {
			want += f[j] * (hi - lo)
		}
	}
	var got float64
	for i := range grid {
		got += out[i] * (outE[i+1] - outE[i])
	}
	if !scalar.EqualWithinRel(got, want, 1e-12) {
		t.Errorf("flux integral %v, want %v", got, want)
	}
	// A constant stays constant.
	c := ResampleFlux(nil, grid, w, ones(len(w)))
	for i, v := range c {
		if !scalar.EqualWithinAbs(v, 1, 1e-12) {
			t.Fatalf("constant resampled to %v at %d", v, i)
		}
	}
}

func TestResampleSpectrumMasksAndErrors(t *testing.T) {
	w := LinearGrid(1000, 1099, 100)
	f := ones(100)
	u := make([]float64, 100)
	for i := range u {
		u[i] = 0.1
	}
	s, _ := New(w, f, u, Metadata{})
	s.MaskRange(1043, 1054, MaskTelluric)
	s.Flux[50] = 1e6 // masked, must not leak
	// 10 Å bins matching input bins exactly; the first lies outside.
	out, err := s.Resample(LinearGrid(994.5, 1094.5, 11))
	if err != nil {
		t.Fatal(err)
	}
	if out.Mask[0]&MaskEdge == 0 {
		t.Error("bin outside the input not flagged edge")
	}
	// Bin 5 (1040–1049 Å) is 7/10 masked: flagged; bin 6 (1050–1059) is
	// 5/10 masked: not flagged, and its masked 1e6 must not leak in.
	if out.Mask[5]&MaskTelluric == 0 || out.Mask[6] != 0 {
		t.Errorf("telluric not carried as expected: %v", out.Mask)
	}
	if !scalar.EqualWithinAbs(out.Flux[6], 1, 1e-12) || !scalar.EqualWithinAbs(out.Flux[5], 1, 1e-12) {
		t.Errorf("masked sample leaked: %v %v", out.Flux[5], out.Flux[6])
	}
	if !scalar.EqualWithinRel(out.Uncertainty[6], 0.1/math.Sqrt(5), 1e-9) {
		t.Errorf("σ over 5 good samples %v, want %v", out.Uncertainty[6], 0.1/math.Sqrt(5))
	}
	// Ten independent σ = 0.1 averaged: 0.1/√10.
	if !scalar.EqualWithinRel(out.Uncertainty[3], 0.1/math.Sqrt(10), 1e-9) {
		t.Errorf("σ %v, want %v", out.Uncertainty[3], 0.1/math.Sqrt(10))
	}
}

func TestSmoothWidth(t *testing.T) {
	// A narrow spike smoothed to R = 1000 becomes a Gaussian of FWHM λ/R:
	// its second moment is σ² = (λ/(R·2√(2 ln 2)))².
	w := LinearGrid(9000, 11000, 20001)
	f := make([]float64, len(w))
	f[10000] = 1 // at 10000 Å
	out := SmoothFlux(nil, w, f, 1000, nil)
	var m0, m2 float64
	for i, v := range out {
		d := w[i] - 10000
		m0 += v
		m2 += v * d * d
	}
	sig := math.Sqrt(m2 / m0)
	if want := 10000 / 1000.0 * fwhmToSigma; !scalar.EqualWithinRel(sig, want, 0.01) {
		t.Errorf("σ %v Å, want %v", sig, want)
	}
	c := SmoothFlux(nil, w, ones(len(w)), 300, nil)
	for i, v := range c {
		if !scalar.EqualWithinAbs(v, 1, 1e-12) {
			t.Fatalf("constant smoothed to %v at %d", v, i)
		}
	}
}

func ones(n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = 1
	}
	return x
}

func TestEmptyInputsDoNotPanic(t *testing.T) {
	if got := SmoothFlux(nil, nil, nil, 1000, nil); len(got) != 0 {
		t.Error("SmoothFlux on nothing")
	}
	if got := ResampleFlux(nil, []float64{1, 2}, nil, nil); len(got) != 2 || got[0] != 0 {
		t.Errorf("ResampleFlux from nothing: %v", got)
	}
	s, _ := New(nil, nil, nil, Metadata{})
	r, err := s.Resample([]float64{1, 2})
	if err != nil || r.CountMasked(MaskEdge) != 2 {
		t.Errorf("Resample of an empty spectrum: %v, %v", r, err)
	}
}
