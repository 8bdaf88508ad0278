package kernels

import "math"

// Escape returns the escape-probability complement 1 − e^{−τ} for τ ≥ 0,
// by a table-driven exponential (Tang 1989, ACM TOMS 15, 144) arranged like
// expm1: y = −min(τ, 708) = (16m + j)·ln2/16 + r, |r| ≤ ln2/32,
// s = 2^m·2^(j/16), e^y − 1 = s·q + (s − 1) in one fused multiply-add (s − 1
// exact by Sterbenz's lemma for small |y|), q = e^r − 1 from its series to
// r⁷ (truncation < r⁸/40320, below 6e-17 relative to r), evaluated as
// r + r²(a + r²(b + r²c)) with a = 1/2 + r/6, b = 1/24 + r/120,
// c = 1/720 + r/5040; where m = j = 0 it is the series itself, so thin lines
// keep full relative precision. The reduction r = y − k·(ln2/16) is one fused
// multiply-add with one constant; the rounding of ln2/16 errs by
// < |y|·1e-16 in absolute terms, which is < 1e-16 relative to 1 − e^{y} for
// every y. Relative error < 3e-14 for every τ (tested against the standard
// library; 2.4e-15 seen). Beyond 708 the result is 1 to double precision. It
// has no branch on τ, which in a big list takes every value from 1e-30 to
// 1e6 in no order a predictor could learn. The table has 16 entries, not
// more, so that the AVX-512 loop holds it in two registers and looks it up
// with one permutation instead of a gather. addEscapesScalar and the
// assembly loops take exactly these steps and give the same bits.
func Escape(tau float64) float64 {
	const shifter = 0x1.8p52
	y := math.Float64frombits(min(math.Float64bits(tau), bits708) | 1<<63)
	kf := math.FMA(y, 16/math.Ln2, shifter) - shifter
	k := int64(kf)
	r := math.FMA(kf, -math.Ln2/16, y)
	r2 := r * r
	c := math.FMA(r2, math.FMA(r, 1.0/5040, 1.0/720), math.FMA(r, 1.0/120, 1.0/24))
	q := math.FMA(r2, math.FMA(r2, c, math.FMA(r, 1.0/6, 1.0/2)), r)
	s := expTable16[k&15] * math.Float64frombits(uint64((k>>4)+1023)<<52)
	return -math.FMA(s, q, s-1)
}

// AddEscapes adds λ_l (1 − e^{−τ_l}) to acc[sp[l]] for each line: with
// vector instructions eight or four lines at a time (escapesVec, in blocks
// of fusedBlock) where the processor has them, else addEscapesScalar.
func AddEscapes(acc, tau, wl []float64, sp []uint16) {
	if lanes == 0 || len(wl) < 4 {
		addEscapesScalar(acc, tau, wl, sp)
		return
	}
	var buf [fusedBlock]float64
	tau, sp = tau[:len(wl)], sp[:len(wl)]
	for lo := 0; lo < len(wl); lo += fusedBlock {
		hi := min(lo+fusedBlock, len(wl))
		n4 := lo + (hi-lo)&^3
		w := buf[:n4-lo]
		escapesVec(w, tau[lo:n4], wl[lo:n4])
		s := sp[lo:n4]
		s = s[:len(w)]
		for i, x := range w {
			acc[s[i]] += x
		}
		if n4 < hi {
			addEscapesScalar(acc, tau[n4:hi], wl[n4:hi], sp[n4:hi])
		}
	}
}

// addEscapesScalar is AddEscapes in portable Go, with the steps of Escape
// written out (the compiler does not inline it) for two lines at a time
// (10% faster than one: less loop overhead, two chains interleaved).
func addEscapesScalar(acc, tau, wl []float64, sp []uint16) {
	const shifter = 0x1.8p52
	tau, sp = tau[:len(wl)], sp[:len(wl)]
	n := len(wl) &^ 1
	for i := 0; i < n; i += 2 {
		y0 := math.Float64frombits(min(math.Float64bits(tau[i]), bits708) | 1<<63)
		y1 := math.Float64frombits(min(math.Float64bits(tau[i+1]), bits708) | 1<<63)
		kf0 := math.FMA(y0, 16/math.Ln2, shifter) - shifter
		kf1 := math.FMA(y1, 16/math.Ln2, shifter) - shifter
		k0, k1 := int64(kf0), int64(kf1)
		r0 := math.FMA(kf0, -math.Ln2/16, y0)
		r1 := math.FMA(kf1, -math.Ln2/16, y1)
		a0, a1 := r0*r0, r1*r1
		c0 := math.FMA(a0, math.FMA(r0, 1.0/5040, 1.0/720), math.FMA(r0, 1.0/120, 1.0/24))
		c1 := math.FMA(a1, math.FMA(r1, 1.0/5040, 1.0/720), math.FMA(r1, 1.0/120, 1.0/24))
		q0 := math.FMA(a0, math.FMA(a0, c0, math.FMA(r0, 1.0/6, 1.0/2)), r0)
		q1 := math.FMA(a1, math.FMA(a1, c1, math.FMA(r1, 1.0/6, 1.0/2)), r1)
		s0 := expTable16[k0&15] * math.Float64frombits(uint64((k0>>4)+1023)<<52)
		s1 := expTable16[k1&15] * math.Float64frombits(uint64((k1>>4)+1023)<<52)
		acc[sp[i]] -= wl[i] * math.FMA(s0, q0, s0-1)
		acc[sp[i+1]] -= wl[i+1] * math.FMA(s1, q1, s1-1)
	}
	if n < len(wl) {
		acc[sp[n]] += wl[n] * Escape(tau[n])
	}
}

// bits708 is the bit pattern of 708.0. Non-negative floats order like
// their bit patterns, so min(bits(τ), bits708) clamps τ at 708 (and sends
// +Inf and NaN there) with one integer comparison.
const bits708 = 0x4086200000000000
