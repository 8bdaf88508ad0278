//go:build amd64

package opacity

import "golang.org/x/sys/cpu"

// vecLanes is the number of lines the vector loops of escape_amd64.s take
// at a time: 8 where the processor has AVX-512 (F and DQ) and the operating
// system saves its registers, 4 where it has AVX2 and FMA, else 0 (portable
// Go loops only). Tests lower it to check the narrower loops.
var vecLanes = func() int {
	switch {
	case cpu.X86.HasAVX512F && cpu.X86.HasAVX512DQ && cpu.X86.HasAVX2 && cpu.X86.HasFMA:
		return 8
	case cpu.X86.HasAVX2 && cpu.X86.HasFMA:
		return 4
	}
	return 0
}()

// escapesAVX2 writes λ_l (1 − e^{−τ_l}) into dst for the first 4·⌊len(wl)/4⌋
// lines, four at a time, by the steps of escape (same constants, same fused
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
// factor and the escape by the steps of escape, the product in the order of
// sumFused. lv holds each line's level term, already gathered. dst, gf
// and lv must be at least as long as that.
//
//go:noescape
func linesAVX2(dst, wl, gf, lv []float64, hck float64)

// linesAVX512 is linesAVX2 eight lines at a time, for the first
// 8·⌊len(wl)/8⌋ lines (same steps, same bits).
//
//go:noescape
func linesAVX512(dst, wl, gf, lv []float64, hck float64)
