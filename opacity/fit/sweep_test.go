package fit

import (
	"context"
	"errors"
	"math"
	"testing"
)

// TestSweepSearch holds the grid-and-golden-section search to functions
// whose minimum is known: a parabola with its vertex between grid points is
// found to 3e-4 of its position, with RefineEvals evaluations after the
// grid; a function falling across the whole range is flagged at the edge
// and not refined.
func TestSweepSearch(t *testing.T) {
	calls := 0
	bowl := func(_ context.Context, v float64) (float64, error) {
		calls++
		return 1 + 1e4*(v-0.2371)*(v-0.2371), nil
	}
	sw, err := Sweep(context.Background(), 0.1, 0.3, 11, bowl, nil)
	if err != nil {
		t.Fatal(err)
	}
	if sw.AtEdge || math.Abs(sw.Best-0.2371) > 3e-4 || calls != 11+RefineEvals || sw.BestChi2N > 1.001 {
		t.Errorf("best %.5f (want 0.2371), χ²/N %.5f, %d calls, at edge %v", sw.Best, sw.BestChi2N, calls, sw.AtEdge)
	}
	calls = 0
	slope := func(_ context.Context, v float64) (float64, error) { calls++; return 10 - v, nil }
	sw, err = Sweep(context.Background(), 0.1, 0.3, 5, slope, nil)
	if err != nil {
		t.Fatal(err)
	}
	if !sw.AtEdge || sw.Best != 0.3 || calls != 5 {
		t.Errorf("falling: best %v at edge %v after %d calls, want 0.3, true, 5", sw.Best, sw.AtEdge, calls)
	}
	boom := errors.New("boom")
	if _, err := Sweep(context.Background(), 0.1, 0.3, 5, func(context.Context, float64) (float64, error) { return 0, boom }, nil); !errors.Is(err, boom) {
		t.Errorf("an evaluation's error was not passed on: %v", err)
	}
}
