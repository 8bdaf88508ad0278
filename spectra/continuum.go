package spectra

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"

	"broadline/physics"
)

// BlackbodyFitOptions configure FitBlackbody. The zero value fits every
// unmasked sample for 1000 K ≤ T ≤ 100000 K and derives no radius.
type BlackbodyFitOptions struct {
	// Windows, when not empty, restricts the fit to samples inside them
	// (vacuum Å, in the spectrum's current frame).
	Windows []Band
	// TMin and TMax bound the temperature search (K); defaults 1000, 1e5.
	TMin, TMax float64
	// Distance (cm) converts the scale to a photospheric radius; 0: none.
	Distance float64
	// Epoch is the time since explosion (days, in the frame of the
	// spectrum) that converts the radius to a velocity v = R/t; 0: none.
	Epoch float64
}

// BlackbodyFit is the result of FitBlackbody. The model is
// F_λ = Scale · π B_λ(T), so that Scale = (R/D)² for a sphere of radius R
// at distance D. Uncertainties (1σ) come from the curvature of χ² at the
// minimum: cov = 2 H⁻¹, H the Hessian of χ² in (T, Scale). Without
// uncertainties in the spectrum every sample has weight 1 and the
// covariance is scaled by χ²/dof.
type BlackbodyFit struct {
	Temperature, TemperatureErr float64 // K
	Scale, ScaleErr             float64 // (R/D)²; F_λ in the spectrum's unit per π B_λ
	Correlation                 float64 // between T and Scale
	Chi2                        float64
	DOF                         int
	N                           int  // samples used
	Weighted                    bool // the spectrum had uncertainties
	FluxUnit                    FluxUnit

	// Set when Distance > 0 (and, for the velocity, Epoch > 0).
	Distance           float64 // cm
	Radius, RadiusErr  float64 // cm
	Luminosity, LumErr float64 // erg s⁻¹, 4πR²σT⁴
	Epoch              float64 // days
	Velocity, VelErr   float64 // cm s⁻¹, R/t
}

// ReducedChi2 returns χ²/dof.
func (f *BlackbodyFit) ReducedChi2() float64 {
	if f.DOF <= 0 {
		return math.NaN()
	}
	return f.Chi2 / float64(f.DOF)
}

// Model returns the fitted blackbody at the wavelengths wave (vacuum Å) in
// the unit of the fitted spectrum.
func (f *BlackbodyFit) Model(wave []float64) []float64 {
	out := make([]float64, len(wave))
	for i, w := range wave {
		b := f.Scale * math.Pi * PlanckLambdaPerAngstrom(w, f.Temperature)
		if f.FluxUnit.PerFrequency() {
			c, _ := fluxFactor(FluxPerAngstrom, f.FluxUnit, w)
			b *= c
		}
		out[i] = b
	}
	return out
}

// ErrFit is wrapped by fitting errors (too few samples, no minimum).
var ErrFit = errors.New("fit failed")

// FitBlackbody fits F = Scale·π B_λ(T) to the unmasked samples of s (and
// only those inside opt.Windows when given), weighted by 1/σ². Fluxes per
// unit frequency are compared with the model converted to that unit; an
// arbitrary flux unit gives an arbitrary scale (and no radius). For a
// given T the best Scale is linear least squares, so the fit minimises the
// profile χ²(T): a grid in ln T, then gonum's Nelder–Mead minimiser
// (gonum.org/v1/gonum/optimize) from the best grid point. The curvature is taken with gonum/diff/fd.
func FitBlackbody(s *Spectrum, opt BlackbodyFitOptions) (*BlackbodyFit, error) {
	if s.Meta.FluxUnit == FluxNormalized {
		return nil, fmt.Errorf("spectra: blackbody fit: %w: the flux is already normalised", ErrFit)
	}
	tmin, tmax := opt.TMin, opt.TMax
	if tmin <= 0 {
		tmin = 1000
	}
	if tmax <= 0 {
		tmax = 1e5
	}
	if tmin >= tmax {
		return nil, fmt.Errorf("spectra: blackbody fit: TMin %v ≥ TMax %v", tmin, tmax)
	}
	var w, f, wt, conv []float64
	weighted := s.Uncertainty != nil
	for i, x := range s.Wavelength {
		if s.Masked(i) {
			continue
		}
		if len(opt.Windows) > 0 {
			in := false
			for _, b := range opt.Windows {
				if x >= math.Min(b.Lo, b.Hi) && x <= math.Max(b.Lo, b.Hi) {
					in = true
					break
				}
			}
			if !in {
				continue
			}
		}
		weight := 1.0
		if weighted {
			weight = 1 / (s.Uncertainty[i] * s.Uncertainty[i])
		}
		c := 1.0
		if s.Meta.FluxUnit.PerFrequency() {
			c, _ = fluxFactor(FluxPerAngstrom, s.Meta.FluxUnit, x)
		}
		w = append(w, x)
		f = append(f, s.Flux[i])
		wt = append(wt, weight)
		conv = append(conv, c)
	}
	if len(w) < 3 {
		return nil, fmt.Errorf("spectra: blackbody fit: %w: %d usable samples, need at least 3", ErrFit, len(w))
	}
	b := make([]float64, len(w))
	basis := func(T float64) {
		for i, x := range w {
			b[i] = math.Pi * PlanckLambdaPerAngstrom(x, T) * conv[i]
		}
	}
	chi2 := func(T, S float64) float64 {
		basis(T)
		var c float64
		for i := range w {
			d := f[i] - S*b[i]
			c += wt[i] * d * d
		}
		return c
	}
	// Best scale for a given T (linear least squares).
	bestScale := func(T float64) float64 {
		basis(T)
		var num, den float64
		for i := range w {
			num += wt[i] * f[i] * b[i]
			den += wt[i] * b[i] * b[i]
		}
		if den == 0 {
			return 0
		}
		return num / den
	}
	// Grid in ln T.
	const ngrid = 120
	bestT, bestS, bestC := 0.0, 0.0, math.Inf(1)
	for k := 0; k < ngrid; k++ {
		T := tmin * math.Pow(tmax/tmin, float64(k)/(ngrid-1))
		S := bestScale(T)
		if S <= 0 {
			continue
		}
		if c := chi2(T, S); c < bestC {
			bestT, bestS, bestC = T, S, c
		}
	}
	if bestS <= 0 {
		return nil, fmt.Errorf("spectra: blackbody fit: %w: no positive blackbody matches the flux", ErrFit)
	}
	// Refine on the profile χ²(T) = min over Scale, in ln T from the best
	// grid point.
	step := math.Log(tmax/tmin) / (ngrid - 1)
	prof := func(lnT float64) float64 {
		T := math.Exp(lnT)
		S := bestScale(T)
		if S <= 0 {
			return math.Inf(1)
		}
		return chi2(T, S)
	}
	lnT, err := minimizeProfile(prof, math.Log(bestT), step)
	if err != nil {
		return nil, fmt.Errorf("spectra: blackbody fit: %w: %v", ErrFit, err)
	}
	T := math.Exp(lnT)
	S := bestScale(T)
	if T <= tmin*math.Exp(step/2) || T >= tmax*math.Exp(-step/2) {
		return nil, fmt.Errorf("spectra: blackbody fit: %w: temperature %.0f K at the search bound [%g, %g] K", ErrFit, T, tmin, tmax)
	}
	// Curvature of χ² in scaled coordinates (T/T*, S/S*).
	scaled := func(p []float64) float64 { return chi2(p[0]*T, p[1]*S) }
	h := mat.NewSymDense(2, nil)
	fd.Hessian(h, scaled, []float64{1, 1}, &fd.Settings{Step: 1e-4})
	var cov mat.Dense
	if err := cov.Inverse(h); err != nil {
		return nil, fmt.Errorf("spectra: blackbody fit: %w: χ² curvature is singular: %v", ErrFit, err)
	}
	cov.Scale(2, &cov)
	fit := &BlackbodyFit{
		Temperature: T, Scale: S, N: len(w), DOF: len(w) - 2, Weighted: weighted,
		Chi2: chi2(T, S), FluxUnit: s.Meta.FluxUnit,
	}
	if !weighted && fit.DOF > 0 {
		cov.Scale(fit.Chi2/float64(fit.DOF), &cov)
	}
	vt, vs := cov.At(0, 0), cov.At(1, 1)
	if !(vt > 0) || !(vs > 0) {
		return nil, fmt.Errorf("spectra: blackbody fit: %w: χ² is not curved upwards at the minimum", ErrFit)
	}
	fit.TemperatureErr = T * math.Sqrt(vt)
	fit.ScaleErr = S * math.Sqrt(vs)
	fit.Correlation = cov.At(0, 1) / math.Sqrt(vt*vs)
	if opt.Distance > 0 {
		if s.Meta.FluxUnit == FluxUnknown {
			return nil, fmt.Errorf("spectra: blackbody fit: a radius needs a calibrated flux unit, not %v", s.Meta.FluxUnit)
		}
		fit.Distance = opt.Distance
		fit.Radius = opt.Distance * math.Sqrt(S)
		relS, relT := fit.ScaleErr/S, fit.TemperatureErr/T
		fit.RadiusErr = fit.Radius * relS / 2
		fit.Luminosity = 4 * math.Pi * fit.Radius * fit.Radius * physics.StefanBoltzmann * T * T * T * T
		fit.LumErr = fit.Luminosity * math.Sqrt(relS*relS+16*relT*relT+8*fit.Correlation*relS*relT)
		if opt.Epoch > 0 {
			fit.Epoch = opt.Epoch
			fit.Velocity = fit.Radius / (opt.Epoch * physics.Day)
			fit.VelErr = fit.RadiusErr / (opt.Epoch * physics.Day)
		}
	}
	return fit, nil
}

// Normalize divides the flux and uncertainty by continuum (one value per
// sample, in the spectrum's flux unit) and sets the unit to FluxNormalized.
// Samples where the continuum is not positive and finite are masked with
// MaskInvalid and set to 0; their number is returned.
func (s *Spectrum) Normalize(continuum []float64) (int, error) {
	if len(continuum) != s.Len() {
		return 0, fmt.Errorf("spectra: normalize: %d continuum values for %d samples", len(continuum), s.Len())
	}
	bad := 0
	for i, c := range continuum {
		if !(c > 0) || math.IsInf(c, 0) {
			s.Flux[i] = 0
			if s.Uncertainty != nil {
				s.Uncertainty[i] = 0
			}
			s.SetMask(i, MaskInvalid)
			bad++
			continue
		}
		s.Flux[i] /= c
		if s.Uncertainty != nil {
			s.Uncertainty[i] /= c
		}
	}
	s.Meta.FluxUnit = FluxNormalized
	s.addHistory("normalised by a continuum (%d samples without a usable continuum masked)", bad)
	return bad, nil
}

// minimizeProfile returns the ln T that minimises the profile χ² prof,
// starting from x0 with an initial simplex step, by gonum's Nelder–Mead
// minimiser (gonum.org/v1/gonum/optimize), converged when the best value
// changes by less than 1e-10 relative over 20 iterations.
func minimizeProfile(prof func(float64) float64, x0, step float64) (float64, error) {
	p := optimize.Problem{Func: func(x []float64) float64 { return prof(x[0]) }}
	set := &optimize.Settings{
		Converger:       &optimize.FunctionConverge{Absolute: 0, Relative: 1e-10, Iterations: 20},
		MajorIterations: 2000,
	}
	res, err := optimize.Minimize(p, []float64{x0}, set, &optimize.NelderMead{SimplexSize: step})
	if err != nil {
		return 0, err
	}
	if res.Status != optimize.FunctionConvergence {
		return 0, fmt.Errorf("minimiser stopped with status %v", res.Status)
	}
	return res.X[0], nil
}
