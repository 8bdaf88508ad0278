package gui

import (
	"fmt"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/driver/desktop"

	"broadline/app/core"
)

// dailyState is the workbench's undo history, autosave and window state.
type dailyState struct {
	hist     *core.History
	auto     *core.Autosaver // nil until autosaving starts
	stateDir string          // "" when unknown: no autosave, no window state
	undo     *fyne.MenuItem
	redo     *fyne.MenuItem
	split    *container.Split // controls | plot and table
	right    *container.Split // plot / table
	// recoverDone, if set, is called after a recovered session is shown
	// (tests wait on it).
	recoverDone func(error)
}

// The undo and redo shortcuts: Ctrl+Z and Ctrl+Shift+Z (⌘ on macOS).
var (
	undoShortcut = &desktop.CustomShortcut{KeyName: fyne.KeyZ, Modifier: fyne.KeyModifierShortcutDefault}
	redoShortcut = &desktop.CustomShortcut{KeyName: fyne.KeyZ, Modifier: fyne.KeyModifierShortcutDefault | fyne.KeyModifierShift}
)

// installDaily starts the undo history at the shown session and adds the
// Edit menu and its shortcuts; split and right are the window's dividers
// (for the window state).
func (wb *workbench) installDaily(split, right *container.Split) {
	wb.daily.hist = core.NewHistory(wb.sess)
	wb.daily.split, wb.daily.right = split, right
	wb.daily.undo = fyne.NewMenuItem("Undo", func() { wb.undo() })
	wb.daily.undo.Shortcut = undoShortcut
	wb.daily.redo = fyne.NewMenuItem("Redo", func() { wb.redo() })
	wb.daily.redo.Shortcut = redoShortcut
	edit := fyne.NewMenu("Edit", wb.daily.undo, wb.daily.redo)
	if mm := wb.win.MainMenu(); mm != nil {
		items := append([]*fyne.Menu{}, mm.Items[:min(1, len(mm.Items))]...)
		items = append(items, edit)
		items = append(items, mm.Items[min(1, len(mm.Items)):]...)
		mm.Items = items
		wb.win.SetMainMenu(mm)
	} else {
		wb.win.SetMainMenu(fyne.NewMainMenu(edit))
	}
	c := wb.win.Canvas()
	c.AddShortcut(undoShortcut, func(fyne.Shortcut) { wb.undo() })
	c.AddShortcut(redoShortcut, func(fyne.Shortcut) { wb.redo() })
	wb.updateEditMenu()
}

// noteChange records the session in the undo history (a no-op when it did
// not change) and hands it to the autosaver. Every parameter change of the
// window passes here: recompute calls it, and the candidate list's changes.
func (wb *workbench) noteChange() {
	if wb.daily.hist == nil {
		return
	}
	wb.daily.hist.Record(wb.sess, "")
	if wb.daily.auto != nil {
		wb.daily.auto.Changed(wb.sess)
	}
	wb.updateEditMenu()
}

func (wb *workbench) updateEditMenu() {
	if wb.daily.undo == nil {
		return
	}
	wb.daily.undo.Disabled = !wb.daily.hist.CanUndo()
	wb.daily.redo.Disabled = !wb.daily.hist.CanRedo()
	if mm := wb.win.MainMenu(); mm != nil {
		mm.Refresh()
	}
}

// undo shows the state before the last change.
func (wb *workbench) undo() {
	if s, ok := wb.daily.hist.Undo(); ok {
		wb.showState(s)
		wb.status.SetText("undone")
	}
}

// redo brings back the change last undone.
func (wb *workbench) redo() {
	if s, ok := wb.daily.hist.Redo(); ok {
		wb.showState(s)
		wb.status.SetText("redone")
	}
}

// showState makes s the shown session and recomputes the figure.
func (wb *workbench) showState(s *core.Session) {
	epoch := s.Epoch != wb.sess.Epoch
	*wb.sess = *s
	wb.syncControls()
	wb.candList.Refresh()
	if epoch {
		wb.updateFeatures()
	} else {
		wb.features.Refresh() // the unit may have changed
	}
	wb.recompute()
}

// startDaily restores the window's size and dividers from the state
// directory, offers to recover an autosave a crashed run left, and then
// autosaves every change; closing the window saves its state and removes
// the autosave. dir is the state directory ("" to find it with
// core.StateDir).
func (wb *workbench) startDaily(a fyne.App, dir string) {
	if dir == "" {
		d, err := core.StateDir()
		if err != nil {
			wb.status.SetText(err.Error() + ": no autosave")
			wb.win.Resize(fyne.NewSize(1280, 800))
			return
		}
		dir = d
	}
	wb.daily.stateDir = dir
	wb.refreshRecent()
	size := fyne.NewSize(1280, 800)
	if ws, ok, err := core.LoadWindowState(dir); err != nil {
		wb.status.SetText(err.Error() + " (window state not restored)")
	} else if ok {
		size = fyne.NewSize(ws.Width, ws.Height)
		wb.daily.split.Offset, wb.daily.right.Offset = ws.Split, ws.RightSplit
		wb.daily.split.Refresh()
		wb.daily.right.Refresh()
	}
	wb.win.Resize(size)
	wb.win.SetCloseIntercept(wb.closeIntercept) // asks about unsaved candidates, then cleanExit
	if a != nil {
		a.Lifecycle().SetOnStopped(func() { wb.closeAutosave() })
	}
	rec, err := core.Recover(dir)
	switch {
	case err != nil:
		// Left in place for the analyst; autosave goes on beside it.
		wb.showError(fmt.Errorf("%w (the file is left as it is; autosave continues)", err))
		wb.startAutosave()
	case rec == nil:
		wb.startAutosave()
	default:
		msg := fmt.Sprintf("The workbench did not close cleanly. An autosave from %s holds\n%s.\nRecover it?",
			rec.Saved.Format("2 Jan 15:04:05"), describeSession(rec.Session))
		dialog.ShowConfirm("Recover unsaved work", msg, func(yes bool) {
			if yes {
				wb.recover(rec)
			} else if err := core.Discard(dir); err != nil {
				wb.status.SetText(err.Error())
			}
			wb.startAutosave()
		}, wb.win)
	}
}

// describeSession is one line about s for the recovery question.
func describeSession(s *core.Session) string {
	ds := "the built-in demo"
	if s.Dataset != core.DemoName {
		ds = s.Dataset
	}
	return fmt.Sprintf("%s, epoch %d, v_ph = %.3f c, T = %.0f K, %d candidate(s)",
		ds, s.Epoch+1, s.PhotosphereVelocity, s.Temperature, len(s.Candidates))
}

// startAutosave autosaves from now on (the recovery file is only written
// once the analyst has answered the recovery question).
func (wb *workbench) startAutosave() {
	if wb.daily.stateDir == "" || wb.daily.auto != nil {
		return
	}
	a, err := core.NewAutosaver(wb.daily.stateDir, 0)
	if err != nil {
		wb.status.SetText(err.Error())
		return
	}
	wb.daily.auto = a
	a.Changed(wb.sess)
}

// recover shows a recovered session: in this window when it belongs to
// the dataset shown (one undo step brings back what was shown), else by
// opening its dataset.
func (wb *workbench) recover(rec *core.Recovery) {
	done := func(err error) {
		if err != nil {
			wb.showError(err)
		}
		if wb.daily.recoverDone != nil {
			wb.daily.recoverDone(err)
		}
	}
	if rec.Session.Dataset == wb.bench.Name {
		if err := rec.Session.Validate(wb.bench.Data); err != nil {
			done(fmt.Errorf("%s: %w", rec.Path, err))
			return
		}
		wb.showState(rec.Session)
		wb.status.SetText("recovered the autosave of " + rec.Saved.Format("2 Jan 15:04:05"))
		done(nil)
		return
	}
	wb.stop()
	ctx, gen := wb.begin(true, "opening the autosaved session's dataset…")
	go func() {
		b, s, err := core.OpenSession(ctx, rec.Path, nil)
		fyne.Do(func() {
			if !wb.end(true, gen) {
				return
			}
			if err != nil {
				done(err)
				return
			}
			nw := newWorkbenchIn(wb.win, b, s)
			nw.done, nw.jobDone = wb.done, wb.jobDone
			nw.adoptDaily(wb)
			nw.recompute()
			done(nil)
		})
	}()
}

// adoptDaily carries the autosave and window state of old (whose window
// this workbench now fills) over to wb; the undo history starts afresh
// with the new dataset.
func (wb *workbench) adoptDaily(old *workbench) {
	wb.daily.auto, wb.daily.stateDir, wb.daily.recoverDone = old.daily.auto, old.daily.stateDir, old.daily.recoverDone
	if wb.daily.auto != nil {
		wb.daily.auto.Changed(wb.sess)
	}
}

// windowState is the window's geometry now.
func (wb *workbench) windowState() core.WindowState {
	sz := wb.win.Canvas().Size()
	return core.WindowState{Width: sz.Width, Height: sz.Height, Split: wb.daily.split.Offset, RightSplit: wb.daily.right.Offset}
}

// cleanExit saves the window state and ends autosaving, removing the
// recovery file.
func (wb *workbench) cleanExit() {
	if wb.daily.stateDir == "" {
		return
	}
	if err := core.SaveWindowState(wb.daily.stateDir, wb.windowState()); err != nil {
		fyne.LogError("window state", err)
	}
	wb.closeAutosave()
}

func (wb *workbench) closeAutosave() {
	if wb.daily.auto == nil {
		return
	}
	if err := wb.daily.auto.Close(); err != nil {
		fyne.LogError("autosave", err)
	}
	wb.daily.auto = nil
}
