package kernels

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestScatter checks Scatter at every vector width the processor has
// against the formula written out in the order the synthesis wrote it
// before the kernel existed, bit for bit, for lengths 0–40 (every
// remainder of 4 and 8) and escapes spanning 0–1, including 0 and 1.
func TestScatter(t *testing.T) {
	r := rand.New(rand.NewPCG(6, 7))
	widths := laneWidths(t)
	for n := 0; n <= 40; n++ {
		I0 := make([]float64, n)
		a0 := make([]float32, n+3) // longer than I, as the callers' runs are
		a1 := make([]float32, n+3)
		for x := range n {
			I0[x] = 2 * r.Float64()
			a0[x] = float32(math.Pow(r.Float64(), 4))
			a1[x] = float32(math.Pow(r.Float64(), 4))
		}
		if n > 2 {
			a0[0], a1[0], a0[1], a1[1] = 0, 1, 1, 1
		}
		f, w, c := r.Float64(), 0.3+r.Float64(), r.Float64()
		want := make([]float64, n)
		for x := range want {
			// The loop of synth's scatterPoint before Scatter (built
			// without fused multiply-adds, GOAMD64=v1).
			tt := c * (float64(a0[x]) + f*float64(a1[x]-a0[x]))
			want[x] = I0[x] + float64((w-I0[x])*tt)
		}
		for _, wd := range widths {
			lanes = wd
			I := append([]float64(nil), I0...)
			Scatter(I, a0, a1, f, w, c)
			for x := range I {
				if math.Float64bits(I[x]) != math.Float64bits(want[x]) {
					t.Fatalf("%d lanes, n = %d, point %d: %v, want %v", wd, n, x, I[x], want[x])
				}
			}
		}
	}
}

// BenchmarkScatter times one resonance point over a chunk of 512 observed
// points (the synthesis's chunk) at each vector width.
func BenchmarkScatter(b *testing.B) {
	r := rand.New(rand.NewPCG(8, 9))
	I := make([]float64, 512)
	a0 := make([]float32, 512)
	a1 := make([]float32, 512)
	for x := range I {
		I[x], a0[x], a1[x] = r.Float64(), float32(r.Float64()), float32(r.Float64())
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
				Scatter(I, a0, a1, 0.3, 1, 0.5)
			}
			b.ReportMetric(float64(len(I)*b.N)/b.Elapsed().Seconds()/1e9, "Gpoints/s")
		})
	}
}
