package gui

import (
	"context"
	"errors"
	"fmt"
	"image"
	"os"
	"slices"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"

	"broadline/app/core"
	"broadline/app/figure"
	"broadline/linelists"
	"broadline/opacity/synth"
	"broadline/spectra"
)

// The workbench's tools beyond the live model: the velocity sweep, the kept
// candidates, the comparison figure and the export, the identification of
// the features and opening a dataset. Each tool runs in the tool slot
// (gui.go), beside the model's computation. As in gui.go, the numbers come
// from the bench (sweep.go, compare.go, identify.go, dataset.go).

// sweepDialog asks for the range and number of values of a sweep of
// parameter p.
func (wb *workbench) sweepDialog(p core.Param) {
	from, to := widget.NewEntry(), widget.NewEntry()
	var title, hint string
	if p == core.Temperature {
		t := wb.sess.Temperature
		from.SetText(fmt.Sprintf("%.0f", max(core.MinTemperature, t-1500)))
		to.SetText(fmt.Sprintf("%.0f", min(core.MaxTemperature, t+1500)))
		title, hint = "Sweep the photosphere temperature", "Temperatures in K."
	} else {
		v := wb.sess.PhotosphereVelocity
		from.SetText(fmt.Sprintf("%.3gc", max(core.MinVelocity, v-0.08)))
		to.SetText(fmt.Sprintf("%.3gc", min(core.MaxVelocity(wb.bench.Data), v+0.08)))
		title, hint = "Sweep the photosphere velocity", "Velocities as 0.2c or 60000km/s."
	}
	steps := widget.NewEntry()
	steps.SetText("17")
	dialog.ShowForm(title, "Sweep", "Cancel",
		[]*widget.FormItem{
			widget.NewFormItem("From", from),
			widget.NewFormItem("To", to),
			widget.NewFormItem("Values", steps),
			widget.NewFormItem("", widget.NewLabel("Everything else stays as set; each value is a full synthesis\n(or the preview, if it is switched on). "+hint)),
		},
		func(ok bool) {
			if !ok {
				return
			}
			parse := core.ParseVelocity
			if p == core.Temperature {
				parse = func(s string) (float64, error) {
					x, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
					if err != nil {
						return 0, fmt.Errorf("temperature %q: want a number of K", s)
					}
					return x, nil
				}
			}
			lo, err1 := parse(from.Text)
			hi, err2 := parse(to.Text)
			n, err3 := strconv.Atoi(strings.TrimSpace(steps.Text))
			if err := errors.Join(err1, err2, err3); err != nil {
				wb.showError(err)
				return
			}
			wb.startSweep(p, lo, hi, n)
		}, wb.win)
}

// startSweep runs a sweep of parameter p off the UI goroutine with a
// progress bar; Cancel (or another tool) stops it.
func (wb *workbench) startSweep(p core.Param, lo, hi float64, steps int) {
	ctx, gen := wb.begin(true, fmt.Sprintf("sweeping %s at %d values from %s to %s…", p.Name(), steps, p.Describe(lo), p.Describe(hi)))
	m := wb.sess.Model
	go func() {
		sw, err := wb.bench.Sweep(ctx, m, p, lo, hi, steps, wb.progressFunc(gen))
		var img image.Image
		if err == nil {
			fig, ferr := figure.Sweep(sw)
			if ferr != nil {
				err = ferr
			} else {
				img = figure.Render(fig, 640, 380)
			}
		}
		fyne.Do(func() { wb.finishSweep(gen, sw, img, err) })
	}()
}

// finishSweep shows a sweep's curve and offers its best value.
func (wb *workbench) finishSweep(gen int, sw *core.Sweep, img image.Image, err error) {
	wb.finishTool(gen, sw, err, func() { wb.showSweep(sw, img) })
}

// showSweep reports a finished sweep and opens its dialog.
func (wb *workbench) showSweep(sw *core.Sweep, img image.Image) {
	p := sw.Param
	other := fmt.Sprintf("T_ph = %s", core.Temperature.Describe(sw.At.Temperature))
	if p == core.Temperature {
		other = fmt.Sprintf("v_ph = %s", core.Velocity.Describe(sw.At.PhotosphereVelocity))
	}
	msg := fmt.Sprintf("%s sweep at %s (epoch %d): χ²/N is least (%.2f) near %s = %s", p.Name(), other, sw.At.Epoch+1,
		sw.BestChi2N, p.Name(), p.Describe(sw.Best))
	if sw.AtEdge {
		msg += " — at the end of the range: the minimum may lie outside it; widen the range"
	}
	if sw.At.Preview {
		msg += " (absorption-only preview)"
	}
	wb.status.SetText(msg)
	if img == nil {
		return
	}
	fig := canvas.NewImageFromImage(img)
	fig.FillMode = canvas.ImageFillContain
	fig.SetMinSize(fyne.NewSize(640, 380))
	use := widget.NewButton(fmt.Sprintf("Use %s = %s", p.Name(), p.Describe(sw.Best)), nil)
	d := dialog.NewCustom("Sweep", "Close", container.NewBorder(widget.NewLabel(msg), use, nil, nil, fig), wb.win)
	use.OnTapped = func() {
		d.Hide()
		wb.useSweep(sw)
	}
	d.Show()
}

// useSweep sets the swept parameter to the sweep's best value as the
// button gives it (to 1 K or 0.001 c; the slider's knob goes to its
// nearest step, the session keeps the value), and recomputes; a sweep made
// for another model (its other parameters since changed) is refused with
// the reason.
func (wb *workbench) useSweep(sw *core.Sweep) {
	if !sw.Matches(wb.sess.Model) {
		wb.status.SetText("the sweep was made for another model (epoch, composition or the other photosphere value changed): sweep again")
		return
	}
	sl := wb.velocity
	if sw.Param == core.Temperature {
		sl = wb.temp
	}
	v := min(max(sw.Param.Round(sw.Best), sl.Min), sl.Max)
	wb.sess.Model = sw.With(wb.sess.Model, v)
	wb.syncControls()
	wb.recompute()
}

// finishTool ends tool computation gen on the UI goroutine: unless a newer
// tool has started meanwhile, it reports err (cancelled or failed) or calls
// show, then tells the test hook jobDone the result.
func (wb *workbench) finishTool(gen int, result any, err error, show func()) {
	if !wb.end(true, gen) {
		return
	}
	if err != nil {
		wb.showJobError(err)
	} else {
		show()
	}
	if wb.jobDone != nil {
		wb.jobDone(result, err)
	}
}

// showJobError reports a failed or cancelled tool computation.
func (wb *workbench) showJobError(err error) {
	if errors.Is(err, context.Canceled) {
		wb.status.SetText("cancelled")
		return
	}
	wb.status.SetText("error: " + core.UserMessage(err))
}

// showError shows err in a dialog, in the words of core.UserMessage (no
// package prefixes or temporary file names).
func (wb *workbench) showError(err error) {
	dialog.ShowError(errors.New(core.UserMessage(err)), wb.win)
}

// keepCandidate keeps the current model as a candidate with the next free
// label.
func (wb *workbench) keepCandidate() error {
	c, err := wb.sess.Keep()
	if err != nil {
		return err
	}
	wb.candList.Refresh()
	wb.noteChange()
	wb.status.SetText(fmt.Sprintf("kept the current model as candidate %s", c.Label))
	return nil
}

// candidateText is a candidate's line in the list: what sets it apart
// from the other candidates (core.CandidateRows).
func (wb *workbench) candidateText(i int) string {
	if i < 0 || i >= len(wb.sess.Candidates) {
		return ""
	}
	return core.CandidateRows(wb.bench.Data, wb.sess.Candidates)[i]
}

// showCandidate makes candidate i the current model.
func (wb *workbench) showCandidate(i int) {
	if i < 0 || i >= len(wb.sess.Candidates) {
		return
	}
	wb.sess.Model = wb.sess.Candidates[i].Model
	wb.syncControls()
	wb.updateFeatures()
	wb.recompute()
}

// removeCandidate forgets candidate i.
func (wb *workbench) removeCandidate(i int) {
	if i < 0 || i >= len(wb.sess.Candidates) {
		return
	}
	wb.sess.Candidates = append(wb.sess.Candidates[:i:i], wb.sess.Candidates[i+1:]...)
	wb.candList.Refresh()
	wb.noteChange()
}

// startComparison computes every candidate at the shown epoch off the UI
// goroutine (those kept at another epoch with their mix at the current
// photosphere) and shows their figure for export.
func (wb *workbench) startComparison() {
	ctx, gen := wb.begin(true, "computing the candidates at this epoch…")
	cands := append([]core.Candidate(nil), wb.sess.Candidates...)
	at, unit := wb.sess.Model, core.UnitOf(wb.sess.WavelengthUnit)
	go func() {
		var shown *figure.Captioned
		var img image.Image
		cmp, err := wb.bench.CompareAt(ctx, cands, at, wb.progressFunc(gen))
		if err == nil {
			shown, err = figure.Comparison(wb.bench, cmp, unit)
		}
		if err == nil {
			img = shown.Render(1000, 620)
		}
		fyne.Do(func() { wb.finishComparison(gen, shown, img, err) })
	}()
}

// finishComparison shows the comparison figure with the export controls.
func (wb *workbench) finishComparison(gen int, shown *figure.Captioned, img image.Image, err error) {
	wb.finishTool(gen, shown, err, func() { wb.showComparison(shown, img) })
}

// showComparison keeps a finished comparison for export and opens its
// dialog.
func (wb *workbench) showComparison(shown *figure.Captioned, img image.Image) {
	wb.compared = shown
	wb.status.SetText("comparison ready: export it from the dialog")
	fig := canvas.NewImageFromImage(img)
	fig.FillMode = canvas.ImageFillContain
	fig.SetMinSize(fyne.NewSize(900, 560))
	path := widget.NewEntry()
	path.SetText(inWorkDir("comparison.png"))
	export := widget.NewButton("Export", func() {
		wb.confirmOverwrite(path.Text, func() {
			if err := wb.exportComparison(path.Text); err != nil {
				wb.showError(err)
			}
		})
	})
	bar := container.NewBorder(nil, nil, widget.NewLabel("File (.png, .svg or .pdf)"), container.NewHBox(wb.sizeSelect(), export), path)
	dialog.ShowCustom("Candidate compositions", "Close", container.NewBorder(nil, bar, nil, nil, fig), wb.win)
}

// exportComparison writes the last comparison figure to path (10 × 6 in).
func (wb *workbench) exportComparison(path string) error {
	if wb.compared == nil {
		return fmt.Errorf("no comparison to export: Figure ▸ Compare candidates first")
	}
	return wb.export(wb.compared, path)
}

// exportCurrent writes the figure the window shows to path (10 × 6 in).
func (wb *workbench) exportCurrent(path string) error {
	if wb.current == nil {
		return fmt.Errorf("no figure to export yet: wait for the model")
	}
	return wb.export(wb.current, path)
}

func (wb *workbench) export(f *figure.Captioned, path string) error {
	size, _ := figure.SizeNamed(wb.exportSize)
	if size.Name == "" {
		size = figure.Sizes[0]
	}
	if err := f.ExportSize(path, size); err != nil {
		return err
	}
	wb.status.SetText("figure written to " + path + " (" + size.Name + ")")
	return nil
}

// sizeSelect chooses the size exports are written at (one or two journal
// columns, or the screen's), kept for the session's later exports.
func (wb *workbench) sizeSelect() *widget.Select {
	sel := widget.NewSelect(figure.SizeNames(), func(v string) { wb.exportSize = v })
	if wb.exportSize == "" {
		wb.exportSize = figure.Sizes[0].Name
	}
	sel.SetSelected(wb.exportSize)
	return sel
}

// exportDialog asks where to write the shown figure.
func (wb *workbench) exportDialog() {
	path := widget.NewEntry()
	path.SetText(inWorkDir("figure.png"))
	dialog.ShowForm("Export the shown figure", "Export", "Cancel",
		[]*widget.FormItem{
			widget.NewFormItem("File", wb.browse(path, true, false)),
			widget.NewFormItem("Size", wb.sizeSelect()),
			widget.NewFormItem("", widget.NewLabel("PNG, SVG or PDF by the extension; the caption gives the model and its cautions.")),
		},
		func(ok bool) {
			if !ok {
				return
			}
			wb.confirmOverwrite(path.Text, func() {
				if err := wb.exportCurrent(path.Text); err != nil {
					wb.showError(err)
				}
			})
		}, wb.win)
}

// openDatasetDialog asks for a dataset file and opens it.
func (wb *workbench) openDatasetDialog() {
	path := widget.NewEntry()
	path.SetText(inWorkDir("dataset.json"))
	dialog.ShowForm("Open dataset", "Open", "Cancel",
		[]*widget.FormItem{
			widget.NewFormItem("Dataset file", wb.browse(path, false, false)),
			widget.NewFormItem("", widget.NewLabel("A dataset file names your spectra, line lists and the fixed model\nparameters (README, \"Dataset files\"); `broadline example DIR` writes one to start from.")),
		},
		func(ok bool) {
			if ok {
				wb.startOpenDataset(path.Text)
			}
		}, wb.win)
}

// startOpenDataset reads the dataset file at path, its spectra and its
// line lists off the UI goroutine, with the line lists' progress and
// Cancel; when it is read, the window shows it with a fresh session and
// the current session is dropped (save it first to keep it).
func (wb *workbench) startOpenDataset(path string) {
	wb.stop()
	ctx, gen := wb.begin(true, "reading the dataset "+path+"…")
	go func() {
		b, err := core.OpenDataset(ctx, path, func(p linelists.Progress) {
			frac := float64(p.Index)
			if p.Total > 0 {
				frac += float64(p.Done) / float64(p.Total)
			}
			wb.progressFunc(gen)(int(1000*frac), 1000*p.Files)
		})
		fyne.Do(func() { wb.finishOpenDataset(gen, b, err) })
	}()
}

// finishOpenDataset shows the dataset just read in this window.
func (wb *workbench) finishOpenDataset(gen int, b *core.Bench, err error) {
	wb.finishReplace(gen, b, nil, "", err)
}

// finishReplace ends tool computation gen that read a bench: on an error
// it says why and leaves the window as it was; else the window shows b
// with session s (a fresh one when nil), its first status line note.
func (wb *workbench) finishReplace(gen int, b *core.Bench, s *core.Session, note string, err error) {
	if !wb.end(true, gen) {
		return
	}
	if err != nil {
		wb.showJobError(err)
		if wb.jobDone != nil {
			wb.jobDone(nil, err)
		}
		if !errors.Is(err, context.Canceled) {
			wb.showError(err)
		}
		return
	}
	if s == nil {
		s = core.NewSession(b)
	}
	nw := newWorkbenchIn(wb.win, b, s)
	nw.done, nw.jobDone, nw.note = wb.done, wb.jobDone, note
	nw.adoptDaily(wb)
	if !b.Unsaved() && b.Name != core.DemoName {
		nw.noteRecent(b.Name, "dataset")
	} else {
		nw.refreshRecent()
	}
	nw.recompute()
	if wb.jobDone != nil {
		wb.jobDone(nw, nil)
	}
}

// startIdentify attributes the shown epoch's features to the current
// model's elements and lines off the UI goroutine (progress per feature,
// Cancel) and fills the table's last two columns.
func (wb *workbench) startIdentify() {
	if len(wb.featRows) == 0 {
		wb.status.SetText("no features to identify in this spectrum")
		return
	}
	ctx, gen := wb.begin(true, "identifying the features with the model…")
	m := wb.sess.Model
	feats := append([]spectra.Feature(nil), wb.featRows...)
	go func() {
		attr, err := wb.bench.Identify(ctx, m, feats, wb.progressFunc(gen))
		fyne.Do(func() { wb.finishIdentify(gen, m, attr, err) })
	}()
}

func (wb *workbench) finishIdentify(gen int, s core.Model, attr []*synth.Attribution, err error) {
	wb.finishTool(gen, attr, err, func() {
		if s.Epoch != wb.sess.Epoch || len(attr) != len(wb.featRows) {
			wb.status.SetText("the shown epoch changed while the features were identified: press Identify again")
			return
		}
		wb.featAttr = attr
		wb.attrFor = s
		wb.features.Refresh()
		wb.status.SetText(fmt.Sprintf("features identified with the model at v_ph = %.3f c, T = %.0f K (absorption-only shares; a hypothesis to check)", s.PhotosphereVelocity, s.Temperature))
	})
}

// confirmOverwrite calls write at once when nothing is at path, and after
// the analyst agrees when a file is there already.
func (wb *workbench) confirmOverwrite(path string, write func()) {
	if _, err := os.Stat(path); err != nil {
		write()
		return
	}
	dialog.ShowConfirm("Replace the file?", path+" exists already. Replace it?", func(ok bool) {
		if ok {
			write()
		}
	}, wb.win)
}

// unsavedCandidates reports whether the candidates differ from those last
// saved or opened.
func (wb *workbench) unsavedCandidates() bool {
	return !slices.Equal(wb.sess.Candidates, wb.savedCands)
}

// closeIntercept asks before the window closes with candidates not saved,
// then closes it cleanly (window state kept, autosave removed: see
// cleanExit).
func (wb *workbench) closeIntercept() {
	quit := func() {
		wb.cleanExit()
		wb.win.Close()
	}
	if !wb.unsavedCandidates() {
		quit()
		return
	}
	dialog.ShowConfirm("Quit without saving?",
		fmt.Sprintf("%d candidates are not saved. Quit anyway? (Session ▸ Save session… keeps them.)", len(wb.sess.Candidates)),
		func(ok bool) {
			if ok {
				quit()
			}
		}, wb.win)
}

// exportFeaturesDialog asks where to write the features table as CSV: the
// features and, once identified, each element's share (core.FeaturesCSV).
func (wb *workbench) exportFeaturesDialog() {
	path := widget.NewEntry()
	path.SetText(inWorkDir("features.csv"))
	dialog.ShowForm("Export the features table", "Export", "Cancel",
		[]*widget.FormItem{
			widget.NewFormItem("File", wb.browse(path, true, false)),
			widget.NewFormItem("", widget.NewLabel("CSV: the absorption minima and, after Identify, each model element's share.")),
		},
		func(ok bool) {
			if ok {
				wb.confirmOverwrite(path.Text, func() {
					if err := wb.exportFeatures(path.Text); err != nil {
						wb.showError(err)
					}
				})
			}
		}, wb.win)
}

// exportFeatures writes the features table to path.
func (wb *workbench) exportFeatures(path string) error {
	if len(wb.featRows) == 0 {
		return errors.New("no features in this spectrum to export")
	}
	attr := wb.featAttr
	if attr == nil {
		attr = make([]*synth.Attribution, len(wb.featRows))
	}
	data, err := core.FeaturesCSV(wb.featRows, attr)
	if err != nil {
		return err
	}
	if err := core.WriteFileAtomic(path, data); err != nil {
		return err
	}
	wb.status.SetText("features table written to " + path)
	return nil
}
