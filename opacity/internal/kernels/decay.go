package kernels

// RunDecay applies a run of resonance points of the formal integral to the
// intensities I of consecutive observed points: I[x] ← w + (I[x] − w)·e^{−t[x]}
// with t[x] the run's summed optical depth there and w its source
// function, written as I − (I − w)·(1 − e^{−t}) with the escape by Escape's
// steps. A depth that is not positive (a rounding residue of −1e-17, or
// NaN) counts as 0. t must be at least as long as I. The vector loops give
// the Go loop's bits.
func RunDecay(I, t []float64, w float64) {
	t = t[:len(I)]
	n := 0
	if lanes > 0 {
		n = len(I) &^ 3
		runDecayVec(I[:n], t[:n], w)
	}
	runDecayGo(I[n:], t[n:], w)
}

// runDecayGo is the Go loop of RunDecay and the twin of the vector loops.
func runDecayGo(I, t []float64, w float64) {
	t = t[:len(I)]
	for x, v := range I {
		tt := t[x]
		if !(tt > 0) {
			tt = 0
		}
		I[x] = v - float64((v-w)*Escape(tt))
	}
}
