package gui

import (
	"context"
	"errors"
	"fmt"
	"image"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"sync"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/app"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"broadline/app/core"
	"broadline/app/figure"
	"broadline/opacity/synth"
	"broadline/physics"
	"broadline/spectra"
)

// Run opens the desktop workbench on the built-in demo and blocks until it
// is closed.
func Run() error { return RunSession("") }

// RunSession opens the workbench on the session saved at path (its dataset
// with it), or on the built-in demo when path is empty, and runs until the
// window closes. A session that cannot be opened is an error before any
// window appears.
func RunSession(path string) error {
	var b *core.Bench
	var s *core.Session
	var err error
	if path == "" {
		if b, err = core.Demo(); err == nil {
			s = core.NewSession(b)
		}
	} else {
		b, s, err = core.OpenSession(context.Background(), path, nil)
	}
	if err != nil {
		return err
	}
	a := app.NewWithID("org.broadline.workbench")
	wb := newWorkbench(a, b, s)
	wb.startDaily(a, "") // window state, recovery, autosave (gui_history.go)
	wb.recompute()
	wb.win.ShowAndRun()
	return nil
}

// workbench is the main window: widgets that show a core.Session and a
// core.Bench. It only arranges widgets and calls the session and bench;
// every number it shows is computed in app/core and every figure drawn by
// app/figure.
type workbench struct {
	// daily is the undo history, autosave and window state (gui_history.go).
	daily dailyState
	win   fyne.Window
	bench *core.Bench
	sess  *core.Session

	epoch     *widget.Select
	velocity  *widget.Slider
	velLabel  *widget.Label
	temp      *widget.Slider
	tempLabel *widget.Label
	fractions *widget.Entry
	// innerFractions and boundary set the inner zone (empty: uniform
	// ejecta); zoneLabel says where the photosphere is, lineless names the
	// elements without lines.
	innerFractions *widget.Entry
	boundary       *widget.Entry
	zoneLabel      *widget.Label
	lineless       *widget.Label
	applyBtn       *widget.Button
	preview        *widget.Check
	status         *widget.Label
	busy           *widget.ProgressBarInfinite
	progress       *widget.ProgressBar // of a sweep or a comparison
	cancelBtn      *widget.Button
	candList       *widget.List
	figure         *canvas.Image
	features       *widget.Table
	featRows       []spectra.Feature
	// featAttr holds the model's identification of each feature, for the
	// model that was shown when Identify was pressed; nil until then.
	featAttr []*synth.Attribution

	mu        sync.Mutex
	modelSlot slot // the computation of the figure
	toolSlot  slot // a sweep, comparison, identification or dataset load
	// done, if set, is called on the UI goroutine after each computation
	// finishes (tests wait on it); jobDone likewise after each sweep or
	// comparison, with its result or error.
	done    func(*core.Overlay, error)
	jobDone func(any, error)
	// compared is the last comparison shown, current the figure shown in
	// the window: each with its caption, for export.
	compared, current *figure.Captioned
	// without is the element (Z) whose knock-out the figure also shows,
	// 0 for none; knockSel chooses it.
	without  int
	knockSel *widget.Select
	knockZ   map[string]int // knockSel's options → Z (0: none)
	// syncing is true while syncControls sets the controls from the
	// session, so that their callbacks change nothing.
	syncing bool
	// plotCard and tableCard are the spectrum and features panels, split
	// by split (tests move its divider).
	plotCard, tableCard *widget.Card
	split               *container.Split
	// savedCands are the candidates as last saved or opened: quitting
	// with others asks first.
	savedCands []core.Candidate
	// recentItem is Session ▸ Open recent, its sub-menu the recent files.
	recentItem *fyne.MenuItem
	// exportSize names the figure.Size exports are written at.
	exportSize string
	// comp holds the composition's element rows (gui_composition.go).
	comp compRows
	// note is a sentence the next model's status line starts with (what
	// an epoch switch set), then cleared.
	note    string
	unitSel *widget.Select // wavelength unit of the figure and the table
	// lastKnock is the knock-out overlay of the last computation (nil
	// when none was asked for); tests read it.
	lastKnock *core.Overlay
	// attrFor is the model featAttr was made with.
	attrFor core.Model
	// plot is the interactive plot: view, axis, panels, ticks, readout
	// (gui_plot.go).
	plot plotState
}

// newWorkbench builds the window in app a for bench b and session s.
func newWorkbench(a fyne.App, b *core.Bench, s *core.Session) *workbench {
	return newWorkbenchIn(a.NewWindow("broadline"), b, s)
}

// newWorkbenchIn fills window win with the workbench for bench b and
// session s (replacing what it showed).
func newWorkbenchIn(win fyne.Window, b *core.Bench, s *core.Session) *workbench {
	wb := &workbench{win: win, bench: b, sess: s}
	sc := b.Data
	if b.Name != core.DemoName {
		win.SetTitle("broadline — " + sc.Object)
	}

	var epochs []string
	for _, ep := range sc.Epochs {
		epochs = append(epochs, fmt.Sprintf("%g d", ep.Days))
	}
	wb.epoch = widget.NewSelect(epochs, func(string) {
		i := wb.epoch.SelectedIndex()
		if i < 0 || i == wb.sess.Epoch || wb.syncing {
			return
		}
		msg, err := wb.sess.SwitchEpoch(wb.bench.Data, i)
		if err != nil {
			wb.status.SetText(err.Error())
			return
		}
		// The selector lets go of the keyboard, so that arrow keys over
		// the plot do not change the epoch.
		wb.win.Canvas().Unfocus()
		wb.syncControls()
		wb.updateFeatures()
		wb.note = msg
		wb.recompute()
	})

	wb.velLabel = widget.NewLabel("")
	wb.velocity = widget.NewSlider(core.MinVelocity, core.MaxVelocity(sc))
	wb.velocity.Step = 0.001 // 300 km/s
	wb.velocity.OnChanged = func(v float64) {
		if !wb.syncing {
			wb.sess.PhotosphereVelocity = v
			wb.showValues()
		}
	}
	wb.velocity.OnChangeEnded = func(float64) {
		if !wb.syncing {
			wb.recompute()
		}
	}

	wb.tempLabel = widget.NewLabel("")
	wb.temp = widget.NewSlider(core.MinTemperature, core.MaxTemperature)
	wb.temp.Step = 50
	wb.temp.OnChanged = func(v float64) {
		if !wb.syncing {
			wb.sess.Temperature = v
			wb.showValues()
		}
	}
	wb.temp.OnChangeEnded = func(float64) {
		if !wb.syncing {
			wb.recompute()
		}
	}
	sweep := widget.NewButton("Sweep velocity…", func() { wb.sweepDialog(core.Velocity) })
	sweepT := widget.NewButton("Sweep temperature…", func() { wb.sweepDialog(core.Temperature) })

	wb.fractions = widget.NewMultiLineEntry()
	wb.fractions.Wrapping = fyne.TextWrapWord
	wb.fractions.SetMinRowsVisible(3)
	wb.innerFractions = widget.NewMultiLineEntry()
	wb.innerFractions.Wrapping = fyne.TextWrapWord
	wb.innerFractions.SetMinRowsVisible(2)
	wb.innerFractions.SetPlaceHolder("empty: the same mix at every velocity")
	wb.boundary = widget.NewEntry()
	wb.boundary.SetPlaceHolder("e.g. 0.16c or 48000km/s")
	wb.zoneLabel = widget.NewLabel("")
	wb.zoneLabel.Wrapping = fyne.TextWrapWord
	wb.lineless = widget.NewLabel("")
	wb.lineless.Wrapping = fyne.TextWrapWord
	wb.lineless.TextStyle = fyne.TextStyle{Italic: true}
	apply := widget.NewButton("Apply composition", func() { wb.applyComposition() })
	wb.applyBtn = apply
	fitBtn := widget.NewButton("Fit the composition…", func() { wb.fitDialog() })
	rowsPanel := wb.newCompRows()
	wb.preview = widget.NewCheck("Absorption-only preview (fast, approximate)", func(on bool) {
		if on != wb.sess.Preview {
			wb.sess.Preview = on
			wb.recompute()
		}
	})
	keep := widget.NewButton("Keep as candidate", func() {
		if err := wb.keepCandidate(); err != nil {
			wb.showError(err)
		}
	})
	wb.candList = widget.NewList(
		func() int { return len(wb.sess.Candidates) },
		func() fyne.CanvasObject {
			l := widget.NewLabel("")
			l.Truncation = fyne.TextTruncateEllipsis
			return container.NewBorder(nil, nil, nil,
				container.NewHBox(widget.NewButton("Show", nil), widget.NewButton("Remove", nil)), l)
		},
		func(i widget.ListItemID, o fyne.CanvasObject) {
			c := o.(*fyne.Container)
			c.Objects[0].(*widget.Label).SetText(wb.candidateText(i))
			btns := c.Objects[1].(*fyne.Container).Objects
			btns[0].(*widget.Button).OnTapped = func() { wb.showCandidate(i) }
			btns[1].(*widget.Button).OnTapped = func() { wb.removeCandidate(i) }
		})
	candScroll := container.NewVScroll(wb.candList)
	candScroll.SetMinSize(fyne.NewSize(0, 120))
	reset := widget.NewButton("Reset to the dataset's values", func() {
		wb.sess.Model = wb.bench.Data.StartModel(wb.sess.Epoch)
		wb.syncControls()
		wb.recompute()
	})

	wb.status = widget.NewLabel("")
	wb.status.Wrapping = fyne.TextWrapWord
	wb.busy = widget.NewProgressBarInfinite()
	wb.busy.Hide()
	wb.progress = widget.NewProgressBar()
	wb.progress.Hide()
	wb.cancelBtn = widget.NewButton("Cancel", func() { wb.stop() })
	wb.cancelBtn.Hide()

	banner := widget.NewLabel(sc.Object + " — " + sc.Label())
	banner.Wrapping = fyne.TextWrapWord
	banner.TextStyle = fyne.TextStyle{Italic: true}

	controls := container.NewVBox(
		widget.NewLabelWithStyle("Epoch", fyne.TextAlignLeading, fyne.TextStyle{Bold: true}), wb.epoch,
		widget.NewLabelWithStyle("Photosphere velocity", fyne.TextAlignLeading, fyne.TextStyle{Bold: true}), wb.velocity, wb.velLabel, sweep,
		widget.NewLabelWithStyle("Photosphere temperature", fyne.TextAlignLeading, fyne.TextStyle{Bold: true}), wb.temp, wb.tempLabel, sweepT,
		widget.NewLabelWithStyle("Mass fractions", fyne.TextAlignLeading, fyne.TextStyle{Bold: true}), wb.fractions,
		widget.NewLabel("Inner zone: its own mass fractions, up to the boundary"), wb.innerFractions,
		container.NewBorder(nil, nil, widget.NewLabel("boundary"), nil, wb.boundary), wb.zoneLabel,
		apply, fitBtn, wb.lineless,
		widget.NewAccordion(widget.NewAccordionItem("Element by element", rowsPanel)),
		wb.preview, reset,
		widget.NewSeparator(),
		widget.NewLabelWithStyle("Candidates", fyne.TextAlignLeading, fyne.TextStyle{Bold: true}), keep, candScroll,
	)
	// The state of the computation stays in view below the scrolling
	// controls.
	state := container.NewVBox(widget.NewSeparator(), wb.busy, wb.progress, wb.cancelBtn, wb.status)
	model := widget.NewCard("Ejecta model", "", container.NewBorder(nil, state, nil, nil, container.NewVScroll(controls)))

	wb.figure = canvas.NewImageFromImage(image.NewRGBA(image.Rect(0, 0, 1, 1)))
	wb.figure.FillMode = canvas.ImageFillContain
	// Small enough that the divider above the features table moves both
	// ways at 1280×800 (with the plot's row of controls under it); the
	// figure keeps its aspect (ImageFillContain).
	wb.figure.SetMinSize(fyne.NewSize(480, 80))
	knockOpts, knockZ := knockOutChoices(b)
	wb.knockZ = knockZ
	wb.knockSel = widget.NewSelect(knockOpts, func(v string) {
		z := knockZ[v]
		wb.sess.KnockOut = ""
		if z > 0 {
			wb.sess.KnockOut = v
		}
		if z != wb.without {
			wb.without = z
			if !wb.syncing {
				wb.recompute()
			}
		}
	})
	wb.syncKnockOut()
	var unitNames []string
	for _, k := range core.WaveUnitKeys {
		unitNames = append(unitNames, core.WaveUnits[k].Name)
	}
	wb.unitSel = widget.NewSelect(unitNames, func(v string) {
		for _, k := range core.WaveUnitKeys {
			if core.WaveUnits[k].Name == v && core.UnitOf(wb.sess.WavelengthUnit) != core.WaveUnits[k] {
				wb.sess.WavelengthUnit = k
				wb.features.Refresh()
				wb.recompute()
			}
		}
	})
	wb.unitSel.SetSelected(core.UnitOf(s.WavelengthUnit).Name)
	knockRow := container.NewBorder(nil, nil, widget.NewLabel("Also draw the model without the lines of"),
		container.NewHBox(widget.NewLabel("wavelengths in"), wb.unitSel), wb.knockSel)
	plotArea, plotBar := wb.newPlotControls() // gui_plot.go
	plot := widget.NewCard("Spectrum", "", container.NewBorder(container.NewVBox(banner, knockRow), plotBar, nil, nil, plotArea))

	wb.features = widget.NewTableWithHeaders(
		func() (int, int) { return len(wb.featRows), 6 },
		func() fyne.CanvasObject {
			l := widget.NewLabel("0.000000 µm")
			l.Truncation = fyne.TextTruncateEllipsis
			return l
		},
		func(id widget.TableCellID, o fyne.CanvasObject) {
			o.(*widget.Label).SetText(wb.featureCell(id.Row, id.Col))
		})
	wb.features.CreateHeader = func() fyne.CanvasObject { return widget.NewLabel("significance") }
	wb.features.UpdateHeader = func(id widget.TableCellID, o fyne.CanvasObject) {
		if id.Row < 0 {
			u := core.UnitOf(wb.sess.WavelengthUnit).Name
			o.(*widget.Label).SetText([]string{"minimum (" + u + ")", "depth", "width (" + u + ")", "significance (σ)",
				"model: elements (share)", "model: strongest lines (rest λ, τ)"}[id.Col])
		} else {
			o.(*widget.Label).SetText(strconv.Itoa(id.Row + 1))
		}
	}
	for c, w := range []float32{130, 90, 110, 130, 330, 700} {
		wb.features.SetColumnWidth(c, w)
	}
	identify := widget.NewButton("Identify with the model", func() { wb.startIdentify() })
	exportTable := widget.NewButton("Export table…", func() { wb.exportFeaturesDialog() })
	note := widget.NewLabel("Absorption minima of the observed spectrum. Which model elements and lines absorb there is a hypothesis (Help ▸ About the model).")
	note.Wrapping = fyne.TextWrapWord
	table := widget.NewCard("Features", "", container.NewBorder(
		container.NewBorder(nil, nil, nil, container.NewHBox(identify, exportTable), note), nil, nil, nil, wb.features))

	right := container.NewVSplit(plot, table)
	right.Offset = 0.64
	wb.plotCard, wb.tableCard, wb.split = plot, table, right
	split := container.NewHSplit(model, right)
	split.Offset = 0.26
	wb.win.SetContent(split)
	wb.recentItem = fyne.NewMenuItem("Open recent", nil)
	wb.recentItem.ChildMenu = fyne.NewMenu("")
	wb.win.SetMainMenu(fyne.NewMainMenu(
		fyne.NewMenu("Session",
			fyne.NewMenuItem("Open dataset…", func() { wb.openDatasetDialog() }),
			fyne.NewMenuItem("Add a spectrum…", func() { wb.addSpectrumDialog() }),
			fyne.NewMenuItem("Open line lists…", func() { wb.openLinesDialog() }),
			wb.recentItem,
			fyne.NewMenuItem("Save dataset…", func() { wb.saveDatasetDialog() }),
			fyne.NewMenuItem("Open session…", func() { wb.openDialog() }),
			fyne.NewMenuItem("Save session…", func() { wb.saveDialog() }),
		),
		fyne.NewMenu("Figure", append([]*fyne.MenuItem{
			fyne.NewMenuItem("Export the shown figure…", func() { wb.exportDialog() }),
			fyne.NewMenuItem("Compare candidates and export…", func() { wb.startComparison() }),
		}, wb.plotMenuItems()...)...), // and the plot's switches (gui_plot.go)
		fyne.NewMenu("Help",
			fyne.NewMenuItem("About the model…", func() { showModelHelp(wb.win) }),
			fyne.NewMenuItem("Keyboard and mouse…", func() { wb.showShortcuts() }),
		),
	))
	wb.savedCands = slices.Clone(s.Candidates)
	wb.win.SetCloseIntercept(wb.closeIntercept)
	wb.win.SetOnDropped(wb.dropped)
	wb.syncControls()
	wb.updateFeatures()
	wb.installDaily(split, right)
	wb.installPlotKeys()
	return wb
}

// syncControls sets every control from the session. The sliders' knobs
// move to the nearest step, but the session keeps its exact values (a
// fitted 0.2387 c stays 0.2387 c) and nothing is recomputed: the caller
// decides that.
func (wb *workbench) syncControls() {
	wb.syncing = true
	defer func() { wb.syncing = false }()
	wb.epoch.SetSelectedIndex(wb.sess.Epoch)
	wb.velocity.SetValue(wb.sess.PhotosphereVelocity)
	wb.temp.SetValue(wb.sess.Temperature)
	wb.fractions.SetText(wb.sess.MassFractions.String())
	wb.innerFractions.SetText(wb.sess.InnerMassFractions.String())
	wb.boundary.SetText(wb.sess.BoundaryText())
	wb.preview.SetChecked(wb.sess.Preview)
	wb.unitSel.SetSelected(core.UnitOf(wb.sess.WavelengthUnit).Name)
	wb.syncKnockOut()
	wb.syncRows()
	wb.showValues()
}

// syncKnockOut selects the session's knock-out element, or nothing when
// the session has none or the line lists have no lines of it.
func (wb *workbench) syncKnockOut() {
	was := wb.syncing
	wb.syncing = true
	defer func() { wb.syncing = was }()
	want := wb.sess.KnockOut
	if _, ok := wb.knockZ[want]; ok && want != "" {
		wb.knockSel.SetSelected(want)
		return
	}
	wb.knockSel.SetSelectedIndex(0)
	if want != "" {
		wb.status.SetText("the session's knock-out " + want + " has no lines in these line lists: none drawn")
	}
}

func (wb *workbench) showValues() {
	wb.velLabel.SetText(fmt.Sprintf("%.3f c  (%.0f km/s)", wb.sess.PhotosphereVelocity, wb.sess.PhotosphereVelocity*physics.SpeedOfLightKmS))
	wb.showComposition() // the photosphere may have crossed the zone boundary
	wb.tempLabel.SetText(fmt.Sprintf("%.0f K", wb.sess.Temperature))
}

// updateFeatures finds the absorption features of the shown epoch.
func (wb *workbench) updateFeatures() {
	keep, err := wb.bench.Features(wb.sess.Epoch)
	if err != nil {
		keep = nil
		wb.status.SetText("feature search: " + err.Error())
	}
	wb.featRows = keep
	wb.featAttr = nil
	wb.features.Refresh()
}

// featureCell is the text of the feature table's cell (row, col).
func (wb *workbench) featureCell(row, col int) string {
	f := wb.featRows[row]
	if col >= 4 {
		if wb.featAttr == nil {
			return "(press Identify)"
		}
		if col == 4 {
			return core.ElementsText(wb.featAttr[row])
		}
		return core.LinesText(wb.featAttr[row])
	}
	switch col {
	case 0:
		u := core.UnitOf(wb.sess.WavelengthUnit)
		return strconv.FormatFloat(f.Wavelength*u.PerA, 'f', u.Decimals, 64)
	case 1:
		return fmt.Sprintf("%.3f", f.Depth)
	case 2:
		u := core.UnitOf(wb.sess.WavelengthUnit)
		return strconv.FormatFloat(f.Width*u.PerA, 'f', u.Decimals, 64)
	default:
		return fmt.Sprintf("%.1f", f.Significance)
	}
}

// slot is one kind of background computation: the model behind the
// figure, or a tool (sweep, comparison, identification, opening a dataset).
// A new computation cancels the running one of its own slot only, so a
// tool never leaves the figure behind the session.
type slot struct {
	cancel context.CancelFunc // of the running computation, if any
	gen    int                // generation of the latest request
}

// begin makes a new computation the current one of its slot (the tool slot
// when tool is true, else the model's), cancelling the one it replaces,
// and shows that it runs: the progress bar for a tool, the indeterminate
// bar for the model. It returns the computation's context and generation.
func (wb *workbench) begin(tool bool, what string) (context.Context, int) {
	wb.mu.Lock()
	sl := wb.slotOf(tool)
	if sl.cancel != nil {
		sl.cancel()
	}
	ctx, cancel := context.WithCancel(context.Background())
	sl.cancel = cancel
	sl.gen++
	gen := sl.gen
	wb.mu.Unlock()
	if tool {
		wb.progress.SetValue(0)
		wb.progress.Show()
	} else {
		wb.busy.Show()
		wb.busy.Start()
	}
	wb.cancelBtn.Show()
	wb.status.SetText(what)
	return ctx, gen
}

func (wb *workbench) slotOf(tool bool) *slot {
	if tool {
		return &wb.toolSlot
	}
	return &wb.modelSlot
}

// end reports whether computation gen is still the current one of its
// slot, and if so clears the signs that it runs.
func (wb *workbench) end(tool bool, gen int) bool {
	wb.mu.Lock()
	sl := wb.slotOf(tool)
	latest := gen == sl.gen
	if latest {
		sl.cancel = nil
	}
	idle := wb.modelSlot.cancel == nil && wb.toolSlot.cancel == nil
	wb.mu.Unlock()
	if latest {
		if tool {
			wb.progress.Hide()
		} else {
			wb.busy.Stop()
			wb.busy.Hide()
		}
		if idle {
			wb.cancelBtn.Hide()
		}
	}
	return latest
}

// progressFunc returns a progress callback for tool computation gen that
// moves the progress bar on the UI goroutine.
func (wb *workbench) progressFunc(gen int) func(done, total int) {
	return func(done, total int) {
		fyne.Do(func() {
			wb.mu.Lock()
			latest := gen == wb.toolSlot.gen
			wb.mu.Unlock()
			if latest {
				wb.progress.SetValue(float64(done) / float64(total))
			}
		})
	}
}

// recompute starts the synthesis for the current session off the UI
// goroutine, cancelling any computation still running.
func (wb *workbench) recompute() {
	wb.noteChange() // undo history and autosave (gui_history.go)
	ctx, gen := wb.begin(false, "computing…")
	if wb.featAttr != nil && wb.attrFor != wb.sess.Model {
		wb.featAttr = nil // made for another model
		wb.features.Refresh()
	}
	m := wb.sess.Model // the goroutine works on copies
	without := wb.without
	disp, species := wb.display(), slices.Clone(wb.plot.species) // gui_plot.go
	go func() {
		ov, err := wb.bench.Compute(ctx, m, 0)
		var knock *core.Overlay
		if err == nil && without > 0 {
			knock, err = wb.bench.Compute(ctx, m, without)
		}
		var ticks []figure.LineTicks
		var tickErr error
		if err == nil {
			ticks, tickErr = lineTicks(ctx, wb.bench, m, species)
		}
		var pic *picture
		if err == nil {
			if pic, err = modelPicture(wb.bench, m, ov, knock, without, ticks, disp); err == nil {
				pic.tickErr = tickErr
			}
		}
		fyne.Do(func() { wb.finish(gen, m, ov, knock, pic, err) })
	}()
}

// knockOutChoices lists the elements that have lines in b's store, for the
// knock-out selector: "nothing" first, then the symbols by Z, with each
// choice's Z.
func knockOutChoices(b *core.Bench) ([]string, map[string]int) {
	opts := []string{"nothing"}
	zs := map[string]int{"nothing": 0}
	syms, z := b.KnockOutChoices()
	for i, sym := range syms {
		opts = append(opts, sym)
		zs[sym] = z[i]
	}
	return opts, zs
}

// applyComposition takes the composition entries (the mix, the inner
// zone's mix and its boundary) into the session, or says what is wrong
// with them and changes nothing.
func (wb *workbench) applyComposition() {
	m, err := wb.sess.Model.WithCompositions(wb.bench.Data, wb.fractions.Text, wb.innerFractions.Text, wb.boundary.Text)
	if err != nil {
		wb.status.SetText("mass fractions not applied: " + err.Error())
		return
	}
	wb.sess.Model = m
	wb.fractions.SetText(m.MassFractions.String())
	wb.innerFractions.SetText(m.InnerMassFractions.String())
	wb.boundary.SetText(m.BoundaryText())
	wb.showComposition()
	wb.recompute()
}

// showComposition sets the labels under the composition entries: where the
// photosphere lies with respect to the inner zone, and which elements have
// no lines.
func (wb *workbench) showComposition() {
	z := wb.sess.ZoneText()
	if z == "" {
		z = "uniform ejecta: one mix at every velocity"
	}
	wb.zoneLabel.SetText(z)
	wb.lineless.SetText(core.LinelessText(wb.bench.Lineless(wb.sess.Model)))
}

// finish shows a computation's result, unless a newer one has been asked
// for.
func (wb *workbench) finish(gen int, s core.Model, ov, knock *core.Overlay, pic *picture, err error) {
	if !wb.end(false, gen) {
		return
	}
	if err == nil {
		wb.current, wb.lastKnock = pic.shown, knock
		wb.plotComputed(s, pic) // gui_plot.go
	}
	switch {
	case errors.Is(err, context.Canceled):
		wb.status.SetText("cancelled")
	case err != nil:
		wb.status.SetText("error: " + err.Error())
	default:
		wb.figure.Image = pic.img
		wb.figure.Refresh()
		msg := fmt.Sprintf("v_ph = %.3f c, T = %.0f K: χ²/N = %.2f over %d unmasked samples", s.PhotosphereVelocity, s.Temperature, ov.Reduced(), ov.N)
		if wb.note != "" {
			msg = wb.note + "\n" + msg
			wb.note = ""
		}
		if ov.Preview {
			msg += " (absorption-only preview: an approximation)"
		}
		for _, w := range ov.Warnings {
			msg += "\n• " + w
		}
		wb.status.SetText(msg)
	}
	if wb.done != nil {
		wb.done(ov, err)
	}
}

// stop cancels the running computations (model and tool).
func (wb *workbench) stop() {
	wb.mu.Lock()
	for _, sl := range []*slot{&wb.modelSlot, &wb.toolSlot} {
		if sl.cancel != nil {
			sl.cancel()
		}
	}
	wb.mu.Unlock()
}

// saveDialog asks for a path and saves the session there atomically (a
// temporary file renamed over the old one, so a failed save loses nothing).
func (wb *workbench) saveDialog() {
	if wb.bench.Unsaved() {
		wb.showError(errors.New("the dataset has a spectrum added since it was read: save it first (Session ▸ Save dataset…), so that the session can be opened again"))
		return
	}
	path := widget.NewEntry()
	path.SetText(inWorkDir("session.json"))
	dialog.ShowForm("Save session", "Save", "Cancel",
		[]*widget.FormItem{widget.NewFormItem("File", wb.browse(path, true, false))},
		func(ok bool) {
			if !ok {
				return
			}
			wb.confirmOverwrite(path.Text, func() {
				if err := wb.sess.Save(path.Text); err != nil {
					wb.showError(err)
					return
				}
				wb.savedCands = slices.Clone(wb.sess.Candidates)
				wb.status.SetText("session saved to " + path.Text)
				wb.noteRecent(path.Text, "session")
			})
		}, wb.win)
}

// openDialog asks for a saved session and shows it; a file that does not
// fit the dataset is refused with its reason and changes nothing.
func (wb *workbench) openDialog() {
	path := widget.NewEntry()
	path.SetText(inWorkDir("session.json"))
	dialog.ShowForm("Open session", "Open", "Cancel",
		[]*widget.FormItem{widget.NewFormItem("File", wb.browse(path, false, false))},
		func(ok bool) {
			if ok {
				if err := wb.openSession(path.Text); err != nil {
					wb.showError(err)
				}
			}
		}, wb.win)
}

// openSession replaces the shown session by the one saved at path.
func (wb *workbench) openSession(path string) error {
	s, err := core.LoadSession(path, wb.bench)
	if err != nil {
		return err
	}
	*wb.sess = *s
	wb.savedCands = slices.Clone(s.Candidates)
	wb.syncControls()
	wb.updateFeatures()
	wb.candList.Refresh()
	wb.recompute()
	wb.noteRecent(path, "session")
	return nil
}

// inWorkDir is name in the working directory (or name alone when that is
// unknown): where the file dialogs start.
func inWorkDir(name string) string {
	dir, err := os.Getwd()
	if err != nil {
		return name
	}
	return filepath.Join(dir, name)
}

// showModelHelp opens the dialog that states the model's approximations.
func showModelHelp(w fyne.Window) {
	dialog.ShowCustom("About the model", "Close", modelHelp(), w)
}

// modelHelp is the scrolling page of Help ▸ About the model: one wrapped
// label per heading, list item and paragraph of core.ModelCautions. (A
// Markdown rich text mixing bold and plain segments in list items broke
// words mid-word and, further down, put one letter per row in a dialog.)
func modelHelp() fyne.CanvasObject {
	box := container.NewVBox()
	for _, p := range helpParagraphs(core.ModelCautions) {
		l := widget.NewLabel(p.text)
		l.Wrapping = fyne.TextWrapWord
		if p.heading {
			l.TextStyle = fyne.TextStyle{Bold: true}
		}
		box.Add(l)
	}
	scroll := container.NewVScroll(box)
	scroll.SetMinSize(fyne.NewSize(640, 460))
	return scroll
}

// helpParagraph is a heading, list item ("• …") or paragraph of the help.
type helpParagraph struct {
	text    string
	heading bool
}

// helpParagraphs splits the Markdown of the help into paragraphs: "## "
// lines are headings, "- " starts a list item, a blank line ends a
// paragraph, other lines continue the one before; bold marks are dropped.
func helpParagraphs(md string) []helpParagraph {
	var out []helpParagraph
	var cur []string
	flush := func() {
		if len(cur) > 0 {
			out = append(out, helpParagraph{text: strings.Join(cur, " ")})
			cur = nil
		}
	}
	for _, line := range strings.Split(strings.ReplaceAll(md, "**", ""), "\n") {
		line = strings.TrimSpace(line)
		switch {
		case line == "":
			flush()
		case strings.HasPrefix(line, "## "):
			flush()
			out = append(out, helpParagraph{text: strings.TrimPrefix(line, "## "), heading: true})
		case strings.HasPrefix(line, "- "):
			flush()
			cur = []string{"• " + strings.TrimPrefix(line, "- ")}
		default:
			cur = append(cur, line)
		}
	}
	flush()
	return out
}

// plainHelp is the help text without its Markdown marks, as it reads.
func plainHelp(md string) string {
	return strings.NewReplacer("**", "", "## ", "", "- ", "").Replace(md)
}
