//go:build !amd64

package opacity

// vectorEscapes is false: only amd64 has the vector escape loop.
var vectorEscapes = false

func escapesAVX2(dst, tau, wl []float64) {
	panic("opacity: no vector escape loop on this architecture")
}

func stimAVX2(dst, wl []float64, hck float64) {
	panic("opacity: no vector loop on this architecture")
}
