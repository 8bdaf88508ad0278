//go:build !amd64

package opacity

// vecLanes is 0: only amd64 has the vector loops.
var vecLanes = 0

func escapesAVX2(dst, tau, wl []float64)   { panic("opacity: no vector loops on this architecture") }
func escapesAVX512(dst, tau, wl []float64) { panic("opacity: no vector loops on this architecture") }

func linesAVX2(dst, wl, gf, lv []float64, hck float64) {
	panic("opacity: no vector loops on this architecture")
}
func linesAVX512(dst, wl, gf, lv []float64, hck float64) {
	panic("opacity: no vector loops on this architecture")
}
