package kernels

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestExp compares Exp with the standard library's math.Exp (the
// reference implementation here) over the range the hot loops use.
func TestExp(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	worst := 0.0
	for i := range 2_000_000 {
		var y float64
		switch i % 4 {
		case 0:
			y = -700 + 1405*r.Float64()
		case 1:
			y = -50 + 60*r.Float64()
		case 2:
			y = (r.Float64() - 0.5) * 1e-3
		default:
			y = -1 + 2*r.Float64()
		}
		got, want := Exp(y), math.Exp(y)
		rel := math.Abs(got-want) / want
		worst = max(worst, rel)
		if rel > 4.5e-16 { // 2 ulp
			t.Fatalf("Exp(%v) = %v, math.Exp %v (relative error %g)", y, got, want, rel)
		}
	}
	t.Logf("worst relative error %g", worst)
	for _, c := range []struct{ y, want float64 }{
		{0, 1}, {math.Inf(-1), 0}, {-800, 0}, {710, math.Exp(710)}, {math.Inf(1), math.Inf(1)},
	} {
		if got := Exp(c.y); got != c.want {
			t.Errorf("Exp(%v) = %v, want %v", c.y, got, c.want)
		}
	}
	if !math.IsNaN(Exp(math.NaN())) {
		t.Error("Exp(NaN) is not NaN")
	}
}

func BenchmarkExp(b *testing.B) {
	ys := make([]float64, 4096)
	r := rand.New(rand.NewPCG(1, 2))
	for i := range ys {
		ys[i] = -30 + 35*r.Float64()
	}
	var s float64
	b.Run("math", func(b *testing.B) {
		for b.Loop() {
			for _, y := range ys {
				s += math.Exp(y)
			}
		}
		b.ReportMetric(float64(b.N*len(ys))/b.Elapsed().Seconds(), "exp/s")
	})
	b.Run("fast", func(b *testing.B) {
		for b.Loop() {
			for _, y := range ys {
				s += Exp(y)
			}
		}
		b.ReportMetric(float64(b.N*len(ys))/b.Elapsed().Seconds(), "exp/s")
	})
	if s == 0 {
		b.Fatal()
	}
}

// TestEscape compares escape with −math.Expm1(−τ) (the reference) over the
// optical depths a line list spans.
func TestEscape(t *testing.T) {
	r := rand.New(rand.NewPCG(2, 3))
	for range 1_000_000 {
		tau := math.Pow(10, -30+36*r.Float64())
		got, want := Escape(tau), -math.Expm1(-tau)
		if rel := math.Abs(got-want) / want; rel > 3e-14 {
			t.Fatalf("Escape(%v) = %v, want %v (relative error %g)", tau, got, want, rel)
		}
	}
	for _, c := range []struct{ tau, want float64 }{{0, 0}, {1e-300, 1e-300}, {800, 1}, {math.Inf(1), 1}} {
		if got := Escape(c.tau); got != c.want {
			t.Errorf("Escape(%v) = %v, want %v", c.tau, got, c.want)
		}
	}
}
