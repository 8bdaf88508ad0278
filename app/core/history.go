package core

import (
	"maps"
	"slices"
	"time"
)

// Clone returns a deep copy of s (its candidates and photospheres are not
// shared with s).
func (s *Session) Clone() *Session {
	c := *s
	c.Candidates = slices.Clone(s.Candidates)
	c.Photospheres = maps.Clone(s.Photospheres)
	return &c
}

// Equal reports whether s and o hold the same state.
func (s *Session) Equal(o *Session) bool {
	return s.Version == o.Version && s.Dataset == o.Dataset && s.Model == o.Model &&
		slices.Equal(s.Candidates, o.Candidates) && s.WavelengthUnit == o.WavelengthUnit &&
		s.KnockOut == o.KnockOut && maps.Equal(s.Photospheres, o.Photospheres)
}

// Controls named by ChangedControl (and accepted by History.Record).
const (
	ControlEpoch       = "epoch"
	ControlVelocity    = "velocity"
	ControlTemperature = "temperature"
	ControlComposition = "composition"
	ControlZone        = "zone"
	ControlPreview     = "preview"
	ControlKnockOut    = "knock-out"
	ControlUnit        = "unit"
	ControlCandidates  = "candidates"
	// ControlSeveral is more than one of the above at once.
	ControlSeveral = "several"
)

// ChangedControl names the control that turns a into b: one of the
// Control* names (an epoch switch, which brings that epoch's photosphere,
// is ControlEpoch), ControlSeveral when several parts differ, "" when
// none.
func ChangedControl(a, b *Session) string {
	if a.Epoch != b.Epoch {
		// Switching epoch brings that epoch's photosphere with it.
		return ControlEpoch
	}
	var got []string
	add := func(differs bool, name string) {
		if differs {
			got = append(got, name)
		}
	}
	add(!maps.Equal(a.Photospheres, b.Photospheres) || a.Dataset != b.Dataset || a.Version != b.Version, ControlEpoch)
	add(a.PhotosphereVelocity != b.PhotosphereVelocity, ControlVelocity)
	add(a.Temperature != b.Temperature, ControlTemperature)
	add(a.MassFractions != b.MassFractions, ControlComposition)
	add(a.InnerMassFractions != b.InnerMassFractions || a.ZoneBoundary != b.ZoneBoundary, ControlZone)
	add(a.Preview != b.Preview, ControlPreview)
	add(a.KnockOut != b.KnockOut, ControlKnockOut)
	add(a.WavelengthUnit != b.WavelengthUnit, ControlUnit)
	add(!slices.Equal(a.Candidates, b.Candidates), ControlCandidates)
	switch len(got) {
	case 0:
		return ""
	case 1:
		return got[0]
	}
	return ControlSeveral
}

// DefaultHistoryLimit is the number of states a History keeps by default.
const DefaultHistoryLimit = 200

// DefaultCoalesce is how close in time two changes of the same control
// must be to count as one step (a drag, or a key held down on a slider).
const DefaultCoalesce = 800 * time.Millisecond

// History is the undo/redo list of a workbench: snapshots of its Session,
// oldest first, and the position of the one shown. It is a plain value the
// GUI drives: Record after every change, Undo and Redo to step. Changes of
// one control in quick succession (within Coalesce of each other), or
// between BeginDrag and EndDrag, make one step. Not safe for concurrent
// use.
type History struct {
	// Limit bounds the number of states kept (the oldest go first); ≤ 0
	// means DefaultHistoryLimit.
	Limit int
	// Coalesce is the interval within which changes of the same control
	// merge into one step; 0 means DefaultCoalesce, < 0 never merges.
	Coalesce time.Duration
	// Now returns the time (time.Now when nil); tests set it.
	Now func() time.Time

	states []*Session
	pos    int
	// lastControl and lastAt describe the change that made the top state,
	// while it may still merge with the next one.
	lastControl string
	lastAt      time.Time
	drag        string
}

// NewHistory returns a history whose only state is a copy of s.
func NewHistory(s *Session) *History {
	return &History{states: []*Session{s.Clone()}}
}

func (h *History) now() time.Time {
	if h.Now != nil {
		return h.Now()
	}
	return time.Now()
}

func (h *History) limit() int {
	if h.Limit <= 0 {
		return DefaultHistoryLimit
	}
	return h.Limit
}

// Record notes that the session is now s, changed by control (one of the
// Control* names; "" to derive it from what differs). It returns false
// when s equals the state shown (nothing to record). A change merges with
// the top state when it is of the same control as the change that made
// that state, within Coalesce of it or during a drag of that control; any
// states undone before are then dropped (no redo after a new change).
func (h *History) Record(s *Session, control string) bool {
	cur := h.states[h.pos]
	if cur.Equal(s) {
		return false
	}
	if control == "" {
		control = ChangedControl(cur, s)
	}
	now := h.now()
	coalesce := h.Coalesce
	if coalesce == 0 {
		coalesce = DefaultCoalesce
	}
	merge := h.pos > 0 && h.pos == len(h.states)-1 && control == h.lastControl && control != ControlSeveral &&
		(h.drag == control || coalesce > 0 && now.Sub(h.lastAt) <= coalesce)
	if merge {
		h.states[h.pos] = s.Clone()
		if h.states[h.pos].Equal(h.states[h.pos-1]) {
			// Dragged back to where it started: no step at all.
			h.states = h.states[:h.pos]
			h.pos--
			h.lastControl = ""
		}
		h.lastAt = now
		return true
	}
	h.states = append(h.states[:h.pos+1], s.Clone())
	if n := len(h.states) - h.limit(); n > 0 {
		h.states = slices.Delete(h.states, 0, n)
	}
	h.pos = len(h.states) - 1
	h.lastControl, h.lastAt = control, now
	return true
}

// BeginDrag starts a drag of control: until EndDrag, its changes make one
// step whatever time passes between them.
func (h *History) BeginDrag(control string) { h.drag = control }

// EndDrag ends a drag; the next change starts a new step.
func (h *History) EndDrag() {
	h.drag = ""
	h.lastControl = ""
}

// CanUndo reports whether there is a state before the one shown.
func (h *History) CanUndo() bool { return h.pos > 0 }

// CanRedo reports whether a state was undone and can be brought back.
func (h *History) CanRedo() bool { return h.pos < len(h.states)-1 }

// Undo steps back and returns a copy of the state now shown, or nil and
// false when there is none before.
func (h *History) Undo() (*Session, bool) {
	if !h.CanUndo() {
		return nil, false
	}
	h.pos--
	h.lastControl = ""
	return h.states[h.pos].Clone(), true
}

// Redo steps forward again after Undo and returns a copy of the state now
// shown, or nil and false when nothing was undone.
func (h *History) Redo() (*Session, bool) {
	if !h.CanRedo() {
		return nil, false
	}
	h.pos++
	h.lastControl = ""
	return h.states[h.pos].Clone(), true
}

// Len returns the number of states kept.
func (h *History) Len() int { return len(h.states) }
