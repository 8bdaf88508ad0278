package gui

import (
	"os"
	"path/filepath"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"

	"broadline/app/core"
)

// shortcut types sc on wb's canvas, as the keyboard would.
func shortcut(t *testing.T, wb *workbench, sc fyne.Shortcut) {
	t.Helper()
	h, ok := wb.win.Canvas().(fyne.Shortcutable)
	if !ok {
		t.Fatal("the canvas takes no shortcuts")
	}
	h.TypedShortcut(sc)
}

// menuItem finds the item labelled label in menu menu of wb's window.
func menuItem(t *testing.T, wb *workbench, menu, label string) *fyne.MenuItem {
	t.Helper()
	for _, m := range wb.win.MainMenu().Items {
		if m.Label != menu {
			continue
		}
		for _, it := range m.Items {
			if it.Label == label {
				return it
			}
		}
	}
	t.Fatalf("no menu item %s ▸ %s", menu, label)
	return nil
}

// TestUndoRedo drives the undo history through the window: a temperature
// drag, a candidate kept and a unit change are undone by Ctrl+Z (and the
// Edit menu) one by one and redone by Ctrl+Shift+Z, and the controls and
// the figure follow.
func TestUndoRedo(t *testing.T) {
	wb := demoWorkbench(t)
	waitDone(t, wb)
	start := wb.sess.Clone()
	undo, redo := menuItem(t, wb, "Edit", "Undo"), menuItem(t, wb, "Edit", "Redo")
	if !undo.Disabled || !redo.Disabled {
		t.Error("Undo or Redo enabled with nothing to undo")
	}
	// A drag of the temperature slider: many values, one end.
	for _, v := range []float64{5200, 5600, 6100} {
		wb.temp.SetValue(v)
	}
	wb.temp.OnChangeEnded(6100)
	waitDone(t, wb)
	if err := wb.keepCandidate(); err != nil {
		t.Fatal(err)
	}
	wb.unitSel.SetSelected(core.WaveUnits["nm"].Name)
	waitDone(t, wb)
	after := wb.sess.Clone()
	if after.Temperature != 6100 || len(after.Candidates) != 1 || after.WavelengthUnit != "nm" {
		t.Fatalf("changes not made: %+v", after)
	}
	if undo.Disabled {
		t.Error("Undo disabled after changes")
	}
	// Ctrl+Z: the unit back.
	await(t, func(f func(*core.Overlay, error)) { wb.done = f }, func() { shortcut(t, wb, undoShortcut) })
	if wb.sess.WavelengthUnit == "nm" || wb.unitSel.Selected == core.WaveUnits["nm"].Name {
		t.Errorf("unit not undone: session %q, selector %q", wb.sess.WavelengthUnit, wb.unitSel.Selected)
	}
	// Edit ▸ Undo: the candidate goes.
	await(t, func(f func(*core.Overlay, error)) { wb.done = f }, undo.Action)
	if len(wb.sess.Candidates) != 0 || wb.candList.Length() != 0 {
		t.Errorf("candidate not undone: %d", len(wb.sess.Candidates))
	}
	// The drag is one step: one more undo brings the start temperature.
	await(t, func(f func(*core.Overlay, error)) { wb.done = f }, func() { shortcut(t, wb, undoShortcut) })
	if !wb.sess.Equal(start) || wb.temp.Value != start.Temperature {
		t.Errorf("after three undos: %+v (slider %v), want the start %+v", wb.sess, wb.temp.Value, start)
	}
	if !undo.Disabled || redo.Disabled {
		t.Error("menu items not updated at the start of the history")
	}
	// Ctrl+Shift+Z three times: everything back.
	for range 3 {
		await(t, func(f func(*core.Overlay, error)) { wb.done = f }, func() { shortcut(t, wb, redoShortcut) })
	}
	if !wb.sess.Equal(after) {
		t.Errorf("after three redos: %+v, want %+v", wb.sess, after)
	}
	if wb.status.Text == "" || wb.figure.Image == nil {
		t.Error("no figure or status after redo")
	}
}

// TestAutosaveAndRecovery: changes in the window reach the recovery file;
// a window opened on the same state directory after a "crash" (no clean
// exit) asks whether to recover, and Yes shows the autosaved session; a
// clean exit removes the file and keeps the window's size and dividers for
// the next start.
func TestAutosaveAndRecovery(t *testing.T) {
	dir := t.TempDir()
	wb := demoWorkbench(t)
	wb.startDaily(nil, dir)
	waitDone(t, wb)
	wb.temp.SetValue(7300)
	wb.temp.OnChangeEnded(7300)
	waitDone(t, wb)
	if err := wb.daily.auto.Flush(); err != nil {
		t.Fatal(err)
	}
	rec, err := core.Recover(dir)
	if err != nil || rec == nil || rec.Session.Temperature != 7300 {
		t.Fatalf("autosave after a change: %+v, %v", rec, err)
	}
	// "Crash": the first window goes without a clean exit. A new one on
	// the same directory offers the autosave.
	b := demoBench(t)
	wb2 := newWorkbench(test.NewTempApp(t), b, core.NewSession(b))
	t.Cleanup(wb2.win.Close)
	wb2.startDaily(nil, dir)
	if wb2.daily.auto != nil {
		t.Error("autosave started before the recovery question was answered (it would overwrite the file)")
	}
	yes := findButton(wb2.win.Canvas().Overlays().Top(), "Yes")
	if yes == nil {
		t.Fatal("no recovery question")
	}
	got := make(chan error, 1)
	wb2.daily.recoverDone = func(err error) { got <- err }
	test.Tap(yes)
	select {
	case err := <-got:
		if err != nil {
			t.Fatal(err)
		}
	case <-time.After(time.Minute):
		t.Fatal("recovery did not finish")
	}
	if wb2.sess.Temperature != 7300 || wb2.temp.Value != 7300 {
		t.Errorf("recovered T = %v (slider %v), want 7300", wb2.sess.Temperature, wb2.temp.Value)
	}
	if wb2.daily.auto == nil {
		t.Error("no autosave after the recovery")
	}
	// Recovery is one undo step.
	if !wb2.daily.hist.CanUndo() {
		t.Error("the recovery cannot be undone")
	}
	// A clean exit with a resized window and moved dividers.
	wb2.win.Resize(fyne.NewSize(900, 640))
	wb2.daily.split.Offset, wb2.daily.right.Offset = 0.4, 0.5
	wb2.cleanExit()
	if _, err := os.Stat(filepath.Join(dir, core.RecoveryFile)); !os.IsNotExist(err) {
		t.Errorf("recovery file after a clean exit: %v", err)
	}
	// The next start asks nothing and restores the window.
	wb3 := newWorkbench(test.NewTempApp(t), b, core.NewSession(b))
	t.Cleanup(wb3.win.Close)
	wb3.startDaily(nil, dir)
	if o := wb3.win.Canvas().Overlays().Top(); o != nil && findButton(o, "Yes") != nil {
		t.Error("recovery offered after a clean exit")
	}
	if sz := wb3.win.Canvas().Size(); sz.Width != 900 || sz.Height != 640 {
		t.Errorf("window size %v, want 900×640", sz)
	}
	if wb3.daily.split.Offset != 0.4 || wb3.daily.right.Offset != 0.5 {
		t.Errorf("dividers %v, %v, want 0.4, 0.5", wb3.daily.split.Offset, wb3.daily.right.Offset)
	}
	if wb3.daily.auto == nil {
		t.Error("no autosave on a start without recovery")
	}
	wb3.cleanExit()
}

// TestDeclineRecovery: No removes the autosave and leaves the session.
func TestDeclineRecovery(t *testing.T) {
	dir := t.TempDir()
	b := demoBench(t)
	s := core.NewSession(b)
	s.Temperature = 8100
	a, err := core.NewAutosaver(dir, 0)
	if err != nil {
		t.Fatal(err)
	}
	a.Changed(s)
	if err := a.Flush(); err != nil {
		t.Fatal(err)
	}
	wb := demoWorkbench(t)
	wb.startDaily(nil, dir)
	no := findButton(wb.win.Canvas().Overlays().Top(), "No")
	if no == nil {
		t.Fatal("no recovery question")
	}
	test.Tap(no)
	if wb.sess.Temperature == 8100 {
		t.Error("declined recovery changed the session")
	}
	// The fresh autosave now holds this window's session, not the old one.
	if err := wb.daily.auto.Flush(); err != nil {
		t.Fatal(err)
	}
	if rec, _ := core.Recover(dir); rec == nil || rec.Session.Temperature == 8100 {
		t.Errorf("after declining, the recovery file holds %+v", rec)
	}
	wb.cleanExit()
}

// findButton returns the button labelled text under o, or nil.
func findButton(o fyne.CanvasObject, text string) *widget.Button {
	if o == nil {
		return nil
	}
	if b, ok := o.(*widget.Button); ok && b.Text == text {
		return b
	}
	var kids []fyne.CanvasObject
	switch v := o.(type) {
	case *fyne.Container:
		kids = v.Objects
	case fyne.Widget:
		kids = test.WidgetRenderer(v).Objects()
	}
	for _, k := range kids {
		if b := findButton(k, text); b != nil {
			return b
		}
	}
	return nil
}
