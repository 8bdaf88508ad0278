package core

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
)

func TestSessionSaveAndRead(t *testing.T) {
	b := demoBench(t)
	d := b.Data
	s := NewSession(b)
	if err := s.Validate(d); err != nil {
		t.Fatalf("fresh session invalid: %v", err)
	}
	// The fresh session carries the scenario's recorded values.
	if s.PhotosphereVelocity != d.Epochs[0].PhotosphereVelocity || s.MassFractions != d.MassFractions {
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
	got, err := ReadSession(f)
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
	if _, err := ReadSession(strings.NewReader(`{"version":1,"epoch":0,"velocty":0.2}`)); err == nil {
		t.Error("a misspelt key was accepted")
	}
	b := demoBench(t)
	d := b.Data
	for name, mod := range map[string]func(*Session){
		"future version": func(s *Session) { s.Version = SessionVersion + 1 },
		"epoch":          func(s *Session) { s.Epoch = len(d.Epochs) },
		"velocity":       func(s *Session) { s.PhotosphereVelocity = d.OuterVelocity },
		"temperature":    func(s *Session) { s.Temperature = -5 },
		"composition":    func(s *Session) { s.MassFractions = Composition{} },
	} {
		s := NewSession(b)
		mod(s)
		if err := s.Validate(d); err == nil {
			t.Errorf("%s: invalid session accepted: %+v", name, s)
		}
	}
}

// TestSessionKnockOutAndOpen: a session keeps the knock-out element and
// OpenSession brings back the session with its dataset (the demo here,
// and the committed walkthrough session); a knock-out that is not an
// element symbol is refused.
func TestSessionKnockOutAndOpen(t *testing.T) {
	b := demoBench(t)
	s := NewSession(b)
	s.Model = b.Data.StartModel(2)
	s.KnockOut = "Nd"
	path := filepath.Join(t.TempDir(), "s.json")
	if err := s.Save(path); err != nil {
		t.Fatal(err)
	}
	ob, got, err := OpenSession(context.Background(), path, nil)
	if err != nil {
		t.Fatal(err)
	}
	if ob.Name != DemoName || !reflect.DeepEqual(*got, *s) {
		t.Errorf("opened %q %+v, want the demo and %+v", ob.Name, got, s)
	}
	if _, w, err := OpenSession(context.Background(), "../../docs/late-epoch-knockout.session.json", nil); err != nil || w.KnockOut != "Nd" || w.Epoch != 2 {
		t.Errorf("the walkthrough session: %+v, %v", w, err)
	}
	for _, bad := range []string{"Qq", "nd", "Nd,Sm"} {
		s.KnockOut = bad
		if err := s.Validate(b.Data); err == nil || !strings.Contains(err.Error(), "knock_out") {
			t.Errorf("knock-out %q: %v", bad, err)
		}
	}
	if _, _, err := OpenSession(context.Background(), filepath.Join(t.TempDir(), "none.json"), nil); err == nil {
		t.Error("a missing session file opened")
	}
}

// TestSwitchEpoch: switching epochs keeps each epoch's photosphere as the
// analyst left it and the composition shared; the first visit starts from
// the dataset's values and says so; the values survive a save.
func TestSwitchEpoch(t *testing.T) {
	b := demoBench(t)
	s := NewSession(b)
	s.PhotosphereVelocity, s.Temperature = 0.2, 4800
	comp := mustComp(t, "Sr=0.5,Kr=0.5")
	s.MassFractions = comp
	msg, err := s.SwitchEpoch(b.Data, 1)
	if err != nil {
		t.Fatal(err)
	}
	st := b.Data.StartModel(1)
	if s.Epoch != 1 || s.PhotosphereVelocity != st.PhotosphereVelocity || s.Temperature != st.Temperature || s.MassFractions != comp {
		t.Errorf("first visit of epoch 2: %+v", s.Model)
	}
	if !strings.Contains(msg, "recorded") || !strings.Contains(msg, "epoch 2") {
		t.Errorf("message %q", msg)
	}
	s.Temperature = 3900
	if msg, _ = s.SwitchEpoch(b.Data, 0); s.PhotosphereVelocity != 0.2 || s.Temperature != 4800 || !strings.Contains(msg, "as you left") {
		t.Errorf("back on epoch 1: %+v, %q", s.Model, msg)
	}
	path := filepath.Join(t.TempDir(), "s.json")
	if err := s.Save(path); err != nil {
		t.Fatal(err)
	}
	got, err := LoadSession(path, b)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := got.SwitchEpoch(b.Data, 1); err != nil || got.Temperature != 3900 {
		t.Errorf("epoch 2 after a save: T = %g (%v), want 3900", got.Temperature, err)
	}
	if _, err := s.SwitchEpoch(b.Data, 9); err == nil {
		t.Error("epoch 10 accepted")
	}
	s.Photospheres[1] = Photosphere{Velocity: 0.9, Temperature: 4000}
	if err := s.Validate(b.Data); err == nil {
		t.Error("a saved photosphere beyond the outer velocity accepted")
	}
}
