package kernels

// linesGo is the pure-Go twin of the vector line loops (linesAVX2,
// linesAVX512): for the first 4·⌊len(wl)/4⌋ lines it writes
// λ(1 − e^{−τ}), τ = ((λ·gf)·lv)·stim, stim = 1 − e^{−hck/λ}, with both
// exponentials by the steps of Escape, in the order the assembly takes
// them, so it gives the same bits (tested). Unlike SumLines' portable path
// it takes a fresh exponential for every line's stimulated-emission
// factor.
func linesGo(dst, wl, gf, lv []float64, hck float64) {
	n := len(wl) &^ 3
	dst, wl, gf, lv = dst[:n], wl[:n], gf[:n], lv[:n]
	for i, lam := range wl {
		stim := Escape(hck / lam)
		tau := lam * gf[i] * lv[i] * stim
		dst[i] = lam * Escape(tau)
	}
}

// escapesGo is the pure-Go twin of the vector escape loops (escapesAVX2,
// escapesAVX512): λ(1 − e^{−τ}) of the first 4·⌊len(wl)/4⌋ lines into dst,
// by the steps of Escape (same bits).
func escapesGo(dst, tau, wl []float64) {
	n := len(wl) &^ 3
	dst, tau, wl = dst[:n], tau[:n], wl[:n]
	for i, lam := range wl {
		dst[i] = lam * Escape(tau[i])
	}
}
