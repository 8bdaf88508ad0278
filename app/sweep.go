package main

import (
	"context"
	"fmt"

	"broadline/opacity/fit"
)

// sweepParam is a parameter of the photosphere the workbench can sweep.
type sweepParam int

const (
	sweepVelocityParam    sweepParam = iota // v_ph / c
	sweepTemperatureParam                   // T_ph in K
)

// paramSweep is a fit.Profile of one parameter at one epoch of the session.
type paramSweep struct {
	fit.Profile
	Param   sweepParam
	Epoch   int
	Preview bool
}

// describe returns v as the workbench shows the parameter: "0.240 c" or
// "5000 K".
func (p sweepParam) describe(v float64) string {
	if p == sweepTemperatureParam {
		return fmt.Sprintf("%.0f K", v)
	}
	return fmt.Sprintf("%.3f c", v)
}

// name is the parameter's name in messages and figures.
func (p sweepParam) name() string {
	if p == sweepTemperatureParam {
		return "T_ph"
	}
	return "v_ph"
}

// sweep synthesises the session's model at steps values of parameter p
// evenly spaced from lo to hi (v/c for the velocity, within the slider's
// range; K for the temperature, within the workbench's 1500–15000 K),
// with everything else as the session has it, and compares each with the
// observed spectrum (fit.Sweep: grid, then golden-section refinement).
// progress, when not nil, is called after each synthesis with the number
// done and the total. The work stops when ctx is done (an error wrapping
// ctx.Err()).
func (b *bench) sweep(ctx context.Context, s *Session, p sweepParam, lo, hi float64, steps int, progress func(done, total int)) (*paramSweep, error) {
	switch p {
	case sweepVelocityParam:
		if top := b.data.Scenario.OuterVelocity - sliderVGap; lo < minSliderV || hi > top {
			return nil, fmt.Errorf("velocity sweep: range %g–%g c must lie within %g–%g c (%g c below the outer velocity)", lo, hi, minSliderV, top, sliderVGap)
		}
	case sweepTemperatureParam:
		if lo < minSliderT || hi > maxSliderT {
			return nil, fmt.Errorf("temperature sweep: range %g–%g K must lie within %g–%g K", lo, hi, minSliderT, maxSliderT)
		}
	default:
		return nil, fmt.Errorf("sweep: unknown parameter %d", p)
	}
	if err := s.Validate(b.data); err != nil {
		return nil, err
	}
	at := *s
	prof, err := fit.Sweep(ctx, lo, hi, steps, func(ctx context.Context, x float64) (float64, error) {
		if p == sweepTemperatureParam {
			at.Temperature = x
		} else {
			at.PhotosphereVelocity = x
		}
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
	return &paramSweep{Profile: *prof, Param: p, Epoch: s.Epoch, Preview: s.Preview}, nil
}
