package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/opacity/synth"
	"broadline/spectra"
)

// datasetFile is the analyst's own dataset, as written in a dataset file
// (JSON, our own format, documented in README.md): the observed spectra of
// one event with their epochs, the line lists, and the fixed parts of the
// ejecta model. Per epoch the photosphere velocity and temperature are the
// starting values the workbench shows (and Reset returns to).
type datasetFile struct {
	Object         string        `json:"object"`
	Note           string        `json:"note,omitempty"`
	DistanceMpc    float64       `json:"distance_mpc"`
	ResolvingPower float64       `json:"resolving_power"`
	LineFiles      []string      `json:"line_files"`
	LevelFiles     []string      `json:"level_files,omitempty"`
	MassFractions  string        `json:"mass_fractions"`
	EjectaMass     float64       `json:"ejecta_mass_msun"`
	InnerVelocity  float64       `json:"inner_velocity_c"`
	OuterVelocity  float64       `json:"outer_velocity_c"`
	DensityIndex   float64       `json:"density_index"`
	Diluted        bool          `json:"diluted_temperature,omitempty"`
	ModelFromUm    float64       `json:"model_from_um"`
	ModelToUm      float64       `json:"model_to_um"`
	Epochs         []datasetSpec `json:"epochs"`
}

// datasetSpec is one observed spectrum of a dataset file.
type datasetSpec struct {
	File                string  `json:"file"`
	Days                float64 `json:"days"`
	PhotosphereVelocity float64 `json:"photosphere_velocity_c"`
	Temperature         float64 `json:"temperature_k"`
}

// The photosphere temperatures the workbench's slider offers, K.
const minSliderT, maxSliderT = 1500.0, 15000.0

// The photosphere velocities the slider offers: from minSliderV to
// sliderVGap below the outer velocity (v/c).
const minSliderV, sliderVGap = 0.02, 0.01

// Bounds of a dataset file: it is small and hand-written.
const (
	maxDatasetBytes = 1 << 20
	maxDatasetFiles = 10000
	maxEpochs       = 1000
)

// readDatasetFile decodes and checks a dataset file; unknown keys are an
// error, so a misspelt one is never ignored. name is for messages.
func readDatasetFile(r io.Reader, name string) (*datasetFile, error) {
	var f datasetFile
	dec := json.NewDecoder(io.LimitReader(r, maxDatasetBytes))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&f); err != nil {
		return nil, fmt.Errorf("%s: dataset file: %w", name, err)
	}
	if err := f.check(); err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	return &f, nil
}

// check validates every value, naming the key at fault.
func (f *datasetFile) check() error {
	switch {
	case f.Object == "":
		return fmt.Errorf("object: give the event's name")
	case !(f.DistanceMpc > 0) || math.IsInf(f.DistanceMpc, 0):
		return fmt.Errorf("distance_mpc %g: want a positive distance in Mpc", f.DistanceMpc)
	case !(f.ResolvingPower > 0) || f.ResolvingPower > 1e6:
		return fmt.Errorf("resolving_power %g: want λ/Δλ of the spectra, 0 < R ≤ 1e6", f.ResolvingPower)
	case len(f.LineFiles) == 0:
		return fmt.Errorf("line_files: at least one line list is needed")
	case len(f.LineFiles)+len(f.LevelFiles) > maxDatasetFiles:
		return fmt.Errorf("line_files, level_files: %d files (at most %d)", len(f.LineFiles)+len(f.LevelFiles), maxDatasetFiles)
	case len(f.Epochs) == 0 || len(f.Epochs) > maxEpochs:
		return fmt.Errorf("epochs: %d spectra (want 1–%d)", len(f.Epochs), maxEpochs)
	case !(f.ModelFromUm > 0) || !(f.ModelToUm > f.ModelFromUm) || f.ModelToUm/f.ModelFromUm > 1000:
		return fmt.Errorf("model_from_um %g, model_to_um %g: want 0 < from < to, at most a factor 1000 apart", f.ModelFromUm, f.ModelToUm)
	}
	if _, err := opacity.ParseComposition(f.MassFractions); err != nil {
		return fmt.Errorf("mass_fractions: %w", err)
	}
	sc := f.scenario()
	for i, e := range f.Epochs {
		if e.File == "" {
			return fmt.Errorf("epochs[%d].file: name the spectrum", i)
		}
		if err := sc.Ejecta(i).Validate(); err != nil {
			return fmt.Errorf("epochs[%d] (%s): %w", i, e.File, err)
		}
		if !(e.PhotosphereVelocity >= minSliderV && e.PhotosphereVelocity <= f.OuterVelocity-sliderVGap) {
			return fmt.Errorf("epochs[%d].photosphere_velocity_c %g: want %g–%g (the workbench's range below outer_velocity_c)",
				i, e.PhotosphereVelocity, minSliderV, f.OuterVelocity-sliderVGap)
		}
		if !(e.Temperature >= minSliderT && e.Temperature <= maxSliderT) {
			return fmt.Errorf("epochs[%d].temperature_k %g: want %g–%g K (the workbench's range)", i, e.Temperature, minSliderT, maxSliderT)
		}
	}
	return nil
}

// scenario is the dataset as the synthesis sees it: the model's fixed
// parts and, per epoch, the starting velocity and temperature. The fields
// that only describe how the demo was made (noise, invented instrument)
// stay empty.
func (f *datasetFile) scenario() *synth.Scenario {
	sc := &synth.Scenario{
		Label: f.Note, Object: f.Object, DistanceMpc: f.DistanceMpc,
		LineFiles: f.LineFiles, LevelFiles: f.LevelFiles, MassFractions: f.MassFractions,
		EjectaMassSolar: f.EjectaMass, InnerVelocity: f.InnerVelocity, OuterVelocity: f.OuterVelocity,
		DensityIndex: f.DensityIndex, Diluted: f.Diluted, ModelFromUm: f.ModelFromUm, ModelToUm: f.ModelToUm,
		Instrument: synth.Instrument{ResolvingPower: f.ResolvingPower},
	}
	if sc.Label == "" {
		sc.Label = "Dataset " + f.Object + "."
	}
	for _, e := range f.Epochs {
		sc.Epochs = append(sc.Epochs, synth.Epoch{File: e.File, Days: e.Days, PhotosphereVelocity: e.PhotosphereVelocity, Temperature: e.Temperature})
	}
	return sc
}

// openDataset reads the dataset file at path, its spectra and its line
// lists (through the line-list cache, reporting each file's progress, and
// giving up when ctx is done), and returns the bench for it. Names in the
// file are relative to the file's directory unless absolute.
func openDataset(ctx context.Context, path string, progress func(linelists.Progress)) (*bench, error) {
	abs, err := filepath.Abs(path)
	if err != nil {
		return nil, fmt.Errorf("open dataset: %w", err)
	}
	r, err := os.Open(abs)
	if err != nil {
		return nil, fmt.Errorf("open dataset: %w", err)
	}
	f, err := readDatasetFile(r, abs)
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
	d := &dataset{Scenario: f.scenario(), name: abs}
	for i, e := range f.Epochs {
		s, err := spectra.ReadFile(resolve(e.File), spectra.ReadOptions{})
		if err != nil {
			return nil, fmt.Errorf("%s: epochs[%d]: %w", abs, i, err)
		}
		if s.Uncertainty == nil {
			return nil, fmt.Errorf("%s: epochs[%d]: %s has no uncertainty column; χ² needs one", abs, i, e.File)
		}
		if s.Meta.Epoch == 0 {
			s.Meta.Epoch = e.Days
		}
		d.Observed = append(d.Observed, s)
	}
	var lines, levels []string
	for _, l := range f.LineFiles {
		lines = append(lines, resolve(l))
	}
	for _, l := range f.LevelFiles {
		levels = append(levels, resolve(l))
	}
	st, rep, err := linelists.LoadContext(ctx, lines, linelists.Options{Levels: levels, Progress: progress})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", abs, err)
	}
	return &bench{data: d, store: st, loadWarnings: rep.Warnings}, nil
}
