package cli

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"runtime"
	"slices"
	"strconv"
	"strings"

	"broadline/app/core"
	"broadline/linelists"
	"broadline/opacity"
	"broadline/opacity/synth"
	"broadline/physics"
	"broadline/spectra"
)

// mixes returns the compositions of the setup: the main one and its zones'.
func (su *modelSetup) mixes() []opacity.Composition {
	out := []opacity.Composition{su.comp}
	for _, z := range su.ejecta.Zones {
		out = append(out, z.Composition)
	}
	return out
}

func init() {
	c := &command{
		name: "model",
		args: "--lines FILE… --mass-fractions LIST --days D --photosphere-velocity V --outer-velocity V " +
			"--temperature K --ejecta-mass M [--inner-velocity V] [--density-index N] [--from-um A --to-um B] " +
			"[--inner-mass-fractions LIST --zone-boundary V] [--resolving-power R] [--without ELEMENT…]",
		summary: "synthesise a photospheric spectrum (CSV wavelength_um,flux,normalized_flux)",
	}
	c.run = func(args []string, stdout, stderr io.Writer) error { return runModel(c, args, stdout, stderr) }
	register(c)
}

// listFlag collects a repeatable flag whose values may also be
// comma-separated.
type listFlag []string

func (l *listFlag) String() string { return strings.Join(*l, ",") }

func (l *listFlag) Set(s string) error {
	for _, v := range strings.Split(s, ",") {
		if v = strings.TrimSpace(v); v != "" {
			*l = append(*l, v)
		}
	}
	return nil
}

// velocityFlag is a velocity given as a fraction of c ("0.2c") or in km/s
// ("60000km/s"); beta is v/c, set says whether it was given.
type velocityFlag struct {
	beta float64
	set  bool
}

func (v *velocityFlag) String() string {
	if v == nil || !v.set {
		return ""
	}
	return strconv.FormatFloat(v.beta, 'g', -1, 64) + "c"
}

func (v *velocityFlag) Set(s string) error {
	b, err := core.ParseVelocity(s)
	if err != nil {
		return err
	}
	v.beta, v.set = b, true
	return nil
}

// numberFlag is a number flag that remembers whether it was given, so that
// a required value has no misleading default in the help.
type numberFlag struct {
	v   float64
	set bool
}

func (n *numberFlag) String() string {
	if n == nil || !n.set {
		return ""
	}
	return strconv.FormatFloat(n.v, 'g', -1, 64)
}

func (n *numberFlag) Set(s string) error {
	x, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil {
		return fmt.Errorf("%q is not a number", s)
	}
	n.v, n.set = x, true
	return nil
}

// value returns the number, or NaN when it was not given.
func (n *numberFlag) value() float64 {
	if !n.set {
		return math.NaN()
	}
	return n.v
}

// modelFlags are the flags that define a synthesis; the model, sweep and
// identify commands share them. With --dataset the fixed parts of the model
// (line lists, ejecta, distance, resolving power, range) and the epoch's
// starting values come from a dataset file, as the workbench shows them;
// the photosphere and composition flags then override those values.
type modelFlags struct {
	lines, levels, without    listFlag
	fracs, innerFracs         *string
	boundary                  velocityFlag
	uniform                   *bool
	daysF, tempF, massF       numberFlag
	vph, vout, vin            velocityFlag
	index, from, to, rp, dist *float64
	diluted, preview          *bool
	doppler                   *string
	dataset                   *string
	epoch                     *int
	given                     map[string]bool
}

// addModelFlags declares the model flags on fs. The photosphere velocity is
// declared only when withVph is true (the sweep sets it itself).
func addModelFlags(fs *flagSet, withVph bool) *modelFlags {
	f := &modelFlags{}
	f.dataset = fs.String("dataset", "", "dataset `FILE` (JSON, see README): take the line lists, ejecta, distance, resolving power and the epoch's starting values from it")
	f.epoch = fs.Int("epoch", 1, "with --dataset: the epoch, numbered from 1")
	fs.Var(&f.lines, "lines", "line-list `FILE` (repeatable, or comma-separated; required without --dataset)")
	fs.Var(&f.levels, "levels", "levels `FILE` for partition functions (optional, repeatable)")
	f.fracs = fs.String("mass-fractions", "", "element mass fractions, e.g. \"Sr=0.3,Nd=0.1,Ca=0.6\" (normalised; required without --dataset)")
	f.innerFracs = fs.String("inner-mass-fractions", "", "element mass fractions of an inner zone, from the centre up to --zone-boundary (--mass-fractions then holds outside it)")
	fs.Var(&f.boundary, "zone-boundary", "outer edge of the inner zone, a `velocity` such as 0.16c (with --inner-mass-fractions)")
	f.uniform = fs.Bool("uniform", false, "with --dataset: leave out the dataset's inner zone (one composition throughout)")
	fs.Var(&f.daysF, "days", "time since explosion in `days` (required without --dataset)")
	if withVph {
		fs.Var(&f.vph, "photosphere-velocity", "photosphere `velocity`, e.g. 0.2c or 60000km/s (required without --dataset)")
	}
	fs.Var(&f.vout, "outer-velocity", "outer edge of the ejecta, a `velocity` such as 0.35c (required without --dataset)")
	fs.Var(&f.vin, "inner-velocity", "inner edge of the density law, a `velocity` (default 0; needed for --density-index ≥ 3)")
	fs.Var(&f.tempF, "temperature", "photosphere blackbody temperature in `K` (required without --dataset)")
	fs.Var(&f.massF, "ejecta-mass", "total ejecta mass in solar `masses` (required without --dataset)")
	f.index = fs.Float64("density-index", 0, "n in ρ ∝ v^−n (0: uniform)")
	f.from = fs.Float64("from-um", 0.4, "start of the wavelength range, µm (vacuum)")
	f.to = fs.Float64("to-um", 2.5, "end of the wavelength range, µm (vacuum)")
	f.rp = fs.Float64("resolving-power", 0, "smooth to resolving power R (0: the model grid's own resolution)")
	fs.Var(&f.without, "without", "remove this element's lines (knock-out; repeatable or comma-separated)")
	f.diluted = fs.Bool("diluted", false, "use the diluted temperature T(r) = W(r)^(1/4) T_ph instead of a uniform one")
	f.preview = fs.Bool("preview", false, "absorption-only approximation (fast preview, no scattered emission)")
	f.doppler = fs.String("doppler", "first-order", "Doppler formula: first-order or relativistic")
	f.dist = fs.Float64("distance-mpc", 0, "distance in Mpc: flux at the observer (default: flux at the photosphere)")
	return f
}

// noteGiven records which flags the command line set (after parsing).
func (f *modelFlags) noteGiven(fs *flagSet) {
	f.given = map[string]bool{}
	fs.Visit(func(fl *flag.Flag) { f.given[fl.Name] = true })
}

// modelSetup is what the model flags describe, checked and read.
type modelSetup struct {
	model    *synth.Model
	comp     opacity.Composition
	ejecta   synth.Ejecta
	settings synth.Settings
	store    *linelists.Store
	report   linelists.Report
	filter   linelists.Filter
	// bench is the dataset's bench with --dataset, else nil; observed is
	// then the epoch's spectrum.
	bench    *core.Bench
	observed *spectra.Spectrum
	// distance is in cm (0: flux at the photosphere); rp the resolving
	// power to smooth to (0: none).
	distance, rp float64
	from, to     float64 // model range, Å
}

// setup checks every value (a *usageError naming the flag when one is bad)
// before it reads the line lists (through the line-list cache) and builds
// the model. vph and tph are the photosphere velocity and temperature to
// check the ejecta with when the command sets them itself (NaN: take
// --photosphere-velocity and --temperature).
func (f *modelFlags) setup(ctx context.Context, vph, tph float64) (*modelSetup, error) {
	if *f.dataset != "" {
		return f.setupDataset(ctx, vph, tph)
	}
	if f.given["epoch"] {
		return nil, usagef("--epoch: only with --dataset")
	}
	days, temp, mass := f.daysF.value(), f.tempF.value(), f.massF.value()
	withT := math.IsNaN(tph)
	if !withT {
		temp = tph
	}
	vout := f.vout.beta
	if !f.vout.set {
		vout = math.NaN()
	}
	withVph := math.IsNaN(vph)
	if withVph {
		vph = f.vph.beta
		if !f.vph.set {
			vph = math.NaN()
		}
	}
	if len(f.lines) == 0 {
		return nil, usagef("--lines: at least one line-list file is needed (or --dataset FILE)")
	}
	if *f.fracs == "" {
		return nil, usagef("--mass-fractions is required, e.g. \"Sr=0.3,Nd=0.1,Ca=0.6\"")
	}
	comp, err := opacity.ParseComposition(*f.fracs)
	if err != nil {
		return nil, usagef("--mass-fractions: %v", err)
	}
	need := func(name string, v float64, what string) error {
		if math.IsNaN(v) {
			return usagef("--%s is required (%s)", name, what)
		}
		if !(v > 0) || math.IsInf(v, 0) {
			return usagef("--%s %g: want a positive, finite %s", name, v, what)
		}
		return nil
	}
	type check struct {
		name, what string
		v          float64
	}
	checks := []check{{"days", "time in days", days}}
	if withVph {
		checks = append(checks, check{"photosphere-velocity", "velocity, e.g. 0.2c", vph})
	}
	checks = append(checks, check{"outer-velocity", "velocity, e.g. 0.35c", vout})
	if withT {
		checks = append(checks, check{"temperature", "temperature in K", temp})
	}
	checks = append(checks, check{"ejecta-mass", "mass in solar masses", mass})
	for _, chk := range checks {
		if err := need(chk.name, chk.v, chk.what); err != nil {
			return nil, err
		}
	}
	from, to := *f.from, *f.to
	if !(from > 0) || !(to > from) || math.IsInf(to, 0) {
		return nil, usagef("--from-um %g --to-um %g: want 0 < from < to", from, to)
	}
	if to/from > 1e3 {
		return nil, usagef("--from-um %g --to-um %g: range wider than a factor 1000", from, to)
	}
	if !(*f.rp >= 0) || math.IsInf(*f.rp, 0) {
		return nil, usagef("--resolving-power %g: want ≥ 0 (0: no smoothing)", *f.rp)
	}
	if !(*f.dist >= 0) || math.IsInf(*f.dist, 0) {
		return nil, usagef("--distance-mpc %g: want > 0 (or 0 for the flux at the photosphere)", *f.dist)
	}
	set, err := f.settings()
	if err != nil {
		return nil, err
	}
	ej := synth.Ejecta{
		Time: days * physics.Day, Mass: mass * physics.SolarMass,
		BetaIn: f.vin.beta, BetaPh: vph, BetaMax: vout,
		DensityIndex: *f.index, Temperature: temp, Diluted: *f.diluted,
	}
	if f.given["uniform"] {
		return nil, usagef("--uniform: only with --dataset (without it, leave out --inner-mass-fractions)")
	}
	if (*f.innerFracs != "") != f.boundary.set {
		return nil, usagef("--inner-mass-fractions and --zone-boundary go together")
	}
	if *f.innerFracs != "" {
		inner, err := opacity.ParseComposition(*f.innerFracs)
		if err != nil {
			return nil, usagef("--inner-mass-fractions: %v", err)
		}
		if b := f.boundary.beta; !(b > f.vin.beta && b < vout) {
			return nil, usagef("--zone-boundary %gc: want between the inner velocity %gc and the outer velocity %gc", b, f.vin.beta, vout)
		}
		ej.Zones = []synth.Zone{{Inner: 0, Outer: f.boundary.beta, Composition: inner}}
	}
	if err := ej.Validate(); err != nil {
		return nil, usagef("%s", strings.TrimPrefix(err.Error(), "synth: "))
	}

	// Read the line lists (through their cache), keeping only lines that
	// can act on the range.
	fromA, toA := from*1e4, to*1e4
	su := &modelSetup{comp: comp, ejecta: ej, settings: set, from: fromA, to: toA,
		distance: *f.dist * physics.Megaparsec, rp: *f.rp,
		filter: linelists.Filter{MinWavelength: fromA * math.Sqrt(1-vout*vout) / (1 + vout), MaxWavelength: toA / (1 - vout)}}
	su.store, su.report, err = linelists.LoadContext(ctx, f.lines, linelists.Options{Levels: f.levels, Filter: su.filter, Workers: runtime.GOMAXPROCS(0)})
	if err != nil {
		return nil, fileError("--lines", err)
	}
	if su.model, err = synth.NewModel(su.store, fromA, toA, 0); err != nil {
		return nil, usagef("%s", strings.TrimPrefix(err.Error(), "synth: "))
	}
	return su, nil
}

// settings reads the synthesis settings (--preview, --without, --doppler).
func (f *modelFlags) settings() (synth.Settings, error) {
	var dop synth.Doppler
	switch *f.doppler {
	case "first-order":
		dop = synth.FirstOrder
	case "relativistic":
		dop = synth.Relativistic
	default:
		return synth.Settings{}, usagef("--doppler %q: want first-order or relativistic", *f.doppler)
	}
	var out []int
	for _, w := range f.without {
		e, err := linelists.ElementBySymbol(w)
		if err != nil {
			return synth.Settings{}, usagef("--without %q: want an element symbol such as Nd", w)
		}
		out = append(out, e.Z)
	}
	return synth.Settings{Preview: *f.preview, Without: out, Workers: runtime.GOMAXPROCS(0),
		Options: synth.Options{Doppler: dop}}, nil
}

// setupDataset is setup with --dataset: the dataset's bench (its line
// lists through the cache), the epoch's model with the command line's
// photosphere, composition and preview instead where given.
func (f *modelFlags) setupDataset(ctx context.Context, vph, tph float64) (*modelSetup, error) {
	for _, name := range []string{"lines", "levels", "days", "outer-velocity", "inner-velocity", "ejecta-mass",
		"density-index", "from-um", "to-um", "diluted", "distance-mpc", "resolving-power"} {
		if f.given[name] {
			return nil, usagef("--%s: the dataset gives it; leave it out with --dataset", name)
		}
	}
	b, err := core.OpenDataset(ctx, *f.dataset, nil)
	if err != nil {
		return nil, fileError("--dataset", err)
	}
	d := b.Data
	if *f.epoch < 1 || *f.epoch > len(d.Epochs) {
		return nil, usagef("--epoch %d: the dataset has epochs 1–%d", *f.epoch, len(d.Epochs))
	}
	m := d.StartModel(*f.epoch - 1)
	m.Preview = *f.preview
	if *f.fracs != "" {
		if m.MassFractions, err = core.ParseComposition(*f.fracs); err != nil {
			return nil, usagef("--mass-fractions: %v", err)
		}
	}
	if *f.uniform {
		if *f.innerFracs != "" || f.boundary.set {
			return nil, usagef("--uniform leaves out the inner zone; do not give --inner-mass-fractions or --zone-boundary with it")
		}
		m = m.WithoutZone()
	}
	if *f.innerFracs != "" {
		if m.InnerMassFractions, err = core.ParseComposition(*f.innerFracs); err != nil {
			return nil, usagef("--inner-mass-fractions: %v", err)
		}
	}
	if f.boundary.set {
		m.ZoneBoundary = f.boundary.beta
	}
	if err := m.ValidateZone(d); err != nil {
		return nil, usagef("--inner-mass-fractions, --zone-boundary: %v", err)
	}
	switch {
	case !math.IsNaN(vph):
		m.PhotosphereVelocity = vph
	case f.vph.set:
		m.PhotosphereVelocity = f.vph.beta
	}
	switch {
	case !math.IsNaN(tph):
		m.Temperature = tph
	case f.tempF.set:
		m.Temperature = f.tempF.v
	}
	set, err := f.settings()
	if err != nil {
		return nil, err
	}
	ej := d.Ejecta(m)
	if err := ej.Validate(); err != nil {
		return nil, usagef("%s", strings.TrimPrefix(err.Error(), "synth: "))
	}
	sm, err := b.SynthModel()
	if err != nil {
		return nil, err
	}
	comp, err := m.MassFractions.Mix()
	if err != nil {
		return nil, usagef("--mass-fractions: %v", err)
	}
	return &modelSetup{model: sm, comp: comp, ejecta: ej, settings: set, store: b.Store,
		report: linelists.Report{Lines: b.Store.Len(), Warnings: b.LoadWarnings},
		bench:  b, observed: b.Observed[m.Epoch], distance: d.DistanceMpc * physics.Megaparsec, rp: d.ResolvingPower,
		from: d.ModelFromUm * 1e4, to: d.ModelToUm * 1e4}, nil
}

// describe writes the one-line account of the lines read and the warnings
// of the reading and of res to stderr, for command name.
func (su *modelSetup) describe(stderr io.Writer, name string, preview bool, warnings []string) {
	fmt.Fprintf(stderr, "%s: %d lines in %d species", name, su.report.Lines, len(su.store.SpeciesTable))
	if su.bench != nil {
		fmt.Fprintf(stderr, " from the dataset %s", su.bench.Name)
	} else {
		fmt.Fprintf(stderr, " (%d lines outside %.4g–%.4g Å skipped, they cannot act on the range)",
			su.report.Skipped.Total(), su.filter.MinWavelength, su.filter.MaxWavelength)
	}
	if preview {
		fmt.Fprint(stderr, "; ABSORPTION-ONLY PREVIEW, not the full model")
	}
	fmt.Fprintln(stderr)
	for _, z := range su.ejecta.Zones {
		where := "above it: only --mass-fractions forms lines"
		if su.ejecta.BetaPh <= z.Outer {
			where = "inside it: lines from both zones"
		}
		fmt.Fprintf(stderr, "%s: two zones: the inner mass fractions up to %.4g c, --mass-fractions outside; the photosphere at %.4g c lies %s\n",
			name, z.Outer, su.ejecta.BetaPh, where)
	}
	for _, w := range append(slices.Clone(su.report.Warnings), warnings...) {
		fmt.Fprintln(stderr, name+": warning:", w)
	}
}

func runModel(c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet(c, stdout)
	f := addModelFlags(fs, true)
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	f.noteGiven(fs)
	if len(pos) > 0 {
		return usagef("unexpected argument %q (line lists go after --lines)", pos[0])
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	su, err := f.setup(ctx, math.NaN(), math.NaN())
	if err != nil {
		return err
	}
	res, err := su.model.Spectrum(ctx, su.comp, su.ejecta, su.settings)
	if err != nil {
		return err
	}
	if su.distance > 0 {
		res.Flux = res.AtDistance(su.distance)
	}
	flux, norm, err := res.Observe(su.rp, nil)
	if err != nil {
		return err
	}

	var buf bytes.Buffer
	buf.WriteString("wavelength_um,flux,normalized_flux\n")
	for i, l := range res.Wavelength {
		buf.WriteString(strconv.FormatFloat(l*1e-4, 'f', 6, 64))
		buf.WriteByte(',')
		buf.WriteString(strconv.FormatFloat(flux[i], 'g', 7, 64))
		buf.WriteByte(',')
		buf.WriteString(strconv.FormatFloat(norm[i], 'f', 6, 64))
		buf.WriteByte('\n')
	}
	if _, err := stdout.Write(buf.Bytes()); err != nil {
		return err
	}
	su.describe(stderr, "model", *f.preview, res.Warnings)
	return nil
}
