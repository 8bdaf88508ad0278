package spectra

import (
	"fmt"
	"math"
)

// fwhmToSigma is 1/(2√(2 ln 2)), the ratio of a Gaussian's σ to its FWHM.
const fwhmToSigma = 0.42466090014400953

// gaussCut is the half-width of the smoothing kernel in units of σ.
const gaussCut = 4.0

// SmoothFlux convolves the flux given at ascending wavelengths wave with a
// Gaussian whose FWHM is λ/R at each wavelength (constant in ln λ, as for a
// spectrograph of resolving power R), writing the result to dst (allocated
// when nil, else it must have len(wave)) and returning it. The kernel is cut
// at ±4σ and each neighbour is weighted by its spacing (the smaller of the
// gaps to its neighbours), so uneven grids and holes are handled; the
// weights are renormalised near the ends. skip, when not
// nil, marks samples to leave out of every average (their own output is
// still computed from their neighbours). R ≤ 0 or +Inf copies flux. It
// panics on mismatched lengths.
func SmoothFlux(dst, wave, flux []float64, resolvingPower float64, skip []bool) []float64 {
	n := len(wave)
	if len(flux) != n || (skip != nil && len(skip) != n) {
		panic("spectra: SmoothFlux: mismatched lengths")
	}
	if dst == nil {
		dst = make([]float64, n)
	}
	if len(dst) != n {
		panic("spectra: SmoothFlux: len(dst) != len(wave)")
	}
	if !(resolvingPower > 0) || math.IsInf(resolvingPower, 1) {
		copy(dst, flux)
		return dst
	}
	smooth(dst, nil, wave, flux, nil, resolvingPower, skip)
	return dst
}

// smooth does the work of SmoothFlux and also propagates uncertainties
// (unc, into dstU) when both are non-nil. It needs dst distinct from flux.
func smooth(dst, dstU, wave, flux, unc []float64, resolvingPower float64, skip []bool) {
	n := len(wave)
	if n == 0 {
		return
	}
	sigLn := fwhmToSigma / resolvingPower // σ in ln λ
	inv2s2 := 1 / (2 * sigLn * sigLn)
	cut := math.Exp(gaussCut * sigLn)
	// Each neighbour is weighted by its spacing: the smaller of the gaps to
	// its two neighbours, so that a sample next to a hole in the grid (masked
	// data left out) does not stand for the whole hole.
	width := make([]float64, n)
	for j := range wave {
		switch {
		case n == 1:
			width[j] = 1
		case j == 0:
			width[j] = wave[1] - wave[0]
		case j == n-1:
			width[j] = wave[j] - wave[j-1]
		default:
			width[j] = math.Min(wave[j]-wave[j-1], wave[j+1]-wave[j])
		}
	}
	lw := make([]float64, n)
	for i, w := range wave {
		lw[i] = math.Log(w)
	}
	out := dst
	if &dst[0] == &flux[0] {
		out = make([]float64, n)
	}
	lo := 0
	for i := 0; i < n; i++ {
		wi := wave[i]
		for lo < i && wave[lo] < wi/cut {
			lo++
		}
		var sw, sf, sv float64
		for j := lo; j < n && wave[j] <= wi*cut; j++ {
			if skip != nil && skip[j] {
				continue
			}
			d := lw[j] - lw[i]
			w := math.Exp(-d*d*inv2s2) * width[j]
			sw += w
			sf += w * flux[j]
			if unc != nil {
				e := w * unc[j]
				sv += e * e
			}
		}
		if sw > 0 {
			out[i] = sf / sw
			if dstU != nil {
				dstU[i] = math.Sqrt(sv) / sw
			}
		} else {
			out[i] = flux[i]
			if dstU != nil {
				dstU[i] = unc[i]
			}
		}
	}
	if &out[0] != &dst[0] {
		copy(dst, out)
	}
}

// Smooth returns a copy of s convolved with a Gaussian to the resolving
// power r = λ/FWHM. inputR is the resolving power the spectrum already has
// (0 for a model at infinite resolution): the kernel then has FWHM
// λ·√(1/r² − 1/inputR²), so that the result has resolving power r. Masked
// samples are left out of the averages (and keep their flags).
// Uncertainties are propagated as if the input noise were independent;
// the smoothed noise is correlated over about λ/r.
func (s *Spectrum) Smooth(r, inputR float64) (*Spectrum, error) {
	if !(r > 0) || math.IsInf(r, 0) {
		return nil, fmt.Errorf("spectra: smooth: resolving power must be positive and finite, got %v", r)
	}
	if inputR < 0 || math.IsNaN(inputR) {
		return nil, fmt.Errorf("spectra: smooth: input resolving power must be ≥ 0, got %v", inputR)
	}
	if inputR > 0 && inputR <= r {
		return nil, fmt.Errorf("spectra: smooth: the spectrum's resolving power %v is already at or below the requested %v", inputR, r)
	}
	if err := s.Validate(); err != nil {
		return nil, fmt.Errorf("smooth: %w", err)
	}
	eff := r
	if inputR > 0 {
		eff = 1 / math.Sqrt(1/(r*r)-1/(inputR*inputR))
	}
	out := s.Clone()
	if s.Len() == 0 {
		return out, nil
	}
	var skip []bool
	if s.Mask != nil {
		skip = make([]bool, s.Len())
		for i, m := range s.Mask {
			skip[i] = m != 0
		}
	}
	smooth(out.Flux, out.Uncertainty, s.Wavelength, s.Flux, s.Uncertainty, eff, skip)
	out.addHistory("smoothed with a Gaussian to resolving power %g (kernel R %.6g)", r, eff)
	return out, nil
}
