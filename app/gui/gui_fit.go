package gui

import (
	"errors"
	"fmt"
	"image"
	"slices"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"
	"gonum.org/v1/plot/vg"

	"broadline/app/core"
	"broadline/app/figure"
	"broadline/opacity/fit"
)

// The Fit… tool: a form that chooses what to free, the fit (and optional
// posterior) off the UI goroutine in the tool slot, and a dialog with the
// result table, "Use best" and the corner plot of the samples. The numbers
// come from core.Bench.Fit.

// fitForm holds the widgets of the Fit… form.
type fitForm struct {
	elements, epochs *widget.CheckGroup
	velocity, temp   *widget.Check
	samples, seed    *widget.Entry
	epochIndex       map[string]int
}

// newFitForm builds the form for the current session: the composition's
// elements (none chosen), the epochs (the shown one chosen), and no
// posterior.
func (wb *workbench) newFitForm() *fitForm {
	f := &fitForm{epochIndex: map[string]int{}}
	syms, _ := wb.sess.MassFractions.Fractions()
	f.elements = widget.NewCheckGroup(syms, nil)
	f.elements.Horizontal = true
	var names []string
	for i, ep := range wb.bench.Data.Epochs {
		n := fmt.Sprintf("%d (%g d)", i+1, ep.Days)
		names = append(names, n)
		f.epochIndex[n] = i
	}
	f.epochs = widget.NewCheckGroup(names, nil)
	f.epochs.Horizontal = true
	f.epochs.SetSelected([]string{names[wb.sess.Epoch]})
	f.velocity = widget.NewCheck("each epoch's photosphere velocity", nil)
	f.temp = widget.NewCheck("each epoch's temperature", nil)
	f.samples = widget.NewEntry()
	f.samples.SetText("0")
	f.seed = widget.NewEntry()
	f.seed.SetText("1")
	return f
}

// request reads the form, refusing what cannot be fitted.
func (f *fitForm) request() (core.FitRequest, error) {
	r := core.FitRequest{Free: slices.Clone(f.elements.Selected), FitVelocity: f.velocity.Checked, FitTemperature: f.temp.Checked}
	for _, n := range f.epochs.Selected {
		r.Epochs = append(r.Epochs, f.epochIndex[n])
	}
	slices.Sort(r.Epochs)
	if len(r.Epochs) == 0 {
		return r, errors.New("choose at least one epoch to fit")
	}
	if len(r.Free) == 0 && !r.FitVelocity && !r.FitTemperature {
		return r, errors.New("nothing to fit: tick the elements whose mass fractions are free (or the velocity or temperature)")
	}
	n, err := strconv.Atoi(strings.TrimSpace(f.samples.Text))
	if err != nil || n < 0 || (n > 0 && n < 4) {
		return r, fmt.Errorf("posterior steps %q: want 0 (fit only) or at least 4", f.samples.Text)
	}
	seed, err := strconv.ParseUint(strings.TrimSpace(f.seed.Text), 10, 64)
	if err != nil {
		return r, fmt.Errorf("seed %q: want a whole number ≥ 0", f.seed.Text)
	}
	r.Samples, r.Seed = n, seed
	return r, nil
}

// fitDialog asks what to fit and starts the fit.
func (wb *workbench) fitDialog() {
	f := wb.newFitForm()
	note := widget.NewLabel("The free elements share one composition across the chosen epochs; the others keep their\n" +
		"ratios and fill the rest. Each epoch has its own free flux scale. A fit takes some 100–300\n" +
		"syntheses of every chosen epoch; a posterior needs walkers × 1.5 × steps more (16 walkers and\n" +
		"300 steps: ~7000). The preview switch makes each synthesis faster and rougher.")
	dialog.ShowForm("Fit the composition", "Fit", "Cancel",
		[]*widget.FormItem{
			widget.NewFormItem("Free elements", f.elements),
			widget.NewFormItem("Epochs", f.epochs),
			widget.NewFormItem("Also free", container.NewHBox(f.velocity, f.temp)),
			widget.NewFormItem("Posterior steps", f.samples),
			widget.NewFormItem("Seed", f.seed),
			widget.NewFormItem("", note),
		},
		func(ok bool) {
			if !ok {
				return
			}
			r, err := f.request()
			if err != nil {
				wb.showError(err)
				return
			}
			wb.startFit(r)
		}, wb.win)
}

// fitShown is a finished fit with its corner plot (nil without a
// posterior), as the result dialog shows it.
type fitShown struct {
	out    *core.FitOutcome
	corner *figure.CornerFigure
	img    image.Image
}

// startFit runs the fit of request r from the current model off the UI
// goroutine, the progress bar showing the fit and then the sampler.
func (wb *workbench) startFit(r core.FitRequest) {
	ctx, gen := wb.begin(true, "fitting the composition…")
	m := wb.sess.Model
	step := wb.progressFunc(gen)
	go func() {
		out, err := wb.bench.Fit(ctx, m, r, func(s core.FitStage, done, total int) {
			if r.Samples == 0 {
				step(done, total)
				return
			}
			// Half the bar for the fit, half for the sampler.
			if s == core.StageOptimise {
				step(done, 2*total)
			} else {
				step(total+done, 2*total)
			}
		})
		var shown *fitShown
		if err == nil {
			shown = &fitShown{out: out}
			if post := out.Posterior; post != nil {
				shown.corner, err = cornerOf(post)
				if err == nil {
					shown.img = shown.corner.Image(7*vg.Inch, 7*vg.Inch, 96).Image()
				}
			}
		}
		fyne.Do(func() { wb.finishTool(gen, shown, err, func() { wb.showFit(shown) }) })
	}()
}

// cornerOf is the corner plot of a posterior's samples, in the
// parameters' coordinates (log₁₀ X, v/c, K).
func cornerOf(post *fit.Posterior) (*figure.CornerFigure, error) {
	var names []string
	for _, p := range post.Parameters {
		names = append(names, p.Label)
	}
	return figure.Corner(names, post.Samples, figure.CornerOptions{
		Title: fmt.Sprintf("posterior: %d walkers × %d steps, seed %d", post.Walkers, post.Steps, post.Seed)})
}

// fitRows are the lines of the result table: parameter, best, and the
// posterior's median with its intervals or its upper limit.
func fitRows(out *core.FitOutcome) [][]string {
	rows := [][]string{{"parameter", "best fit", "posterior median", "68 % interval", "95 % interval / limit"}}
	for i, p := range out.Best.Parameters {
		row := []string{p.Label, fmt.Sprintf("%.4g", p.Physical(out.Best.Best[i])), "", "", ""}
		if p.Kind == fit.KindLogMassFraction {
			row[0] = "X(" + p.Element + ")"
		}
		if post := out.Posterior; post != nil {
			s := post.Summaries[i]
			if s.IsUpperLimit {
				row[2], row[4] = "—", fmt.Sprintf("< %.3g (95 %% upper limit)", s.UpperLimit95)
			} else {
				row[2] = fmt.Sprintf("%.4g", s.Median)
				row[3] = fmt.Sprintf("%.4g – %.4g", s.Lower68, s.Upper68)
				row[4] = fmt.Sprintf("%.4g – %.4g", s.Lower95, s.Upper95)
			}
		}
		rows = append(rows, row)
	}
	return rows
}

// fitSummary says in a few lines what the fit found and how it was made.
func fitSummary(out *core.FitOutcome) string {
	b := out.Best
	var sb strings.Builder
	fmt.Fprintf(&sb, "Joint χ²/N = %.3g over %d samples; flux scale %s per epoch%s; %s after %d evaluations.\n",
		b.Chi2N, b.N, b.Scale, map[bool]string{true: "; absorption-only preview", false: ""}[b.Preview], b.Status, b.Evaluations)
	for _, e := range b.Epochs {
		fmt.Fprintf(&sb, "Epoch %d (%g d): χ²/N = %.3g, v_ph = %.3f c, T = %.0f K, scale %.3g.\n",
			e.Epoch, e.Days, e.Chi2N, e.PhotosphereVelocityC, e.TemperatureK, e.FluxScale)
	}
	if post := out.Posterior; post != nil {
		fmt.Fprintf(&sb, "Posterior: acceptance %.2f, chain %.1f autocorrelation times long", post.AcceptanceFraction, post.ChainInTau)
		if post.ChainInTau < fit.TauLengths {
			fmt.Fprintf(&sb, " (fewer than %d: the intervals are rough; run more steps)", fit.TauLengths)
		}
		sb.WriteString(".\n")
	}
	warn := b.Warnings
	if out.Posterior != nil {
		warn = out.Posterior.Warnings
	}
	for _, w := range warn {
		sb.WriteString("Warning: " + w + "\n")
	}
	sb.WriteString("A fit under the model's approximations: a hypothesis to check with full radiative transfer (Help ▸ About the model).")
	return sb.String()
}

// showFit opens the result dialog of a finished fit.
func (wb *workbench) showFit(s *fitShown) {
	out := s.out
	wb.status.SetText(fmt.Sprintf("fit done: joint χ²/N = %.3g; see the result dialog", out.Best.Chi2N))
	rows := fitRows(out)
	table := widget.NewTable(
		func() (int, int) { return len(rows), len(rows[0]) },
		func() fyne.CanvasObject { return widget.NewLabel("0.0000e-00 – 0.0000e-00") },
		func(id widget.TableCellID, o fyne.CanvasObject) {
			l := o.(*widget.Label)
			l.SetText(rows[id.Row][id.Col])
			l.TextStyle.Bold = id.Row == 0
		})
	for c, w := range []float32{130, 100, 130, 190, 260} {
		table.SetColumnWidth(c, w)
	}
	tableBox := container.NewGridWrap(fyne.NewSize(820, float32(36*len(rows))), table)
	summary := widget.NewLabel(fitSummary(out))
	summary.Wrapping = fyne.TextWrapWord
	use := widget.NewButton("Use best", nil)
	content := container.NewVBox(tableBox, summary, use)
	if s.img != nil {
		img := canvas.NewImageFromImage(s.img)
		img.FillMode = canvas.ImageFillContain
		img.SetMinSize(fyne.NewSize(420, 420))
		path := widget.NewEntry()
		path.SetText(inWorkDir("corner.png"))
		export := widget.NewButton("Export corner plot", func() {
			if err := wb.exportCorner(s, path.Text); err != nil {
				wb.showError(err)
			}
		})
		content.Add(img)
		content.Add(container.NewBorder(nil, nil, widget.NewLabel("File (.png, .svg or .pdf)"), export, path))
	}
	d := dialog.NewCustom("Fit result", "Close", container.NewVScroll(content), wb.win)
	d.Resize(fyne.NewSize(900, 700))
	use.OnTapped = func() {
		if err := wb.useFit(out); err != nil {
			wb.status.SetText(err.Error())
			return
		}
		d.Hide()
	}
	d.Show()
}

// useFit makes the fit's best model the current one: its composition, and
// at the shown epoch (if fitted) its photosphere. A fit started from
// another model than the current one is refused with the reason.
func (wb *workbench) useFit(out *core.FitOutcome) error {
	if out.Start != wb.sess.Model {
		return errors.New("the model changed since the fit started (epoch, photosphere or composition): fit again")
	}
	m := wb.sess.Model
	m.MassFractions = out.Models[0].MassFractions
	for _, bm := range out.Models {
		if bm.Epoch == m.Epoch {
			m = bm
		}
	}
	if err := m.Validate(wb.bench.Data); err != nil {
		return fmt.Errorf("the best model cannot be used: %w", err)
	}
	wb.sess.Model = m
	wb.syncControls()
	wb.recompute()
	wb.status.SetText("using the fit's best model: " + m.MassFractions.Text())
	return nil
}

// exportCorner writes a fit's corner plot to path (7 × 7 in).
func (wb *workbench) exportCorner(s *fitShown, path string) error {
	if s.corner == nil {
		return errors.New("no posterior to plot: fit with posterior steps > 0")
	}
	if err := s.corner.Save(7*vg.Inch, 7*vg.Inch, path); err != nil {
		return err
	}
	wb.status.SetText("corner plot written to " + path)
	return nil
}
