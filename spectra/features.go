package spectra

import (
	"fmt"
	"math"
	"sort"
)

// FeatureOptions configure FindFeatures. The zero value searches the
// spectrum as it is and keeps features of significance ≥ 3.
type FeatureOptions struct {
	// ResolvingPower, when > 0, smooths the flux with a Gaussian to this
	// resolving power before the search (100–300 suits features ~0.05–0.1 λ
	// wide). Uncertainties are smoothed alongside.
	ResolvingPower float64
	// MinSignificance is the smallest depth/σ kept (default 3).
	MinSignificance float64
	// MinDepth is the smallest fractional depth kept (default 0).
	MinDepth float64
}

// Feature is one absorption feature: a local minimum of the flux measured
// against a straight pseudo-continuum between its two shoulders, the
// highest points on each side before the flux falls below the minimum
// again (the topographic prominence of the dip).
type Feature struct {
	// Wavelength of the minimum (vacuum Å), the vertex of a weighted
	// parabola fitted to the samples below half depth (kept only if it lies
	// within the half-depth width and not in a hole of the grid).
	Wavelength float64
	// Depth is 1 − F_min/F_continuum at the minimum; DepthErr its 1σ error.
	Depth, DepthErr float64
	// Width is the full width (Å) at half depth below the pseudo-continuum.
	Width float64
	// Significance is (F_continuum − F_min)/σ, with σ combining the
	// uncertainty at the minimum and at the shoulders.
	Significance float64
	// EquivalentWidth is ∫(1 − F/F_continuum) dλ over λ ± Width, within the
	// shoulders (Å).
	EquivalentWidth float64
	// Lo and Hi are the shoulder wavelengths (Å); ContLo and ContHi the
	// flux there.
	Lo, Hi, ContLo, ContHi float64
}

// FindFeatures returns the absorption features of s in order of
// wavelength. Masked samples are skipped. With uncertainties they give
// the significance; without, the noise is estimated from the scatter of
// second differences (σ = 1.4826·MAD/√1.5, robust to features and
// outliers). The shoulders are maxima of noisy data, so depths are biased
// up by about twice the (smoothed) noise; smooth first for noisy spectra.
func FindFeatures(s *Spectrum, opt FeatureOptions) ([]Feature, error) {
	if err := s.Validate(); err != nil {
		return nil, fmt.Errorf("find features: %w", err)
	}
	minSig := opt.MinSignificance
	if minSig <= 0 {
		minSig = 3
	}
	var x, y, e []float64
	for i := range s.Wavelength {
		if s.Masked(i) {
			continue
		}
		x = append(x, s.Wavelength[i])
		y = append(y, s.Flux[i])
		if s.Uncertainty != nil {
			e = append(e, s.Uncertainty[i])
		}
	}
	n := len(x)
	if n < 5 {
		return nil, fmt.Errorf("spectra: find features: %d unmasked samples, need at least 5", n)
	}
	if e == nil {
		sigma := robustNoise(y)
		e = make([]float64, n)
		for i := range e {
			e[i] = sigma
		}
	}
	if opt.ResolvingPower > 0 {
		x, y, e = prebin(x, y, e, opt.ResolvingPower)
		n = len(x)
		ys := make([]float64, n)
		es := make([]float64, n)
		smooth(ys, es, x, y, e, opt.ResolvingPower, nil)
		y, e = ys, es
	}
	var out []Feature
	for i := 1; i < n-1; i++ {
		if !(y[i] < y[i-1] && y[i] <= y[i+1]) {
			continue
		}
		L := i
		for j := i - 1; j >= 0 && y[j] >= y[i]; j-- {
			if y[j] > y[L] {
				L = j
			}
		}
		R := i
		for j := i + 1; j < n && y[j] >= y[i]; j++ {
			if y[j] > y[R] {
				R = j
			}
		}
		if L == i || R == i {
			continue
		}
		cont := func(k int) float64 {
			return y[L] + (y[R]-y[L])*(x[k]-x[L])/(x[R]-x[L])
		}
		c := cont(i)
		dep := c - y[i]
		if !(c > 0) || !(dep > 0) {
			continue
		}
		wr := (x[i] - x[L]) / (x[R] - x[L])
		ec := math.Hypot((1-wr)*e[L], wr*e[R])
		sd := math.Hypot(e[i], ec)
		f := Feature{Lo: x[L], Hi: x[R], ContLo: y[L], ContHi: y[R]}
		// Width at half depth (from the lowest sample).
		half := func(k int) float64 { return y[k] - (cont(k) - dep/2) } // ≥ 0 above the half level
		xl, kl := x[L], L
		for k := i - 1; k >= L; k-- {
			if half(k) >= 0 {
				h0, h1 := half(k), half(k+1)
				xl, kl = x[k]+(x[k+1]-x[k])*h0/(h0-h1), k
				break
			}
		}
		xr, kr := x[R], R
		for k := i + 1; k <= R; k++ {
			if half(k) >= 0 {
				h0, h1 := half(k-1), half(k)
				xr, kr = x[k-1]+(x[k]-x[k-1])*(-h0)/(h1-h0), k
				break
			}
		}
		f.Width = xr - xl
		// Minimum: a weighted least-squares parabola through the samples
		// below half depth (less noise-biased than the lowest sample).
		xm, ym := x[i], y[i]
		if px, py, ok := parabolaVertex(x[kl:kr+1], y[kl:kr+1], e[kl:kr+1]); ok && px > xl && px < xr && py <= cont(i) && !inHole(x[kl:kr+1], px) {
			xm, ym = px, py
		}
		f.Wavelength = xm
		cm := y[L] + (y[R]-y[L])*(xm-x[L])/(x[R]-x[L])
		dep = cm - ym
		f.Depth = dep / cm
		f.Significance = dep / sd
		f.DepthErr = math.Hypot(e[i]/cm, ym*ec/(cm*cm))
		if f.Significance < minSig || f.Depth < opt.MinDepth {
			continue
		}
		// Equivalent width over λ_min ± FWHM (±2.35σ of a Gaussian dip,
		// 98 % of its area), within the shoulders: integrating out to distant
		// shoulders would add the pseudo-continuum's noise bias.
		a0, a1 := math.Max(x[L], xm-f.Width), math.Min(x[R], xm+f.Width)
		for k := L; k < R; k++ {
			lo, hi := math.Max(x[k], a0), math.Min(x[k+1], a1)
			if hi <= lo {
				continue
			}
			a := 1 - y[k]/cont(k)
			b := 1 - y[k+1]/cont(k+1)
			f.EquivalentWidth += 0.5 * (a + b) * (hi - lo)
		}
		out = append(out, f)
	}
	sort.Slice(out, func(a, b int) bool { return out[a].Wavelength < out[b].Wavelength })
	return out, nil
}

// robustNoise estimates the per-sample noise of y from its second
// differences: for white noise of variance σ², y[i] − (y[i−1]+y[i+1])/2
// has variance 1.5σ²; 1.4826·MAD converts the median absolute deviation to
// a Gaussian σ.
func robustNoise(y []float64) float64 {
	if len(y) < 3 {
		return 0
	}
	d := make([]float64, 0, len(y)-2)
	for i := 1; i < len(y)-1; i++ {
		d = append(d, y[i]-0.5*(y[i-1]+y[i+1]))
	}
	med := median(d)
	for i := range d {
		d[i] = math.Abs(d[i] - med)
	}
	return 1.4826 * median(d) / math.Sqrt(1.5)
}

func median(v []float64) float64 {
	c := append([]float64(nil), v...)
	sort.Float64s(c)
	m := len(c) / 2
	if len(c)%2 == 1 {
		return c[m]
	}
	return 0.5 * (c[m-1] + c[m])
}

// parabolaVertex fits y = a + b x + c x² by weighted least squares
// (weights 1/σ²) and returns the vertex when c > 0.
func parabolaVertex(x, y, e []float64) (xv, yv float64, ok bool) {
	if len(x) < 3 {
		return 0, 0, false
	}
	x0 := x[len(x)/2]
	var s [5]float64
	var t [3]float64
	for k := range x {
		w := 1 / (e[k] * e[k])
		d := x[k] - x0
		p := w
		for j := 0; j < 5; j++ {
			s[j] += p
			if j < 3 {
				t[j] += p * y[k]
			}
			p *= d
		}
	}
	// Normal equations [s0 s1 s2; s1 s2 s3; s2 s3 s4][a b c] = t, by Cramer.
	det3 := func(m [9]float64) float64 {
		return m[0]*(m[4]*m[8]-m[5]*m[7]) - m[1]*(m[3]*m[8]-m[5]*m[6]) + m[2]*(m[3]*m[7]-m[4]*m[6])
	}
	m := [9]float64{s[0], s[1], s[2], s[1], s[2], s[3], s[2], s[3], s[4]}
	D := det3(m)
	if D == 0 || math.IsNaN(D) {
		return 0, 0, false
	}
	ma, mb, mc := m, m, m
	ma[0], ma[3], ma[6] = t[0], t[1], t[2]
	mb[1], mb[4], mb[7] = t[0], t[1], t[2]
	mc[2], mc[5], mc[8] = t[0], t[1], t[2]
	a, b, c := det3(ma)/D, det3(mb)/D, det3(mc)/D
	if !(c > 0) {
		return 0, 0, false
	}
	xv = -b / (2 * c)
	return x0 + xv, a + b*xv + c*xv*xv, true
}

// prebin makes smoothing to resolving power r cheap on grids much finer
// than the kernel: when the median spacing in ln λ is below a sixth of the
// kernel's σ, the samples are averaged (flux-conserving, uncertainties
// propagated) onto a grid uniform in ln λ with a step of σ/3, which widens
// the kernel by less than 0.5 %. Bins that contain no original sample
// (gaps left by masked data) are dropped rather than filled.
func prebin(x, y, e []float64, r float64) (bx, by, be []float64) {
	n := len(x)
	step := fwhmToSigma / r / 3
	d := make([]float64, n-1)
	for i := 1; i < n; i++ {
		d[i-1] = math.Log(x[i] / x[i-1])
	}
	if median(d) >= step/2 {
		return x, y, e
	}
	m := int(math.Log(x[n-1]/x[0])/step) + 1
	if m < 5 {
		return x, y, e
	}
	grid := LogGrid(x[0], x[n-1], m)
	rs := newResampler(grid, x)
	j := 0
	rs.each(func(i int, parts []overlap) {
		lo, hi := rs.outEdges[i], rs.outEdges[i+1]
		for j < n && x[j] < lo {
			j++
		}
		if j >= n || x[j] > hi {
			return // no original sample in this bin: a gap
		}
		var sw, sf, sv float64
		for _, p := range parts {
			sw += p.width
			sf += p.width * y[p.j]
			q := p.width * e[p.j]
			sv += q * q
		}
		if sw > 0 {
			bx = append(bx, grid[i])
			by = append(by, sf/sw)
			be = append(be, math.Sqrt(sv)/sw)
		}
	})
	return bx, by, be
}

// inHole reports whether p falls between two samples of x spaced more than
// three times the median spacing (a hole left by masked data).
func inHole(x []float64, p float64) bool {
	if len(x) < 2 {
		return false
	}
	d := make([]float64, len(x)-1)
	for k := range d {
		d[k] = x[k+1] - x[k]
	}
	med := median(d)
	for k := range d {
		if p >= x[k] && p <= x[k+1] {
			return d[k] > 3*med
		}
	}
	return false
}
