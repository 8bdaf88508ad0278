package cli

import (
	"context"
	"testing"

	"broadline/app/core"
	"broadline/grid"
	"broadline/internal/benchstore"
)

// BenchmarkGridDemo: grid points per second of the real model on the
// built-in demo (3 epochs per point, full synthesis), through the grid
// machinery as the command runs it.
func BenchmarkGridDemo(b *testing.B) {
	bench, err := core.Demo()
	if err != nil {
		b.Fatal(err)
	}
	gridPoints(b, bench)
}

// BenchmarkGridMillionLines: grid points per second with the invented
// 1-million-line store of the other benchmarks (internal/benchstore) in
// place of the demo's lists, on the demo's three epochs (full synthesis,
// the workbench's grid). The χ²/N values mean nothing (the store did not
// make the spectra); the cost is that of a real grid.
func BenchmarkGridMillionLines(b *testing.B) {
	demo, err := core.Demo()
	if err != nil {
		b.Fatal(err)
	}
	d := *demo.Data
	d.MassFractions, err = core.ParseComposition("Sr=0.02,Y=0.005,Zr=0.01,Ba=0.002,La=1e-4,Ce=3e-4,Nd=5e-4,Sm=1e-4,Kr=0.962")
	if err != nil {
		b.Fatal(err)
	}
	d.InnerMassFractions, d.ZoneBoundary = core.Composition{}, 0
	bench, err := core.NewBench("invented 1-million-line store", &d, demo.Observed, benchstore.New(1_000_000), nil)
	if err != nil {
		b.Fatal(err)
	}
	gridPoints(b, bench)
}

// gridPoints times a 2 × 2 grid (velocity × temperature) of bench through
// the grid machinery as the command runs it and reports points per second.
func gridPoints(b *testing.B, bench *core.Bench) {
	spec, err := grid.NewSpec("bench", grid.Axis{Quantity: grid.Velocity, Values: []float64{0.22, 0.24}},
		grid.Axis{Quantity: grid.Temperature, Values: []float64{4800, 5000}})
	if err != nil {
		b.Fatal(err)
	}
	eval, labels, err := gridEvaluator(bench, spec, nil)
	if err != nil {
		b.Fatal(err)
	}
	var sink discard
	b.ResetTimer()
	for range b.N {
		rep, err := grid.Write(context.Background(), spec, grid.Whole, eval, &sink, nil, grid.Options{Epochs: labels})
		if err != nil {
			b.Fatal(err)
		}
		if rep.Failed > 0 {
			b.Fatalf("%d of %d points failed", rep.Failed, rep.Points)
		}
	}
	b.ReportMetric(float64(spec.Points()*b.N)/b.Elapsed().Seconds(), "points/s")
}

type discard struct{}

func (discard) Write(p []byte) (int, error) { return len(p), nil }
