package core

import (
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sync"
	"time"
)

// File names in the state directory (StateDir).
const (
	// RecoveryFile is the autosaved session: a plain session file, which
	// `broadline open` also reads.
	RecoveryFile = "autosave.session.json"
	// cleanExitFile marks the last clean exit by its modification time.
	cleanExitFile = "clean-exit"
	// WindowFile holds the window's size and split positions.
	WindowFile = "window.json"
)

// DefaultAutosaveInterval is the longest an autosaved change waits before
// it is written (so a crash loses at most about this much work).
const DefaultAutosaveInterval = 2 * time.Second

// StateDir returns the directory of the workbench's state (the autosave,
// the window state): $XDG_STATE_HOME/broadline when XDG_STATE_HOME is set,
// else broadline under os.UserConfigDir. It does not create it.
func StateDir() (string, error) {
	if d := os.Getenv("XDG_STATE_HOME"); d != "" && filepath.IsAbs(d) {
		return filepath.Join(d, "broadline"), nil
	}
	d, err := os.UserConfigDir()
	if err != nil {
		return "", fmt.Errorf("state directory: %w", err)
	}
	return filepath.Join(d, "broadline"), nil
}

// Autosaver writes the session to the recovery file in its directory,
// atomically (WriteFileAtomic), at most once per Interval and only when it
// changed: the first change after a quiet spell is written at once, later
// ones when the interval since the last write has passed. A crash thus
// loses at most about Interval of changes; Close, on a clean exit, removes
// the file. Its methods may be called from any goroutine.
type Autosaver struct {
	dir      string
	interval time.Duration

	mu        sync.Mutex
	pending   *Session // not yet written; nil when none
	timer     *time.Timer
	lastWrite time.Time
	closed    bool
	err       error  // of the last write
	written   []byte // what the file holds

	writeMu sync.Mutex // one write at a time
}

// NewAutosaver returns an autosaver writing to dir (created if needed)
// every interval at most (≤ 0: DefaultAutosaveInterval).
func NewAutosaver(dir string, interval time.Duration) (*Autosaver, error) {
	if interval <= 0 {
		interval = DefaultAutosaveInterval
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("autosave: %w", err)
	}
	return &Autosaver{dir: dir, interval: interval}, nil
}

// Path returns the recovery file's path.
func (a *Autosaver) Path() string { return filepath.Join(a.dir, RecoveryFile) }

// Changed notes that the session is now s (a copy is kept, so s may change
// afterwards) and schedules a write.
func (a *Autosaver) Changed(s *Session) {
	c := s.Clone()
	a.mu.Lock()
	defer a.mu.Unlock()
	if a.closed {
		return
	}
	a.pending = c
	if a.timer != nil {
		return // a write is due already and will take the newest state
	}
	delay := max(time.Until(a.lastWrite.Add(a.interval)), 0)
	a.timer = time.AfterFunc(delay, func() { a.write() })
}

// write writes the pending session, if any.
func (a *Autosaver) write() {
	a.writeMu.Lock()
	defer a.writeMu.Unlock()
	a.mu.Lock()
	s := a.pending
	a.pending, a.timer = nil, nil
	closed := a.closed
	a.mu.Unlock()
	if s == nil || closed {
		return
	}
	js, err := json.MarshalIndent(s, "", "  ")
	if err == nil {
		js = append(js, '\n')
		a.mu.Lock()
		same := string(js) == string(a.written)
		a.mu.Unlock()
		if !same {
			err = WriteFileAtomic(a.Path(), js)
		}
	}
	a.mu.Lock()
	a.lastWrite = time.Now()
	if err != nil {
		a.err = fmt.Errorf("autosave: %w", err)
	} else {
		a.err, a.written = nil, js
	}
	a.mu.Unlock()
}

// Flush writes a pending change now.
func (a *Autosaver) Flush() error {
	a.mu.Lock()
	if a.timer != nil {
		a.timer.Stop()
	}
	a.mu.Unlock()
	a.write()
	return a.Err()
}

// Err returns the error of the last write, nil when it succeeded.
func (a *Autosaver) Err() error {
	a.mu.Lock()
	defer a.mu.Unlock()
	return a.err
}

// Close ends autosaving on a clean exit: nothing pending is written, the
// recovery file is removed and the clean exit is marked, so that Recover
// offers nothing next time.
func (a *Autosaver) Close() error {
	a.mu.Lock()
	a.closed = true
	a.pending = nil
	if a.timer != nil {
		a.timer.Stop()
		a.timer = nil
	}
	a.mu.Unlock()
	a.writeMu.Lock() // wait for a write under way
	defer a.writeMu.Unlock()
	if err := os.Remove(a.Path()); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("autosave: %w", err)
	}
	if err := WriteFileAtomic(filepath.Join(a.dir, cleanExitFile), []byte(time.Now().UTC().Format(time.RFC3339Nano)+"\n")); err != nil {
		return fmt.Errorf("autosave: mark the clean exit: %w", err)
	}
	return nil
}

// Recovery is an autosaved session left by a run that did not exit
// cleanly.
type Recovery struct {
	Path    string    // the recovery file
	Saved   time.Time // when it was written
	Session *Session  // as read; check it against its dataset before use
}

// Recover looks in dir for a recovery file newer than the last clean exit
// and returns it, or nil when there is none. A recovery file that cannot
// be read is an error (it is left in place for the analyst to look at).
// The session is not checked against its dataset: OpenSession(rec.Path)
// or Session.Validate does that.
func Recover(dir string) (*Recovery, error) {
	path := filepath.Join(dir, RecoveryFile)
	fi, err := os.Stat(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("recover: %w", err)
	}
	if ce, err := os.Stat(filepath.Join(dir, cleanExitFile)); err == nil && !fi.ModTime().After(ce.ModTime()) {
		return nil, nil
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("recover: %w", err)
	}
	defer f.Close()
	s, err := ReadSession(f)
	if err != nil {
		return nil, fmt.Errorf("recover %s: %w", path, err)
	}
	return &Recovery{Path: path, Saved: fi.ModTime(), Session: s}, nil
}

// Discard removes the recovery file in dir (the analyst declined it).
func Discard(dir string) error {
	if err := os.Remove(filepath.Join(dir, RecoveryFile)); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("discard the autosave: %w", err)
	}
	return nil
}

// WindowState is the window's geometry, restored on the next start.
type WindowState struct {
	Width  float32 `json:"width"`
	Height float32 `json:"height"`
	// Split is the position of the divider between the controls and the
	// plot (0–1), RightSplit that between the plot and the feature table.
	Split      float64 `json:"split"`
	RightSplit float64 `json:"right_split"`
}

// Bounds of a window state that LoadWindowState accepts.
const (
	minWindowSide = 200
	maxWindowSide = 16384
)

func (w WindowState) check() error {
	ok := func(v float32) bool { return v >= minWindowSide && v <= maxWindowSide }
	split := func(v float64) bool { return v >= 0.05 && v <= 0.95 }
	if !ok(w.Width) || !ok(w.Height) || !split(w.Split) || !split(w.RightSplit) {
		return fmt.Errorf("window state %+v: want sides of %d–%d and splits of 0.05–0.95", w, minWindowSide, maxWindowSide)
	}
	return nil
}

// SaveWindowState writes w to the window file in dir (created if needed).
func SaveWindowState(dir string, w WindowState) error {
	if err := w.check(); err != nil {
		return err
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("window state: %w", err)
	}
	js, err := json.Marshal(w)
	if err != nil {
		return fmt.Errorf("window state: %w", err)
	}
	if err := WriteFileAtomic(filepath.Join(dir, WindowFile), append(js, '\n')); err != nil {
		return fmt.Errorf("window state: %w", err)
	}
	return nil
}

// LoadWindowState reads the window file in dir. No file gives ok false
// and no error; a file with impossible values is an error.
func LoadWindowState(dir string) (w WindowState, ok bool, err error) {
	path := filepath.Join(dir, WindowFile)
	b, err := os.ReadFile(path)
	if errors.Is(err, fs.ErrNotExist) {
		return w, false, nil
	}
	if err != nil {
		return w, false, fmt.Errorf("window state: %w", err)
	}
	if len(b) > 4096 {
		return w, false, fmt.Errorf("%s: %d bytes, want a small JSON object", path, len(b))
	}
	if err := json.Unmarshal(b, &w); err != nil {
		return WindowState{}, false, fmt.Errorf("%s: %w", path, err)
	}
	if err := w.check(); err != nil {
		return WindowState{}, false, fmt.Errorf("%s: %w", path, err)
	}
	return w, true, nil
}
