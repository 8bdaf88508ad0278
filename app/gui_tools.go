package main

import (
	"context"
	"errors"
	"fmt"
	"image"
	"math"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"
	"gonum.org/v1/plot/vg"

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
func (wb *workbench) sweepDialog(p sweepParam) {
	from, to := widget.NewEntry(), widget.NewEntry()
	var title, hint string
	if p == sweepTemperatureParam {
		t := wb.sess.Temperature
		from.SetText(fmt.Sprintf("%.0f", max(minSliderT, t-1500)))
		to.SetText(fmt.Sprintf("%.0f", min(maxSliderT, t+1500)))
		title, hint = "Sweep the photosphere temperature", "Temperatures in K."
	} else {
		v, outer := wb.sess.PhotosphereVelocity, wb.bench.data.Scenario.OuterVelocity
		from.SetText(fmt.Sprintf("%.3gc", max(0.02, v-0.08)))
		to.SetText(fmt.Sprintf("%.3gc", min(outer-0.01, v+0.08)))
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
			parse := parseVelocity
			if p == sweepTemperatureParam {
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
				dialog.ShowError(err, wb.win)
				return
			}
			wb.startSweep(p, lo, hi, n)
		}, wb.win)
}

// startSweep runs a sweep of parameter p off the UI goroutine with a
// progress bar; Cancel (or another tool) stops it.
func (wb *workbench) startSweep(p sweepParam, lo, hi float64, steps int) {
	ctx, gen := wb.begin(true, fmt.Sprintf("sweeping %s at %d values from %s to %s…", p.name(), steps, p.describe(lo), p.describe(hi)))
	sess := *wb.sess
	go func() {
		sw, err := wb.bench.sweep(ctx, &sess, p, lo, hi, steps, wb.progressFunc(gen))
		var img image.Image
		if err == nil {
			fig, ferr := sweepFigure(sw)
			if ferr != nil {
				err = ferr
			} else {
				img = renderFigure(fig, 640, 380)
			}
		}
		fyne.Do(func() { wb.finishSweep(gen, sw, img, err) })
	}()
}

// finishSweep shows a sweep's curve and offers its best value.
func (wb *workbench) finishSweep(gen int, sw *paramSweep, img image.Image, err error) {
	wb.finishTool(gen, sw, err, func() { wb.showSweep(sw, img) })
}

// showSweep reports a finished sweep and opens its dialog.
func (wb *workbench) showSweep(sw *paramSweep, img image.Image) {
	p := sw.Param
	msg := fmt.Sprintf("%s sweep: χ²/N is least (%.2f) near %s = %s", p.name(), sw.BestChi2N, p.name(), p.describe(sw.Best))
	if sw.AtEdge {
		msg += " — at the end of the range: the minimum may lie outside it; widen the range"
	}
	if sw.Preview {
		msg += " (absorption-only preview)"
	}
	wb.status.SetText(msg)
	if img == nil {
		return
	}
	fig := canvas.NewImageFromImage(img)
	fig.FillMode = canvas.ImageFillContain
	fig.SetMinSize(fyne.NewSize(640, 380))
	use := widget.NewButton(fmt.Sprintf("Use %s = %s", p.name(), p.describe(sw.Best)), nil)
	d := dialog.NewCustom("Sweep", "Close", container.NewBorder(widget.NewLabel(msg), use, nil, nil, fig), wb.win)
	use.OnTapped = func() {
		d.Hide()
		wb.useSweep(sw)
	}
	d.Show()
}

// useSweep sets the swept parameter to the sweep's best value, to the
// slider's step (0.001 c, 50 K), and recomputes.
func (wb *workbench) useSweep(sw *paramSweep) {
	sl := wb.velocity
	if sw.Param == sweepTemperatureParam {
		sl = wb.temp
	}
	v := min(max(math.Round(sw.Best/sl.Step)*sl.Step, sl.Min), sl.Max)
	if sw.Param == sweepTemperatureParam {
		wb.sess.Temperature = v
	} else {
		wb.sess.PhotosphereVelocity = v
	}
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
	wb.status.SetText("error: " + err.Error())
}

// keepCandidate keeps the current model as a candidate with the next free
// label.
func (wb *workbench) keepCandidate() error {
	if len(wb.sess.Candidates) >= maxCandidates {
		return fmt.Errorf("%d candidates are kept already (the most a figure can tell apart): remove one first", maxCandidates)
	}
	c := candidateOf(wb.sess, nextLabel(wb.sess.Candidates))
	wb.sess.Candidates = append(wb.sess.Candidates, c)
	wb.candList.Refresh()
	wb.status.SetText(fmt.Sprintf("kept the current model as candidate %s", c.Label))
	return nil
}

// candidateText is a candidate's line in the list.
func (wb *workbench) candidateText(i int) string {
	if i < 0 || i >= len(wb.sess.Candidates) {
		return ""
	}
	c := wb.sess.Candidates[i]
	return fmt.Sprintf("%s · %g d · %.3f c · %.0f K · %s", c.Label, wb.bench.data.Scenario.Epochs[c.Epoch].Days,
		c.PhotosphereVelocity, c.Temperature, compositionText(c.MassFractions))
}

// showCandidate makes candidate i the current model.
func (wb *workbench) showCandidate(i int) {
	if i < 0 || i >= len(wb.sess.Candidates) {
		return
	}
	c := wb.sess.Candidates[i]
	wb.sess.Epoch, wb.sess.PhotosphereVelocity, wb.sess.Temperature, wb.sess.MassFractions, wb.sess.Preview =
		c.Epoch, c.PhotosphereVelocity, c.Temperature, c.MassFractions, c.Preview
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
}

// startComparison computes the candidates of the shown epoch off the UI
// goroutine and shows their figure for export.
func (wb *workbench) startComparison() {
	ctx, gen := wb.begin(true, "computing the candidates of this epoch…")
	sess := *wb.sess
	sess.Candidates = append([]Candidate(nil), wb.sess.Candidates...)
	go func() {
		var shown *exportable
		var img image.Image
		cmp, err := wb.bench.compareCandidates(ctx, &sess, sess.Epoch, wb.progressFunc(gen))
		if err == nil {
			shown = &exportable{}
			shown.fig, shown.caption, err = wb.bench.comparisonFigure(cmp, unitOf(sess.WavelengthUnit))
		}
		if err == nil {
			img = renderCaptioned(shown.fig, shown.caption, 1000, 620)
		}
		fyne.Do(func() { wb.finishComparison(gen, shown, img, err) })
	}()
}

// finishComparison shows the comparison figure with the export controls.
func (wb *workbench) finishComparison(gen int, shown *exportable, img image.Image, err error) {
	wb.finishTool(gen, shown, err, func() { wb.showComparison(shown, img) })
}

// showComparison keeps a finished comparison for export and opens its
// dialog.
func (wb *workbench) showComparison(shown *exportable, img image.Image) {
	wb.compared = shown
	wb.status.SetText("comparison ready: export it from the dialog")
	fig := canvas.NewImageFromImage(img)
	fig.FillMode = canvas.ImageFillContain
	fig.SetMinSize(fyne.NewSize(900, 560))
	path := widget.NewEntry()
	path.SetText(inWorkDir("comparison.png"))
	export := widget.NewButton("Export", func() {
		if err := wb.exportComparison(path.Text); err != nil {
			dialog.ShowError(err, wb.win)
		}
	})
	bar := container.NewBorder(nil, nil, widget.NewLabel("File (.png, .svg or .pdf)"), export, path)
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

func (wb *workbench) export(f *exportable, path string) error {
	if err := exportFigure(f.fig, f.caption, path, 10*vg.Inch, 6*vg.Inch); err != nil {
		return err
	}
	wb.status.SetText("figure written to " + path)
	return nil
}

// exportDialog asks where to write the shown figure.
func (wb *workbench) exportDialog() {
	path := widget.NewEntry()
	path.SetText(inWorkDir("figure.png"))
	dialog.ShowForm("Export the shown figure", "Export", "Cancel",
		[]*widget.FormItem{
			widget.NewFormItem("File", path),
			widget.NewFormItem("", widget.NewLabel("PNG, SVG or PDF by the extension; the caption gives the model and its cautions.")),
		},
		func(ok bool) {
			if !ok {
				return
			}
			if err := wb.exportCurrent(path.Text); err != nil {
				dialog.ShowError(err, wb.win)
			}
		}, wb.win)
}

// openDatasetDialog asks for a dataset file and opens it.
func (wb *workbench) openDatasetDialog() {
	path := widget.NewEntry()
	path.SetText(inWorkDir("dataset.json"))
	dialog.ShowForm("Open dataset", "Open", "Cancel",
		[]*widget.FormItem{
			widget.NewFormItem("Dataset file", path),
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
		b, err := openDataset(ctx, path, func(p linelists.Progress) {
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
func (wb *workbench) finishOpenDataset(gen int, b *bench, err error) {
	if !wb.end(true, gen) {
		return
	}
	if err != nil {
		wb.showJobError(err)
		if wb.jobDone != nil {
			wb.jobDone(nil, err)
		}
		if !errors.Is(err, context.Canceled) {
			dialog.ShowError(err, wb.win)
		}
		return
	}
	nw := newWorkbenchIn(wb.win, b, newSession(b.data.name, b.data))
	nw.done, nw.jobDone = wb.done, wb.jobDone
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
	sess := *wb.sess
	feats := append([]spectra.Feature(nil), wb.featRows...)
	go func() {
		attr, err := wb.bench.identify(ctx, &sess, feats, wb.progressFunc(gen))
		fyne.Do(func() { wb.finishIdentify(gen, &sess, attr, err) })
	}()
}

func (wb *workbench) finishIdentify(gen int, s *Session, attr []*synth.Attribution, err error) {
	wb.finishTool(gen, attr, err, func() {
		if s.Epoch != wb.sess.Epoch || len(attr) != len(wb.featRows) {
			wb.status.SetText("the shown epoch changed while the features were identified: press Identify again")
			return
		}
		wb.featAttr = attr
		wb.attrFor = keyOf(s)
		wb.features.Refresh()
		wb.status.SetText(fmt.Sprintf("features identified with the model at v_ph = %.3f c, T = %.0f K (absorption-only shares; a hypothesis to check)", s.PhotosphereVelocity, s.Temperature))
	})
}
