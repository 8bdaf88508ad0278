package core

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"broadline/linelists"
)

// SessionVersion is written into every saved session; a file from a newer
// version is refused rather than half-read.
const SessionVersion = 1

// MaxCandidates is the number of candidates a session keeps: as many as
// the comparison figure tells apart.
const MaxCandidates = 6

// Session is everything the workbench shows and the analyst has chosen, as
// a plain value: the GUI reads it and calls its methods, tests drive it
// without a display, and it is saved as JSON (the model's keys at the top
// level, as in earlier files).
type Session struct {
	Version int `json:"version"`
	// Dataset names the dataset: "demo" for the built-in demo, else the
	// absolute path of the dataset file.
	Dataset string `json:"dataset"`
	// Model is the model shown.
	Model
	// Candidates are the models kept for comparison (at most
	// MaxCandidates), in the order kept.
	Candidates []Candidate `json:"candidates,omitempty"`
	// WavelengthUnit is how wavelengths are shown: "um" (the default when
	// empty), "nm" or "A".
	WavelengthUnit string `json:"wavelength_unit,omitempty"`
	// KnockOut is the element whose knock-out the figure also draws (its
	// symbol; empty for none).
	KnockOut string `json:"knock_out,omitempty"`
	// Photospheres are the photosphere values the analyst left on the
	// other epochs, by epoch index, so that switching back brings them back
	// (the composition is shared by all epochs).
	Photospheres map[int]Photosphere `json:"photospheres,omitempty"`
}

// Photosphere is one epoch's photosphere velocity (v/c) and temperature (K).
type Photosphere struct {
	Velocity    float64 `json:"photosphere_velocity_c"`
	Temperature float64 `json:"temperature_k"`
}

// SwitchEpoch makes epoch i the shown one: the current epoch's photosphere
// is kept for later, epoch i's comes back as the analyst left it (or, the
// first time, from the dataset's recorded values), and the composition
// and inner zone stay as they are. It returns a sentence saying what the
// values now are and where they came from, for the status line.
func (s *Session) SwitchEpoch(d *Dataset, i int) (string, error) {
	if i < 0 || i >= len(d.Epochs) {
		return "", fmt.Errorf("epoch %d out of range (the dataset has %d)", i+1, len(d.Epochs))
	}
	if i == s.Epoch {
		return "", nil
	}
	if s.Photospheres == nil {
		s.Photospheres = map[int]Photosphere{}
	}
	s.Photospheres[s.Epoch] = Photosphere{s.PhotosphereVelocity, s.Temperature}
	from := "as you left them"
	p, ok := s.Photospheres[i]
	if !ok {
		st := d.StartModel(i)
		p, from = Photosphere{st.PhotosphereVelocity, st.Temperature}, "the dataset's recorded values"
	}
	s.Epoch, s.PhotosphereVelocity, s.Temperature = i, p.Velocity, p.Temperature
	return fmt.Sprintf("epoch %d (%g d): v_ph = %.3f c and T_ph = %.0f K, %s; the composition is kept",
		i+1, d.Epochs[i].Days, p.Velocity, p.Temperature, from), nil
}

// Candidate is a model the analyst keeps to compare with others.
type Candidate struct {
	Label string `json:"label"`
	Model
}

// NewSession returns a session for the bench's dataset on its first
// epoch, at the dataset's starting values.
func NewSession(b *Bench) *Session {
	return &Session{Version: SessionVersion, Dataset: b.Name, Model: b.Data.StartModel(0)}
}

// Validate checks the session against dataset d.
func (s *Session) Validate(d *Dataset) error {
	if s.Version < 1 || s.Version > SessionVersion {
		return fmt.Errorf("session version %d not supported (this program writes %d)", s.Version, SessionVersion)
	}
	if err := s.Model.Validate(d); err != nil {
		return err
	}
	if _, ok := WaveUnits[s.WavelengthUnit]; !ok && s.WavelengthUnit != "" {
		return fmt.Errorf("wavelength_unit %q: want um, nm or A", s.WavelengthUnit)
	}
	if s.KnockOut != "" {
		e, err := linelists.ElementBySymbol(s.KnockOut)
		if err != nil || e.Symbol != s.KnockOut {
			return fmt.Errorf("knock_out %q: want an element symbol such as Nd", s.KnockOut)
		}
	}
	for e, p := range s.Photospheres {
		m := s.Model
		m.Epoch, m.PhotosphereVelocity, m.Temperature = e, p.Velocity, p.Temperature
		if err := m.Validate(d); err != nil {
			return fmt.Errorf("photospheres: %w", err)
		}
	}
	if len(s.Candidates) > MaxCandidates {
		return fmt.Errorf("%d candidates (at most %d are kept)", len(s.Candidates), MaxCandidates)
	}
	seen := map[string]bool{}
	for _, c := range s.Candidates {
		switch {
		case strings.TrimSpace(c.Label) == "" || len(c.Label) > 40:
			return fmt.Errorf("candidate label %q: want 1–40 characters", c.Label)
		case seen[c.Label]:
			return fmt.Errorf("two candidates are labelled %q", c.Label)
		}
		seen[c.Label] = true
		if err := c.Model.Validate(d); err != nil {
			return fmt.Errorf("candidate %s: %w", c.Label, err)
		}
	}
	return nil
}

// Keep adds the shown model as a candidate with the next free label and
// returns it; a full list is an error.
func (s *Session) Keep() (Candidate, error) {
	if len(s.Candidates) >= MaxCandidates {
		return Candidate{}, fmt.Errorf("%d candidates are kept already (the most a figure can tell apart): remove one first", MaxCandidates)
	}
	c := Candidate{Label: NextLabel(s.Candidates), Model: s.Model}
	s.Candidates = append(s.Candidates, c)
	return c, nil
}

// NextLabel returns the first of "A", "B", … that no candidate has.
func NextLabel(cs []Candidate) string {
	for r := 'A'; r <= 'Z'; r++ {
		l := string(r)
		free := true
		for _, c := range cs {
			free = free && c.Label != l
		}
		if free {
			return l
		}
	}
	return fmt.Sprintf("model %d", len(cs)+1)
}

// Save writes the session as JSON to path atomically (WriteFileAtomic): a
// failure leaves any earlier file at path untouched.
func (s *Session) Save(path string) error {
	js, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return fmt.Errorf("save session: %w", err)
	}
	if err := WriteFileAtomic(path, append(js, '\n')); err != nil {
		return fmt.Errorf("save session: %w", err)
	}
	return nil
}

// WriteFileAtomic writes data to path through a temporary file in the same
// directory, synced, then renamed over path, so that a reader sees either
// the old file or the whole new one and a failure leaves the old one. The
// file keeps the permissions of the one it replaces, or gets 0644.
func WriteFileAtomic(path string, data []byte) error {
	if err := writeFileAtomic(path, data); err != nil {
		// The temporary file's name means nothing to the user: name the
		// file being written and the system's reason.
		var pe *fs.PathError
		var le *os.LinkError
		switch {
		case errors.As(err, &pe):
			err = pe.Err
		case errors.As(err, &le):
			err = le.Err
		}
		return fmt.Errorf("write %s: %w", path, err)
	}
	return nil
}

func writeFileAtomic(path string, data []byte) error {
	mode := os.FileMode(0o644)
	if fi, err := os.Stat(path); err == nil && fi.Mode().IsRegular() {
		mode = fi.Mode().Perm()
	}
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return err
	}
	defer os.Remove(tmp.Name()) // no-op after a successful rename
	if err := tmp.Chmod(mode); err != nil {
		tmp.Close()
		return err
	}
	if _, err := tmp.Write(data); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Sync(); err != nil {
		tmp.Close()
		return err
	}
	if err := tmp.Close(); err != nil {
		return err
	}
	return os.Rename(tmp.Name(), path)
}

// ReadSession decodes a session; unknown fields are an error so a misspelt
// key is never ignored.
func ReadSession(r io.Reader) (*Session, error) {
	var s Session
	data, err := readBounded(r, maxSessionBytes, "session")
	if err != nil {
		return nil, err
	}
	if err := DecodeJSON(data, &s); err != nil {
		return nil, fmt.Errorf("session file: %w", err)
	}
	return &s, nil
}

// OpenSession reads the session saved at path and opens its dataset (the
// built-in demo, or the dataset file it names, through the cached loader),
// checking the one against the other.
func OpenSession(ctx context.Context, path string, progress func(linelists.Progress)) (*Bench, *Session, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, fmt.Errorf("open session: %w", err)
	}
	s, err := ReadSession(f)
	f.Close()
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", path, err)
	}
	var b *Bench
	if s.Dataset == DemoName {
		b, err = Demo()
	} else {
		b, err = OpenDataset(ctx, s.Dataset, progress)
	}
	if err != nil {
		return nil, nil, fmt.Errorf("%s: its dataset: %w", path, err)
	}
	if err := s.Validate(b.Data); err != nil {
		return nil, nil, fmt.Errorf("%s: %w", path, err)
	}
	return b, s, nil
}

// LoadSession reads the session saved at path and checks it against the
// bench's dataset, which it must belong to.
func LoadSession(path string, b *Bench) (*Session, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("open session: %w", err)
	}
	defer f.Close()
	s, err := ReadSession(f)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if s.Dataset != b.Name {
		return nil, fmt.Errorf("%s: the session is for dataset %q, not %q", path, s.Dataset, b.Name)
	}
	if err := s.Validate(b.Data); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return s, nil
}
