package main

import (
	"context"
	"fmt"

	"broadline/opacity/fit"
)

// velocitySweep is a fit.VelocitySweep of one epoch of the session.
type velocitySweep struct {
	fit.VelocitySweep
	Epoch   int
	Preview bool
}

// sweepVelocity synthesises the session's model at steps velocities evenly
// spaced from lo to hi (v/c) and compares each with the observed spectrum.
// progress, when not nil, is called after each synthesis with the number
// done and the total. The work stops when ctx is done (an error wrapping
// ctx.Err()).
func (b *bench) sweepVelocity(ctx context.Context, s *Session, lo, hi float64, steps int, progress func(done, total int)) (*velocitySweep, error) {
	if outer := b.data.Scenario.OuterVelocity; hi >= outer {
		return nil, fmt.Errorf("velocity sweep: range %g–%g c must end below the outer velocity %g c", lo, hi, outer)
	}
	if err := s.Validate(b.data); err != nil {
		return nil, err
	}
	at := *s
	fs, err := fit.Sweep(ctx, lo, hi, steps, func(ctx context.Context, v float64) (float64, error) {
		at.PhotosphereVelocity = v
		ov, err := b.compute(ctx, &at)
		if err != nil {
			return 0, err
		}
		if ov.N == 0 {
			return 0, fmt.Errorf("no unmasked samples with uncertainties to compare")
		}
		return ov.Chi2 / float64(ov.N), nil
	}, progress)
	if err != nil {
		return nil, err
	}
	return &velocitySweep{VelocitySweep: *fs, Epoch: s.Epoch, Preview: s.Preview}, nil
}
