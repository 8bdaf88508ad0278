package opacity

import (
	"context"
	"flag"
	"fmt"
	"math"
	"runtime"
	"sync"
	"syscall"
	"testing"
	"time"

	"broadline/linelists"
	"broadline/opacity/internal/kernels"
	"broadline/physics"
)

// benchElements are ten r-process-like elements; with stages I–III they
// give the 30 species of the synthetic benchmark stores.
var benchElements = []string{"Sr", "Y", "Zr", "Ba", "La", "Ce", "Nd", "Sm", "Eu", "Ca"}

var benchStores sync.Map // n → *Lines

// benchLines returns the prepared synthetic store of n lines (30 species,
// 2000 levels each), made once per size.
func benchLines(b testing.TB, n int) *Lines {
	if s, ok := benchStores.Load(n); ok {
		return s.(*Lines)
	}
	ls, err := NewLines(context.Background(), benchLikeStore(n, speciesOf(benchElements...), 2000, 5), runtime.GOMAXPROCS(0))
	if err != nil {
		b.Fatal(err)
	}
	benchStores.Store(n, ls)
	return ls
}

func benchPlasma(b testing.TB, T float64) *Plasma {
	c := mustComp(b, "Sr=0.1,Y=0.1,Zr=0.1,Ba=0.1,La=0.1,Ce=0.1,Nd=0.1,Sm=0.1,Eu=0.1,Ca=0.1")
	p, err := Solve(c, 1e-13, T, nil)
	if err != nil {
		b.Fatal(err)
	}
	return p
}

var benchSizes = []int{1e5, 1e6, 1e7}

var benchLanes = flag.Int("lanes", -1, "vector width for the expansion benchmarks: 0 (portable loops), 4 (AVX2) or 8 (AVX-512); default the processor's widest")

// useBenchLanes applies -lanes for one benchmark (to time the narrower
// loops on a processor that has the wider ones).
func useBenchLanes(b *testing.B) {
	w := *benchLanes
	if w < 0 {
		return
	}
	own := kernels.Lanes()
	if err := kernels.SetLanes(w); err != nil {
		b.Fatalf("-lanes: %v", err)
	}
	b.Cleanup(func() {
		if err := kernels.SetLanes(own); err != nil {
			b.Error(err)
		}
	})
}

// BenchmarkExpansion times the expansion opacity at a new temperature each
// iteration (plasma solve, level populations, the pass over every line of
// the prepared store) on a 10-Å grid over 0.3–2.5 µm, using all cores.
// Metric: lines/s.
func BenchmarkExpansion(b *testing.B) {
	useBenchLanes(b)
	for _, n := range benchSizes {
		b.Run(fmt.Sprintf("lines=%d", n), func(b *testing.B) {
			ls := benchLines(b, n)
			g := must(LinearGrid(3000, 25000, 10))
			workers := runtime.GOMAXPROCS(0)
			ctx := context.Background()
			i := 0
			for b.Loop() {
				p := benchPlasma(b, 4000+float64(i%50)*20)
				i++
				if _, err := ls.Expansion(ctx, p, physics.Day, g, workers); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "lines/s")
		})
	}
}

// streamFloor reads every per-line array that the expansion pass reads
// (wavelength, gf, species, lower level: 22 bytes per line) once, split
// over workers the same way, doing the least arithmetic that keeps the
// loads: the memory streaming floor for a pass over the store. The pass
// also gathers the per-level terms and reuses a 2-KB buffer per block;
// both stay in the caches and are not part of the floor.
func streamFloor(ls *Lines, workers int) float64 {
	st := ls.Store
	n := st.Len()
	parts := make([]float64, (n+parallelChunk-1)/parallelChunk)
	_ = parallel(context.Background(), n, workers, func(lo, hi int) {
		s := 0.0
		wl, gf, sp, lw := st.Wavelength[lo:hi], ls.GF[lo:hi], st.Species[lo:hi], st.Lower[lo:hi]
		for i, x := range wl {
			s += x + gf[i] + float64(sp[i]) + float64(lw[i])
		}
		parts[lo/parallelChunk] = s
	})
	s := 0.0
	for _, x := range parts {
		s += x
	}
	return s
}

// BenchmarkStreamFloor is the streaming floor for the same arrays as
// BenchmarkExpansion. Metric: lines/s.
func BenchmarkStreamFloor(b *testing.B) {
	for _, n := range benchSizes {
		b.Run(fmt.Sprintf("lines=%d", n), func(b *testing.B) {
			ls := benchLines(b, n)
			workers := runtime.GOMAXPROCS(0)
			var sink float64
			for b.Loop() {
				sink += streamFloor(ls, workers)
			}
			if sink == 0 {
				b.Fatal("no data streamed")
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "lines/s")
		})
	}
}

// BenchmarkFloorRatio reports the ratio of the time for an expansion
// opacity at a new temperature to the time of the streaming floor, for 10⁷
// lines (goal ≤ 4). Each iteration runs both, alternately. x-floor is the
// ratio of wall-clock times; x-floor-cpu the ratio of the CPU time the
// process used (user + system, all threads), which other jobs on a shared
// machine disturb less; x-floor-best the ratio of the fastest iteration of
// each (wall clock), which is what the code does when it has both cores.
func BenchmarkFloorRatio(b *testing.B) {
	useBenchLanes(b)
	ls := benchLines(b, 1e7)
	g := must(LinearGrid(3000, 25000, 10))
	workers := runtime.GOMAXPROCS(0)
	ctx := context.Background()
	var tx, tf, cx, cf time.Duration
	bx, bf := time.Duration(math.MaxInt64), time.Duration(math.MaxInt64)
	var sink float64
	i := 0
	for b.Loop() {
		t0, c0 := time.Now(), cpuTime()
		sink += streamFloor(ls, workers)
		t1, c1 := time.Now(), cpuTime()
		p := benchPlasma(b, 4000+float64(i%50)*20)
		i++
		if _, err := ls.Expansion(ctx, p, physics.Day, g, workers); err != nil {
			b.Fatal(err)
		}
		dx := time.Since(t1)
		tx += dx
		cx += cpuTime() - c1
		tf += t1.Sub(t0)
		cf += c1 - c0
		bx, bf = min(bx, dx), min(bf, t1.Sub(t0))
	}
	if sink == 0 {
		b.Fatal("no data streamed")
	}
	b.ReportMetric(tx.Seconds()/tf.Seconds(), "x-floor")
	b.ReportMetric(cx.Seconds()/cf.Seconds(), "x-floor-cpu")
	b.ReportMetric(bx.Seconds()/bf.Seconds(), "x-floor-best")
	b.ReportMetric(tx.Seconds()/float64(b.N)*1e3, "ms-expansion")
	b.ReportMetric(tf.Seconds()/float64(b.N)*1e3, "ms-floor")
}

// cpuTime returns the user + system CPU time of the process so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// BenchmarkSolve30 times a new plasma state for 30 elements (goal ≤ 1 ms).
func BenchmarkSolve30(b *testing.B) {
	var z []int
	var w []float64
	for _, s := range []string{"O", "Na", "Mg", "Si", "Ca", "Ti", "Fe", "Ni", "Zn", "Se", "Rb", "Sr", "Y", "Zr",
		"Mo", "Ru", "Pd", "Ag", "Sn", "Te", "Cs", "Ba", "La", "Ce", "Pr", "Nd", "Sm", "Eu", "Gd", "Dy"} {
		e, err := linelists.ElementBySymbol(s)
		if err != nil {
			b.Fatal(err)
		}
		z = append(z, e.Z)
		w = append(w, 1)
	}
	c, err := NewComposition(z, w)
	if err != nil || len(c.Z) != 30 {
		b.Fatal(err)
	}
	i := 0
	for b.Loop() {
		if _, err := Solve(c, 1e-13, 3000+float64(i%100)*100, nil); err != nil {
			b.Fatal(err)
		}
		i++
	}
	b.ReportMetric(b.Elapsed().Seconds()/float64(b.N)*1e3, "ms/solve")
}

// BenchmarkNewLines times preparing a store (log gf → gf, once per store).
func BenchmarkNewLines(b *testing.B) {
	st := benchLines(b, 1e6).Store
	for b.Loop() {
		if _, err := NewLines(context.Background(), st, runtime.GOMAXPROCS(0)); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(1e6*float64(b.N)/b.Elapsed().Seconds(), "lines/s")
}
