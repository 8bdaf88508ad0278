//go:build amd64 && !noasm

package kernels

import "golang.org/x/sys/cpu"

// maxLanes is the number of lines the vector loops of kernels_amd64.s take
// at a time: 8 where the processor has AVX-512 (F and DQ) and the operating
// system saves its registers, 4 where it has AVX2 and FMA, else 0 (portable
// Go loops only).
var maxLanes = func() int {
	switch {
	case cpu.X86.HasAVX512F && cpu.X86.HasAVX512DQ && cpu.X86.HasAVX2 && cpu.X86.HasFMA:
		return 8
	case cpu.X86.HasAVX2 && cpu.X86.HasFMA:
		return 4
	}
	return 0
}()

// linesVec writes λ(1 − e^{−τ}), τ = λ·gf·lv·(1 − e^{−hck/λ}), of the first
// 4·⌊len(wl)/4⌋ lines into dst with the widest vector loop in use (lanes
// must be > 0).
func linesVec(dst, wl, gf, lv []float64, hck float64) {
	dst, gf, lv = dst[:len(wl)], gf[:len(wl)], lv[:len(wl)] // the kernels trust these lengths
	n8 := 0
	if lanes == 8 {
		n8 = len(wl) &^ 7
		linesAVX512(dst[:n8], wl[:n8], gf[:n8], lv[:n8], hck)
	}
	linesAVX2(dst[n8:], wl[n8:], gf[n8:], lv[n8:], hck) // the rest, or a last group of four
}

// escapesVec writes λ(1 − e^{−τ}) of the first 4·⌊len(wl)/4⌋ lines into dst
// with the widest vector loop in use (lanes must be > 0).
func escapesVec(dst, tau, wl []float64) {
	dst, tau = dst[:len(wl)], tau[:len(wl)] // the kernels trust these lengths
	n8 := 0
	if lanes == 8 {
		n8 = len(wl) &^ 7
		escapesAVX512(dst[:n8], tau[:n8], wl[:n8])
	}
	escapesAVX2(dst[n8:], tau[n8:], wl[n8:]) // the rest, or a last group of four
}

// escapesAVX2 writes λ_l (1 − e^{−τ_l}) into dst for the first 4·⌊len(wl)/4⌋
// lines, four at a time, by the steps of Escape (same constants, same fused
// multiply-adds, so the same bits). dst and tau must be at least as long as
// that.
//
//go:noescape
func escapesAVX2(dst, tau, wl []float64)

// escapesAVX512 is escapesAVX2 eight lines at a time, for the first
// 8·⌊len(wl)/8⌋ lines (same steps, same bits).
//
//go:noescape
func escapesAVX512(dst, tau, wl []float64)

// linesAVX2 writes λ(1 − e^{−τ}) with τ = λ·gf·lv·(1 − e^{−hck/λ}) of the
// first 4·⌊len(wl)/4⌋ lines into dst, four at a time: the stimulated-emission
// factor and the escape by the steps of Escape, the product in the order of
// SumLines. lv holds each line's level term, already gathered. dst, gf
// and lv must be at least as long as that.
//
//go:noescape
func linesAVX2(dst, wl, gf, lv []float64, hck float64)

// linesAVX512 is linesAVX2 eight lines at a time, for the first
// 8·⌊len(wl)/8⌋ lines (same steps, same bits).
//
//go:noescape
func linesAVX512(dst, wl, gf, lv []float64, hck float64)

// scatterVec is Scatter's loop over the first 4·⌊len(I)/4⌋ points with the
// widest vector loop in use (lanes must be > 0).
func scatterVec(I []float64, a0, a1 []float32, f, w, c float64) {
	a0, a1 = a0[:len(I)], a1[:len(I)] // the kernels trust these lengths
	n8 := 0
	if lanes == 8 {
		n8 = len(I) &^ 7
		scatterAVX512(I[:n8], a0[:n8], a1[:n8], f, w, c)
	}
	scatterAVX2(I[n8:], a0[n8:], a1[n8:], f, w, c) // the rest, or a last group of four
}

// scatterAVX2 is scatterGo four points at a time, for the first
// 4·⌊len(I)/4⌋ points (same steps, same bits). a0 and a1 must be at least
// as long as that.
//
//go:noescape
func scatterAVX2(I []float64, a0, a1 []float32, f, w, c float64)

// scatterAVX512 is scatterAVX2 eight points at a time, for the first
// 8·⌊len(I)/8⌋ points.
//
//go:noescape
func scatterAVX512(I []float64, a0, a1 []float32, f, w, c float64)

// runDecayVec is RunDecay's loop over the first 4·⌊len(I)/4⌋ points with
// the widest vector loop in use (lanes must be > 0).
func runDecayVec(I, t []float64, w float64) {
	t = t[:len(I)] // the kernels trust this length
	n8 := 0
	if lanes == 8 {
		n8 = len(I) &^ 7
		runDecayAVX512(I[:n8], t[:n8], w)
	}
	runDecayAVX2(I[n8:], t[n8:], w)
}

// runDecayAVX2 is runDecayGo four points at a time, for the first
// 4·⌊len(I)/4⌋ points (the escape by the steps of Escape: same bits). t
// must be at least as long as that.
//
//go:noescape
func runDecayAVX2(I, t []float64, w float64)

// runDecayAVX512 is runDecayAVX2 eight points at a time, for the first
// 8·⌊len(I)/8⌋ points.
//
//go:noescape
func runDecayAVX512(I, t []float64, w float64)
