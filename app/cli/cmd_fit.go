package cli

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"strconv"

	"broadline/app/core"
	"broadline/opacity/fit"
)

func init() {
	c := &command{
		name: "fit",
		args: "--dataset FILE --free ELEMENTS [--epochs N,…] [--fit-velocity] [--fit-temperature] [--samples N --seed S --samples-csv FILE] [--out FILE.json]",
		summary: "fit the mass fractions of chosen elements (and optionally v_ph, T_ph) to one or several epochs jointly, " +
			"with a free flux scale per epoch; with --samples, a posterior (medians, 68/95 % intervals, upper limits) (JSON)",
	}
	c.run = func(args []string, stdout, stderr io.Writer) error { return runFit(c, args, stdout, stderr) }
	register(c)
}

// fitReport is the JSON the fit command writes.
type fitReport struct {
	Dataset string `json:"dataset"`
	// Epochs are the dataset's epochs fitted, numbered from 1.
	Epochs           []int    `json:"epochs"`
	Free             []string `json:"free_elements"`
	FitVelocity      bool     `json:"fit_velocity"`
	FitTemperature   bool     `json:"fit_temperature"`
	StartComposition string   `json:"start_mass_fractions"`
	// InnerZone and ZoneBoundary are the inner zone's fixed mix and outer
	// edge (v/c), absent for uniform ejecta.
	InnerZone         string     `json:"inner_zone_mass_fractions,omitempty"`
	ZoneBoundary      float64    `json:"zone_boundary_c,omitempty"`
	MassFractionRange [2]float64 `json:"mass_fraction_range"`
	// Best is the optimiser's result: best values, χ²/N joint and per
	// epoch, the scales and the stop reason.
	Best *fit.FitResult `json:"best"`
	// Posterior is the sampler's (absent without --samples): intervals,
	// upper limits, diagnostics.
	Posterior  *fit.Posterior `json:"posterior,omitempty"`
	SamplesCSV string         `json:"samples_csv,omitempty"`
	Cautions   string         `json:"cautions"`
}

func runFit(c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet(c, stdout)
	dataset := fs.String("dataset", "", "dataset `FILE` (JSON, see README; required): spectra, line lists, ejecta, distance, starting values")
	var free, epochList listFlag
	fs.Var(&free, "free", "`ELEMENTS` whose mass fractions are fitted, e.g. Sr,Ce,Nd (comma-separated or repeated; "+
		"required unless --fit-velocity or --fit-temperature)")
	fs.Var(&epochList, "epochs", "the dataset's `EPOCHS` to fit jointly, numbered from 1, e.g. 1,3 (default: all), sharing one composition")
	fracs := fs.String("mass-fractions", "", "starting composition, e.g. \"Sr=0.01,Nd=1e-3,Kr=0.99\" (default: the dataset's); "+
		"the elements not freed keep their ratios and fill the rest")
	innerFracs := fs.String("inner-mass-fractions", "", "the inner zone's mass fractions (held fixed), from the centre up to --zone-boundary "+
		"(default: the dataset's zone, if it has one)")
	boundary := fs.String("zone-boundary", "", "outer edge of the inner zone, a velocity such as 0.16c (with --inner-mass-fractions)")
	uniform := fs.Bool("uniform", false, "leave out the dataset's inner zone: one composition throughout")
	lowest := fs.Float64("lowest-fraction", fit.DefaultMassFractionLower, "lower bound of each free mass fraction (the prior is uniform in log X)")
	highest := fs.Float64("highest-fraction", fit.DefaultMassFractionUpper, "upper bound of each free mass fraction")
	fitV := fs.Bool("fit-velocity", false, "also fit each epoch's photosphere velocity")
	fitT := fs.Bool("fit-temperature", false, "also fit each epoch's photosphere temperature")
	order := fs.Int("correction-order", 0, "order 0–3 of a smooth multiplicative continuum correction per epoch (0: a free flux scale only)")
	samples := fs.Int("samples", 0, "after the fit, run the posterior sampler for `N` kept steps per walker (0: fit only); e.g. 300")
	walkers := fs.Int("walkers", 0, "sampler ensemble size, even (default max(16, 2×parameters+2))")
	seed := fs.Uint64("seed", 1, "seed of the sampler's random numbers: the same seed gives the same samples")
	samplesCSV := fs.String("samples-csv", "", "with --samples: write the samples to this `FILE` (CSV; default fit-samples.csv)")
	out := fs.String("out", "", "write the JSON result to this `FILE` instead of standard output")
	preview := fs.Bool("preview", false, "absorption-only approximation instead of the formal integral (faster, rougher)")
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	switch {
	case len(pos) > 0:
		return usagef("unexpected argument %q", pos[0])
	case *dataset == "":
		return usagef("--dataset: the dataset to fit is required")
	case len(free) == 0 && !*fitV && !*fitT:
		return usagef("--free: nothing to fit; name the elements to fit (e.g. --free Sr,Nd) or give --fit-velocity / --fit-temperature")
	case !(*lowest > 0 && *lowest < *highest && *highest <= 1):
		return usagef("--lowest-fraction %g --highest-fraction %g: want 0 < lowest < highest ≤ 1", *lowest, *highest)
	case *order < 0 || *order > fit.MaxCorrectionOrder:
		return usagef("--correction-order %d: want 0–%d", *order, fit.MaxCorrectionOrder)
	case *samples < 0 || *samples == 1 || *samples == 2 || *samples == 3:
		return usagef("--samples %d: want 0 (fit only) or at least 4 steps", *samples)
	case *samplesCSV != "" && *samples == 0:
		return usagef("--samples-csv: only with --samples N")
	case *walkers != 0 && *samples == 0:
		return usagef("--walkers: only with --samples N")
	case (*innerFracs != "") != (*boundary != ""):
		return usagef("--inner-mass-fractions and --zone-boundary go together")
	case *uniform && *innerFracs != "":
		return usagef("--uniform leaves out the inner zone; do not give --inner-mass-fractions or --zone-boundary with it")
	}
	if *samples > 0 && *samplesCSV == "" {
		*samplesCSV = "fit-samples.csv"
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	b, err := core.OpenDataset(ctx, *dataset, nil)
	if err != nil {
		return fileError("--dataset", err)
	}
	req := core.FitRequest{Free: free, MassFractionLower: *lowest, MassFractionUpper: *highest,
		FitVelocity: *fitV, FitTemperature: *fitT, CorrectionOrder: *order,
		Samples: *samples, Walkers: *walkers, Seed: *seed}
	for _, s := range epochList {
		n, err := strconv.Atoi(s)
		if err != nil || n < 1 || n > len(b.Data.Epochs) {
			return usagef("--epochs: %q is not an epoch of the dataset (1–%d)", s, len(b.Data.Epochs))
		}
		req.Epochs = append(req.Epochs, n-1)
	}
	if len(req.Epochs) == 0 {
		for i := range b.Data.Epochs {
			req.Epochs = append(req.Epochs, i)
		}
	}
	start := b.Data.StartModel(req.Epochs[0])
	start.Preview = *preview
	if *fracs != "" {
		if start.MassFractions, err = core.ParseComposition(*fracs); err != nil {
			return usagef("--mass-fractions: %v", err)
		}
	}
	switch {
	case *uniform:
		start = start.WithoutZone()
	case *innerFracs != "":
		if start, err = start.WithCompositions(b.Data, start.MassFractions.String(), *innerFracs, *boundary); err != nil {
			return usagef("--inner-mass-fractions, --zone-boundary: %v", err)
		}
	}
	if _, _, err := b.Problem(start, req); err != nil {
		return usagef("%v", err)
	}
	var progress func(core.FitStage, int, int)
	if isTerminal(stderr) {
		progress = func(s core.FitStage, done, total int) {
			what := "evaluations"
			if s == core.StageSample {
				what = "steps"
			}
			fmt.Fprintf(stderr, "\rfit: %s: %d of at most %d %s ", s, done, total, what)
		}
	}
	res, err := b.Fit(ctx, start, req, progress)
	if progress != nil {
		fmt.Fprintln(stderr)
	}
	if errors.Is(err, fit.ErrProblem) {
		return usagef("%v", err)
	}
	if err != nil {
		return err
	}
	rep := fitReport{Dataset: b.Name, Free: free, FitVelocity: *fitV, FitTemperature: *fitT,
		StartComposition: start.MassFractions.String(), InnerZone: start.InnerMassFractions.String(), ZoneBoundary: start.ZoneBoundary, MassFractionRange: [2]float64{*lowest, *highest},
		Best: res.Best, Posterior: res.Posterior, Cautions: core.Cautions}
	for _, e := range res.Epochs {
		rep.Epochs = append(rep.Epochs, e+1)
	}
	if res.Posterior != nil {
		var csv bytes.Buffer
		if err := res.Posterior.WriteSamplesCSV(&csv); err != nil {
			return err
		}
		if err := core.WriteFileAtomic(*samplesCSV, csv.Bytes()); err != nil {
			return fileError("--samples-csv", err)
		}
		rep.SamplesCSV = *samplesCSV
	}
	js, err := json.MarshalIndent(rep, "", "  ")
	if err != nil {
		return err
	}
	js = append(js, '\n')
	if *out != "" {
		if err := core.WriteFileAtomic(*out, js); err != nil {
			return fileError("--out", err)
		}
	} else if _, err := stdout.Write(js); err != nil {
		return err
	}
	writeFitSummary(stderr, rep)
	return nil
}

// writeFitSummary tells on stderr what the fit found, in a few lines.
func writeFitSummary(w io.Writer, rep fitReport) {
	best := rep.Best
	fmt.Fprintf(w, "fit: %s after %d evaluations (%s; flux scale %s, correction order %d%s): joint χ²/N = %.4g over %d samples\n",
		best.Status, best.Evaluations, best.Method, best.Scale, best.CorrectionOrder, previewNote(best.Preview), best.Chi2N, best.N)
	for _, e := range best.Epochs {
		fmt.Fprintf(w, "fit:   epoch %d (day %g): v_ph %.4fc, T_ph %.0f K, scale %.4g, χ²/N = %.4g over %d samples\n",
			e.Epoch, e.Days, e.PhotosphereVelocityC, e.TemperatureK, e.FluxScale, e.Chi2N, e.N)
	}
	for i, p := range best.Parameters {
		fmt.Fprintf(w, "fit:   best %s = %.4g\n", physicalName(p), p.Physical(best.Best[i]))
	}
	if post := rep.Posterior; post != nil {
		fmt.Fprintf(w, "fit: posterior from %d walkers × %d steps (seed %d), acceptance %.2f, chain = %.1f τ\n",
			post.Walkers, post.Steps, post.Seed, post.AcceptanceFraction, post.ChainInTau)
		for i, s := range post.Summaries {
			if s.IsUpperLimit {
				fmt.Fprintf(w, "fit:   %s < %.3g (95 %% upper limit)\n", physicalName(post.Parameters[i]), s.UpperLimit95)
			} else {
				fmt.Fprintf(w, "fit:   %s = %.4g (68 %%: %.4g–%.4g; 95 %%: %.4g–%.4g) R̂ %.3f\n",
					physicalName(post.Parameters[i]), s.Median, s.Lower68, s.Upper68, s.Lower95, s.Upper95, s.SplitRHat)
			}
		}
		fmt.Fprintf(w, "fit: samples written to %s\n", rep.SamplesCSV)
		for _, wn := range post.Warnings {
			fmt.Fprintln(w, "fit: warning:", wn)
		}
	} else {
		for _, wn := range best.Warnings {
			fmt.Fprintln(w, "fit: warning:", wn)
		}
	}
	if math.IsNaN(best.Chi2N) {
		fmt.Fprintln(w, "fit: warning: χ²/N is not a number (check the spectra's uncertainties)")
	}
}

// physicalName names a parameter in its physical unit, as Summary and
// Physical give it: X(Sr) for a mass fraction, not its logarithm.
func physicalName(p fit.Parameter) string {
	switch p.Kind {
	case fit.KindLogMassFraction:
		return "X(" + p.Element + ")"
	case fit.KindVelocity:
		return fmt.Sprintf("v_ph/c (epoch %d)", p.Epoch)
	case fit.KindTemperature:
		return fmt.Sprintf("T_ph/K (epoch %d)", p.Epoch)
	}
	return p.Name
}

func previewNote(preview bool) string {
	if preview {
		return ", absorption-only preview"
	}
	return ""
}
