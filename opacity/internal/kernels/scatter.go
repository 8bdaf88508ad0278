package kernels

// Scatter applies one resonance point of the formal integral to the
// intensities I of consecutive observed points: I[x] ← I[x] + (w − I[x])·t
// with t = c·(a0[x] + f·(a1[x] − a0[x])), the escape 1 − e^{−τ} of the
// point's line bin interpolated between its two velocity nodes (a0, a1,
// single precision; the difference taken in single precision) at fraction
// f, times c, and w the source function. a0 and a1 must be at least as
// long as I. The vector loops give the same bits as the Go loop (no fused
// multiply-adds: the Go code rounds each product).
func Scatter(I []float64, a0, a1 []float32, f, w, c float64) {
	a0, a1 = a0[:len(I)], a1[:len(I)]
	n := 0
	if lanes > 0 {
		n = len(I) &^ 3
		scatterVec(I[:n], a0[:n], a1[:n], f, w, c)
	}
	scatterGo(I[n:], a0[n:], a1[n:], f, w, c)
}

// scatterGo is the Go loop of Scatter and the twin of the vector loops:
// the explicit conversions keep the compiler from fusing a multiply and an
// add (the Go specification lets it fuse otherwise), so every step rounds
// as the assembly's does.
func scatterGo(I []float64, a0, a1 []float32, f, w, c float64) {
	a0, a1 = a0[:len(I)], a1[:len(I)]
	for x, v := range I {
		d := float64(a1[x] - a0[x])
		t := c * float64(float64(a0[x])+float64(f*d))
		I[x] = v + float64((w-v)*t)
	}
}
