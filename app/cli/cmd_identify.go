package cli

import (
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"

	"broadline/app/core"
	"broadline/opacity/fit"
	"broadline/spectra"
)

func init() {
	c := &command{
		name: "identify",
		args: "(--dataset FILE [--epoch N] | --spectrum FILE --lines FILE… --mass-fractions LIST --days D --photosphere-velocity V --outer-velocity V " +
			"--temperature K --ejecta-mass M) [--significance S] [model flags as for model]",
		summary: "find a spectrum's absorption features and attribute each to the model's elements and lines (CSV)",
	}
	c.run = func(args []string, stdout, stderr io.Writer) error { return runIdentify(c, args, stdout, stderr) }
	register(c)
}

// runIdentify finds the absorption features of the observed spectrum (as
// the workbench does) and attributes each to the model of the flags:
// elements' shares of the absorbed equivalent width in the feature's
// window and the strongest lines acting there (synth.Attribute).
func runIdentify(c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet(c, stdout)
	f := addModelFlags(fs, true)
	specPath := fs.String("spectrum", "", "observed spectrum `FILE` (rest frame; our text format or FITS; required without --dataset, whose epoch's spectrum is the default)")
	minSig := fs.Float64("significance", 5, "smallest significance (depth/σ) of a feature to attribute")
	featR := fs.Float64("feature-resolving-power", 150, "smoothing of the spectrum for the feature search, resolving power")
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	f.noteGiven(fs)
	if len(pos) > 0 {
		return usagef("unexpected argument %q", pos[0])
	}
	switch {
	case *specPath == "" && *f.dataset == "":
		return usagef("--spectrum: the observed spectrum whose features to identify is required (or --dataset FILE)")
	case !(*minSig > 0) || math.IsInf(*minSig, 0):
		return usagef("--significance %g: want > 0", *minSig)
	case !(*featR > 0) || math.IsInf(*featR, 0):
		return usagef("--feature-resolving-power %g: want > 0", *featR)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	su, err := f.setup(ctx, math.NaN(), math.NaN())
	if err != nil {
		return err
	}
	obs := su.observed
	if *specPath != "" {
		if obs, err = spectra.ReadFile(*specPath, spectra.ReadOptions{}); err != nil {
			return fileError("--spectrum", err)
		}
	}
	feats, err := spectra.FindFeatures(obs, spectra.FeatureOptions{ResolvingPower: *featR, MinSignificance: *minSig})
	if err != nil {
		return fmt.Errorf("feature search: %w", err)
	}
	attr, err := fit.AttributeFeatures(ctx, su.model, su.comp, su.ejecta, su.settings, feats, su.from, su.to, core.IdentifyLines, nil)
	if err != nil {
		return err
	}
	table, err := core.FeaturesCSV(feats, attr)
	if err != nil {
		return err
	}
	if _, err := stdout.Write(table); err != nil {
		return err
	}
	var warnings []string
	if l := core.LinelessText(core.LinelessIn(su.store, su.mixes()...)); l != "" {
		warnings = append(warnings, l+"; no feature can be attributed to them")
	}
	su.describe(stderr, "identify", *f.preview, warnings)
	fmt.Fprintf(stderr, "identify: %d features of significance ≥ %g attributed with the model at v_ph = %.3f c, T = %.0f K; "+
		"shares are of the absorbed equivalent width with each element alone (absorption-only); an attribution is a hypothesis\n",
		len(feats), *minSig, su.ejecta.BetaPh, su.ejecta.Temperature)
	return nil
}
