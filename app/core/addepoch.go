package core

import (
	"bufio"
	"compress/gzip"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"slices"
	"strings"
	"unicode/utf8"

	"broadline/app/demo"
	"broadline/linelists"
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
	d.ImportedLineFiles = slices.Clone(d.ImportedLineFiles)
	for i := range d.ImportedLineFiles {
		if d.ImportedLineFiles[i].File, err = place(d.ImportedLineFiles[i].File, "lines"); err != nil {
			return fmt.Errorf("save dataset: %w", err)
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

// LineLists are line lists to load in place of (or beside) a dataset's:
// files in our format, tables read by a column map, and levels files.
type LineLists struct {
	Files    []string
	Imported []ImportedLineFile
	Levels   []string
	// Keep keeps the dataset's own lists beside the new ones.
	Keep bool
}

// WithLineLists returns a bench whose line lists are l's (with the
// dataset's own when l.Keep), loaded through the line-list cache with
// progress, its spectra and ejecta as b's; the new bench's name says it is
// unsaved. It stops when ctx is done.
func (b *Bench) WithLineLists(ctx context.Context, l LineLists, progress func(linelists.Progress)) (*Bench, error) {
	abs := func(names []string) ([]string, error) {
		out := make([]string, len(names))
		for i, n := range names {
			a, err := filepath.Abs(n)
			if err != nil {
				return nil, err
			}
			out[i] = a
		}
		return out, nil
	}
	d := *b.Data
	files, err := abs(l.Files)
	if err != nil {
		return nil, err
	}
	levels, err := abs(l.Levels)
	if err != nil {
		return nil, err
	}
	imported := slices.Clone(l.Imported)
	for i := range imported {
		if imported[i].File, err = filepath.Abs(imported[i].File); err != nil {
			return nil, err
		}
	}
	if l.Keep {
		files = append(b.resolved(d.LineFiles), files...)
		levels = append(b.resolved(d.LevelFiles), levels...)
		for _, f := range d.ImportedLineFiles {
			f.File = b.resolved([]string{f.File})[0]
			imported = append([]ImportedLineFile{f}, imported...)
		}
	}
	d.LineFiles, d.LevelFiles, d.ImportedLineFiles = files, levels, imported
	if err := d.Check(); err != nil {
		return nil, err
	}
	var st *linelists.Store
	var warn []string
	if strings.TrimPrefix(b.Name, UnsavedPrefix) == DemoName && l.Keep {
		// The demo's own lists are embedded, not on disk: merge its store.
		st2, w, err := loadLines(ctx, files[len(b.Data.LineFiles):], imported, func(s string) string { return s }, levels[len(b.Data.LevelFiles):], progress)
		if err != nil {
			return nil, err
		}
		var rep linelists.Report
		st, rep = linelists.Merge(b.Store, st2)
		warn = append(w, rep.Warnings...)
	} else {
		st, warn, err = loadLines(ctx, files, imported, func(s string) string { return s }, levels, progress)
		if err != nil {
			return nil, err
		}
	}
	name := b.Name
	if !b.Unsaved() {
		name = UnsavedPrefix + b.Name
	}
	return newBench(name, &d, b.Observed, st, warn), nil
}

// resolved returns names as absolute paths against the dataset file's
// directory (the demo's names stay as they are: they are embedded).
func (b *Bench) resolved(names []string) []string {
	base := strings.TrimPrefix(b.Name, UnsavedPrefix)
	out := slices.Clone(names)
	if base == DemoName {
		return out
	}
	for i, n := range out {
		if !filepath.IsAbs(n) {
			out[i] = filepath.Join(filepath.Dir(base), filepath.FromSlash(n))
		}
	}
	return out
}

// PreviewLineTable reads the first rows of a line table (at most n data
// rows, with the comment lines before them) and parses them with f's
// column map, or as our format when f.Columns is empty: the raw text for
// the analyst to see, the lines read, and the reader's error (file:line,
// what was expected) when a row does not fit.
func PreviewLineTable(f ImportedLineFile, n int) (raw string, lines []PreviewLine, err error) {
	r, err := os.Open(f.File)
	if err != nil {
		return "", nil, err
	}
	defer r.Close()
	var rd io.Reader = bufio.NewReader(r)
	if magic, _ := rd.(*bufio.Reader).Peek(2); len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		zr, err := gzip.NewReader(rd)
		if err != nil {
			return "", nil, fmt.Errorf("%s: gzip: %w", f.File, err)
		}
		defer zr.Close()
		rd = zr
	}
	var head strings.Builder
	sc := bufio.NewScanner(rd)
	sc.Buffer(make([]byte, 0, 64<<10), 1<<20)
	rows, want := 0, n
	if f.HeaderRow {
		want++ // the header row is not a data row
	}
	for rows < want && sc.Scan() {
		t := sc.Text()
		if !utf8.ValidString(t) || strings.ContainsRune(t, 0) {
			return "", nil, fmt.Errorf("%s: not a text table (binary data)", f.File)
		}
		head.WriteString(t + "\n")
		if s := strings.TrimSpace(t); s != "" && !strings.HasPrefix(s, "#") {
			rows++
		}
	}
	if err := sc.Err(); err != nil {
		return "", nil, fmt.Errorf("%s: %w", f.File, err)
	}
	opt := linelists.ReadOptions{Name: f.File}
	if f.Columns != "" {
		if opt.Import, err = f.Import(); err != nil {
			return head.String(), nil, err
		}
	}
	b := linelists.NewBuilder()
	if _, err := b.Read(strings.NewReader(head.String()), opt); err != nil {
		return head.String(), nil, err
	}
	st, _ := b.Build()
	for i := range st.Len() {
		lines = append(lines, PreviewLine{Wavelength: st.Wavelength[i], Species: st.SpeciesTable[st.Species[i]].String(),
			LogGF: float64(st.LogGF[i]), LowerEV: st.Levels.Energy[st.Lower[i]]})
	}
	return head.String(), lines, nil
}

// PreviewLine is one line as a preview shows it: vacuum wavelength (Å),
// species, log gf and lower-level energy (eV).
type PreviewLine struct {
	Wavelength float64
	Species    string
	LogGF      float64
	LowerEV    float64
}

// WithInstrument returns a bench whose dataset has resolving power R (the
// spectra's, to which the model is smoothed) and distance distMpc (Mpc) in
// place of b's, for every epoch; its name says it is unsaved.
func (b *Bench) WithInstrument(R, distMpc float64) (*Bench, error) {
	d := *b.Data
	d.ResolvingPower, d.DistanceMpc = R, distMpc
	if err := d.Check(); err != nil {
		return nil, err
	}
	name := b.Name
	if !b.Unsaved() {
		name = UnsavedPrefix + b.Name
	}
	return newBench(name, &d, b.Observed, b.Store, b.LoadWarnings), nil
}
