package core

import (
	"encoding/json"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"slices"
	"strings"

	"broadline/app/demo"
	"broadline/spectra"
)

// UnsavedPrefix starts the name of a bench whose dataset has changed since
// it was read (an epoch added): sessions of it cannot be reopened until the
// dataset is saved (SaveDataset).
const UnsavedPrefix = "unsaved: "

// Unsaved reports whether the bench's dataset has changes not in a file.
func (b *Bench) Unsaved() bool { return strings.HasPrefix(b.Name, UnsavedPrefix) }

// WithEpoch returns a bench with epoch e added after the dataset's own:
// its spectrum read from e.File (an absolute path, or relative to the
// working directory) with e.Read's options and prepared with e.Prepare.
// The line lists, ejecta and distance are the bench's. e's photosphere,
// when zero, starts at the last epoch's values. The new bench's name says
// it is unsaved.
func (b *Bench) WithEpoch(e Epoch) (*Bench, error) {
	if len(b.Data.Epochs) >= maxEpochs {
		return nil, fmt.Errorf("the dataset has %d epochs, the most a dataset holds", len(b.Data.Epochs))
	}
	abs, err := filepath.Abs(e.File)
	if err != nil {
		return nil, fmt.Errorf("spectrum %q: %w", e.File, err)
	}
	e.File = abs
	last := b.Data.Epochs[len(b.Data.Epochs)-1]
	if e.PhotosphereVelocity == 0 {
		e.PhotosphereVelocity = last.PhotosphereVelocity
	}
	if e.Temperature == 0 {
		e.Temperature = last.Temperature
	}
	d := *b.Data
	d.Epochs = append(slices.Clone(b.Data.Epochs), e)
	if err := d.Check(); err != nil {
		return nil, err
	}
	s, warn, err := readEpoch(&d, len(d.Epochs)-1, func(name string, opt spectra.ReadOptions) (*spectra.Spectrum, error) {
		return spectra.ReadFile(name, opt)
	})
	if err != nil {
		return nil, err
	}
	name := b.Name
	if !b.Unsaved() {
		name = UnsavedPrefix + b.Name
	}
	obs := append(slices.Clone(b.Observed), s)
	return newBench(name, &d, obs, b.Store, append(slices.Clone(b.LoadWarnings), warn...)), nil
}

// SaveDataset writes the bench's dataset to the file at path, atomically,
// with every file it names resolved: the dataset's own files absolute (for
// the built-in demo, its embedded line lists and spectra are written
// beside the file, in lines/ and spectra/, as WriteExample lays them out).
// The bench is named by the file from then on, so its sessions reopen;
// call it while no computation reads the bench's Name.
func (b *Bench) SaveDataset(file string) error {
	abs, err := filepath.Abs(file)
	if err != nil {
		return fmt.Errorf("save dataset: %w", err)
	}
	dir := filepath.Dir(abs)
	d := *b.Data
	d.LineFiles, d.LevelFiles = slices.Clone(d.LineFiles), slices.Clone(d.LevelFiles)
	d.Epochs = slices.Clone(d.Epochs)
	base := strings.TrimPrefix(b.Name, UnsavedPrefix)
	var place func(name, sub string) (string, error)
	if base == DemoName {
		// The demo's files are embedded: write them beside the dataset.
		place = func(name, sub string) (string, error) {
			if filepath.IsAbs(name) {
				return name, nil
			}
			data, err := fs.ReadFile(demo.FS, path.Join(demo.Dir, name))
			if err != nil {
				return "", err
			}
			out := path.Join(sub, path.Base(name))
			if err := os.MkdirAll(filepath.Join(dir, sub), 0o755); err != nil {
				return "", err
			}
			return out, WriteFileAtomic(filepath.Join(dir, filepath.FromSlash(out)), data)
		}
	} else {
		from := filepath.Dir(base)
		place = func(name, _ string) (string, error) {
			if filepath.IsAbs(name) {
				return name, nil
			}
			return filepath.Join(from, filepath.FromSlash(name)), nil
		}
	}
	for _, list := range [][]string{d.LineFiles, d.LevelFiles} {
		for i, n := range list {
			if list[i], err = place(n, "lines"); err != nil {
				return fmt.Errorf("save dataset: %w", err)
			}
		}
	}
	for i := range d.Epochs {
		if d.Epochs[i].File, err = place(d.Epochs[i].File, "spectra"); err != nil {
			return fmt.Errorf("save dataset: %w", err)
		}
	}
	js, err := json.MarshalIndent(&d, "", "  ")
	if err != nil {
		return fmt.Errorf("save dataset: %w", err)
	}
	if err := WriteFileAtomic(abs, append(js, '\n')); err != nil {
		return fmt.Errorf("save dataset: %w", err)
	}
	b.Name = abs
	return nil
}

// JSONKind is what a JSON file of ours holds, as SniffJSON finds it.
type JSONKind int

// The kinds of file SniffJSON tells apart.
const (
	OtherFile   JSONKind = iota // not JSON, or not one of ours
	SessionFile                 // a saved session (has "dataset")
	DatasetFile                 // a dataset file (has "epochs")
)

// SniffJSON tells a saved session from a dataset file by its top-level
// keys (reading at most 1 MiB), and anything else — a spectrum, a line
// list — as OtherFile.
func SniffJSON(path string) JSONKind {
	f, err := os.Open(path)
	if err != nil {
		return OtherFile
	}
	defer f.Close()
	var keys map[string]json.RawMessage
	if json.NewDecoder(io.LimitReader(f, maxDatasetBytes)).Decode(&keys) != nil {
		return OtherFile
	}
	switch {
	case keys["dataset"] != nil && keys["version"] != nil:
		return SessionFile
	case keys["epochs"] != nil:
		return DatasetFile
	}
	return OtherFile
}
