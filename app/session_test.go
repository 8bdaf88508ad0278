package main

import (
	"bytes"
	"image/color"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func TestSessionSaveAndRead(t *testing.T) {
	d, err := loadDemo()
	if err != nil {
		t.Fatal(err)
	}
	s := newSession("demo", d)
	if err := s.Validate(d); err != nil {
		t.Fatalf("fresh session invalid: %v", err)
	}
	// The fresh session carries the scenario's recorded values.
	if s.PhotosphereVelocity != d.Scenario.Epochs[0].PhotosphereVelocity || s.MassFractions != d.Scenario.MassFractions {
		t.Errorf("session %+v does not start from the recorded values", s)
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "s.json")
	s.Epoch = 1
	s.Temperature = 4321
	if err := s.Save(path); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	got, err := readSession(f)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(*got, *s) {
		t.Errorf("round trip: got %+v, want %+v", got, s)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 {
		t.Errorf("temporary files left behind: %v", ents)
	}
	// A new file is readable by others (0644), as files written by hand
	// are; a replaced file keeps its permissions.
	if fi, err := os.Stat(path); err != nil || fi.Mode().Perm() != 0o644 {
		t.Errorf("new session file mode %v (%v), want 0644", fi.Mode().Perm(), err)
	}
	if err := os.Chmod(path, 0o600); err != nil {
		t.Fatal(err)
	}
	if err := s.Save(path); err != nil {
		t.Fatal(err)
	}
	if fi, err := os.Stat(path); err != nil || fi.Mode().Perm() != 0o600 {
		t.Errorf("replaced session file mode %v (%v), want the old 0600", fi.Mode().Perm(), err)
	}
}

// TestSessionSaveIsAtomic: a save that cannot complete leaves the earlier
// file as it was.
func TestSessionSaveIsAtomic(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "s.json")
	old := []byte(`{"version":1,"dataset":"demo"}`)
	if err := os.WriteFile(path, old, 0o644); err != nil {
		t.Fatal(err)
	}
	// Make the rename fail: the target becomes a non-empty directory.
	s := &Session{Version: 1, Dataset: "demo"}
	if err := s.Save(filepath.Join(dir, "missing-dir", "s.json")); err == nil {
		t.Error("save into a missing directory succeeded")
	}
	blocker := filepath.Join(dir, "blocked.json")
	if err := os.MkdirAll(filepath.Join(blocker, "x"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := s.Save(blocker); err == nil {
		t.Error("save over a directory succeeded")
	}
	if b, _ := os.ReadFile(path); !bytes.Equal(b, old) {
		t.Errorf("earlier session changed: %q", b)
	}
	ents, _ := os.ReadDir(dir)
	for _, e := range ents {
		if strings.HasSuffix(e.Name(), ".tmp") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
	}
}

func TestSessionRejects(t *testing.T) {
	if _, err := readSession(strings.NewReader(`{"version":1,"epoch":0,"velocty":0.2}`)); err == nil {
		t.Error("a misspelt key was accepted")
	}
	d, err := loadDemo()
	if err != nil {
		t.Fatal(err)
	}
	for name, mod := range map[string]func(*Session){
		"future version": func(s *Session) { s.Version = sessionVersion + 1 },
		"epoch":          func(s *Session) { s.Epoch = len(d.Scenario.Epochs) },
		"velocity":       func(s *Session) { s.PhotosphereVelocity = d.Scenario.OuterVelocity },
		"temperature":    func(s *Session) { s.Temperature = -5 },
		"composition":    func(s *Session) { s.MassFractions = "Xx=1" },
	} {
		s := newSession("demo", d)
		mod(s)
		if err := s.Validate(d); err == nil {
			t.Errorf("%s: invalid session accepted: %+v", name, s)
		}
	}
}

// TestFigure renders the demo's first epoch with a model overlay and checks
// that both palette colours reach the image and that a removed range stays a
// gap (the line is broken into segments).
func TestFigure(t *testing.T) {
	d, err := loadDemo()
	if err != nil {
		t.Fatal(err)
	}
	obs := d.Observed[0]
	ov := &overlay{Wavelength: obs.Wavelength, Flux: obs.Flux}
	p, err := spectrumFigure(obs, ov, "test", unitOf(""))
	if err != nil {
		t.Fatal(err)
	}
	img := renderFigure(p, 800, 400)
	if b := img.Bounds(); b.Dx() != 800 || b.Dy() != 400 {
		t.Fatalf("image %v, want 800×400", b)
	}
	counts := map[color.NRGBA]int{}
	for y := 0; y < 400; y++ {
		for x := 0; x < 800; x++ {
			r, g, b, _ := img.At(x, y).RGBA()
			counts[color.NRGBA{uint8(r >> 8), uint8(g >> 8), uint8(b >> 8), 255}]++
		}
	}
	if counts[palette.Model] < 100 {
		t.Errorf("model colour on %d pixels only", counts[palette.Model])
	}
	// The demo removes two opaque water bands: the observed spectrum must
	// be drawn in three pieces, not joined across the gaps.
	if n := len(segments(obs.Wavelength, obs.Flux, unitOf(""))); n != 3 {
		t.Errorf("demo spectrum drawn in %d segments, want 3", n)
	}
	// A NaN breaks a line too.
	if n := len(segments([]float64{1, 2, 3, 4, 5}, []float64{1, 1, math.NaN(), 1, 1}, unitOf(""))); n != 2 {
		t.Errorf("NaN split into %d segments, want 2", n)
	}
	if _, err := spectrumFigure(obs, nil, "no flux", unitOf("")); err != nil {
		t.Errorf("figure without overlay: %v", err)
	}
}
