package main

import (
	"embed"
	"fmt"
	"io/fs"
	"path"

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
	fsys     fs.FS
	dir      string
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
	d := &dataset{Scenario: sc, fsys: fsys, dir: dir}
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
