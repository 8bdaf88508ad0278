package main

import (
	"embed"
	"encoding/json"
	"fmt"
	"io/fs"
	"os"
	"path"
	"path/filepath"

	"broadline/opacity/synth"
	"broadline/spectra"
)

// demoFS holds the built-in demo: invented line lists, three invented spectra
// of a fictional event, and the scenario that records their true parameters.
// Regenerate with `go run ./tools/demolines` and `go run ./tools/demospectra`.
//
//go:embed demo/lines demo/spectra
var demoFS embed.FS

// demoDir is the directory of the demo's scenario inside demoFS.
const demoDir = "demo/spectra"

// dataset is a scenario with its observed spectra: what the workbench shows.
type dataset struct {
	Scenario *synth.Scenario
	Observed []*spectra.Spectrum // one per epoch, in the scenario's order
	// name identifies the dataset in saved sessions: "demo", or the
	// absolute path of a dataset file.
	name string
	fsys fs.FS
	dir  string
}

// loadDataset reads the scenario file scenario.json in dir of fsys and the
// spectrum of every epoch.
func loadDataset(fsys fs.FS, dir string) (*dataset, error) {
	f, err := fsys.Open(path.Join(dir, "scenario.json"))
	if err != nil {
		return nil, fmt.Errorf("load scenario: %w", err)
	}
	sc, err := synth.ReadScenario(f)
	f.Close()
	if err != nil {
		return nil, err
	}
	d := &dataset{Scenario: sc, name: "demo", fsys: fsys, dir: dir}
	for _, ep := range sc.Epochs {
		name := path.Join(dir, ep.File)
		r, err := fsys.Open(name)
		if err != nil {
			return nil, fmt.Errorf("load spectrum: %w", err)
		}
		s, err := spectra.Read(r, spectra.ReadOptions{Name: name})
		r.Close()
		if err != nil {
			return nil, err
		}
		if s.Meta.Epoch == 0 {
			s.Meta.Epoch = ep.Days
		}
		d.Observed = append(d.Observed, s)
	}
	return d, nil
}

// loadDemo returns the built-in demo dataset.
func loadDemo() (*dataset, error) { return loadDataset(demoFS, demoDir) }

// writeDemoDataset writes the built-in demo into dir as a dataset of one's
// own would be laid out — lines/ (line lists and levels files), spectra/
// (the three invented spectra) and dataset.json (see datasetFile) — and
// returns the dataset file's path: a template to edit. It refuses to write
// over an existing dataset.json.
func writeDemoDataset(dir string) (string, error) {
	d, err := loadDemo()
	if err != nil {
		return "", err
	}
	sc := d.Scenario
	out := filepath.Join(dir, "dataset.json")
	if _, err := os.Stat(out); err == nil {
		return "", fmt.Errorf("%s exists: not overwritten", out)
	}
	f := datasetFile{
		Object: sc.Object, Note: sc.Label, DistanceMpc: sc.DistanceMpc, ResolvingPower: sc.Instrument.ResolvingPower,
		MassFractions: sc.MassFractions, EjectaMass: sc.EjectaMassSolar, InnerVelocity: sc.InnerVelocity,
		OuterVelocity: sc.OuterVelocity, DensityIndex: sc.DensityIndex, Diluted: sc.Diluted,
		ModelFromUm: sc.ModelFromUm, ModelToUm: sc.ModelToUm,
	}
	copyTo := func(src, sub string) (string, error) {
		data, err := fs.ReadFile(demoFS, path.Join(demoDir, src))
		if err != nil {
			return "", err
		}
		name := path.Join(sub, path.Base(src))
		if err := os.MkdirAll(filepath.Join(dir, sub), 0o755); err != nil {
			return "", err
		}
		return name, writeFileAtomic(filepath.Join(dir, filepath.FromSlash(name)), data)
	}
	for _, l := range sc.LineFiles {
		name, err := copyTo(l, "lines")
		if err != nil {
			return "", fmt.Errorf("example dataset: %w", err)
		}
		f.LineFiles = append(f.LineFiles, name)
	}
	for _, l := range sc.LevelFiles {
		name, err := copyTo(l, "lines")
		if err != nil {
			return "", fmt.Errorf("example dataset: %w", err)
		}
		f.LevelFiles = append(f.LevelFiles, name)
	}
	for _, ep := range sc.Epochs {
		name, err := copyTo(ep.File, "spectra")
		if err != nil {
			return "", fmt.Errorf("example dataset: %w", err)
		}
		f.Epochs = append(f.Epochs, datasetSpec{File: name, Days: ep.Days, PhotosphereVelocity: ep.PhotosphereVelocity, Temperature: ep.Temperature})
	}
	js, err := json.MarshalIndent(f, "", "  ")
	if err != nil {
		return "", fmt.Errorf("example dataset: %w", err)
	}
	if err := writeFileAtomic(out, append(js, '\n')); err != nil {
		return "", fmt.Errorf("example dataset: %w", err)
	}
	return out, nil
}
