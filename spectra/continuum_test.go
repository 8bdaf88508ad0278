package spectra

import (
	"math"
	"os"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/physics"
)

// TestFitNoisyBlackbody fits the invented noisy blackbody written by
// testdata/spectra/gen_reference.py (T = 4500 K, 5 % Gaussian noise with a
// known σ). The fit must recover the true T within its quoted 1σ-based
// uncertainty (we allow 2σ), and agree with scipy.optimize.curve_fit
// (absolute_sigma=True) on the same file: T to 1 % of σ, σ_T to 2 %, and
// the scale likewise (scipy's covariance is the inverse of JᵀWJ, ours the
// curvature of χ²; for a good fit they agree).
func TestFitNoisyBlackbody(t *testing.T) {
	ref := loadReference(t).BlackbodyFit
	f, err := os.Open("../testdata/spectra/blackbody_noisy.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s, err := ReadText(f, ReadOptions{Name: "blackbody_noisy.csv"})
	if err != nil {
		t.Fatal(err)
	}
	if s.Len() != ref.N || s.Meta.FluxUnit != FluxPerAngstrom {
		t.Fatalf("read %d samples in %v", s.Len(), s.Meta.FluxUnit)
	}
	fit, err := FitBlackbody(s, BlackbodyFitOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(fit.Temperature - ref.TrueT); d > 2*fit.TemperatureErr {
		t.Errorf("T = %.1f ± %.1f K, true %v (off by %.1fσ)", fit.Temperature, fit.TemperatureErr, ref.TrueT, d/fit.TemperatureErr)
	}
	if d := math.Abs(fit.Scale - ref.TrueScale); d > 2*fit.ScaleErr {
		t.Errorf("scale = %g ± %g, true %g", fit.Scale, fit.ScaleErr, ref.TrueScale)
	}
	if !scalar.EqualWithinAbs(fit.Temperature, ref.ScipyT, 0.01*ref.ScipyTSigma) {
		t.Errorf("T = %.4f, scipy %.4f", fit.Temperature, ref.ScipyT)
	}
	if !scalar.EqualWithinRel(fit.TemperatureErr, ref.ScipyTSigma, 0.02) {
		t.Errorf("σ_T = %.4f, scipy %.4f", fit.TemperatureErr, ref.ScipyTSigma)
	}
	if !scalar.EqualWithinAbs(fit.Scale, ref.ScipyScale, 0.01*ref.ScipySSigma) || !scalar.EqualWithinRel(fit.ScaleErr, ref.ScipySSigma, 0.02) {
		t.Errorf("scale %g ± %g, scipy %g ± %g", fit.Scale, fit.ScaleErr, ref.ScipyScale, ref.ScipySSigma)
	}
	if !scalar.EqualWithinRel(fit.Chi2, ref.Chi2, 1e-6) || fit.DOF != ref.N-2 {
		t.Errorf("χ² %v (dof %d), scipy %v", fit.Chi2, fit.DOF, ref.Chi2)
	}
}

// TestPhotosphere: a noiseless blackbody of radius R at distance D gives
// back R, v = R/t and L = 4πR²σT⁴ (definitions, REFERENCES.md
// "Blackbody"), also when only windows of it are fitted and part of it is
// masked, and also in mJy.
func TestPhotosphere(t *testing.T) {
	const T, R, D, days = 6000.0, 1.5e15, 40 * physics.Megaparsec, 2.0
	w := LinearGrid(4000, 23000, 500)
	flux := BlackbodyFluxes(nil, w, T, R, D)
	s, _ := New(w, flux, nil, Metadata{FluxUnit: FluxPerAngstrom})
	s.MaskRange(9000, 15000, MaskUser)
	s.Flux[300] *= 100 // an outlier, masked by hand: it must not pull the fit
	s.SetMask(300, MaskUser)
	for _, unit := range []FluxUnit{FluxPerAngstrom, FluxMilliJansky} {
		c := s.Clone()
		if err := c.ConvertFlux(unit); err != nil {
			t.Fatal(err)
		}
		fit, err := FitBlackbody(c, BlackbodyFitOptions{Distance: D, Epoch: days,
			Windows: []Band{{Lo: 4000, Hi: 8000}, {Lo: 16000, Hi: 23000}}})
		if err != nil {
			t.Fatal(err)
		}
		if !scalar.EqualWithinRel(fit.Temperature, T, 1e-6) || !scalar.EqualWithinRel(fit.Radius, R, 1e-6) {
			t.Errorf("%v: T %v R %g", unit, fit.Temperature, fit.Radius)
		}
		if v := R / (days * physics.Day); !scalar.EqualWithinRel(fit.Velocity, v, 1e-6) {
			t.Errorf("%v: v %g, want %g", unit, fit.Velocity, v)
		}
		if L := 4 * math.Pi * R * R * physics.StefanBoltzmann * math.Pow(T, 4); !scalar.EqualWithinRel(fit.Luminosity, L, 1e-5) {
			t.Errorf("L %g want %g", fit.Luminosity, L)
		}
		model := fit.Model(c.Wavelength)
		if !scalar.EqualWithinRel(model[10], c.Flux[10], 1e-6) {
			t.Errorf("%v: model %g, flux %g", unit, model[10], c.Flux[10])
		}
	}
	// Normalising by the model gives 1 where unmasked.
	fit, _ := FitBlackbody(s, BlackbodyFitOptions{})
	n := s.Clone()
	if _, err := n.Normalize(fit.Model(n.Wavelength)); err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinAbs(n.Flux[5], 1, 1e-6) || n.Meta.FluxUnit != FluxNormalized {
		t.Errorf("normalised flux %v unit %v", n.Flux[5], n.Meta.FluxUnit)
	}
	if _, err := FitBlackbody(n, BlackbodyFitOptions{}); err == nil {
		t.Error("fitted an already normalised spectrum")
	}
}
