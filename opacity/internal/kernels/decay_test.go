package kernels

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestRunDecay checks RunDecay at every vector width the processor has
// against its Go loop bit for bit, and against w + (I − w)·e^{−t} with the
// standard library's math.Exp to 1e-13 relative, for lengths 0–40 and
// depths from 1e-20 to 1e3 (with 0, a rounding residue −1e-17 taken as 0,
// and NaN taken as 0).
func TestRunDecay(t *testing.T) {
	r := rand.New(rand.NewPCG(10, 11))
	widths := laneWidths(t)
	for n := 0; n <= 40; n++ {
		I0 := make([]float64, n)
		tau := make([]float64, n+2)
		for x := range n {
			I0[x] = 2 * r.Float64()
			tau[x] = math.Pow(10, -20+23*r.Float64())
		}
		if n > 3 {
			tau[0], tau[1], tau[2] = 0, -1e-17, math.NaN()
		}
		w := 0.2 + r.Float64()
		var first []float64
		for _, wd := range widths {
			lanes = wd
			I := append([]float64(nil), I0...)
			RunDecay(I, tau, w)
			for x := range I {
				tt := tau[x]
				if !(tt > 0) {
					tt = 0
				}
				want := w + (I0[x]-w)*math.Exp(-tt)
				if d := math.Abs(I[x] - want); d > 1e-13*math.Max(math.Abs(want), 1) {
					t.Fatalf("%d lanes, n = %d, t = %g: %v, want %v", wd, n, tau[x], I[x], want)
				}
			}
			if first == nil {
				first = I
				continue
			}
			for x := range I {
				if math.Float64bits(I[x]) != math.Float64bits(first[x]) {
					t.Fatalf("%d lanes, n = %d, point %d: %v, the Go loop %v", wd, n, x, I[x], first[x])
				}
			}
		}
	}
}

// BenchmarkRunDecay times one run over a 512-point chunk at each width.
func BenchmarkRunDecay(b *testing.B) {
	r := rand.New(rand.NewPCG(12, 13))
	I := make([]float64, 512)
	tau := make([]float64, 512)
	for x := range I {
		I[x], tau[x] = r.Float64(), math.Pow(10, -4+5*r.Float64())
	}
	own := lanes
	defer func() { lanes = own }()
	for _, wd := range []int{0, 4, 8} {
		if wd > maxLanes {
			continue
		}
		lanes = wd
		b.Run(map[int]string{0: "go", 4: "avx2", 8: "avx512"}[wd], func(b *testing.B) {
			for b.Loop() {
				RunDecay(I, tau, 0.5)
			}
			b.ReportMetric(float64(len(I)*b.N)/b.Elapsed().Seconds()/1e9, "Gpoints/s")
		})
	}
}
