//go:build !amd64 || noasm

package kernels

// maxLanes is 0: only amd64 without the noasm tag has the vector loops, so
// every width in use is the portable Go loops.
var maxLanes = 0

// linesVec is linesGo: with maxLanes = 0 the vector path is never taken, but
// the pure-Go twin keeps it defined and correct.
func linesVec(dst, wl, gf, lv []float64, hck float64) { linesGo(dst, wl, gf, lv, hck) }

// escapesVec is escapesGo (see linesVec).
func escapesVec(dst, tau, wl []float64) { escapesGo(dst, tau, wl) }

// scatterVec is scatterGo (see linesVec).
func scatterVec(I []float64, a0, a1 []float32, f, w, c float64) { scatterGo(I, a0, a1, f, w, c) }

// runDecayVec is runDecayGo (see linesVec).
func runDecayVec(I, t []float64, w float64) { runDecayGo(I, t, w) }
