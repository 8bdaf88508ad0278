package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"slices"
	"strconv"
	"strings"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/opacity/synth"
	"broadline/spectra"
)

func init() {
	c := &command{
		name: "model",
		args: "--lines FILE… --mass-fractions LIST --days D --photosphere-velocity V --outer-velocity V " +
			"--temperature K --ejecta-mass M [--inner-velocity V] [--density-index N] [--from-um A --to-um B] " +
			"[--resolving-power R] [--without ELEMENT…]",
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
	b, err := parseVelocity(s)
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

// parseVelocity reads "0.2c" or "60000km/s" (spaces allowed before the unit)
// and returns v/c, which must lie in [0, 1).
func parseVelocity(s string) (float64, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	var num string
	var scale float64
	switch {
	case strings.HasSuffix(t, "km/s"):
		num, scale = strings.TrimSuffix(t, "km/s"), 1/spectra.SpeedOfLightKmS
	case strings.HasSuffix(t, "c"):
		num, scale = strings.TrimSuffix(t, "c"), 1
	default:
		return 0, fmt.Errorf("velocity %q needs a unit: a fraction of c like 0.2c, or km/s like 60000km/s", s)
	}
	x, err := strconv.ParseFloat(strings.TrimSpace(num), 64)
	if err != nil {
		return 0, fmt.Errorf("velocity %q: %q is not a number (want e.g. 0.2c or 60000km/s)", s, strings.TrimSpace(num))
	}
	b := x * scale
	if !(b >= 0) || b >= 1 {
		return 0, fmt.Errorf("velocity %q is %g c; want 0 ≤ v < c", s, b)
	}
	return b, nil
}

// modelFlags are the flags that define a synthesis; the model and sweep
// commands share them.
type modelFlags struct {
	lines, levels, without    listFlag
	fracs                     *string
	daysF, tempF, massF       numberFlag
	vph, vout, vin            velocityFlag
	index, from, to, rp, dist *float64
	diluted, preview          *bool
	doppler                   *string
}

// addModelFlags declares the model flags on fs. The photosphere velocity is
// declared only when withVph is true (the sweep sets it itself).
func addModelFlags(fs *flagSet, withVph bool) *modelFlags {
	f := &modelFlags{}
	fs.Var(&f.lines, "lines", "line-list `FILE` (repeatable, or comma-separated)")
	fs.Var(&f.levels, "levels", "levels `FILE` for partition functions (optional, repeatable)")
	f.fracs = fs.String("mass-fractions", "", "element mass fractions, e.g. \"Sr=0.3,Nd=0.1,Ca=0.6\" (normalised; required)")
	fs.Var(&f.daysF, "days", "time since explosion in `days` (required)")
	if withVph {
		fs.Var(&f.vph, "photosphere-velocity", "photosphere `velocity`, e.g. 0.2c or 60000km/s (required)")
	}
	fs.Var(&f.vout, "outer-velocity", "outer edge of the ejecta, a `velocity` such as 0.35c (required)")
	fs.Var(&f.vin, "inner-velocity", "inner edge of the density law, a `velocity` (default 0; needed for --density-index ≥ 3)")
	fs.Var(&f.tempF, "temperature", "photosphere blackbody temperature in `K` (required)")
	fs.Var(&f.massF, "ejecta-mass", "total ejecta mass in solar `masses` (required)")
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

// modelSetup is what the model flags describe, checked and read.
type modelSetup struct {
	model    *synth.Model
	comp     opacity.Composition
	ejecta   synth.Ejecta
	settings synth.Settings
	store    *linelists.Store
	report   linelists.Report
	skipped  int
	filter   linelists.Filter
}

// setup checks every value (a *usageError naming the flag when one is bad)
// before it reads the line lists and builds the model. vph and tph are the
// photosphere velocity and temperature to check the ejecta with when the
// command sets them itself (NaN: take --photosphere-velocity and
// --temperature).
func (f *modelFlags) setup(vph, tph float64) (*modelSetup, error) {
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
		return nil, usagef("--lines: at least one line-list file is needed")
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
	var dop synth.Doppler
	switch *f.doppler {
	case "first-order":
		dop = synth.FirstOrder
	case "relativistic":
		dop = synth.Relativistic
	default:
		return nil, usagef("--doppler %q: want first-order or relativistic", *f.doppler)
	}
	var out []int
	for _, w := range f.without {
		e, err := linelists.ElementBySymbol(w)
		if err != nil {
			return nil, usagef("--without %q: %v", w, err)
		}
		out = append(out, e.Z)
	}
	ej := synth.Ejecta{
		Time: days * spectra.Day, Mass: mass * spectra.SolarMass,
		BetaIn: f.vin.beta, BetaPh: vph, BetaMax: vout,
		DensityIndex: *f.index, Temperature: temp, Diluted: *f.diluted,
	}
	if err := ej.Validate(); err != nil {
		return nil, usagef("%s", strings.TrimPrefix(err.Error(), "synth: "))
	}

	// Read the line lists, keeping only lines that can act on the range.
	fromA, toA := from*1e4, to*1e4
	b := linelists.NewBuilder()
	su := &modelSetup{comp: comp, ejecta: ej,
		filter: linelists.Filter{MinWavelength: fromA * math.Sqrt(1-vout*vout) / (1 + vout), MaxWavelength: toA / (1 - vout)},
		settings: synth.Settings{Preview: *f.preview, Without: out, Workers: runtime.GOMAXPROCS(0),
			Options: synth.Options{Doppler: dop}}}
	for _, name := range f.lines {
		n, err := readFile(name, func(r io.Reader) (int, error) {
			fr, err := b.Read(r, linelists.ReadOptions{Name: name, Filter: su.filter})
			return fr.Skipped.Total(), err
		})
		if err != nil {
			return nil, usagef("--lines: %v", err)
		}
		su.skipped += n
	}
	for _, name := range f.levels {
		if _, err := readFile(name, func(r io.Reader) (int, error) {
			_, err := b.ReadLevels(r, linelists.LevelsOptions{Name: name})
			return 0, err
		}); err != nil {
			return nil, usagef("--levels: %v", err)
		}
	}
	su.store, su.report = b.Build()
	if su.model, err = synth.NewModel(su.store, fromA, toA, 0); err != nil {
		return nil, usagef("%s", strings.TrimPrefix(err.Error(), "synth: "))
	}
	return su, nil
}

// describe writes the one-line account of the lines read and the warnings
// of the reading and of res to stderr, for command name.
func (su *modelSetup) describe(stderr io.Writer, name string, preview bool, warnings []string) {
	fmt.Fprintf(stderr, "%s: %d lines in %d species (%d lines outside %.4g–%.4g Å skipped, they cannot act on the range)",
		name, su.report.Lines, len(su.store.SpeciesTable), su.skipped, su.filter.MinWavelength, su.filter.MaxWavelength)
	if preview {
		fmt.Fprint(stderr, "; ABSORPTION-ONLY PREVIEW, not the full model")
	}
	fmt.Fprintln(stderr)
	for _, w := range append(slices.Clone(su.report.Warnings), warnings...) {
		fmt.Fprintln(stderr, name+": warning:", w)
	}
}

func runModel(c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet(c, stderr)
	f := addModelFlags(fs, true)
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("unexpected argument %q (line lists go after --lines)", pos[0])
	}
	su, err := f.setup(math.NaN(), math.NaN())
	if err != nil {
		return err
	}
	res, err := su.model.Spectrum(context.Background(), su.comp, su.ejecta, su.settings)
	if err != nil {
		return err
	}
	if *f.dist > 0 {
		res.Flux = res.AtDistance(*f.dist * spectra.Megaparsec)
	}
	flux, norm, err := res.Observe(*f.rp, nil)
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

// readFile opens name and passes it to read.
func readFile(name string, read func(io.Reader) (int, error)) (int, error) {
	f, err := os.Open(name)
	if err != nil {
		return 0, err
	}
	defer f.Close()
	return read(f)
}
