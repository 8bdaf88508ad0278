package cli

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"strconv"

	"broadline/opacity/fit"
	"broadline/physics"
	"broadline/spectra"
)

func init() {
	c := &command{
		name: "sweep",
		args: "(--from-velocity V --to-velocity V | --from-temperature K --to-temperature K) [--steps N] " +
			"(--dataset FILE [--epoch N] | --spectrum FILE --lines FILE… --mass-fractions LIST --days D --outer-velocity V --ejecta-mass M --distance-mpc D) [model flags as for model]",
		summary: "fit the photosphere velocity or temperature to an observed spectrum (CSV velocity_c|temperature_k,chi2_per_sample)",
	}
	c.run = func(args []string, stdout, stderr io.Writer) error { return runSweep(c, args, stdout, stderr) }
	register(c)
}

// runSweep synthesises the model of the flags at evenly spaced photosphere
// velocities (or temperatures, the other held at its flag), compares each
// with the observed spectrum (χ² over its unmasked samples with
// uncertainties, the model smoothed to --resolving-power and put at
// --distance-mpc), refines the best, and writes the grid as CSV; the best
// value goes to stderr.
func runSweep(c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet(c, stdout)
	f := addModelFlags(fs, true)
	specPath := fs.String("spectrum", "", "observed spectrum `FILE` with uncertainties, in our text format or FITS "+
		"(e.g. written by prep: rest frame, dereddened, telluric bands flagged; required without --dataset, whose epoch's spectrum is the default)")
	var lo, hi velocityFlag
	fs.Var(&lo, "from-velocity", "lowest photosphere `velocity` of the sweep, e.g. 0.1c (required for a velocity sweep, i.e. without --from-temperature)")
	fs.Var(&hi, "to-velocity", "highest photosphere `velocity`, below --outer-velocity (required for a velocity sweep)")
	var tlo, thi numberFlag
	fs.Var(&tlo, "from-temperature", "sweep the photosphere temperature instead, from this many `K` (with --to-temperature, and --photosphere-velocity unless --dataset gives it)")
	fs.Var(&thi, "to-temperature", "highest photosphere temperature of the sweep, `K`")
	// A velocity sweep sets the photosphere velocity itself.
	fs.Lookup("photosphere-velocity").Usage = "photosphere `velocity` of a temperature sweep, e.g. 0.2c or 60000km/s (required for one without --dataset; refused in a velocity sweep, which sets it)"
	steps := fs.Int("steps", 21, "number of velocities, evenly spaced (3–400); the lowest is then refined with 10 more syntheses")
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	f.noteGiven(fs)
	if len(pos) > 0 {
		return usagef("unexpected argument %q", pos[0])
	}
	byT := tlo.set || thi.set
	switch {
	case *specPath == "" && *f.dataset == "":
		return usagef("--spectrum: the observed spectrum to compare with is required (or --dataset FILE)")
	case byT && (lo.set || hi.set):
		return usagef("--from-temperature/--to-temperature and --from-velocity/--to-velocity: sweep one or the other")
	case byT && (!tlo.set || !thi.set):
		return usagef("--from-temperature and --to-temperature are both required for a temperature sweep")
	case byT && !(tlo.v > 0 && thi.v > tlo.v && !math.IsInf(thi.v, 0)):
		return usagef("--from-temperature %g --to-temperature %g: want 0 < from < to", tlo.v, thi.v)
	case byT && f.tempF.set:
		return usagef("--temperature: the sweep sets the temperature; leave it out")
	case !byT && (!lo.set || !hi.set):
		return usagef("--from-velocity and --to-velocity are required (e.g. 0.1c and 0.3c), or --from-temperature and --to-temperature")
	case !byT && !(lo.beta > 0 && hi.beta > lo.beta):
		return usagef("--from-velocity %gc --to-velocity %gc: want 0 < from < to", lo.beta, hi.beta)
	case !byT && f.vph.set:
		return usagef("--photosphere-velocity: the sweep sets the velocity; leave it out")
	case !byT && f.vout.set && hi.beta >= f.vout.beta:
		return usagef("--to-velocity %gc: must lie below --outer-velocity %gc", hi.beta, f.vout.beta)
	case *steps < 3 || *steps > fit.MaxSweepSteps:
		return usagef("--steps %d: want 3–%d", *steps, fit.MaxSweepSteps)
	case !(*f.dist > 0) && *f.dataset == "":
		return usagef("--distance-mpc is required: the observed flux is compared with the model's at that distance")
	}
	from, to, column := lo.beta, hi.beta, "velocity_c"
	vph, tph := lo.beta, math.NaN()
	if byT {
		from, to, column = tlo.v, thi.v, "temperature_k"
		vph, tph = math.NaN(), tlo.v
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	su, err := f.setup(ctx, vph, tph)
	if err != nil {
		return err
	}
	if !byT && hi.beta >= su.ejecta.BetaMax {
		return usagef("--to-velocity %gc: must lie below the outer velocity %gc", hi.beta, su.ejecta.BetaMax)
	}
	obs := su.observed
	if *specPath != "" {
		if obs, err = spectra.ReadFile(*specPath, spectra.ReadOptions{}); err != nil {
			return fileError("--spectrum", err)
		}
		if obs.Uncertainty == nil {
			return fileError("--spectrum", fmt.Errorf("%s: no uncertainty column: χ² needs one", *specPath))
		}
	}
	var warnings, readWarn []string
	if *specPath != "" {
		for _, w := range obs.Meta.Read.Warnings {
			readWarn = append(readWarn, *specPath+": "+w)
		}
		if u := obs.Meta.FluxUnit; u.PerFrequency() {
			// The model is F_λ: compare in erg s⁻¹ cm⁻² Å⁻¹.
			if err := obs.ConvertFlux(spectra.FluxPerAngstrom); err != nil {
				return fileError("--spectrum", err)
			}
			readWarn = append(readWarn, fmt.Sprintf("%s: flux in %v converted to erg/s/cm2/A for the χ²", *specPath, u))
		}
	}
	var n int
	sw, err := fit.Sweep(ctx, from, to, *steps, func(ctx context.Context, x float64) (float64, error) {
		ej := su.ejecta
		if byT {
			ej.Temperature = x
		} else {
			ej.BetaPh = x
		}
		ov, err := fit.CompareModel(ctx, su.model, su.comp, ej, su.settings, su.distance, obs, su.rp)
		if err != nil {
			return 0, err
		}
		if ov.N == 0 {
			return 0, fmt.Errorf("no unmasked samples with uncertainties inside the model's range")
		}
		warnings, n = ov.Warnings, ov.N
		return ov.Reduced(), nil
	}, nil)
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	buf.WriteString(column + ",chi2_per_sample\n")
	for i, v := range sw.Values {
		buf.WriteString(strconv.FormatFloat(v, 'f', 6, 64))
		buf.WriteByte(',')
		buf.WriteString(strconv.FormatFloat(sw.Chi2N[i], 'g', 7, 64))
		buf.WriteByte('\n')
	}
	if _, err := stdout.Write(buf.Bytes()); err != nil {
		return err
	}
	su.describe(stderr, "sweep", *f.preview, append(readWarn, warnings...))
	if byT {
		fmt.Fprintf(stderr, "sweep: best temperature_k=%.1f chi2_per_sample=%.4g samples=%d at_edge=%v\n",
			sw.Best, sw.BestChi2N, n, sw.AtEdge)
	} else {
		fmt.Fprintf(stderr, "sweep: best velocity_c=%.5f (%.0f km/s) chi2_per_sample=%.4g samples=%d at_edge=%v\n",
			sw.Best, sw.Best*physics.SpeedOfLightKmS, sw.BestChi2N, n, sw.AtEdge)
	}
	if sw.AtEdge {
		fmt.Fprintln(stderr, "sweep: warning: the least χ²/N is at an end of the range; the minimum may lie outside it")
	}
	if math.IsNaN(sw.BestChi2N) {
		return fmt.Errorf("sweep: χ²/N is not a number (check the spectrum's uncertainties)")
	}
	return nil
}
