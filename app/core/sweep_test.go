package core

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
		s := NewSession(b)
		s.Model = b.Data.StartModel(epoch)
		truth := s.PhotosphereVelocity
		var calls []int
		sw, err := b.Sweep(context.Background(), s.Model, Velocity, truth-0.06, truth+0.06, 7, func(done, total int) {
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
	s := NewSession(b)
	outer := b.Data.OuterVelocity
	for _, c := range []struct {
		lo, hi float64
		n      int
	}{{0, 0.2, 5}, {0.2, 0.1, 5}, {0.1, outer, 5}, {0.1, 0.2, 2}, {0.1, 0.2, fit.MaxSweepSteps + 1}} {
		if _, err := b.Sweep(context.Background(), s.Model, Velocity, c.lo, c.hi, c.n, nil); err == nil {
			t.Errorf("sweep %v–%v in %d steps: no error", c.lo, c.hi, c.n)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	_, err := b.Sweep(ctx, s.Model, Velocity, 0.1, 0.3, 20, func(done, _ int) {
		if done == 2 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled sweep: %v", err)
	}
}

// TestSweepRecoversTemperature: the same injection–recovery check for the
// photosphere temperature, with the velocity at its recorded value: the
// sweep of 3500–6500 K in 250-K steps finds the recorded 5000 K within
// 50 K; a range outside the workbench's 1500–15000 K is refused.
func TestSweepRecoversTemperature(t *testing.T) {
	b := demoBench(t)
	s := NewSession(b)
	truth := s.Temperature
	sw, err := b.Sweep(context.Background(), s.Model, Temperature, truth-1500, truth+1500, 13, nil)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("recorded %.0f K, sweep best %.1f K, χ²/N %.3g", truth, sw.Best, sw.BestChi2N)
	if sw.AtEdge || math.Abs(sw.Best-truth) > 50 || sw.BestChi2N > 1.5 {
		t.Errorf("best %.1f K (recorded %.0f), χ²/N %.3f, at edge %v", sw.Best, truth, sw.BestChi2N, sw.AtEdge)
	}
	if _, err := b.Sweep(context.Background(), s.Model, Temperature, 1000, 3000, 5, nil); err == nil {
		t.Error("a temperature sweep from 1000 K was accepted")
	}
}
