package cli

import (
	"context"
	"testing"

	"broadline/app/core"
	"broadline/grid"
)

// BenchmarkGridDemo: grid points per second of the real model on the
// built-in demo (3 epochs per point, full synthesis), through the grid
// machinery as the command runs it.
func BenchmarkGridDemo(b *testing.B) {
	bench, err := core.Demo()
	if err != nil {
		b.Fatal(err)
	}
	spec, err := grid.NewSpec("bench", grid.Axis{Quantity: grid.Velocity, Values: []float64{0.22, 0.24}},
		grid.Axis{Quantity: grid.Temperature, Values: []float64{4800, 5000}})
	if err != nil {
		b.Fatal(err)
	}
	eval, labels, err := gridEvaluator(bench, spec)
	if err != nil {
		b.Fatal(err)
	}
	var sink discard
	b.ResetTimer()
	for range b.N {
		if _, err := grid.Write(context.Background(), spec, grid.Whole, eval, &sink, nil, grid.Options{Epochs: labels}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(spec.Points()*b.N)/b.Elapsed().Seconds(), "points/s")
}

type discard struct{}

func (discard) Write(p []byte) (int, error) { return len(p), nil }
