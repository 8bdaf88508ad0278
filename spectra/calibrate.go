package spectra

import (
	"fmt"
	"math"

	"broadline/physics"
)

// fluxFactor returns the factor that converts a flux density in unit from
// to unit to at vacuum wavelength λ (Å). F_ν = F_λ λ²/c, with F_λ per Å and
// λ in Å: F_ν[erg s⁻¹ cm⁻² Hz⁻¹] = F_λ · λ² · 1e-8 / c.
func fluxFactor(from, to FluxUnit, lambda float64) (float64, error) {
	if from == to {
		return 1, nil
	}
	toCGS := func(u FluxUnit) (float64, bool) { // per-frequency units → erg/s/cm²/Hz
		switch u {
		case FluxPerHz:
			return 1, true
		case FluxJansky:
			return physics.Jansky, true
		case FluxMilliJansky:
			return 1e-3 * physics.Jansky, true
		}
		return 0, false
	}
	if from == FluxUnknown || to == FluxUnknown || from == FluxNormalized || to == FluxNormalized {
		return 0, fmt.Errorf("spectra: cannot convert flux from %v to %v", from, to)
	}
	// F_ν(cgs) per F_λ(per Å) at λ.
	nuPerLam := lambda * lambda * physics.Angstrom / physics.SpeedOfLight
	switch {
	case from == FluxPerAngstrom:
		c, _ := toCGS(to)
		return nuPerLam / c, nil
	case to == FluxPerAngstrom:
		c, _ := toCGS(from)
		return c / nuPerLam, nil
	}
	a, _ := toCGS(from)
	b, _ := toCGS(to)
	return a / b, nil
}

// ConvertFlux converts the flux and uncertainty to unit to in place
// (per-wavelength ↔ per-frequency: F_ν = F_λ λ²/c; 1 Jy = 1e-23 erg s⁻¹
// cm⁻² Hz⁻¹). A spectrum in an arbitrary or normalised unit cannot be
// converted.
func (s *Spectrum) ConvertFlux(to FluxUnit) error {
	from := s.Meta.FluxUnit
	if from == to {
		return nil
	}
	if _, err := fluxFactor(from, to, 1e4); err != nil {
		return err
	}
	for i, w := range s.Wavelength {
		f, _ := fluxFactor(from, to, w)
		s.Flux[i] *= f
		if s.Uncertainty != nil {
			s.Uncertainty[i] *= f
		}
	}
	s.Meta.FluxUnit = to
	s.addHistory("converted flux from %v to %v", from, to)
	return nil
}

// ToRestFrame removes redshift z: λ_rest = λ_obs/(1+z). The flux convention
// keeps the integrated flux ∫F dλ = ∫F dν: F_λ,rest = (1+z) F_λ,obs and
// F_ν,rest = F_ν,obs/(1+z) (uncertainties alike); arbitrary and normalised
// fluxes are left unchanged. Meta.Redshift accumulates (1+z) products. The
// epoch in Meta stays in the observer's frame; the rest-frame time is
// Epoch/(1+z).
func (s *Spectrum) ToRestFrame(z float64) error {
	if !(z > -1) || math.IsInf(z, 0) {
		return fmt.Errorf("spectra: redshift must be finite and > -1, got %v", z)
	}
	if z == 0 {
		return nil
	}
	k := 1 + z
	for i := range s.Wavelength {
		s.Wavelength[i] /= k
	}
	f := 1.0
	switch {
	case s.Meta.FluxUnit == FluxPerAngstrom:
		f = k
	case s.Meta.FluxUnit.PerFrequency():
		f = 1 / k
	}
	if f != 1 {
		for i := range s.Flux {
			s.Flux[i] *= f
			if s.Uncertainty != nil {
				s.Uncertainty[i] *= f
			}
		}
	}
	s.Meta.Redshift = (1+s.Meta.Redshift)*k - 1
	s.addHistory("moved to the rest frame of z = %g (flux × %g)", z, f)
	return nil
}

// ExtinctionLaw names a dust extinction curve.
type ExtinctionLaw uint8

const (
	// CCM89 is Cardelli, Clayton & Mathis (1989, ApJ 345, 245), valid
	// 0.3 ≤ x ≤ 10 µm⁻¹ (1000 Å – 3.33 µm).
	CCM89 ExtinctionLaw = iota
	// F99 is Fitzpatrick (1999, PASP 111, 63) with the optical/IR spline
	// anchors as updated by Fitzpatrick after the paper (R_V-dependent; the
	// values Debian's python3-extinction uses), valid 910 Å – 6 µm.
	F99
)

// String returns "ccm89" or "f99".
func (l ExtinctionLaw) String() string {
	if l == F99 {
		return "f99"
	}
	return "ccm89"
}

// ParseExtinctionLaw accepts "ccm89" or "f99" (case-insensitive).
func ParseExtinctionLaw(s string) (ExtinctionLaw, error) {
	switch s {
	case "ccm89", "CCM89", "ccm", "CCM":
		return CCM89, nil
	case "f99", "F99", "fitzpatrick99":
		return F99, nil
	}
	return CCM89, fmt.Errorf("spectra: unknown extinction law %q (want ccm89 or f99)", s)
}

// Extinction returns A_λ/A_V of the law at vacuum wavelength λ (Å) for the
// given R_V, or an error outside the law's range.
func Extinction(law ExtinctionLaw, lambda, rv float64) (float64, error) {
	if !(rv > 0) {
		return 0, fmt.Errorf("spectra: R_V must be positive, got %v", rv)
	}
	x := 1e4 / lambda // µm⁻¹
	switch law {
	case CCM89:
		a, b, err := ccm89ab(x)
		if err != nil {
			return 0, err
		}
		return a + b/rv, nil
	case F99:
		k, err := f99(x, rv)
		if err != nil {
			return 0, err
		}
		return k / rv, nil
	}
	return 0, fmt.Errorf("spectra: unknown extinction law %d", law)
}

// ccm89ab returns CCM89's a(x) and b(x), x in µm⁻¹. The infrared and
// optical coefficients are those listed in REFERENCES.md; the ultraviolet
// and far-ultraviolet ones were typed from memory and are confirmed against
// python3-extinction down to 1050 Å by TestExtinctionAgainstPackage.
func ccm89ab(x float64) (a, b float64, err error) {
	switch {
	case x >= 0.3 && x < 1.1:
		p := math.Pow(x, 1.61)
		return 0.574 * p, -0.527 * p, nil
	case x >= 1.1 && x < 3.3:
		y := x - 1.82
		a = 1 + y*(0.17699+y*(-0.50447+y*(-0.02427+y*(0.72085+y*(0.01979+y*(-0.77530+y*0.32999))))))
		b = y * (1.41338 + y*(2.28305+y*(1.07233+y*(-5.38434+y*(-0.62251+y*(5.30260+y*(-2.09002)))))))
		return a, b, nil
	case x >= 3.3 && x < 8:
		var fa, fb float64
		if x >= 5.9 {
			d := x - 5.9
			fa = -0.04473*d*d - 0.009779*d*d*d
			fb = 0.2130*d*d + 0.1207*d*d*d
		}
		a = 1.752 - 0.316*x - 0.104/((x-4.67)*(x-4.67)+0.341) + fa
		b = -3.090 + 1.825*x + 1.206/((x-4.62)*(x-4.62)+0.263) + fb
		return a, b, nil
	case x >= 8 && x <= 10:
		d := x - 8
		a = -1.073 - 0.628*d + 0.137*d*d - 0.070*d*d*d
		b = 13.670 + 4.257*d - 0.420*d*d + 0.374*d*d*d
		return a, b, nil
	}
	return 0, 0, fmt.Errorf("spectra: CCM89 is defined for 1000 Å ≤ λ ≤ 33333 Å, got %.6g Å", 1e4/x)
}

// f99 returns A_λ/E(B−V) of Fitzpatrick (1999), x in µm⁻¹. The FM90
// parameters and the spline anchors were typed from memory and are
// confirmed against python3-extinction from 1050 Å to 3 µm, for
// R_V = 2.5, 3.1 and 5, by TestExtinctionAgainstPackage.
func f99(x, rv float64) (float64, error) {
	if x < 1e4/60000 || x > 1e4/910 {
		return 0, fmt.Errorf("spectra: F99 is defined for 910 Å ≤ λ ≤ 6 µm, got %.6g Å", 1e4/x)
	}
	// FM90 ultraviolet form with F99's R_V dependence of c1, c2.
	const x0, gamma, c3, c4 = 4.596, 0.99, 3.23, 0.41
	c2 := -0.824 + 4.717/rv
	c1 := 2.030 - 3.007*c2
	uv := func(x float64) float64 {
		x2 := x * x
		d := x2 / ((x2-x0*x0)*(x2-x0*x0) + x2*gamma*gamma)
		k := c1 + c2*x + c3*d
		if x >= 5.9 {
			y := x - 5.9
			k += c4 * (0.5392*y*y + 0.05644*y*y*y)
		}
		return k + rv
	}
	if x >= 1e4/2700 {
		return uv(x), nil
	}
	// Optical/IR: natural cubic spline through the anchors.
	r2, r3, r4 := rv*rv, rv*rv*rv, rv*rv*rv*rv
	kx := [...]float64{0, 1e4 / 26500, 1e4 / 12200, 1e4 / 6000, 1e4 / 5470, 1e4 / 4670, 1e4 / 4110, 1e4 / 2700, 1e4 / 2600}
	ky := [...]float64{
		0,
		0.26469 * rv / 3.1,
		0.82925 * rv / 3.1,
		-0.422809 + 1.00270*rv + 2.13572e-4*r2,
		-5.13540e-2 + 1.00216*rv - 7.35778e-5*r2,
		0.700127 + 1.00184*rv - 3.32598e-5*r2,
		1.19456 + 1.01707*rv - 5.46959e-3*r2 + 7.97809e-4*r3 - 4.45636e-5*r4,
		uv(1e4 / 2700),
		uv(1e4 / 2600),
	}
	return naturalSpline(kx[:], ky[:], x), nil
}

// naturalSpline evaluates the natural cubic spline through (xs, ys) at x.
func naturalSpline(xs, ys []float64, x float64) float64 {
	n := len(xs)
	// Second derivatives by the tridiagonal algorithm.
	m := make([]float64, n)
	u := make([]float64, n)
	for i := 1; i < n-1; i++ {
		sig := (xs[i] - xs[i-1]) / (xs[i+1] - xs[i-1])
		p := sig*m[i-1] + 2
		m[i] = (sig - 1) / p
		d := (ys[i+1]-ys[i])/(xs[i+1]-xs[i]) - (ys[i]-ys[i-1])/(xs[i]-xs[i-1])
		u[i] = (6*d/(xs[i+1]-xs[i-1]) - sig*u[i-1]) / p
	}
	m[n-1] = 0
	for k := n - 2; k >= 0; k-- {
		m[k] = m[k]*m[k+1] + u[k]
	}
	lo := 0
	for lo < n-2 && x > xs[lo+1] {
		lo++
	}
	h := xs[lo+1] - xs[lo]
	a := (xs[lo+1] - x) / h
	b := (x - xs[lo]) / h
	return a*ys[lo] + b*ys[lo+1] + ((a*a*a-a)*m[lo]+(b*b*b-b)*m[lo+1])*h*h/6
}

// Deredden corrects the flux for dust extinction in place:
// F_corrected = F · 10^(0.4 A_λ), A_λ = (A_λ/A_V)·R_V·E(B−V). It is meant
// for Milky Way (observer-frame) extinction, so apply it before ToRestFrame.
// Samples outside the law's range are masked with MaskEdge and left
// uncorrected; the count is returned.
func (s *Spectrum) Deredden(law ExtinctionLaw, ebv, rv float64) (outside int, err error) {
	if math.IsNaN(ebv) || math.IsInf(ebv, 0) || ebv < 0 {
		return 0, fmt.Errorf("spectra: E(B−V) must be finite and ≥ 0, got %v", ebv)
	}
	if !(rv > 0) || math.IsInf(rv, 0) {
		return 0, fmt.Errorf("spectra: R_V must be positive and finite, got %v", rv)
	}
	av := rv * ebv
	for i, w := range s.Wavelength {
		r, err := Extinction(law, w, rv)
		if err != nil {
			s.SetMask(i, MaskEdge)
			outside++
			continue
		}
		f := math.Pow(10, 0.4*r*av)
		s.Flux[i] *= f
		if s.Uncertainty != nil {
			s.Uncertainty[i] *= f
		}
	}
	s.addHistory("dereddened with %v, E(B−V) = %g, R_V = %g (%d samples outside the law's range masked)", law, ebv, rv, outside)
	return outside, nil
}
