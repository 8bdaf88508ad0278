package core

import (
	"testing"
	"time"
)

// fakeClock is a settable time source for History.
type fakeClock struct{ t time.Time }

func (c *fakeClock) now() time.Time                 { return c.t }
func (c *fakeClock) step(d time.Duration) time.Time { c.t = c.t.Add(d); return c.t }

func TestHistoryUndoRedoEveryControl(t *testing.T) {
	b := demoBench(t)
	s := NewSession(b)
	start := s.Clone()
	clock := &fakeClock{t: time.Unix(1e9, 0)}
	h := NewHistory(s)
	h.Now = clock.now
	if h.CanUndo() || h.CanRedo() {
		t.Fatal("a fresh history can undo or redo")
	}
	if h.Record(s, "") {
		t.Error("recording an unchanged session made a step")
	}
	// One change of each kind, far apart in time: one step each, and
	// ChangedControl names the control.
	changes := []struct {
		control string
		apply   func(*Session)
	}{
		{ControlEpoch, func(s *Session) { s.Epoch = 1 }},
		{ControlVelocity, func(s *Session) { s.PhotosphereVelocity += 0.01 }},
		{ControlTemperature, func(s *Session) { s.Temperature += 100 }},
		{ControlComposition, func(s *Session) { s.MassFractions = mustComp(t, "Sr=1,Nd=0.5") }},
		{ControlZone, func(s *Session) { s.InnerMassFractions, s.ZoneBoundary = mustComp(t, "Nd=1"), 0.15 }},
		{ControlPreview, func(s *Session) { s.Preview = !s.Preview }},
		{ControlKnockOut, func(s *Session) { s.KnockOut = "Nd" }},
		{ControlUnit, func(s *Session) { s.WavelengthUnit = "nm" }},
		{ControlCandidates, func(s *Session) {
			if _, err := s.Keep(); err != nil {
				t.Fatal(err)
			}
		}},
	}
	var states []*Session
	for _, c := range changes {
		before := s.Clone()
		c.apply(s)
		if got := ChangedControl(before, s); got != c.control {
			t.Errorf("ChangedControl = %q, want %q", got, c.control)
		}
		clock.step(5 * time.Second)
		if !h.Record(s, "") {
			t.Fatalf("%s: not recorded", c.control)
		}
		states = append(states, s.Clone())
	}
	if h.Len() != len(changes)+1 {
		t.Fatalf("%d states, want %d", h.Len(), len(changes)+1)
	}
	// Undo walks back through every state to the start.
	for i := len(states) - 2; i >= -1; i-- {
		got, ok := h.Undo()
		want := start
		if i >= 0 {
			want = states[i]
		}
		if !ok || !got.Equal(want) {
			t.Fatalf("undo to state %d: got %+v, want %+v", i, got, want)
		}
	}
	if h.CanUndo() {
		t.Error("can undo past the start")
	}
	if _, ok := h.Undo(); ok {
		t.Error("Undo past the start succeeded")
	}
	// Redo brings them back in order.
	for i := range states {
		got, ok := h.Redo()
		if !ok || !got.Equal(states[i]) {
			t.Fatalf("redo to state %d: %+v", i, got)
		}
	}
	if h.CanRedo() {
		t.Error("can redo past the newest")
	}
	// A copy handed out does not alias the history.
	h.Undo()
	got, _ := h.Redo()
	got.Candidates[0].Label = "changed"
	got.Temperature = 1
	h.Undo()
	if back, _ := h.Redo(); !back.Equal(states[len(states)-1]) {
		t.Error("a state handed out aliases the history")
	}
	// A new change after an undo drops the redo list.
	h.Undo()
	s2 := states[len(states)-2].Clone()
	s2.Temperature = 9000
	clock.step(5 * time.Second)
	h.Record(s2, "")
	if h.CanRedo() {
		t.Error("redo still possible after a new change")
	}
}

func TestHistoryCoalescesDrags(t *testing.T) {
	b := demoBench(t)
	s := NewSession(b)
	clock := &fakeClock{t: time.Unix(1e9, 0)}
	h := NewHistory(s)
	h.Now = clock.now
	// A drag: 20 velocity changes 50 ms apart are one step.
	for i := 0; i < 20; i++ {
		s.PhotosphereVelocity += 0.001
		clock.step(50 * time.Millisecond)
		h.Record(s, "")
	}
	if h.Len() != 2 {
		t.Fatalf("a drag of 20 changes made %d states, want 2", h.Len())
	}
	// A temperature change right after is a step of its own.
	s.Temperature += 50
	clock.step(50 * time.Millisecond)
	h.Record(s, "")
	if h.Len() != 3 {
		t.Fatalf("%d states after a second control, want 3", h.Len())
	}
	// The same control after a pause is a new step.
	clock.step(2 * DefaultCoalesce)
	s.Temperature += 50
	h.Record(s, "")
	if h.Len() != 4 {
		t.Fatalf("%d states after a pause, want 4", h.Len())
	}
	// An explicit drag merges however slow it is, until EndDrag.
	h.BeginDrag(ControlVelocity)
	for i := 0; i < 5; i++ {
		s.PhotosphereVelocity += 0.002
		clock.step(3 * time.Second)
		h.Record(s, ControlVelocity)
	}
	h.EndDrag()
	if h.Len() != 5 {
		t.Fatalf("%d states after an explicit drag, want 5", h.Len())
	}
	s.PhotosphereVelocity += 0.002
	h.Record(s, ControlVelocity)
	if h.Len() != 6 {
		t.Fatalf("%d states after the drag ended, want 6", h.Len())
	}
	// Undoing the last step then changing the same control at once does
	// not merge into the state undone to.
	h.Undo()
	u := s.Clone()
	u.PhotosphereVelocity -= 0.01
	h.Record(u, "")
	if h.Len() != 6 || !h.CanUndo() {
		t.Fatalf("%d states after undo and change", h.Len())
	}
	// A drag that ends where it began leaves no step.
	n := h.Len()
	top := u.Clone()
	clock.step(2 * DefaultCoalesce)
	top.Temperature += 100
	h.Record(top, "")
	clock.step(10 * time.Millisecond)
	top.Temperature -= 100
	h.Record(top, "")
	if h.Len() != n {
		t.Errorf("a drag back to its start left %d states, want %d", h.Len(), n)
	}
}

func TestHistoryLimit(t *testing.T) {
	b := demoBench(t)
	s := NewSession(b)
	h := NewHistory(s)
	h.Limit = 10
	h.Coalesce = -1
	for i := 0; i < 25; i++ {
		s.Temperature = 3000 + float64(i)
		h.Record(s, "")
	}
	if h.Len() != 10 {
		t.Fatalf("%d states kept, want the limit 10", h.Len())
	}
	steps := 0
	var last *Session
	for h.CanUndo() {
		last, _ = h.Undo()
		steps++
	}
	if steps != 9 || last.Temperature != 3015 {
		t.Errorf("undid %d steps to T = %v, want 9 steps to the oldest kept, 3015 K", steps, last.Temperature)
	}
}
