package spectra

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// synthetic: unit continuum with Gaussian dips (centre, depth, σ in Å) and
// Gaussian noise of σ = noise (seeded).
func synthetic(dips [][3]float64, noise float64, withUnc bool) *Spectrum {
	rng := rand.New(rand.NewPCG(7, 7))
	w := LinearGrid(6000, 14000, 4001) // 2 Å steps
	f := make([]float64, len(w))
	var u []float64
	if withUnc {
		u = make([]float64, len(w))
	}
	for i, x := range w {
		v := 1.0
		for _, d := range dips {
			z := (x - d[0]) / d[2]
			v -= d[1] * math.Exp(-0.5*z*z)
		}
		f[i] = v + noise*rng.NormFloat64()
		if withUnc {
			u[i] = noise
		}
	}
	s, _ := New(w, f, u, Metadata{FluxUnit: FluxNormalized})
	return s
}

// TestFindFeatures: the found minimum, depth and width of Gaussian dips
// match their definitions (FWHM = 2√(2 ln 2)σ), the significance is close
// to depth/σ_noise reduced by smoothing, and noise makes no spurious
// features at the 5σ threshold.
func TestFindFeatures(t *testing.T) {
	dips := [][3]float64{{8000, 0.3, 100}, {11000, 0.05, 150}}
	for _, withUnc := range []bool{true, false} {
		s := synthetic(dips, 0.01, withUnc)
		s.MaskRange(9300, 9700, MaskTelluric) // a gap between the features
		fs, err := FindFeatures(s, FeatureOptions{ResolvingPower: 300, MinSignificance: 5})
		if err != nil {
			t.Fatal(err)
		}
		if len(fs) != 2 {
			t.Fatalf("unc=%v: found %d features, want 2: %+v", withUnc, len(fs), fs)
		}
		for k, d := range dips {
			f := fs[k]
			// Smoothing at R = 300 adds σ_k = λ/(300·2.3548) in quadrature.
			sk := d[0] / 300 * fwhmToSigma
			sw := math.Hypot(d[2], sk)
			wantDepth := d[1] * d[2] / sw
			if !scalar.EqualWithinAbs(f.Wavelength, d[0], 5) {
				t.Errorf("unc=%v dip %d: λ %v, want %v", withUnc, k, f.Wavelength, d[0])
			}
			if !scalar.EqualWithinAbs(f.Depth, wantDepth, 0.01) {
				t.Errorf("unc=%v dip %d: depth %v, want %v", withUnc, k, f.Depth, wantDepth)
			}
			if want := sw / fwhmToSigma; !scalar.EqualWithinRel(f.Width, want, 0.1) {
				t.Errorf("unc=%v dip %d: width %v, want %v", withUnc, k, f.Width, want)
			}
			// EW of a Gaussian dip: depth·σ·√(2π) (unchanged by smoothing),
			// 98 % of it within ±FWHM. The pseudo-continuum rests on noise
			// maxima: the highest of ~100 independent smoothed values is
			// ≈ 2.5–3σ_s high, σ_s the smoothed noise (σ over
			// √(2√π σ_k/Δλ) for a Gaussian kernel σ_k on a Δλ = 2 Å grid),
			// which adds up to 3σ_s·2·FWHM to the EW.
			sigS := 0.01 / math.Sqrt(2*math.Sqrt(math.Pi)*sk/2)
			bias := 3 * sigS * 2 * sw / fwhmToSigma
			if want := d[1] * d[2] * math.Sqrt(2*math.Pi); !scalar.EqualWithinAbs(f.EquivalentWidth, want, 0.05*want+bias) {
				t.Errorf("unc=%v dip %d: EW %v, want %v", withUnc, k, f.EquivalentWidth, want)
			}
			if f.Significance < 5 || f.Significance > 10*d[1]/0.01*10 {
				t.Errorf("unc=%v dip %d: significance %v", withUnc, k, f.Significance)
			}
		}
	}
	// Pure noise: nothing at 5σ.
	s := synthetic(nil, 0.01, true)
	fs, err := FindFeatures(s, FeatureOptions{ResolvingPower: 300, MinSignificance: 5})
	if err != nil {
		t.Fatal(err)
	}
	if len(fs) != 0 {
		t.Errorf("%d features found in noise: %+v", len(fs), fs[0])
	}
}

func TestRobustNoise(t *testing.T) {
	s := synthetic([][3]float64{{9000, 0.5, 200}}, 0.02, false)
	if got := robustNoise(s.Flux); !scalar.EqualWithinRel(got, 0.02, 0.05) {
		t.Errorf("noise %v, want 0.02", got)
	}
}

// TestFindFeaturesDenseGrid: on a grid 20 times finer (pre-binned before
// smoothing) the same two features are found at the same places.
func TestFindFeaturesDenseGrid(t *testing.T) {
	dips := [][3]float64{{8000, 0.3, 100}, {11000, 0.05, 150}}
	rng := rand.New(rand.NewPCG(3, 3))
	w := LinearGrid(6000, 14000, 80001) // 0.1 Å steps
	f := make([]float64, len(w))
	u := make([]float64, len(w))
	for i, x := range w {
		v := 1.0
		for _, d := range dips {
			z := (x - d[0]) / d[2]
			v -= d[1] * math.Exp(-0.5*z*z)
		}
		u[i] = 0.01 * math.Sqrt(20) // same noise per Å as TestFindFeatures
		f[i] = v + u[i]*rng.NormFloat64()
	}
	s, _ := New(w, f, u, Metadata{FluxUnit: FluxNormalized})
	s.MaskRange(9300, 9700, MaskTelluric)
	fs, err := FindFeatures(s, FeatureOptions{ResolvingPower: 300, MinSignificance: 5})
	if err != nil {
		t.Fatal(err)
	}
	if len(fs) != 2 {
		t.Fatalf("found %d features: %+v", len(fs), fs)
	}
	for k, d := range dips {
		// A parabola over the half-depth region places the minimum to a
		// small fraction of the dip's σ (10 % allowed; the shallow dip's
		// vertex moves by ~5–10 Å between noise realisations).
		if !scalar.EqualWithinAbs(fs[k].Wavelength, d[0], 0.1*d[2]) || fs[k].Lo < 6000 || fs[k].Hi > 14000 {
			t.Errorf("dip %d at %v, found %+v", k, d[0], fs[k])
		}
		// No feature may use the masked gap as its minimum.
		if fs[k].Wavelength > 9300 && fs[k].Wavelength < 9700 {
			t.Errorf("feature inside the masked gap: %+v", fs[k])
		}
	}
}
