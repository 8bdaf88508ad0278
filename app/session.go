package main

import (
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"broadline/opacity"
)

// sessionVersion is written into every saved session; a file from a newer
// version is refused rather than half-read.
const sessionVersion = 1

// Session is everything the workbench shows and the analyst has chosen, as a
// plain value: the GUI reads it and calls its methods, tests drive it without
// a display, and it is saved as JSON.
type Session struct {
	Version int `json:"version"`
	// Dataset names the dataset: "demo" for the built-in demo, else the
	// absolute path of the dataset file.
	Dataset string `json:"dataset"`
	// Epoch is the index of the shown epoch in the dataset.
	Epoch int `json:"epoch"`
	// PhotosphereVelocity is v_ph / c.
	PhotosphereVelocity float64 `json:"photosphere_velocity_c"`
	// Temperature is the photosphere's temperature in K.
	Temperature float64 `json:"temperature_k"`
	// MassFractions is the composition, "Sr=0.05,Nd=0.001,…".
	MassFractions string `json:"mass_fractions"`
	// Preview selects the absorption-only approximation.
	Preview bool `json:"preview"`
	// Candidates are the models kept for comparison (at most
	// maxCandidates), in the order kept.
	Candidates []Candidate `json:"candidates,omitempty"`
	// WavelengthUnit is how wavelengths are shown: "um" (the default when
	// empty), "nm" or "A".
	WavelengthUnit string `json:"wavelength_unit,omitempty"`
}

// newSession returns a session on epoch 0 of d with the model parameters set
// to the scenario's recorded values (for the demo: the truth).
func newSession(name string, d *dataset) *Session {
	s := &Session{Version: sessionVersion, Dataset: name}
	s.resetModel(d)
	return s
}

// resetModel sets the model parameters to the dataset's values for the
// current epoch.
func (s *Session) resetModel(d *dataset) {
	ep := d.Scenario.Epochs[s.Epoch]
	s.PhotosphereVelocity = ep.PhotosphereVelocity
	s.Temperature = ep.Temperature
	s.MassFractions = d.Scenario.MassFractions
}

// Validate checks the session against the dataset it refers to.
func (s *Session) Validate(d *dataset) error {
	switch {
	case s.Version < 1 || s.Version > sessionVersion:
		return fmt.Errorf("session version %d not supported (this program writes %d)", s.Version, sessionVersion)
	case s.Epoch < 0 || s.Epoch >= len(d.Scenario.Epochs):
		return fmt.Errorf("epoch %d out of range (the dataset has %d)", s.Epoch, len(d.Scenario.Epochs))
	case !(s.PhotosphereVelocity >= minSliderV) || s.PhotosphereVelocity > d.Scenario.OuterVelocity-sliderVGap:
		return fmt.Errorf("photosphere velocity %gc must lie between %gc and %gc below the outer velocity %gc",
			s.PhotosphereVelocity, minSliderV, sliderVGap, d.Scenario.OuterVelocity)
	case !(s.Temperature >= minSliderT && s.Temperature <= maxSliderT):
		return fmt.Errorf("temperature %g K outside the workbench's %g–%g K", s.Temperature, minSliderT, maxSliderT)
	}
	if _, err := opacity.ParseComposition(s.MassFractions); err != nil {
		return fmt.Errorf("mass fractions: %w", err)
	}
	if _, ok := waveUnits[s.WavelengthUnit]; !ok && s.WavelengthUnit != "" {
		return fmt.Errorf("wavelength_unit %q: want um, nm or A", s.WavelengthUnit)
	}
	if len(s.Candidates) > maxCandidates {
		return fmt.Errorf("%d candidates (at most %d are kept)", len(s.Candidates), maxCandidates)
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
		t := c.session(s)
		if err := t.Validate(d); err != nil {
			return fmt.Errorf("candidate %s: %w", c.Label, err)
		}
	}
	return nil
}

// Save writes the session as JSON to path atomically (writeFileAtomic): a
// failure leaves any earlier file at path untouched.
func (s *Session) Save(path string) error {
	js, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return fmt.Errorf("save session: %w", err)
	}
	if err := writeFileAtomic(path, append(js, '\n')); err != nil {
		return fmt.Errorf("save session: %w", err)
	}
	return nil
}

// writeFileAtomic writes data to path through a temporary file in the same
// directory, synced, then renamed over path, so that a reader sees either
// the old file or the whole new one and a failure leaves the old one. The
// file keeps the permissions of the one it replaces, or gets 0644.
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

// readSession decodes a session; unknown fields are an error so a misspelt
// key is never ignored.
func readSession(r io.Reader) (*Session, error) {
	var s Session
	dec := json.NewDecoder(io.LimitReader(r, 1<<20))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&s); err != nil {
		return nil, fmt.Errorf("read session: %w", err)
	}
	return &s, nil
}

// loadSession reads the session saved at path and checks it against the
// dataset d it must belong to.
func loadSession(path, dataset string, d *dataset) (*Session, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("open session: %w", err)
	}
	defer f.Close()
	s, err := readSession(f)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	if s.Dataset != dataset {
		return nil, fmt.Errorf("%s: the session is for dataset %q, not %q", path, s.Dataset, dataset)
	}
	if err := s.Validate(d); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return s, nil
}
