package cli

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"os/signal"
	"path/filepath"
	"strconv"
	"strings"

	"broadline/app/core"
	"broadline/grid"
)

func init() {
	c := &command{
		name: "grid",
		args: "--dataset FILE --spec GRID.json [--out FILE.csv] [--shard I/N] [--spectra FROM,TO,STEP] | grid merge OUT PART…",
		summary: "χ²/N of the model at every point of a grid (velocity × temperature × mass fractions × days × epoch), " +
			"in shards for a job array (CSV with the inputs' checksums); 'grid merge' joins the parts",
	}
	c.run = func(args []string, stdout, stderr io.Writer) error { return runGrid(c, args, stdout, stderr) }
	register(c)
}

func runGrid(c *command, args []string, stdout, stderr io.Writer) error {
	if len(args) > 0 && args[0] == "merge" {
		return runGridMerge(c, args[1:], stdout, stderr)
	}
	fs := newFlagSet(c, stdout)
	dataset := fs.String("dataset", "", "dataset `FILE` (JSON, see README; required)")
	specPath := fs.String("spec", "", "grid spec `FILE` (JSON, see README \"Running a grid on a cluster\"; required)")
	out := fs.String("out", "grid.csv", "result `FILE`; a shard I/N writes FILE with .partI-of-N before the extension")
	spectraText := fs.String("spectra", "", "also keep each point's model spectra at vacuum wavelengths `FROM,TO,STEP` in µm, "+
		"e.g. 0.4,2.4,0.002 (at the distance, smoothed to the resolving power), in FILE.spectra.csv")
	shardText := fs.String("shard", "", "run the I-th of N interleaved parts, counting from 0 (default: from SLURM_ARRAY_TASK_ID/COUNT, else the whole grid)")
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	switch {
	case len(pos) > 0:
		return usagef("unexpected argument %q", pos[0])
	case *dataset == "":
		return usagef("--dataset: the dataset whose spectra the grid is compared with is required")
	case *specPath == "":
		return usagef("--spec: the grid spec is required")
	}
	var wave []float64
	if *spectraText != "" {
		if wave, err = parseWaveRange(*spectraText); err != nil {
			return usagef("--spectra: %v", err)
		}
	}
	shard := grid.Whole
	if *shardText != "" {
		if shard, err = grid.ParseShard(*shardText); err != nil {
			return usagef("--shard: %v", err)
		}
	} else {
		s, found, err := grid.ShardFromEnv(os.Getenv)
		if err != nil {
			return usagef("%v", err)
		}
		if found {
			shard = s
		}
	}
	data, err := os.ReadFile(*specPath)
	if err != nil {
		return fileError("--spec", err)
	}
	spec, err := grid.DecodeSpec(bytes.NewReader(data), *specPath)
	if err != nil {
		// A JSON mistake is worded by core.DecodeJSON (line, column, what
		// was expected); grid's own checks of the values read as they are.
		var probe grid.Spec
		if jerr := core.DecodeJSON(data, &probe); jerr != nil && len(data) <= grid.MaxSpecBytes {
			return fileError("--spec", fmt.Errorf("%s: grid spec: %w", *specPath, jerr))
		}
		return fileError("--spec", err)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	b, err := core.OpenDataset(ctx, *dataset, nil)
	if err != nil {
		return fileError("--dataset", err)
	}
	eval, labels, err := gridEvaluator(b, spec, wave)
	if err != nil {
		return usagef("--spec: %v", err)
	}
	inputs, err := gridInputs(b)
	if err != nil {
		return err
	}
	path := *out
	if shard.Count > 1 {
		ext := filepath.Ext(path)
		path = fmt.Sprintf("%s.part%d-of-%d%s", strings.TrimSuffix(path, ext), shard.Index, shard.Count, ext)
	}
	opt := grid.Options{Inputs: inputs, Epochs: labels, Wavelengths: wave,
		Note: func(msg string) { fmt.Fprintln(stderr, "grid:", msg) }}
	if isTerminal(stderr) {
		opt.Progress = func(done, total int) { fmt.Fprintf(stderr, "\rgrid: %d of %d points", done, total) }
	}
	rep, err := grid.Run(ctx, spec, shard, eval, path, opt)
	if opt.Progress != nil {
		fmt.Fprintln(stderr)
	}
	if err != nil {
		return err
	}
	if rep.Skipped {
		fmt.Fprintf(stderr, "grid: %s is complete and matches the spec and inputs: skipped\n", path)
	} else {
		fmt.Fprintf(stderr, "grid: shard %s: %d points, %d failed (see the error column), written to %s\n", shard, rep.Points, rep.Failed, path)
	}
	fmt.Fprintln(stdout, path)
	if wave != nil {
		fmt.Fprintln(stdout, grid.SpectraPath(path))
	}
	return nil
}

// maxSpectrumSamples bounds the wavelengths of --spectra: every point and
// epoch writes one row of them.
const maxSpectrumSamples = 100_000

// parseWaveRange reads "FROM,TO,STEP" in µm into vacuum wavelengths in Å,
// FROM, FROM+STEP, … up to TO (within a millionth of a step).
func parseWaveRange(s string) ([]float64, error) {
	f := strings.Split(s, ",")
	if len(f) != 3 {
		return nil, fmt.Errorf("%q: want FROM,TO,STEP in µm, e.g. 0.4,2.4,0.002", s)
	}
	var v [3]float64
	for i, t := range f {
		x, err := strconv.ParseFloat(strings.TrimSpace(t), 64)
		if err != nil {
			return nil, fmt.Errorf("%q is not a number", t)
		}
		v[i] = x
	}
	from, to, step := v[0], v[1], v[2]
	if !(from > 0 && to > from && step > 0) || math.IsInf(to, 0) {
		return nil, fmt.Errorf("%q: want 0 < FROM < TO and STEP > 0", s)
	}
	n := math.Floor((to-from)/step+1e-6) + 1
	if n < 2 {
		return nil, fmt.Errorf("%q: one wavelength; a spectrum needs at least 2", s)
	}
	if n > maxSpectrumSamples {
		return nil, fmt.Errorf("%q: %.0f wavelengths, at most %d", s, n, maxSpectrumSamples)
	}
	w := make([]float64, int(n))
	for i := range w {
		w[i] = (from + float64(i)*step) * 1e4
	}
	return w, nil
}

// gridEvaluator returns the evaluator of spec's points for bench b and the
// epoch labels of its result columns: every epoch of the dataset ("e1",
// "e2", …), or, when the spec has an epoch axis, the one epoch of each
// point ("fit"). Each point's model is the epoch's starting model with the
// point's values instead.
func gridEvaluator(b *core.Bench, spec *grid.Spec, wave []float64) (grid.Evaluator, []string, error) {
	names := spec.Names()
	hasEpoch := false
	for i, a := range spec.Axes {
		if a.Quantity == grid.Epoch {
			hasEpoch = true
			for _, v := range spec.AxisValues(i) {
				if int(v) >= len(b.Data.Epochs) {
					return nil, nil, fmt.Errorf("epoch axis: index %d, but the dataset has epochs 0–%d (counting from 0 here)", int(v), len(b.Data.Epochs)-1)
				}
			}
		}
	}
	var labels []string
	if hasEpoch {
		labels = []string{"fit"}
	} else {
		for i := range b.Data.Epochs {
			labels = append(labels, "e"+strconv.Itoa(i+1))
		}
	}
	eval := grid.EvaluatorFunc(func(ctx context.Context, p grid.Point) (grid.Result, error) {
		epochs := make([]int, 0, len(b.Data.Epochs))
		if hasEpoch {
			v, _ := p.Get("epoch")
			epochs = append(epochs, int(v))
		} else {
			for i := range b.Data.Epochs {
				epochs = append(epochs, i)
			}
		}
		var res grid.Result
		for _, e := range epochs {
			m := b.Data.StartModel(e)
			days := 0.0
			for k, name := range names {
				v := p.Values[k]
				switch a := spec.Axes[k]; a.Quantity {
				case grid.Velocity:
					m.PhotosphereVelocity = v
				case grid.Temperature:
					m.Temperature = v
				case grid.Days:
					days = v
				case grid.Fraction:
					c, err := m.MassFractions.WithFraction(a.Element, v)
					if err != nil {
						return grid.Result{}, fmt.Errorf("%s: %w", name, err)
					}
					m.MassFractions = c
				}
			}
			ov, flux, err := b.ComputeSpectrum(ctx, m, 0, days, wave)
			if err != nil {
				return grid.Result{}, err
			}
			res.Epochs = append(res.Epochs, grid.EpochFit{Chi2N: ov.Reduced(), N: ov.N})
			if wave != nil {
				res.Spectra = append(res.Spectra, flux)
			}
		}
		return res, nil
	})
	return eval, labels, nil
}

// gridInputs are the files a grid's results depend on, with their
// checksums: the dataset file, its spectra and line lists.
func gridInputs(b *core.Bench) (grid.Inputs, error) {
	in := grid.Inputs{Program: "broadline " + Version}
	add := func(role, path string) error {
		f, err := grid.HashFile(role, path)
		if err != nil {
			return fileError("--dataset", err)
		}
		in.Files = append(in.Files, f)
		return nil
	}
	if err := add("dataset", b.Name); err != nil {
		return in, err
	}
	dir := filepath.Dir(b.Name)
	resolve := func(n string) string {
		if filepath.IsAbs(n) {
			return n
		}
		return filepath.Join(dir, filepath.FromSlash(n))
	}
	for _, e := range b.Data.Epochs {
		if err := add("spectrum", resolve(e.File)); err != nil {
			return in, err
		}
	}
	for _, l := range b.Data.LineFiles {
		if err := add("linelist", resolve(l)); err != nil {
			return in, err
		}
	}
	for _, l := range b.Data.ImportedLineFiles {
		if err := add("linelist", resolve(l.File)); err != nil {
			return in, err
		}
	}
	for _, l := range b.Data.LevelFiles {
		if err := add("levels", resolve(l)); err != nil {
			return in, err
		}
	}
	return in, nil
}

func runGridMerge(c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet(c, stdout)
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	if len(pos) < 2 {
		return usagef("grid merge OUT PART…: give the output file and at least one part")
	}
	info, err := grid.Merge(pos[0], pos[1:]...)
	if err != nil {
		return err
	}
	_ = info
	fmt.Fprintf(stderr, "grid merge: %d parts merged into %s\n", len(pos)-1, pos[0])
	fmt.Fprintln(stdout, pos[0])
	return nil
}

// isTerminal reports whether w is a terminal (a character device).
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}
