package kernels

import "math"

// expTable[j] = 2^(j/64), for the table-driven exponential below.
var expTable = func() (t [64]float64) {
	for j := range t {
		t[j] = math.Exp2(float64(j) / 64)
	}
	return t
}()

// ln2/64 split into a high part with trailing zero bits, so that k·ln2Hi is
// exact for |k| < 2^17, and the rest of the true ln2/64 (the fdlibm split of
// ln 2, as in Go's math.Exp, scaled exactly by 1/64).
const (
	ln2Hi = 6.93147180369123816490e-01 / 64
	ln2Lo = 1.90821492927058770002e-10 / 64
)

// Exp returns e^y to within 2 ulp for the hot loops, by the
// table-driven method (Tang 1989, ACM TOMS 15, 144): y = (64m + j)·ln2/64 + r
// with |r| ≤ ln2/128, e^y = 2^m · 2^(j/64) · e^r, and e^r by its Taylor
// polynomial to r⁵ (truncation < r⁶/720 = 3.5e-17). It returns 0 for
// y < −708 (where e^y is subnormal or zero; the callers multiply it into
// quantities that are negligible there) and defers to math.Exp above 709 and
// for NaN.
func Exp(y float64) float64 {
	if !(y > -708) {
		if y != y {
			return y
		}
		return 0
	}
	if y > 709 {
		return math.Exp(y)
	}
	const shifter = 0x1.8p52 // adding it rounds to an integer
	kf := (y*(64/math.Ln2) + shifter) - shifter
	k := int64(kf)
	r := (y - kf*ln2Hi) - kf*ln2Lo
	q := r * (1 + r*(1.0/2+r*(1.0/6+r*(1.0/24+r*(1.0/120))))) // e^r − 1
	t := expTable[k&63]
	scale := math.Float64frombits(uint64((k>>6)+1023) << 52)
	return math.FMA(t, q, t) * scale
}

// expTable16[j] = 2^(j/16), for Escape and its vector loops.
var expTable16 = func() (t [16]float64) {
	for j := range t {
		t[j] = math.Exp2(float64(j) / 16)
	}
	return t
}()
