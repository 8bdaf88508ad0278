package core

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path"
	"path/filepath"

	"broadline/app/demo"
	"broadline/internal/demogen"
	"broadline/linelists"
	"broadline/physics"
	"broadline/spectra"
)

// Dataset is the analyst's own dataset, as written in a dataset file (JSON,
// our own format, documented in README.md): the observed spectra of one
// event with their epochs, the line lists, and the fixed parts of the
// ejecta model. Per epoch the photosphere velocity and temperature are the
// starting values the workbench shows (and Reset returns to). The built-in
// demo is a Dataset too.
type Dataset struct {
	Object         string   `json:"object"`
	Note           string   `json:"note,omitempty"`
	DistanceMpc    float64  `json:"distance_mpc"`
	ResolvingPower float64  `json:"resolving_power"`
	LineFiles      []string `json:"line_files"`
	// ImportedLineFiles are line tables in other layouts, each read with
	// its column map (as broadline lines --columns).
	ImportedLineFiles []ImportedLineFile `json:"imported_line_files,omitempty"`
	LevelFiles        []string           `json:"level_files,omitempty"`
	MassFractions     Composition        `json:"mass_fractions"`
	// InnerMassFractions and ZoneBoundary (v/c), when given, start the
	// models with an inner zone of that composition (see Model).
	InnerMassFractions Composition `json:"inner_mass_fractions,omitzero"`
	ZoneBoundary       float64     `json:"zone_boundary_c,omitzero"`
	EjectaMass         float64     `json:"ejecta_mass_msun"`
	InnerVelocity      float64     `json:"inner_velocity_c"`
	OuterVelocity      float64     `json:"outer_velocity_c"`
	DensityIndex       float64     `json:"density_index"`
	Diluted            bool        `json:"diluted_temperature,omitempty"`
	ModelFromUm        float64     `json:"model_from_um"`
	ModelToUm          float64     `json:"model_to_um"`
	Epochs             []Epoch     `json:"epochs"`
}

// Epoch is one observed spectrum of a dataset.
type Epoch struct {
	File                string  `json:"file"`
	Days                float64 `json:"days"`
	PhotosphereVelocity float64 `json:"photosphere_velocity_c"`
	Temperature         float64 `json:"temperature_k"`
	// Read holds how to read File when the file alone does not say (nil:
	// everything from the file).
	Read *EpochRead `json:"read,omitempty"`
	// Prepare, when not nil, brings the spectrum as read to the model's
	// frame before it is compared (as broadline prep does): dereddening,
	// telluric bands flagged, rest frame. Nil: the file is prepared already.
	Prepare *Preparation `json:"prepare,omitempty"`
}

// ImportedLineFile is a line table in a layout of its own, read through a
// column map: Columns as broadline lines --columns takes it
// ("wavelength=1:nm,species=2,log_gf=3,lower_energy=4:cm-1,lower_j=5"),
// HeaderRow when the first row names the columns, Species when every line
// is of one species (then no species column is needed), Medium "air" or
// "vacuum" when the file does not say.
type ImportedLineFile struct {
	File      string `json:"file"`
	Columns   string `json:"columns"`
	HeaderRow bool   `json:"header_row,omitempty"`
	Species   string `json:"species,omitempty"`
	Medium    string `json:"medium,omitempty"`
}

// Import returns the reader's import options of f, or what is wrong.
func (f ImportedLineFile) Import() (*linelists.Import, error) {
	if f.File == "" {
		return nil, fmt.Errorf("file: name the table")
	}
	cols, err := linelists.ParseColumnMap(f.Columns)
	if err != nil {
		return nil, fmt.Errorf("columns: %w", err)
	}
	imp := &linelists.Import{Columns: cols, HeaderRow: f.HeaderRow}
	if f.Species != "" {
		if imp.Species, err = linelists.ParseSpecies(f.Species); err != nil {
			return nil, fmt.Errorf("species: %w", err)
		}
	}
	if f.Medium != "" {
		if imp.Medium, err = physics.ParseMedium(f.Medium); err != nil {
			return nil, fmt.Errorf("medium: %w", err)
		}
	}
	return imp, nil
}

// Preparation is how a spectrum is brought to the model's frame: Milky Way
// dust removed with the law (ccm89, the default, or f99) at E(B−V) and R_V
// (default 3.1), the telluric bands of ground-based spectra flagged (never
// removed), then the wavelengths divided by 1 + Redshift.
type Preparation struct {
	EBV          float64 `json:"ebv,omitempty"`
	RV           float64 `json:"rv,omitempty"`
	Law          string  `json:"law,omitempty"`
	MaskTelluric bool    `json:"mask_telluric,omitempty"`
	Redshift     float64 `json:"redshift,omitempty"`
}

// Check validates the preparation, naming the key at fault.
func (p *Preparation) Check() error {
	if p == nil {
		return nil
	}
	switch {
	case !(p.EBV >= 0 && p.EBV <= 10):
		return fmt.Errorf("prepare.ebv %g: want 0–10 mag", p.EBV)
	case p.RV != 0 && !(p.RV >= 1 && p.RV <= 10):
		return fmt.Errorf("prepare.rv %g: want 1–10 (or leave it out for 3.1)", p.RV)
	case !(p.Redshift > -0.01 && p.Redshift < 10):
		return fmt.Errorf("prepare.redshift %g: want −0.01 < z < 10", p.Redshift)
	}
	if p.Law != "" {
		if _, err := spectra.ParseExtinctionLaw(p.Law); err != nil {
			return fmt.Errorf("prepare.law %q: want ccm89 or f99", p.Law)
		}
	}
	return nil
}

// apply prepares s in place; each step is recorded in its history.
func (p *Preparation) apply(s *spectra.Spectrum) error {
	if p == nil {
		return nil
	}
	if p.EBV > 0 {
		law := spectra.CCM89
		if p.Law != "" {
			law, _ = spectra.ParseExtinctionLaw(p.Law)
		}
		rv := p.RV
		if rv == 0 {
			rv = 3.1
		}
		if _, err := s.Deredden(law, p.EBV, rv); err != nil {
			return fmt.Errorf("prepare: %w", err)
		}
	}
	if p.MaskTelluric {
		s.MaskTelluric()
	}
	if p.Redshift != 0 {
		if err := s.ToRestFrame(p.Redshift); err != nil {
			return fmt.Errorf("prepare: %w", err)
		}
	}
	return nil
}

// EpochRead are the read options of one epoch's spectrum in a dataset
// file, all optional (see spectra.ReadOptions, whose fields they fill):
// which HDU, band or table row, which columns, the units and medium when
// the file does not give them, and the mask convention.
type EpochRead struct {
	HDU        *int   `json:"hdu,omitempty"`
	Band       int    `json:"band,omitempty"`
	Row        int    `json:"row,omitempty"`
	MergeRows  bool   `json:"merge_rows,omitempty"`
	WaveColumn string `json:"wave_column,omitempty"`
	FluxColumn string `json:"flux_column,omitempty"`
	UncColumn  string `json:"unc_column,omitempty"`
	MaskColumn string `json:"mask_column,omitempty"`
	WaveUnit   string `json:"wave_unit,omitempty"`
	FluxUnit   string `json:"flux_unit,omitempty"`
	Medium     string `json:"medium,omitempty"`
	MaskGood   bool   `json:"mask_good,omitempty"`
	IgnoreMask bool   `json:"ignore_mask,omitempty"`
}

// Check validates the options, naming the key at fault.
func (r *EpochRead) Check() error {
	if r == nil {
		return nil
	}
	switch {
	case r.HDU != nil && *r.HDU < 0:
		return fmt.Errorf("read.hdu %d: want 0 (primary) or an extension number", *r.HDU)
	case r.Band < 0 || r.Row < 0:
		return fmt.Errorf("read.band, read.row: 1-based row numbers")
	case r.Row > 0 && r.MergeRows:
		return fmt.Errorf("read.row and read.merge_rows exclude each other")
	case r.IgnoreMask && (r.MaskGood || r.MaskColumn != ""):
		return fmt.Errorf("read.ignore_mask excludes read.mask_good and read.mask_column")
	}
	if r.WaveUnit != "" {
		if _, _, err := spectra.ParseWaveScale(r.WaveUnit); err != nil {
			return fmt.Errorf("read.wave_unit: %w", err)
		}
	}
	if r.FluxUnit != "" {
		if _, _, err := spectra.ParseFluxUnitScale(r.FluxUnit); err != nil {
			return fmt.Errorf("read.flux_unit: %w", err)
		}
	}
	if r.Medium != "" {
		if _, err := physics.ParseMedium(r.Medium); err != nil {
			return fmt.Errorf("read.medium: %w", err)
		}
	}
	return nil
}

// ReadOptions returns the options to read epoch i's spectrum with: its
// read settings, and its days since explosion (which take precedence over
// any epoch in the file).
func (d *Dataset) ReadOptions(i int) spectra.ReadOptions {
	e := d.Epochs[i]
	opt := spectra.ReadOptions{Days: e.Days}
	if r := e.Read; r != nil {
		opt.Band, opt.Row, opt.MergeRows = r.Band, r.Row, r.MergeRows
		opt.WaveColumn, opt.FluxColumn, opt.UncColumn, opt.MaskColumn = r.WaveColumn, r.FluxColumn, r.UncColumn, r.MaskColumn
		opt.WaveUnit, opt.FluxUnit, opt.Medium = r.WaveUnit, r.FluxUnit, r.Medium
		opt.MaskGood, opt.IgnoreMask = r.MaskGood, r.IgnoreMask
		if r.HDU != nil {
			opt.HDU, opt.HDUSet = *r.HDU, true
		}
	}
	return opt
}

// Bounds of a dataset file: it is small and hand-written.
const (
	maxDatasetBytes = 1 << 20
	maxDatasetFiles = 10000
	maxEpochs       = 1000
)

// ReadDataset decodes and checks a dataset file; unknown keys are an
// error, so a misspelt one is never ignored. name is for messages.
func ReadDataset(r io.Reader, name string) (*Dataset, error) {
	var d Dataset
	data, err := readBounded(r, maxDatasetBytes, "dataset")
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	if err := DecodeJSON(data, &d); err != nil {
		return nil, fmt.Errorf("%s: dataset file: %w", name, err)
	}
	if err := d.Check(); err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	return &d, nil
}

// Check validates every value, naming the key at fault; epochs are
// numbered from 1.
func (d *Dataset) Check() error {
	switch {
	case d.Object == "":
		return fmt.Errorf("object: give the event's name")
	case !(d.DistanceMpc > 0) || math.IsInf(d.DistanceMpc, 0):
		return fmt.Errorf("distance_mpc %g: want a positive distance in Mpc", d.DistanceMpc)
	case !(d.ResolvingPower > 0) || d.ResolvingPower > 1e6:
		return fmt.Errorf("resolving_power %g: want λ/Δλ of the spectra, 0 < R ≤ 1e6", d.ResolvingPower)
	case len(d.LineFiles)+len(d.ImportedLineFiles) == 0:
		return fmt.Errorf("line_files: at least one line list is needed")
	case len(d.LineFiles)+len(d.ImportedLineFiles)+len(d.LevelFiles) > maxDatasetFiles:
		return fmt.Errorf("line_files, imported_line_files, level_files: %d files (at most %d)",
			len(d.LineFiles)+len(d.ImportedLineFiles)+len(d.LevelFiles), maxDatasetFiles)
	case len(d.Epochs) == 0 || len(d.Epochs) > maxEpochs:
		return fmt.Errorf("epochs: %d spectra (want 1–%d)", len(d.Epochs), maxEpochs)
	case !(d.ModelFromUm > 0) || !(d.ModelToUm > d.ModelFromUm) || d.ModelToUm/d.ModelFromUm > 1000:
		return fmt.Errorf("model_from_um %g, model_to_um %g: want 0 < from < to, at most a factor 1000 apart", d.ModelFromUm, d.ModelToUm)
	case d.MassFractions.IsZero():
		return fmt.Errorf("mass_fractions: give the element mix, e.g. \"Ca=0.4,Sr=0.3,Nd=0.3\"")
	}
	if err := d.StartModel(0).ValidateZone(d); err != nil {
		return fmt.Errorf("inner_mass_fractions, zone_boundary_c: %w", err)
	}
	for i, f := range d.ImportedLineFiles {
		if _, err := f.Import(); err != nil {
			return fmt.Errorf("imported_line_files %d (%s): %w", i+1, f.File, err)
		}
	}
	for i, e := range d.Epochs {
		if e.File == "" {
			return fmt.Errorf("epoch %d: file: name the spectrum", i+1)
		}
		if err := e.Read.Check(); err != nil {
			return fmt.Errorf("epoch %d: %w", i+1, err)
		}
		if err := e.Prepare.Check(); err != nil {
			return fmt.Errorf("epoch %d: %w", i+1, err)
		}
		m := d.StartModel(i)
		if err := d.Ejecta(m).Validate(); err != nil {
			return fmt.Errorf("epoch %d (%s): %w", i+1, e.File, err)
		}
		if !(e.PhotosphereVelocity >= MinVelocity && e.PhotosphereVelocity <= MaxVelocity(d)) {
			return fmt.Errorf("epoch %d: photosphere_velocity_c %g: want %g–%g (the workbench's range below outer_velocity_c)",
				i+1, e.PhotosphereVelocity, MinVelocity, MaxVelocity(d))
		}
		if !(e.Temperature >= MinTemperature && e.Temperature <= MaxTemperature) {
			return fmt.Errorf("epoch %d: temperature_k %g: want %g–%g K (the workbench's range)", i+1, e.Temperature, MinTemperature, MaxTemperature)
		}
	}
	return nil
}

// Label is the dataset's one-line description: its note up to the first
// full stop (for the demo: that it is invented), or "Dataset OBJECT.".
func (d *Dataset) Label() string {
	if d.Note == "" {
		return "Dataset " + d.Object + "."
	}
	return FirstSentence(d.Note)
}

// DemoName is the dataset name of the built-in demo in saved sessions.
const DemoName = "demo"

// Demo returns the bench of the built-in invented demo (its line lists
// and spectra embedded in the program).
func Demo() (*Bench, error) {
	d, sc, err := demoDataset()
	if err != nil {
		return nil, fmt.Errorf("demo: %w", err)
	}
	st, rep, err := sc.LoadStore(demo.FS, demo.Dir)
	if err != nil {
		return nil, fmt.Errorf("demo: %w", err)
	}
	obs, warn, err := readSpectra(d, func(name string, opt spectra.ReadOptions) (*spectra.Spectrum, error) {
		p := path.Join(demo.Dir, name)
		r, err := demo.FS.Open(p)
		if err != nil {
			return nil, err
		}
		defer r.Close()
		opt.Name = p
		return spectra.Read(r, opt)
	})
	if err != nil {
		return nil, fmt.Errorf("demo: %w", err)
	}
	return newBench(DemoName, d, obs, st, append(warn, rep.Warnings...)), nil
}

// demoDataset is the demo's scenario as a Dataset (the scenario also
// records how the invented spectra were made: noise, instrument).
func demoDataset() (*Dataset, *demogen.Scenario, error) {
	f, err := demo.FS.Open(path.Join(demo.Dir, "scenario.json"))
	if err != nil {
		return nil, nil, err
	}
	sc, err := demogen.ReadScenario(f)
	f.Close()
	if err != nil {
		return nil, nil, err
	}
	comp, err := ParseComposition(sc.MassFractions)
	if err != nil {
		return nil, nil, err
	}
	var inner Composition
	if sc.InnerMassFractions != "" {
		if inner, err = ParseComposition(sc.InnerMassFractions); err != nil {
			return nil, nil, err
		}
	}
	d := &Dataset{
		Object: sc.Object, Note: sc.Label, DistanceMpc: sc.DistanceMpc, ResolvingPower: sc.Instrument.ResolvingPower,
		LineFiles: sc.LineFiles, LevelFiles: sc.LevelFiles, MassFractions: comp, EjectaMass: sc.EjectaMassSolar,
		InnerMassFractions: inner, ZoneBoundary: sc.ZoneBoundary,
		InnerVelocity: sc.InnerVelocity, OuterVelocity: sc.OuterVelocity, DensityIndex: sc.DensityIndex,
		Diluted: sc.Diluted, ModelFromUm: sc.ModelFromUm, ModelToUm: sc.ModelToUm,
	}
	for _, e := range sc.Epochs {
		d.Epochs = append(d.Epochs, Epoch{File: e.File, Days: e.Days, PhotosphereVelocity: e.PhotosphereVelocity, Temperature: e.Temperature})
	}
	if err := d.Check(); err != nil {
		return nil, nil, err
	}
	return d, sc, nil
}

// readSpectra reads every epoch's spectrum with read and the epoch's read
// options; each must carry uncertainties (χ² needs them). The epoch's days
// since explosion are the dataset's. A flux per unit frequency is
// converted to erg s⁻¹ cm⁻² Å⁻¹, the model's unit, before any χ². The
// warnings are the readers' (unit assumed or not understood, implausible
// range, …) and the loader's, each naming its epoch and file.
func readSpectra(d *Dataset, read func(name string, opt spectra.ReadOptions) (*spectra.Spectrum, error)) ([]*spectra.Spectrum, []string, error) {
	var out []*spectra.Spectrum
	var warn []string
	for i := range d.Epochs {
		s, w, err := readEpoch(d, i, read)
		if err != nil {
			return nil, nil, err
		}
		out, warn = append(out, s), append(warn, w...)
	}
	return out, warn, nil
}

// readEpoch reads and prepares the spectrum of epoch i of d, with the
// warnings to show.
func readEpoch(d *Dataset, i int, read func(name string, opt spectra.ReadOptions) (*spectra.Spectrum, error)) (*spectra.Spectrum, []string, error) {
	var warn []string
	e := d.Epochs[i]
	s, err := read(e.File, d.ReadOptions(i))
	if err != nil {
		return nil, nil, fmt.Errorf("epoch %d: %w", i+1, err)
	}
	if s.Uncertainty == nil {
		return nil, nil, fmt.Errorf("epoch %d: %s has no uncertainty column; χ² needs one (name it with read.unc_column)", i+1, e.File)
	}
	if err := e.Prepare.apply(s); err != nil {
		return nil, nil, fmt.Errorf("epoch %d: %w", i+1, err)
	}
	at := fmt.Sprintf("epoch %d (%s): ", i+1, e.File)
	if s.Meta.Read != nil {
		for _, w := range s.Meta.Read.Warnings {
			warn = append(warn, at+w)
		}
	}
	switch u := s.Meta.FluxUnit; {
	case u.PerFrequency():
		if err := s.ConvertFlux(spectra.FluxPerAngstrom); err != nil {
			return nil, nil, fmt.Errorf("epoch %d: %w", i+1, err)
		}
		warn = append(warn, at+fmt.Sprintf("flux in %v converted to erg/s/cm2/A (F_λ = F_ν c/λ²) for the comparison with the model", u))
	case u == spectra.FluxUnknown || u == spectra.FluxNormalized:
		warn = append(warn, at+fmt.Sprintf("flux unit %v: compared with the model's erg/s/cm2/A as if it were in that unit (give read.flux_unit)", u))
	}
	return s, warn, nil
}

// OpenDataset reads the dataset file at path, its spectra and its line
// lists (through the line-list cache, reporting each file's progress, and
// giving up when ctx is done), and returns the bench for it. Names in the
// file are relative to the file's directory unless absolute.
func OpenDataset(ctx context.Context, path string, progress func(linelists.Progress)) (*Bench, error) {
	abs, err := filepath.Abs(path)
	if err != nil {
		return nil, fmt.Errorf("open dataset: %w", err)
	}
	r, err := os.Open(abs)
	if err != nil {
		return nil, fmt.Errorf("open dataset: %w", err)
	}
	d, err := ReadDataset(r, abs)
	r.Close()
	if err != nil {
		return nil, err
	}
	dir := filepath.Dir(abs)
	resolve := func(name string) string {
		if filepath.IsAbs(name) {
			return name
		}
		return filepath.Join(dir, filepath.FromSlash(name))
	}
	obs, spWarn, err := readSpectra(d, func(name string, opt spectra.ReadOptions) (*spectra.Spectrum, error) {
		return spectra.ReadFile(resolve(name), opt)
	})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", abs, err)
	}
	var lines, levels []string
	for _, l := range d.LineFiles {
		lines = append(lines, resolve(l))
	}
	for _, l := range d.LevelFiles {
		levels = append(levels, resolve(l))
	}
	st, warn, err := loadLines(ctx, lines, d.ImportedLineFiles, resolve, levels, progress)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", abs, err)
	}
	return newBench(abs, d, obs, st, append(spWarn, warn...)), nil
}

// loadLines loads line lists in our format (lines) and imported tables,
// each through the line-list cache, with the levels files, into one store.
func loadLines(ctx context.Context, lines []string, imported []ImportedLineFile, resolve func(string) string, levels []string,
	progress func(linelists.Progress)) (*linelists.Store, []string, error) {
	var stores []*linelists.Store
	var warn []string
	if len(lines) > 0 {
		st, rep, err := linelists.LoadContext(ctx, lines, linelists.Options{Levels: levels, Progress: progress})
		if err != nil {
			return nil, nil, err
		}
		stores, warn, levels = append(stores, st), rep.Warnings, nil
	}
	for _, f := range imported {
		imp, err := f.Import()
		if err != nil {
			return nil, nil, fmt.Errorf("%s: %w", f.File, err)
		}
		st, rep, err := linelists.LoadContext(ctx, []string{resolve(f.File)}, linelists.Options{Import: imp, Levels: levels, Progress: progress})
		if err != nil {
			return nil, nil, err
		}
		stores, warn, levels = append(stores, st), append(warn, rep.Warnings...), nil
	}
	if len(stores) == 1 {
		return stores[0], warn, nil
	}
	st, rep := linelists.Merge(stores...)
	return st, append(warn, rep.Warnings...), nil
}

// WriteExample writes the built-in demo into dir as a dataset of one's
// own would be laid out — lines/ (line lists and levels files), spectra/
// (the three invented spectra) and dataset.json — and returns the dataset
// file's path: a template to edit. It refuses to write over an existing
// dataset.json.
func WriteExample(dir string) (string, error) {
	d, _, err := demoDataset()
	if err != nil {
		return "", fmt.Errorf("example dataset: %w", err)
	}
	out := filepath.Join(dir, "dataset.json")
	if _, err := os.Stat(out); err == nil {
		return "", fmt.Errorf("%s exists: not overwritten", out)
	}
	copyTo := func(src, sub string) (string, error) {
		data, err := fs.ReadFile(demo.FS, path.Join(demo.Dir, src))
		if err != nil {
			return "", err
		}
		name := path.Join(sub, path.Base(src))
		if err := os.MkdirAll(filepath.Join(dir, sub), 0o755); err != nil {
			return "", err
		}
		return name, WriteFileAtomic(filepath.Join(dir, filepath.FromSlash(name)), data)
	}
	f := *d
	f.LineFiles, f.LevelFiles, f.Epochs = nil, nil, nil
	for _, l := range d.LineFiles {
		name, err := copyTo(l, "lines")
		if err != nil {
			return "", fmt.Errorf("example dataset: %w", err)
		}
		f.LineFiles = append(f.LineFiles, name)
	}
	for _, l := range d.LevelFiles {
		name, err := copyTo(l, "lines")
		if err != nil {
			return "", fmt.Errorf("example dataset: %w", err)
		}
		f.LevelFiles = append(f.LevelFiles, name)
	}
	for _, ep := range d.Epochs {
		name, err := copyTo(ep.File, "spectra")
		if err != nil {
			return "", fmt.Errorf("example dataset: %w", err)
		}
		ep.File = name
		f.Epochs = append(f.Epochs, ep)
	}
	js, err := json.MarshalIndent(f, "", "  ")
	if err != nil {
		return "", fmt.Errorf("example dataset: %w", err)
	}
	if err := WriteFileAtomic(out, append(js, '\n')); err != nil {
		return "", fmt.Errorf("example dataset: %w", err)
	}
	return out, nil
}
