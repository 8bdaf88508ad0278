package kernels

import "math"

// SumLines adds λ_l (1 − e^{−τ_l}) of each line of a run to acc[sp[l]],
// with τ computed as in opacity's Sobolev: τ = λ·gf·lev[lower]·stim,
// stim = 1 − e^{−hck/λ}. wl (vacuum Å, ascending), gf, sp and lower are the
// run's per-line arrays (of one length), lev the level term of every level
// and hck = hc/kT in Å. Lines of species not
// modelled have lev = 0, so τ = 0. With vector instructions (lanes > 0)
// all but the last 0–3 lines of the run go through sumVec, which computes
// the stimulated-emission factor afresh for every line; the rest, and the
// whole run on processors without AVX2, take the portable pair Depths
// (factor carried along) and AddEscapes in blocks of fusedBlock lines. The
// tests hold both to the formula evaluated directly.
func SumLines(wl, gf []float64, sp []uint16, lower []uint32, lev []float64, hck float64, acc []float64) {
	n4 := 0
	if lanes > 0 {
		n4 = len(wl) &^ 3
		sumVec(wl[:n4], gf[:n4], sp[:n4], lower[:n4], lev, hck, acc)
	}
	var buf [fusedBlock]float64
	var c Carry
	for lo := n4; lo < len(wl); lo += fusedBlock {
		hi := min(lo+fusedBlock, len(wl))
		tau := buf[:hi-lo]
		Depths(tau, wl[lo:hi], gf[lo:hi], lower[lo:hi], lev, hck, &c)
		AddEscapes(acc, tau, wl[lo:hi], sp[lo:hi])
	}
}

// sumVec is SumLines with the vector loops, for a run whose length is a
// multiple of four, in blocks of fusedBlock lines: the level terms of a block
// are gathered into a buffer, linesVec turns each line into its term
// λ(1 − e^{−τ}), and one loop adds the terms to the per-species sums while
// it gathers the level terms of the next block (the two streams of
// independent loads keep more of them in flight than two loops would).
func sumVec(wl, gf []float64, sp []uint16, lower []uint32, lev []float64, hck float64, acc []float64) {
	var w, lv [fusedBlock]float64
	n := len(wl)
	hi := min(fusedBlock, n)
	gatherLevels(lv[:hi], lower[:hi], lev)
	for lo := 0; lo < n; lo = hi {
		hi = min(lo+fusedBlock, n)
		m := hi - lo
		linesVec(w[:m], wl[lo:hi], gf[lo:hi], lv[:m], hck)
		next := lower[hi:min(hi+fusedBlock, n)]
		s := sp[lo:hi]
		k := len(next) // ≤ m: only the last block is shorter
		for i, l := range next {
			acc[s[i]] += w[i]
			lv[i] = lev[l]
		}
		for i := k; i < m; i++ {
			acc[s[i]] += w[i]
		}
	}
}

// gatherLevels writes lev[lower[i]] into dst[i] for each line.
func gatherLevels(dst []float64, lower []uint32, lev []float64) {
	dst = dst[:len(lower)]
	for i, l := range lower {
		dst[i] = lev[l]
	}
}

// Carry is the state of the stimulated-emission factor carried along a
// run of lines (see stimRefresh): x = hc/λkT of the previous line, e^{−x},
// and the number of steps left before a fresh exponential. The zero value
// starts a run with a fresh exponential.
type Carry struct {
	x, e float64
	left int
}

// Depths writes τ = λ·gf·lev[lower]·(1 − e^{−hck/λ}) of each line into
// dst (at least as long as wl), continuing the stimulated-emission factor
// from c and leaving it in c for the next run of ascending wavelengths
// (relative accuracy ~1e-13, see stimRefresh). The step is written out here
// (the compiler does not inline it).
func Depths(dst, wl, gf []float64, lower []uint32, lev []float64, hck float64, c *Carry) {
	dst, gf, lower = dst[:len(wl)], gf[:len(wl)], lower[:len(wl)]
	xPrev, e, left := c.x, c.e, c.left
	for i, lam := range wl {
		x := hck / lam
		d := xPrev - x
		if left > 0 && d >= 0 && d <= 1e-3 {
			e *= 1 + d*(1+d*(1.0/2+d*(1.0/6+d*(1.0/24))))
			left--
		} else {
			e = Exp(-x)
			left = stimRefresh
		}
		xPrev = x
		stim := 1 - e
		if x < 1e-3 {
			stim = -math.Expm1(-x)
		}
		dst[i] = lam * gf[i] * lev[lower[i]] * stim
	}
	c.x, c.e, c.left = xPrev, e, left
}

// fusedBlock is the number of lines SumLines and sumVec take at a time: the
// buffers of a block (2 KB each) stay in the first-level cache between the
// loops that write and read them. 512 to 2048 measured the same.
const fusedBlock = 256

// stimRefresh bounds the run of lines over which the stimulated-emission
// factor 1 − e^{−x}, x = hc/λkT, is carried along ascending wavelengths
// instead of recomputed: from one line to the next e^{−x} is multiplied by
// e^{d}, d = x_prev − x, from its Taylor series to d⁴ when 0 ≤ d ≤ 10⁻³
// (truncation < d⁵/120 ≈ 1e-17); a larger step, a descent or the end of a
// run takes a fresh exponential. The rounding drift over a run stays below
// about 1e-13 relative. For x < 10⁻³ the factor is −expm1(−x).
const stimRefresh = 1024
