package spectra

import (
	"fmt"
	"math"
)

// binEdges writes the len(x)+1 edges of the bins centred on the samples x
// (ascending): interior edges half-way between samples, the outer edges half
// a spacing beyond the first and last sample. A single sample gets a bin of
// zero width.
func binEdges(dst, x []float64) []float64 {
	n := len(x)
	if cap(dst) < n+1 {
		dst = make([]float64, n+1)
	}
	dst = dst[:n+1]
	if n == 0 {
		return dst[:0]
	}
	if n == 1 {
		dst[0], dst[1] = x[0], x[0]
		return dst
	}
	for i := 1; i < n; i++ {
		dst[i] = 0.5 * (x[i-1] + x[i])
	}
	dst[0] = x[0] - 0.5*(x[1]-x[0])
	dst[n] = x[n-1] + 0.5*(x[n-1]-x[n-2])
	return dst
}

// ResampleFlux resamples a flux density given at the ascending wavelengths
// wave onto the ascending wavelengths grid, conserving flux: each input
// sample is taken as constant over its bin (edges half-way between samples),
// and each output value is the integral of that step function over the
// output bin divided by the bin's width. Output bins only partly covered by
// the input are averaged over the covered part; bins not covered at all get
// 0. The result is written to dst (allocated when nil, else it must have
// len(grid)) and returned. Mismatched lengths panic.
//
// Flux conservation holds for any grids: Σ F_out Δλ_out equals Σ F_in Δλ_in
// over the common range.
func ResampleFlux(dst, grid, wave, flux []float64) []float64 {
	if len(wave) != len(flux) {
		panic("spectra: ResampleFlux: len(wave) != len(flux)")
	}
	if dst == nil {
		dst = make([]float64, len(grid))
	}
	if len(dst) != len(grid) {
		panic("spectra: ResampleFlux: len(dst) != len(grid)")
	}
	r := newResampler(grid, wave)
	r.each(func(i int, parts []overlap) {
		var sum, w float64
		for _, p := range parts {
			sum += p.width * flux[p.j]
			w += p.width
		}
		if w > 0 {
			dst[i] = sum / w
		} else {
			dst[i] = 0
		}
	})
	return dst
}

// overlap is the width of the intersection of output bin i with input bin j.
type overlap struct {
	j     int
	width float64
}

type resampler struct {
	inEdges, outEdges []float64
}

func newResampler(grid, wave []float64) *resampler {
	return &resampler{inEdges: binEdges(nil, wave), outEdges: binEdges(nil, grid)}
}

// each calls fn for every output bin with the input bins that overlap it
// (positive width only). It sweeps both edge lists once.
func (r *resampler) each(fn func(i int, parts []overlap)) {
	nOut := len(r.outEdges) - 1
	nIn := len(r.inEdges) - 1
	var parts []overlap
	j := 0
	for i := 0; i < nOut; i++ {
		lo, hi := r.outEdges[i], r.outEdges[i+1]
		for j < nIn && r.inEdges[j+1] <= lo {
			j++
		}
		parts = parts[:0]
		for k := j; k < nIn && r.inEdges[k] < hi; k++ {
			w := math.Min(hi, r.inEdges[k+1]) - math.Max(lo, r.inEdges[k])
			if w > 0 {
				parts = append(parts, overlap{k, w})
			}
		}
		fn(i, parts)
	}
}

// Resample returns a new spectrum on the ascending vacuum wavelengths grid,
// conserving flux as ResampleFlux does. Masked input samples are left out
// of each output bin's average when unmasked samples also overlap it; an
// output sample inherits the mask reasons of the masked input samples that
// cover more than half of its bin, or all of them if no unmasked sample
// overlaps it. Uncertainties are propagated as σ_out = √(Σ(w_j σ_j)²)/Σw_j,
// w_j the overlap widths (neighbouring output samples become correlated,
// which this ignores). Output samples not fully covered by the input are
// masked with MaskEdge; those not covered at all have flux and uncertainty 0.
func (s *Spectrum) Resample(grid []float64) (*Spectrum, error) {
	for i := range grid {
		if !(grid[i] > 0) || math.IsInf(grid[i], 0) || (i > 0 && grid[i] <= grid[i-1]) {
			return nil, fmt.Errorf("spectra: resample: grid must be finite, positive and strictly ascending (sample %d is %v)", i, grid[i])
		}
	}
	if err := s.Validate(); err != nil {
		return nil, fmt.Errorf("resample: %w", err)
	}
	out := &Spectrum{
		Wavelength: append([]float64(nil), grid...),
		Flux:       make([]float64, len(grid)),
		Meta:       s.Meta,
	}
	out.Meta.History = append([]string(nil), s.Meta.History...)
	if s.Uncertainty != nil {
		out.Uncertainty = make([]float64, len(grid))
	}
	if len(s.Wavelength) == 0 {
		for i := range grid {
			out.SetMask(i, MaskEdge)
		}
		return out, nil
	}
	r := newResampler(grid, s.Wavelength)
	inLo, inHi := r.inEdges[0], r.inEdges[len(r.inEdges)-1]
	r.each(func(i int, parts []overlap) {
		lo, hi := r.outEdges[i], r.outEdges[i+1]
		if lo < inLo || hi > inHi {
			out.SetMask(i, MaskEdge)
		}
		var good, all float64
		var maskedW float64
		var reasons, allReasons MaskReason
		for _, p := range parts {
			all += p.width
			if s.Masked(p.j) {
				maskedW += p.width
				allReasons |= s.Mask[p.j]
				continue
			}
			good += p.width
		}
		useMasked := good == 0
		if maskedW > 0.5*(hi-lo) || useMasked {
			reasons = allReasons
		}
		var sum, w, v float64
		for _, p := range parts {
			if !useMasked && s.Masked(p.j) {
				continue
			}
			sum += p.width * s.Flux[p.j]
			w += p.width
			if s.Uncertainty != nil {
				e := p.width * s.Uncertainty[p.j]
				v += e * e
			}
		}
		if w > 0 {
			out.Flux[i] = sum / w
			if out.Uncertainty != nil {
				out.Uncertainty[i] = math.Sqrt(v) / w
			}
		}
		if reasons != 0 {
			out.SetMask(i, reasons)
		}
	})
	out.addHistory("resampled (flux-conserving) onto %d samples, %.6g–%.6g Å", len(grid), grid[0], grid[len(grid)-1])
	return out, nil
}

// LinearGrid returns n wavelengths evenly spaced from lo to hi inclusive.
func LinearGrid(lo, hi float64, n int) []float64 {
	g := make([]float64, n)
	if n == 1 {
		g[0] = lo
		return g
	}
	for i := range g {
		g[i] = lo + (hi-lo)*float64(i)/float64(n-1)
	}
	return g
}

// LogGrid returns n wavelengths from lo to hi inclusive, evenly spaced in
// ln λ (constant velocity spacing c·Δlnλ).
func LogGrid(lo, hi float64, n int) []float64 {
	g := make([]float64, n)
	if n == 1 {
		g[0] = lo
		return g
	}
	a, b := math.Log(lo), math.Log(hi)
	for i := range g {
		g[i] = math.Exp(a + (b-a)*float64(i)/float64(n-1))
	}
	g[0], g[n-1] = lo, hi
	return g
}
