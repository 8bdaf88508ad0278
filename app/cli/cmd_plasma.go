package cli

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"strconv"
	"strings"

	"broadline/linelists"
	"broadline/opacity"
)

func init() {
	c := &command{
		name:    "plasma",
		args:    "--temperature K --density G_CM3 --mass-fractions LIST [--lines FILE…] [--levels FILE…] [--overrides FILE]",
		summary: "LTE plasma state: electron density, ion densities and partition functions (JSON)",
	}
	c.run = func(args []string, stdout, stderr io.Writer) error { return runPlasma(c, args, stdout, stderr) }
	register(c)
}

// fileList is a repeatable flag of file names; one value may also list
// several names separated by commas.
type fileList []string

func (l *fileList) String() string { return strings.Join(*l, ",") }

func (l *fileList) Set(s string) error {
	for _, v := range strings.Split(s, ",") {
		if v = strings.TrimSpace(v); v != "" {
			*l = append(*l, v)
		}
	}
	return nil
}

// requiredFloat is a float flag without a default: unset until given, so
// that a missing value is reported by name (and help shows no "NaN").
type requiredFloat struct {
	v   float64
	set bool
}

func (f *requiredFloat) String() string {
	if f == nil || !f.set {
		return ""
	}
	return strconv.FormatFloat(f.v, 'g', -1, 64)
}

func (f *requiredFloat) Set(s string) error {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil {
		return fmt.Errorf("%q is not a number", s)
	}
	f.v, f.set = v, true
	return nil
}

// value returns the flag's value, or NaN when it was not given.
func (f *requiredFloat) value() float64 {
	if !f.set {
		return math.NaN()
	}
	return f.v
}

// positive checks that the flag was given and is positive and finite; the
// error names the flag.
func (f *requiredFloat) positive(name, what string) error {
	if !f.set {
		return usagef("--%s is required (%s)", name, what)
	}
	if !(f.v > 0) || math.IsInf(f.v, 0) {
		return usagef("--%s %g: want a positive, finite %s", name, f.v, what)
	}
	return nil
}

// floatFlag defines a requiredFloat flag and returns it.
func floatFlag(fs *flagSet, name, usage string) *requiredFloat {
	f := &requiredFloat{}
	fs.Var(f, name, usage)
	return f
}

// plasmaFlags are the flags plasma and opacity share: the thermodynamic
// state, the composition and the atomic-data files.
type plasmaFlags struct {
	temp, density *requiredFloat
	fracs         *string
	lines, levels fileList
	overrides     *string
}

func addPlasmaFlags(fs *flagSet, linesUsage string) *plasmaFlags {
	p := &plasmaFlags{}
	p.temp = floatFlag(fs, "temperature", "temperature in `K` (required, > 0)")
	p.density = floatFlag(fs, "density", "mass density `G_CM3` in g cm⁻³ (required, > 0)")
	p.fracs = fs.String("mass-fractions", "", "element mass fractions `LIST`, e.g. \"Ca=0.4,Sr=0.3,Nd=0.3\" (required; any positive weights, normalised)")
	fs.Var(&p.lines, "lines", linesUsage)
	fs.Var(&p.levels, "levels", "levels `FILE` for the partition functions (repeatable, or comma-separated)")
	p.overrides = fs.String("overrides", "", "`FILE` of ionisation energies and ground weights replacing the element table's")
	return p
}

// check validates the values that need no file, naming the flag at fault.
func (p *plasmaFlags) check() (opacity.Composition, error) {
	for _, f := range []struct {
		name, what string
		v          *requiredFloat
	}{{"temperature", "temperature in K", p.temp}, {"density", "mass density in g cm⁻³", p.density}} {
		if err := f.v.positive(f.name, f.what); err != nil {
			return opacity.Composition{}, err
		}
	}
	if strings.TrimSpace(*p.fracs) == "" {
		return opacity.Composition{}, usagef("--mass-fractions is required, e.g. \"Ca=0.4,Sr=0.3,Nd=0.3\"")
	}
	comp, err := opacity.ParseComposition(*p.fracs)
	if err != nil {
		return opacity.Composition{}, usagef("--mass-fractions: %v", err)
	}
	return comp, nil
}

// load reads the atomic-data files: the line lists through the linelists
// loader (with its cache), or only levels files, or only overrides. It
// returns nil when no file was given. A file that cannot be read or parsed
// is a usage error naming its flag.
func (p *plasmaFlags) load(filter linelists.Filter) (*linelists.Store, linelists.Report, error) {
	var rep linelists.Report
	if len(p.lines) > 0 {
		st, rep, err := linelists.Load(p.lines, linelists.Options{Levels: p.levels, Overrides: *p.overrides, Filter: filter})
		if err != nil {
			return nil, rep, fileError(p.flagOf(err), err)
		}
		return st, rep, nil
	}
	if len(p.levels) == 0 && *p.overrides == "" {
		return nil, rep, nil
	}
	b := linelists.NewBuilder()
	for _, name := range p.levels {
		f, err := os.Open(name)
		if err != nil {
			return nil, rep, fileError("--levels", err)
		}
		_, err = b.ReadLevels(f, linelists.LevelsOptions{Name: name})
		f.Close()
		if err != nil {
			return nil, rep, fileError("--levels", err)
		}
	}
	st, rep := b.Build()
	if *p.overrides != "" {
		f, err := os.Open(*p.overrides)
		if err != nil {
			return nil, rep, fileError("--overrides", err)
		}
		o, err := linelists.ReadOverrides(f, *p.overrides)
		f.Close()
		if err != nil {
			return nil, rep, fileError("--overrides", err)
		}
		st.Overrides = o
	}
	return st, rep, nil
}

// flagOf names the flag whose file caused err: the file named by a
// *linelists.ParseError or an *fs.PathError, looked up among the flags'
// values; "--lines" when it cannot tell.
func (p *plasmaFlags) flagOf(err error) string {
	var name string
	var pe *linelists.ParseError
	var fe *fs.PathError
	switch {
	case errors.As(err, &pe):
		name = pe.File
	case errors.As(err, &fe):
		name = fe.Path
	}
	if name != "" && name == *p.overrides {
		return "--overrides"
	}
	for _, l := range p.levels {
		if name == l {
			return "--levels"
		}
	}
	return "--lines"
}

// plasmaJSON is the output of the plasma command.
type plasmaJSON struct {
	TemperatureK       float64 `json:"temperature_k"`
	DensityGCm3        float64 `json:"density_g_cm3"`
	ElectronDensityCm3 float64 `json:"electron_density_cm3"`
	Iterations         int     `json:"iterations"`
	ChargeResidual     float64 `json:"charge_residual"`
	// PartitionFunctions says where the partition functions came from.
	PartitionFunctions string           `json:"partition_functions"`
	Elements           []plasmaElemJSON `json:"elements"`
	Species            []plasmaSpecJSON `json:"species"`
	Approximations     string           `json:"approximations"`
}

type plasmaElemJSON struct {
	Element          string  `json:"element"`
	MassFraction     float64 `json:"mass_fraction"`
	NumberDensityCm3 float64 `json:"number_density_cm3"`
	Stages           int     `json:"stages"`
}

type plasmaSpecJSON struct {
	Species           string  `json:"species"`
	NumberDensityCm3  float64 `json:"number_density_cm3"`
	Fraction          float64 `json:"fraction"`
	PartitionFunction float64 `json:"partition_function"`
	PartitionSource   string  `json:"partition_source"`
}

const groundOnly = "ground-level statistical weights of the element table only (no --lines or --levels given): lower bounds of the true partition functions"

func runPlasma(c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet(c, stdout)
	pf := addPlasmaFlags(fs, "line-list `FILE` whose levels give the partition functions (optional; repeatable, or comma-separated)")
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("unexpected argument %q (give several files as --lines A --lines B, or --lines A,B)", pos[0])
	}
	comp, err := pf.check()
	if err != nil {
		return err
	}
	st, _, err := pf.load(linelists.Filter{})
	if err != nil {
		return err
	}
	atoms := opacity.Atoms{}
	source := groundOnly
	if st != nil {
		atoms = opacity.StoreAtoms(st)
		switch {
		case len(pf.lines) == 0 && len(pf.levels) == 0:
			source = groundOnly + "; ground weights and ionisation energies with --overrides applied"
		case len(pf.levels) > 0:
			source = "summed over the levels of the --levels files (and of the line lists), per species as partition_source says"
		default:
			source = "summed over the levels the line lists name (lower bounds), per species as partition_source says"
		}
	}
	p, err := opacity.SolveAtoms(comp, pf.density.value(), pf.temp.value(), atoms)
	if err != nil {
		return err
	}
	out := plasmaJSON{
		TemperatureK: p.Temperature, DensityGCm3: p.Density, ElectronDensityCm3: p.ElectronDensity,
		Iterations: p.Iterations, ChargeResidual: p.Residual, PartitionFunctions: source,
		Approximations: "LTE (Saha–Boltzmann at one temperature); ion stages above those with known ionisation energies neglected (at most I–V); ideal gas, no pressure ionisation",
	}
	for k := range p.Elements {
		e := &p.Elements[k]
		el, _ := linelists.ElementByZ(e.Z)
		out.Elements = append(out.Elements, plasmaElemJSON{Element: el.Symbol, MassFraction: e.MassFraction,
			NumberDensityCm3: e.NumberDensity, Stages: e.Stages})
		for j := 0; j < e.Stages; j++ {
			sp := e.Species(j)
			src := "ground weight only (lower bound)"
			switch {
			case j >= e.Z:
				src = "bare nucleus"
			case st != nil:
				src = st.LevelSourceOf(sp).String()
			}
			out.Species = append(out.Species, plasmaSpecJSON{Species: sp.String(), NumberDensityCm3: e.Ion[j],
				Fraction: e.Ion[j] / e.NumberDensity, PartitionFunction: e.Partition[j], PartitionSource: src})
		}
	}
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetIndent("", "  ")
	if err := enc.Encode(out); err != nil {
		return fmt.Errorf("writing JSON: %w", err)
	}
	_, err = stdout.Write(buf.Bytes())
	return err
}
