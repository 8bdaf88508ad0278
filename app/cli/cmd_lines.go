package cli

import (
	"bytes"
	"compress/gzip"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"

	"broadline/app/core"
	"broadline/linelists"
	"broadline/opacity"
	"broadline/physics"
)

// elementsWithLines returns the Z of the elements with lines in st, ascending.
func elementsWithLines(st *linelists.Store) []int {
	var zs []int
	for _, sp := range st.SpeciesTable {
		if z := int(sp.Z); !slices.Contains(zs, z) {
			zs = append(zs, z)
		}
	}
	slices.Sort(zs)
	return zs
}

func init() {
	c := &command{
		name:    "lines",
		args:    "summary|convert FILE… [--out F] [--columns MAP] [--species S] [--medium vacuum|air] [flags]",
		summary: "summarise line lists, or convert any table of lines to broadline's line-list format",
	}
	c.run = func(args []string, stdout, stderr io.Writer) error { return runLines(c, args, stdout, stderr) }
	register(c)
}

// linesFlags are the flags of "broadline lines".
type linesFlags struct {
	out, columns, species, medium, levels, overrides, only, fracs string
	headerRow, noCache, keepDup                                   bool
	wlMin, wlMax, minLogGF                                        float64
	hasMinLogGF                                                   bool
}

func runLines(c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet(c, stdout)
	var f linesFlags
	fs.StringVar(&f.out, "out", "", "convert: output file in broadline's format (gzip-compressed if it ends in .gz)")
	fs.StringVar(&f.columns, "columns", "", "import a table: field=column[:unit],… e.g. wavelength=1:nm,species=2,log_gf=3,lower_energy=4:cm-1,lower_j=5 (column by 1-based number or header name)")
	fs.BoolVar(&f.headerRow, "header-row", false, "import: the first non-comment row names the columns")
	fs.StringVar(&f.species, "species", "", `one species for every line of a file without a species column, e.g. "Nd II"`)
	fs.StringVar(&f.medium, "medium", "", "medium of the wavelengths when a file does not say: vacuum or air")
	fs.StringVar(&f.levels, "levels", "", "levels file(s), comma-separated (species, energy_eV|energy_cm-1, g|j)")
	fs.StringVar(&f.overrides, "overrides", "", "file of ionisation energies / ground weights replacing the built-in table")
	fs.StringVar(&f.only, "only", "", `keep only these species, comma-separated, e.g. "Sr II,Nd II"`)
	fs.Float64Var(&f.wlMin, "wl-min", 0, "keep lines at vacuum wavelengths ≥ this, in Å (0: no limit)")
	fs.Float64Var(&f.wlMax, "wl-max", 0, "keep lines at vacuum wavelengths ≤ this, in Å (0: no limit)")
	fs.Func("min-loggf", "keep lines with log gf ≥ this", func(s string) error {
		v, err := parseFloatFlag(s)
		f.minLogGF, f.hasMinLogGF = v, true
		return err
	})
	fs.BoolVar(&f.noCache, "no-cache", false, "neither read nor write the binary cache next to each file")
	fs.BoolVar(&f.keepDup, "keep-duplicates", false, "keep duplicate lines (they are counted either way)")
	fs.StringVar(&f.fracs, "mass-fractions", "", `summary: also name the elements of this mix that have no lines in the files, e.g. "Sr=0.3,Te=0.7"`)
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return usagef("want a sub-command: lines summary FILE… or lines convert FILE… --out F")
	}
	sub, files := pos[0], pos[1:]
	if sub != "summary" && sub != "convert" {
		return usagef("unknown sub-command %q of lines (want summary or convert)", sub)
	}
	if len(files) == 0 {
		return usagef("lines %s: no input files", sub)
	}
	if sub == "convert" && f.out == "" {
		return usagef("lines convert: --out F is required")
	}
	if sub == "summary" && f.out != "" {
		return usagef("lines summary writes no file; --out belongs to lines convert")
	}
	var mix *opacity.Composition
	if f.fracs != "" {
		if sub != "summary" {
			return usagef("--mass-fractions belongs to lines summary")
		}
		c, err := opacity.ParseComposition(f.fracs)
		if err != nil {
			return usagef("--mass-fractions: %v", err)
		}
		mix = &c
	}
	opts, err := f.options()
	if err != nil {
		return err
	}
	st, rep, err := linelists.Load(files, opts)
	if err != nil {
		return err
	}
	if sub == "summary" {
		var b bytes.Buffer
		if err := linelists.WriteSummary(&b, st, rep); err != nil {
			return err
		}
		var with []string
		for _, z := range elementsWithLines(st) {
			with = append(with, core.ElementSymbol(z))
		}
		fmt.Fprintf(&b, "elements with lines: %s; any other element of a composition only supplies electrons\n", strings.Join(with, ", "))
		if mix != nil {
			if l := core.LinelessText(core.LinelessIn(st, *mix)); l != "" {
				fmt.Fprintln(&b, "--mass-fractions: "+l)
			} else {
				fmt.Fprintln(&b, "--mass-fractions: every element has lines")
			}
		}
		_, err := stdout.Write(b.Bytes())
		return err
	}
	return convertLines(f.out, files, st, rep, stdout)
}

func parseFloatFlag(s string) (float64, error) {
	var v float64
	if _, err := fmt.Sscan(s, &v); err != nil {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	return v, nil
}

// options turns the flags into linelists.Options; bad values are usage
// errors.
func (f *linesFlags) options() (linelists.Options, error) {
	var o linelists.Options
	if f.medium != "" {
		m, err := physics.ParseMedium(f.medium)
		if err != nil {
			return o, usagef("--medium %q: want vacuum or air", f.medium)
		}
		o.Medium = m
	}
	var sp linelists.Species
	if f.species != "" {
		s, err := linelists.ParseSpecies(f.species)
		if err != nil {
			return o, usagef("--species: %v", err)
		}
		sp = s
	}
	if f.columns != "" {
		cols, err := linelists.ParseColumnMap(f.columns)
		if err != nil {
			return o, usagef("--columns: %v", err)
		}
		o.Import = &linelists.Import{Columns: cols, Species: sp, Medium: o.Medium, HeaderRow: f.headerRow}
	} else {
		if f.headerRow {
			return o, usagef("--header-row belongs to an import with --columns")
		}
		o.Species = sp
	}
	if f.wlMin < 0 || f.wlMax < 0 || f.wlMax > 0 && f.wlMax <= f.wlMin {
		return o, usagef("--wl-min %g and --wl-max %g: want 0 ≤ min < max (Å, 0 for no limit)", f.wlMin, f.wlMax)
	}
	o.Filter = linelists.Filter{MinWavelength: f.wlMin, MaxWavelength: f.wlMax, MinLogGF: f.minLogGF, HasMinLogGF: f.hasMinLogGF}
	if f.only != "" {
		for _, s := range strings.Split(f.only, ",") {
			sp, err := linelists.ParseSpecies(s)
			if err != nil {
				return o, usagef("--only: %v", err)
			}
			o.Filter.Species = append(o.Filter.Species, sp)
		}
	}
	if f.levels != "" {
		o.Levels = strings.Split(f.levels, ",")
	}
	o.Overrides = f.overrides
	o.KeepDuplicates = f.keepDup
	o.Workers = runtime.GOMAXPROCS(0)
	if f.noCache {
		o.Cache = linelists.CacheOff
	}
	return o, nil
}

// convertLines writes st in our format to out (via a temporary file, so a
// failure leaves no partial output).
func convertLines(out string, files []string, st *linelists.Store, rep linelists.Report, stdout io.Writer) error {
	var body bytes.Buffer
	var comments []string
	comments = append(comments, fmt.Sprintf("Converted by broadline lines convert from %s.", strings.Join(files, ", ")))
	var meta []linelists.KeyValue
	for _, fr := range rep.Files {
		for _, kv := range fr.Meta {
			if !strings.EqualFold(kv.Key, "medium") {
				meta = append(meta, linelists.KeyValue{Key: kv.Key, Value: kv.Value})
			}
		}
		if fr.Medium == physics.Air {
			comments = append(comments, fmt.Sprintf("%s gave air wavelengths; they were converted to vacuum (Morton 2000).", fr.Name))
		}
	}
	if err := linelists.Write(&body, st, linelists.WriteOptions{Comments: comments, Meta: meta}); err != nil {
		return err
	}
	data := body.Bytes()
	if strings.HasSuffix(out, ".gz") {
		var z bytes.Buffer
		zw := gzip.NewWriter(&z)
		zw.Write(data)
		if err := zw.Close(); err != nil {
			return err
		}
		data = z.Bytes()
	}
	tmp, err := os.CreateTemp(filepath.Dir(out), ".lines-convert-*")
	if err != nil {
		return fmt.Errorf("writing %s: %w", out, err)
	}
	_, werr := tmp.Write(data)
	cerr := tmp.Close()
	if err := errors.Join(werr, cerr); err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("writing %s: %w", out, err)
	}
	if err := os.Rename(tmp.Name(), out); err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("writing %s: %w", out, err)
	}
	fmt.Fprintf(stdout, "wrote %d lines (%d species, %d duplicates dropped, %d skipped by the filter) to %s\n",
		st.Len(), len(st.SpeciesTable), rep.Duplicates, rep.Skipped.Total(), out)
	return nil
}
