package kernels

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/physics"
)

// TestAddEscapes holds the written-out escape loop of the fused pass to
// −math.Expm1(−τ) (the reference), line by line, over the optical depths a
// line list spans, including 0, the clamp at 708, +Inf and the thin limit.
func TestAddEscapes(t *testing.T) {
	r := rand.New(rand.NewPCG(4, 5))
	n := 59999 // odd: the loop takes two lines at a time
	tau := make([]float64, n)
	wl := make([]float64, n)
	sp := make([]uint16, n)
	for i := range tau {
		tau[i] = math.Pow(10, -30+36*r.Float64())
		wl[i] = 3000 + 20000*r.Float64()
		sp[i] = uint16(i)
	}
	copy(tau, []float64{0, 1e-300, 707.9, 708, 800, math.Inf(1), 1.0 / 128, math.Ln2 / 128})
	tau[n-1] = 0.3 // the odd line left over
	// Every loop the processor has (portable, AVX2, AVX-512), which must
	// agree bit for bit (same steps, same constants, same fused
	// multiply-adds).
	widths := laneWidths(t)
	sums := make([][]float64, len(widths))
	for v, w := range widths {
		lanes = w
		acc := make([]float64, n)
		AddEscapes(acc, tau, wl, sp)
		for i := range tau {
			want := -math.Expm1(-tau[i]) * wl[i]
			if !scalar.EqualWithinAbsOrRel(acc[i], want, 0, 3e-14) {
				t.Fatalf("%d lanes, τ = %v: λ(1 − e^−τ) = %v, want %v", w, tau[i], acc[i], want)
			}
		}
		sums[v] = acc
	}
	for v := 1; v < len(widths); v++ {
		for i := range tau {
			if math.Float64bits(sums[0][i]) != math.Float64bits(sums[v][i]) {
				t.Fatalf("τ = %v: %d-lane loop %v, portable %v", tau[i], widths[v], sums[v][i], sums[0][i])
			}
		}
	}
}

// laneWidths returns the vector widths to test: 0 (the portable loops) and
// every width up to the processor's own, and restores the width in use at
// the end of the test.
func laneWidths(t *testing.T) []int {
	own := lanes
	if own != maxLanes {
		t.Fatalf("width in use %d, the processor's %d: a test did not restore it", own, maxLanes)
	}
	t.Cleanup(func() { lanes = own })
	widths := []int{0}
	for _, w := range []int{4, 8} {
		if w <= own {
			widths = append(widths, w)
		}
	}
	if len(widths) < 3 {
		t.Logf("this processor and build have vector loops of %d lanes: the wider ones are not checked here", own)
	}
	return widths
}

func TestBits708(t *testing.T) {
	if math.Float64frombits(bits708) != 708 {
		t.Errorf("bits708 is %v, not 708", math.Float64frombits(bits708))
	}
}

// TestLinesVector holds the vector line loops (stimulated-emission factor,
// product with the gathered level term, escape, weight λ) and their pure-Go
// twin linesGo to the formula evaluated with the standard library,
// λ(1 − e^{−τ}) with τ = λ·gf·lv·(−expm1(−hc/λkT)), to 1e-13 (each of the
// two exponentials errs by < 3e-14), from x = hc/λkT = 1e-6 to beyond 708
// and from thin to thick lines; and the AVX2 and AVX-512 loops to the twin
// bit for bit.
func TestLinesVector(t *testing.T) {
	widths := laneWidths(t) // 0 stands for the twin here
	r := rand.New(rand.NewPCG(6, 7))
	n := 4003 // not a multiple of four: the last lines are left alone
	wl := make([]float64, n)
	gf := make([]float64, n)
	lv := make([]float64, n)
	for i := range wl {
		wl[i] = 3000 + 22000*r.Float64()
		gf[i] = math.Pow(10, -6+7*r.Float64())
		lv[i] = math.Pow(10, -30+30*r.Float64()) // τ from ~1e-33 to ~1e5
	}
	got := make([][]float64, len(widths))
	for v, w := range widths {
		lanes = w
		for _, T := range []float64{10, 1000, 5000, 1e5, 1e7, 1e10} {
			hck := physics.HCOverK / T
			dst := make([]float64, n)
			for i := range dst {
				dst[i] = -1
			}
			if w == 0 {
				linesGo(dst, wl, gf, lv, hck)
			} else {
				linesVec(dst, wl, gf, lv, hck)
			}
			for i, lam := range wl {
				tau := lam * gf[i] * lv[i] * -math.Expm1(-hck/lam)
				want := lam * -math.Expm1(-tau)
				if i >= n&^3 {
					want = -1
				}
				if !scalar.EqualWithinAbsOrRel(dst[i], want, 0, 1e-13) {
					t.Fatalf("%d lanes, T = %v K, λ = %v Å (line %d): λ(1 − e^−τ) = %v, want %v", w, T, lam, i, dst[i], want)
				}
			}
			got[v] = append(got[v], dst...)
		}
	}
	for v := 1; v < len(widths); v++ {
		for i := range got[0] {
			if math.Float64bits(got[v][i]) != math.Float64bits(got[0][i]) {
				t.Fatalf("value %d: %d-lane loop %v, pure-Go twin %v", i, widths[v], got[v][i], got[0][i])
			}
		}
	}
}

// TestEscapesTwin holds the vector escape loops and their pure-Go twin
// escapesGo to −math.Expm1(−τ)·λ (the reference) to 3e-14, and to each
// other bit for bit, leaving the last 0–3 lines alone.
func TestEscapesTwin(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 9))
	n := 1027
	tau := make([]float64, n)
	wl := make([]float64, n)
	for i := range tau {
		tau[i] = math.Pow(10, -30+36*r.Float64())
		wl[i] = 3000 + 20000*r.Float64()
	}
	copy(tau, []float64{0, 1e-300, 707.9, 708, 800, math.Inf(1), 1.0 / 128, math.Ln2 / 128})
	widths := laneWidths(t) // 0 stands for the twin here
	got := make([][]float64, len(widths))
	for v, w := range widths {
		lanes = w
		dst := make([]float64, n)
		for i := range dst {
			dst[i] = -1
		}
		if w == 0 {
			escapesGo(dst, tau, wl)
		} else {
			escapesVec(dst, tau, wl)
		}
		for i := range tau {
			want := -math.Expm1(-tau[i]) * wl[i]
			if i >= n&^3 {
				want = -1
			}
			if !scalar.EqualWithinAbsOrRel(dst[i], want, 0, 3e-14) {
				t.Fatalf("%d lanes, τ = %v: λ(1 − e^−τ) = %v, want %v", w, tau[i], dst[i], want)
			}
		}
		got[v] = dst
	}
	for v := 1; v < len(widths); v++ {
		for i := range got[0] {
			if math.Float64bits(got[v][i]) != math.Float64bits(got[0][i]) {
				t.Fatalf("τ = %v: %d-lane loop %v, pure-Go twin %v", tau[i], widths[v], got[v][i], got[0][i])
			}
		}
	}
}

// TestSetLanes: every width up to the processor's is accepted and used,
// anything else is refused and leaves the width alone.
func TestSetLanes(t *testing.T) {
	own := Lanes()
	t.Cleanup(func() { lanes = own })
	if own != MaxLanes() {
		t.Fatalf("Lanes() = %d at start, MaxLanes() = %d", own, MaxLanes())
	}
	for _, w := range []int{0, 4, 8} {
		err := SetLanes(w)
		if ok := w <= MaxLanes(); ok != (err == nil) {
			t.Errorf("SetLanes(%d) with MaxLanes %d: %v", w, MaxLanes(), err)
		}
		if err == nil && Lanes() != w {
			t.Errorf("SetLanes(%d): Lanes() = %d", w, Lanes())
		}
	}
	lanes = own
	for _, w := range []int{-1, 1, 2, 16} {
		if err := SetLanes(w); err == nil || Lanes() != own {
			t.Errorf("SetLanes(%d) = %v, Lanes() = %d", w, err, Lanes())
		}
	}
}
