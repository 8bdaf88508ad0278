//go:build amd64

package opacity

import "golang.org/x/sys/cpu"

// vectorEscapes says whether addEscapes uses escapesAVX2 (the processor has
// AVX2 and FMA and the operating system saves the vector registers). Tests
// switch it off to check the portable loop.
var vectorEscapes = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// escapesAVX2 writes λ_l (1 − e^{−τ_l}) into dst for the first 4·⌊len(wl)/4⌋
// lines, four at a time, by the same steps as escape (same constants, same
// fused multiply-adds, so the same bits). dst and tau must be at least as
// long as that.
//
//go:noescape
func escapesAVX2(dst, tau, wl []float64)

// stimAVX2 writes the stimulated-emission factor 1 − e^{−x}, x = hck/λ, of
// the first 4·⌊len(wl)/4⌋ lines into dst, four at a time, by the steps of
// escape (relative error < 3e-14, also for small x). dst must be at least
// as long as that.
//
//go:noescape
func stimAVX2(dst, wl []float64, hck float64)
