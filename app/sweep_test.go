package main

import (
	"context"
	"errors"
	"math"
	"testing"

	"broadline/opacity/fit"
)

// TestSweepRecoversVelocity is an injection–recovery check: the demo
// spectra are the model at recorded parameters plus noise, so a sweep of
// the photosphere velocity with the other parameters at their recorded
// values must find its χ²/N minimum at the recorded velocity — within
// 0.002 c (600 km/s) after the refinement, on a grid of 0.02 c — with χ²/N
// there near 1.
func TestSweepRecoversVelocity(t *testing.T) {
	b := demoBench(t)
	for _, epoch := range []int{0, 2} {
		s := newSession("demo", b.data)
		s.Epoch = epoch
		s.resetModel(b.data)
		truth := s.PhotosphereVelocity
		var calls []int
		sw, err := b.sweepVelocity(context.Background(), s, truth-0.06, truth+0.06, 7, func(done, total int) {
			if total != 7+fit.RefineEvals {
				t.Errorf("progress total %d, want %d", total, 7+fit.RefineEvals)
			}
			calls = append(calls, done)
		})
		if err != nil {
			t.Fatal(err)
		}
		if len(calls) != 7+fit.RefineEvals || calls[0] != 1 || calls[len(calls)-1] != 7+fit.RefineEvals {
			t.Errorf("progress calls %v, want 1…%d", calls, 7+fit.RefineEvals)
		}
		t.Logf("epoch %d: recorded %.4f c, sweep best %.4f c, χ²/N %.3g", epoch, truth, sw.Best, sw.Chi2N)
		if sw.AtEdge || math.Abs(sw.Best-truth) > 0.002 {
			t.Errorf("epoch %d: best %.4f c (at edge %v), recorded %.4f c; χ²/N %v", epoch, sw.Best, sw.AtEdge, truth, sw.Chi2N)
		}
		if sw.BestChi2N > 1.5 || sw.BestChi2N > sw.Chi2N[3] || sw.Chi2N[0] < 2*sw.BestChi2N || sw.Chi2N[6] < 2*sw.BestChi2N {
			t.Errorf("epoch %d: χ²/N %v: want ~1 at the minimum and clearly worse 0.06 c away", epoch, sw.Chi2N)
		}
	}
}

func TestSweepErrorsAndCancel(t *testing.T) {
	b := demoBench(t)
	s := newSession("demo", b.data)
	outer := b.data.Scenario.OuterVelocity
	for _, c := range []struct {
		lo, hi float64
		n      int
	}{{0, 0.2, 5}, {0.2, 0.1, 5}, {0.1, outer, 5}, {0.1, 0.2, 2}, {0.1, 0.2, fit.MaxSweepSteps + 1}} {
		if _, err := b.sweepVelocity(context.Background(), s, c.lo, c.hi, c.n, nil); err == nil {
			t.Errorf("sweep %v–%v in %d steps: no error", c.lo, c.hi, c.n)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	_, err := b.sweepVelocity(ctx, s, 0.1, 0.3, 20, func(done, _ int) {
		if done == 2 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled sweep: %v", err)
	}
}
