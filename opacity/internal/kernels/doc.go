// Package kernels holds the hot loops of the expansion opacity and of the
// Sobolev depths: the escape λ(1 − e^{−τ}) summed per species (AddEscapes),
// the fused pass that computes each line's τ with its stimulated-emission
// factor and sums its escape (SumLines), the depths alone with the factor
// carried along ascending wavelengths (Depths, Carry), and the
// table-driven exponentials they rest on (Exp, Escape; Tang 1989, ACM TOMS
// 15, 144).
//
// On amd64 the loops use AVX-512 (eight lines at a time) or AVX2 with FMA
// (four), chosen at run time with golang.org/x/sys/cpu (kernels_amd64.s).
// Everywhere else, and with the build tag noasm, they are the portable Go
// loops only. The vector loops take the same steps with the same constants
// and fused multiply-adds as the Go code and give the same bits; the tests
// check every width the processor has against the Go code and against the
// standard library's math.Exp and math.Expm1. MaxLanes, Lanes and SetLanes
// tell and choose the width (SetLanes is for tests and benchmarks).
//
// Units are those of the callers: wavelengths in vacuum Å, hck = hc/kT in Å,
// the level terms such that τ = λ[Å]·gf·lev·stim. Slices of per-line
// arrays must be of one length; the loops trust those lengths once sliced.
package kernels
