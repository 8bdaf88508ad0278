package gui

import (
	"context"
	"errors"
	"fmt"
	"image"
	"math"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/widget"

	"broadline/app/core"
	"broadline/app/figure"
	"broadline/linelists"
	"broadline/physics"
)

// The size in pixels at which the spectrum is rendered for the window
// (shown scaled to fit, keeping its aspect).
const plotW, plotH = 1100, 560

// plotState is the interactive plot: what is shown (the scene of the last
// computation, drawn again for each new view without recomputing), how
// (display), and its controls.
type plotState struct {
	area *plotArea
	// scene is the last computation's scene (nil before the first);
	// sceneModel the model it shows.
	scene      *figure.Scene
	sceneModel core.Model
	// disp is how the plot is drawn; its Axis.Unit follows the session,
	// its Axis.Rest is set from rest when velocity is on.
	disp     figure.Display
	velocity bool
	rest     float64 // vacuum Å of the rest line; 0: none
	// frame is the geometry of the image shown.
	frame figure.Frame
	// species are the species whose strongest lines are ticked.
	species []linelists.Species
	tickGen int

	rendering, pending bool
	// redraws counts the redraws shown (not the computations'); drawn,
	// if set, is called after each (tests wait on it).
	redraws int
	drawn   func(error)

	readout   *widget.Label
	restEntry *widget.Entry
	// box is true while drags zoom to a box instead of panning.
	box bool
	// The Figure menu's switches: velocity axis, residual panel,
	// uncertainty band, box zoom.
	velItem, residItem, bandItem, boxItem *fyne.MenuItem
}

// newPlotControls builds the interactive plot's widget around wb.figure
// and the row under it: its buttons, the rest line and the readout.
func (wb *workbench) newPlotControls() (area, bar fyne.CanvasObject) {
	ps := &wb.plot
	ps.area = newPlotArea(wb)
	ps.readout = widget.NewLabel("")
	ps.readout.Truncation = fyne.TextTruncateEllipsis
	ps.restEntry = widget.NewEntry()
	ps.restEntry.SetPlaceHolder("rest line, e.g. 1.0830 µm")
	ps.restEntry.OnChanged = func(string) { wb.setRest() }
	ps.velItem = fyne.NewMenuItem("Velocity axis from the rest line (V)", func() { wb.setVelocity(!ps.velocity) })
	ps.residItem = fyne.NewMenuItem("Residual panel (D)", func() { wb.setResiduals(!ps.disp.Residuals) })
	ps.bandItem = fyne.NewMenuItem("Observed ±1σ band (U)", func() { wb.setBand(!ps.disp.Band) })
	ps.boxItem = fyne.NewMenuItem("Drag zooms to a box (B)", func() { wb.setBox(!ps.box) })
	lines := widget.NewButton("Mark lines… (L)", func() { wb.linesDialog() })
	reset := widget.NewButton("Reset view (R)", func() { wb.resetView() })
	entry := container.NewGridWrap(fyne.NewSize(170, ps.restEntry.MinSize().Height), ps.restEntry)
	// One row, so that the spectrum card stays low (the divider above the
	// features table must move both ways).
	bar = container.NewBorder(nil, nil, container.NewHBox(reset, lines, widget.NewLabel("rest line"), entry), nil, ps.readout)
	return ps.area, bar
}

// plotMenuItems are the plot's entries of the Figure menu.
func (wb *workbench) plotMenuItems() []*fyne.MenuItem {
	ps := &wb.plot
	return []*fyne.MenuItem{fyne.NewMenuItemSeparator(),
		fyne.NewMenuItem("Reset the view (R)", func() { wb.resetView() }),
		ps.velItem, ps.residItem, ps.bandItem, ps.boxItem,
		fyne.NewMenuItem("Mark the strongest lines of… (L)", func() { wb.linesDialog() })}
}

// checkMenu shows the switches' states in the Figure menu.
func (wb *workbench) checkMenu() {
	ps := &wb.plot
	ps.velItem.Checked, ps.residItem.Checked = ps.velocity, ps.disp.Residuals
	ps.bandItem.Checked, ps.boxItem.Checked = ps.disp.Band, ps.box
	if mm := wb.win.MainMenu(); mm != nil {
		mm.Refresh()
	}
}

// setVelocity switches the x axis between wavelength and the velocity
// relative to the rest line (which must be entered first).
func (wb *workbench) setVelocity(on bool) {
	ps := &wb.plot
	if on && ps.rest <= 0 {
		ps.readout.SetText("enter a rest line (e.g. 1.0830 µm) for the velocity axis")
		on = false
	}
	if on != ps.velocity {
		ps.velocity = on
		wb.redraw()
	}
	wb.checkMenu()
}

// setResiduals shows or hides the residual panel.
func (wb *workbench) setResiduals(on bool) {
	if on != wb.plot.disp.Residuals {
		wb.plot.disp.Residuals = on
		wb.redraw()
	}
	wb.checkMenu()
}

// setBand shows or hides the observed ±1σ band.
func (wb *workbench) setBand(on bool) {
	if on != wb.plot.disp.Band {
		wb.plot.disp.Band = on
		wb.redraw()
	}
	wb.checkMenu()
}

// setBox makes drags zoom to a box (on) or pan (off).
func (wb *workbench) setBox(on bool) {
	wb.plot.box = on
	wb.checkMenu()
}

// display is how the next picture is drawn: the plot's display with the
// session's wavelength unit and, on the velocity axis, the rest line.
func (wb *workbench) display() figure.Display {
	d := wb.plot.disp
	d.Axis = figure.XAxis{Unit: core.UnitOf(wb.sess.WavelengthUnit)}
	if wb.plot.velocity && wb.plot.rest > 0 {
		d.Axis.Rest = wb.plot.rest
	}
	return d
}

// setRest takes the rest line from its entry (a bare number is in the
// figure's unit) and redraws a velocity axis.
func (wb *workbench) setRest() {
	ps := &wb.plot
	txt := strings.TrimSpace(ps.restEntry.Text)
	rest := 0.0
	if txt != "" {
		r, err := core.ParseWavelength(txt, core.UnitOf(wb.sess.WavelengthUnit))
		if err != nil {
			ps.readout.SetText(err.Error())
			return
		}
		rest = r
	}
	if rest != ps.rest {
		ps.rest = rest
		ps.readout.SetText("")
		if ps.velocity {
			wb.redraw()
		}
	}
}

// modelPicture draws the figure of a computation (off the UI goroutine):
// the scene of model m with its overlays and ticks, drawn as d says, or
// the whole figure when d's view shows no data.
func modelPicture(b *core.Bench, m core.Model, ov, knock *core.Overlay, z int, ticks []figure.LineTicks, d figure.Display) (*picture, error) {
	pic := &picture{disp: d, scene: figure.ModelScene(b, m, ov, knock, z)}
	pic.scene.Ticks = ticks
	var err error
	pic.shown, err = pic.scene.Figure(d)
	if err != nil && d.View != (figure.View{}) {
		d.View = figure.View{} // e.g. another epoch's range
		pic.viewReset = true
		pic.shown, err = pic.scene.Figure(d)
	}
	if err != nil {
		return nil, err
	}
	pic.img, pic.frame = pic.shown.RenderPlot(plotW, plotH, d.Axis)
	return pic, nil
}

// lineTicks computes the tick rows of species for model m (nil when
// there are none to mark).
func lineTicks(ctx context.Context, b *core.Bench, m core.Model, species []linelists.Species) ([]figure.LineTicks, error) {
	if len(species) == 0 {
		return nil, nil
	}
	lines, err := b.StrongestLines(ctx, m, species, core.TickLines)
	if err != nil {
		return nil, err
	}
	var out []figure.LineTicks
	for i, ls := range lines {
		t := figure.LineTicks{Label: species[i].String()}
		for _, l := range ls {
			t.Acting = append(t.Acting, l.Acting)
		}
		out = append(out, t)
	}
	return out, nil
}

// picture is what a computation drew: the scene, the figure and its
// image and frame, for display disp; tickErr is why the lines could not be
// marked, if they could not.
type picture struct {
	scene   *figure.Scene
	shown   *figure.Captioned
	img     image.Image
	frame   figure.Frame
	disp    figure.Display
	tickErr error
	// viewReset is true when disp's view showed no data, so the whole
	// spectrum was drawn.
	viewReset bool
}

// plotComputed keeps the scene of a finished computation of model m for
// later redraws, and redraws at once if the display changed meanwhile
// (a zoom during the computation).
func (wb *workbench) plotComputed(m core.Model, pic *picture) {
	ps := &wb.plot
	ps.scene, ps.sceneModel, ps.frame = pic.scene, m, pic.frame
	if pic.viewReset && ps.disp.View == pic.disp.View {
		ps.disp.View = figure.View{}
		pic.disp.View = figure.View{}
	}
	if pic.tickErr != nil && !errors.Is(pic.tickErr, context.Canceled) {
		ps.readout.SetText("lines not marked: " + pic.tickErr.Error())
	}
	if wb.display() != pic.disp {
		wb.redraw()
	}
}

// redraw draws the last computation's scene again for the current display
// off the UI goroutine, without recomputing anything. Requests made while
// a picture is being drawn are merged into one, drawn afterwards: the
// newest wins.
func (wb *workbench) redraw() {
	ps := &wb.plot
	if ps.scene == nil {
		return
	}
	if ps.rendering {
		ps.pending = true
		return
	}
	ps.rendering = true
	sc, d := ps.scene, wb.display()
	go func() {
		shown, err := sc.Figure(d)
		var img image.Image
		var fr figure.Frame
		if err == nil {
			img, fr = shown.RenderPlot(plotW, plotH, d.Axis)
		}
		fyne.Do(func() {
			ps.rendering = false
			if err == nil && sc == ps.scene {
				wb.current = shown
				ps.frame = fr
				wb.figure.Image = img
				wb.figure.Refresh()
			} else if err != nil {
				ps.readout.SetText("view not changed: " + err.Error())
			}
			if ps.pending {
				ps.pending = false
				wb.redraw()
				return
			}
			ps.redraws++
			if ps.drawn != nil {
				ps.drawn(err)
			}
		})
	}()
}

// viewNow is the view being shown or asked for, with its ranges filled in
// from the picture where the display leaves them to the figure.
func (wb *workbench) viewNow() figure.View {
	v := wb.plot.disp.View
	fv := wb.plot.frame.View()
	if !v.HasX() {
		v.XMin, v.XMax = fv.XMin, fv.XMax
	}
	if v.AutoY() {
		v.YMin, v.YMax, v.Auto = fv.YMin, fv.YMax, true
	}
	return v
}

// setView shows view v (kept within the spectrum's range) and redraws.
func (wb *workbench) setView(v figure.View) {
	if wb.plot.scene == nil || wb.plot.frame.Width == 0 {
		return
	}
	lo, hi := wb.plot.scene.Extent()
	wb.plot.disp.View = v.Within(lo, hi)
	wb.redraw()
}

// resetView shows the whole spectrum with the flux range fitted to it.
func (wb *workbench) resetView() {
	wb.plot.disp.View = figure.View{}
	wb.redraw()
}

// zoomBy zooms the view by factor k (< 1: in) about the data point
// (lam Å, y).
func (wb *workbench) zoomBy(k, lam, y float64) {
	if wb.plot.frame.Width == 0 {
		return
	}
	wb.setView(wb.viewNow().ZoomAbout(lam, y, k))
}

// zoomCentre zooms by k about the middle of the view.
func (wb *workbench) zoomCentre(k float64) {
	v := wb.viewNow()
	wb.zoomBy(k, (v.XMin+v.XMax)/2, (v.YMin+v.YMax)/2)
}

// panBy moves the view by a fraction f of its width (> 0: towards longer
// wavelengths).
func (wb *workbench) panBy(f float64) {
	if wb.plot.frame.Width == 0 {
		return
	}
	v := wb.viewNow()
	wb.setView(v.Pan(f*(v.XMax-v.XMin), 0))
}

// plotKey handles the plot's keys (listed by shortcutsText); it reports
// whether key was one of them.
func (wb *workbench) plotKey(name fyne.KeyName) bool {
	switch name {
	case fyne.KeyHome, fyne.KeyEscape:
		wb.resetView()
	case fyne.KeyLeft:
		wb.panBy(-0.2)
	case fyne.KeyRight:
		wb.panBy(0.2)
	default:
		return false
	}
	return true
}

// plotRune handles the plot's character keys (listed by shortcutsText).
func (wb *workbench) plotRune(r rune) bool {
	ps := &wb.plot
	switch r {
	case 'r', 'R':
		wb.resetView()
	case '+', '=':
		wb.zoomCentre(0.8)
	case '-', '_':
		wb.zoomCentre(1.25)
	case 'a', 'A':
		v := ps.disp.View
		v.Auto = true
		ps.disp.View = v
		wb.redraw()
	case 'v', 'V':
		wb.setVelocity(!ps.velocity)
	case 'd', 'D':
		wb.setResiduals(!ps.disp.Residuals)
	case 'u', 'U':
		wb.setBand(!ps.disp.Band)
	case 'b', 'B':
		wb.setBox(!ps.box)
	case 'l', 'L':
		wb.linesDialog()
	default:
		return false
	}
	return true
}

// installPlotKeys sends the keys typed while nothing has the focus to
// the plot.
func (wb *workbench) installPlotKeys() {
	c := wb.win.Canvas()
	c.SetOnTypedKey(func(e *fyne.KeyEvent) { wb.plotKey(e.Name) })
	c.SetOnTypedRune(func(r rune) { wb.plotRune(r) })
}

// readoutText is the cursor readout at image pixel (px, py): wavelength,
// flux (or residual) and the velocity implied for the rest line; "" off
// the data areas.
func (wb *workbench) readoutText(px, py float64) string {
	fr := wb.plot.frame
	u := core.UnitOf(wb.sess.WavelengthUnit)
	var p figure.Panel
	what := "flux"
	switch {
	case fr.Main.Contains(px, py):
		p = fr.Main
	case fr.Residual.Contains(px, py):
		p, what = fr.Residual, "(obs − model)/σ"
	default:
		return ""
	}
	x, y := p.ToData(px, py)
	lam := fr.Axis.Wavelength(x)
	s := fmt.Sprintf("λ %s %s · %s %.4g", fmtFloat(lam*u.PerA, u.Decimals+1), u.Name, what, y)
	if wb.plot.rest > 0 {
		v := figure.VelocityKmS(lam, wb.plot.rest)
		s += fmt.Sprintf(" · v %.0f km/s (%.4f c)", v, v/physics.SpeedOfLightKmS)
	}
	return s
}

func fmtFloat(x float64, dec int) string { return fmt.Sprintf("%.*f", dec, x) }

// linesDialog lets the user choose the species whose strongest lines the
// plot ticks, from those with lines in the store.
func (wb *workbench) linesDialog() {
	all := wb.bench.LineSpecies()
	names := make([]string, len(all))
	byName := map[string]linelists.Species{}
	for i, sp := range all {
		names[i] = sp.String()
		byName[names[i]] = sp
	}
	group := widget.NewCheckGroup(names, nil)
	for _, sp := range wb.plot.species {
		group.Selected = append(group.Selected, sp.String())
	}
	scroll := container.NewVScroll(group)
	scroll.SetMinSize(fyne.NewSize(260, 320))
	note := widget.NewLabel(fmt.Sprintf("Ticks at the bottom of the plot mark the %d strongest lines (largest Sobolev τ at the photosphere) of each species chosen, at the photosphere's velocity.", core.TickLines))
	note.Wrapping = fyne.TextWrapWord
	dialog.ShowCustomConfirm("Mark the strongest lines of", "Mark", "Cancel", container.NewBorder(note, nil, nil, nil, scroll), func(ok bool) {
		if !ok {
			return
		}
		var sel []linelists.Species
		for _, n := range names { // in the store's order, not the clicks'
			for _, s := range group.Selected {
				if s == n {
					sel = append(sel, byName[n])
				}
			}
		}
		wb.setTickSpecies(sel)
	}, wb.win)
}

// setTickSpecies marks the strongest lines of species on the plot: their
// lines are found for the shown model (a plasma solve, no synthesis) and
// the scene drawn again.
func (wb *workbench) setTickSpecies(species []linelists.Species) {
	ps := &wb.plot
	ps.species = species
	ps.tickGen++
	gen, sc, m := ps.tickGen, ps.scene, ps.sceneModel
	if sc == nil {
		return
	}
	go func() {
		ticks, err := lineTicks(context.Background(), wb.bench, m, species)
		fyne.Do(func() {
			if gen != ps.tickGen || sc != ps.scene {
				return // a newer choice, or a new computation that has its own
			}
			if err != nil {
				ps.readout.SetText("lines not marked: " + err.Error())
				return
			}
			next := *sc
			next.Ticks = ticks
			ps.scene = &next
			wb.redraw()
		})
	}()
}

// shortcutsText lists the workbench's keyboard shortcuts and mouse
// actions, for Help ▸ Keyboard and mouse.
func shortcutsText() string {
	return strings.Join([]string{
		"Editing (anywhere)",
		"Ctrl+Z (⌘Z on macOS) — undo the last parameter change",
		"Ctrl+Shift+Z (⌘⇧Z) — redo",
		"",
		"The plot (click it first, or with no entry field focused; the same switches are in the Figure menu)",
		"mouse wheel — zoom about the pointer (x; y too when the flux range is fixed)",
		"drag — pan; Shift+drag, right-button drag, or any drag after B — zoom to the box drawn",
		"double-click, R, Home or Esc — reset the view to the whole spectrum",
		"+ / − — zoom in / out about the middle",
		"← / → — pan by a fifth of the width",
		"A — fit the flux range to what is shown again",
		"V — x axis in velocity relative to the rest line (enter it under the plot)",
		"D — residual panel (observed − model)/σ",
		"U — the observed ±1σ band",
		"B — box zoom on or off",
		"L — mark the strongest lines of chosen species",
		"",
		"The readout under the plot gives the wavelength, the flux (or residual) and, with a rest line, the velocity v = c (λ_rest − λ)/λ_rest at the pointer.",
	}, "\n")
}

// showShortcuts opens Help ▸ Keyboard and mouse.
func (wb *workbench) showShortcuts() {
	l := widget.NewLabel(shortcutsText())
	l.Wrapping = fyne.TextWrapWord
	scroll := container.NewVScroll(l)
	scroll.SetMinSize(fyne.NewSize(600, 420))
	dialog.ShowCustom("Keyboard and mouse", "Close", scroll, wb.win)
}

// plotArea is the spectrum image with the pointer's actions: wheel zoom,
// drag to pan or to zoom to a box, double-click to reset, the cursor
// readout, and the plot's keys when it has the focus.
type plotArea struct {
	widget.BaseWidget
	wb  *workbench
	box *canvas.Rectangle

	hover    fyne.Position
	hovering bool
	// drag state: where it started, and whether it draws a box.
	dragging, boxDrag bool
	dragFrom, dragTo  fyne.Position
	// the button and modifiers of the last press (desktop only).
	button   desktop.MouseButton
	modifier fyne.KeyModifier
	focused  bool
}

func newPlotArea(wb *workbench) *plotArea {
	a := &plotArea{wb: wb, box: canvas.NewRectangle(nil)}
	a.box.StrokeColor = figure.CandidateStyles[1].Color
	a.box.StrokeWidth = 1
	a.box.Hide()
	a.ExtendBaseWidget(a)
	return a
}

// CreateRenderer implements fyne.Widget.
func (a *plotArea) CreateRenderer() fyne.WidgetRenderer {
	return widget.NewSimpleRenderer(container.NewStack(a.wb.figure, container.NewWithoutLayout(a.box)))
}

// toImage maps a position in the widget to a pixel of the rendered image
// (shown scaled to fit and centred, canvas.ImageFillContain).
func (a *plotArea) toImage(pos fyne.Position) (px, py float64, ok bool) {
	fr := a.wb.plot.frame
	sz := a.Size()
	if fr.Width == 0 || sz.Width <= 0 || sz.Height <= 0 {
		return 0, 0, false
	}
	s := math.Min(float64(sz.Width)/float64(fr.Width), float64(sz.Height)/float64(fr.Height))
	ox := (float64(sz.Width) - float64(fr.Width)*s) / 2
	oy := (float64(sz.Height) - float64(fr.Height)*s) / 2
	return (float64(pos.X) - ox) / s, (float64(pos.Y) - oy) / s, true
}

// dataAt is the vacuum wavelength (Å) and flux under pos on the spectrum
// panel (its transform extended beyond the data area).
func (a *plotArea) dataAt(pos fyne.Position) (lam, y float64, ok bool) {
	px, py, ok := a.toImage(pos)
	if !ok {
		return 0, 0, false
	}
	fr := a.wb.plot.frame
	x, y := fr.Main.ToData(px, py)
	return fr.Axis.Wavelength(x), y, true
}

// Scrolled zooms about the pointer: in when scrolling up.
func (a *plotArea) Scrolled(e *fyne.ScrollEvent) {
	pos := e.Position
	if pos == (fyne.Position{}) && a.hovering {
		pos = a.hover // fyne's test driver sends no position
	}
	if pos == (fyne.Position{}) {
		pos = fyne.NewPos(a.Size().Width/2, a.Size().Height/2)
	}
	lam, y, ok := a.dataAt(pos)
	if !ok || e.Scrolled.DY == 0 {
		return
	}
	a.wb.zoomBy(math.Pow(0.85, float64(e.Scrolled.DY)/10), lam, y)
}

// Dragged pans the view, or draws the zoom box.
func (a *plotArea) Dragged(e *fyne.DragEvent) {
	if !a.dragging {
		a.dragging = true
		a.dragFrom = e.Position.Subtract(e.Dragged)
		a.boxDrag = a.wb.plot.box || a.modifier&fyne.KeyModifierShift != 0 || a.button == desktop.MouseButtonSecondary
	}
	a.dragTo = e.Position
	if a.boxDrag {
		x0, x1 := min(a.dragFrom.X, a.dragTo.X), max(a.dragFrom.X, a.dragTo.X)
		y0, y1 := min(a.dragFrom.Y, a.dragTo.Y), max(a.dragFrom.Y, a.dragTo.Y)
		a.box.Move(fyne.NewPos(x0, y0))
		a.box.Resize(fyne.NewSize(x1-x0, y1-y0))
		a.box.Show()
		return
	}
	l0, y0, ok0 := a.dataAt(e.Position.Subtract(e.Dragged))
	l1, y1, ok1 := a.dataAt(e.Position)
	if !ok0 || !ok1 {
		return
	}
	v := a.wb.viewNow()
	dy := 0.0
	if !v.AutoY() {
		dy = y0 - y1
	}
	a.wb.setView(v.Pan(l0-l1, dy))
}

// DragEnd zooms to the box drawn, if any.
func (a *plotArea) DragEnd() {
	if !a.dragging {
		return
	}
	a.dragging = false
	if !a.boxDrag {
		return
	}
	a.box.Hide()
	l0, y0, ok0 := a.dataAt(a.dragFrom)
	l1, y1, ok1 := a.dataAt(a.dragTo)
	if !ok0 || !ok1 || l0 == l1 {
		return
	}
	v := figure.View{XMin: min(l0, l1), XMax: max(l0, l1), YMin: min(y0, y1), YMax: max(y0, y1)}
	if v.YMax <= v.YMin {
		v.Auto = true
	}
	a.wb.setView(v)
}

// DoubleTapped resets the view.
func (a *plotArea) DoubleTapped(*fyne.PointEvent) { a.wb.resetView() }

// Tapped gives the plot the keyboard.
func (a *plotArea) Tapped(*fyne.PointEvent) {
	if c := fyne.CurrentApp().Driver().CanvasForObject(a); c != nil {
		c.Focus(a)
	}
}

// MouseIn implements desktop.Hoverable.
func (a *plotArea) MouseIn(e *desktop.MouseEvent) { a.MouseMoved(e) }

// MouseMoved shows the cursor readout.
func (a *plotArea) MouseMoved(e *desktop.MouseEvent) {
	a.hover, a.hovering = e.Position, true
	px, py, ok := a.toImage(e.Position)
	if !ok {
		return
	}
	if s := a.wb.readoutText(px, py); s != "" {
		a.wb.plot.readout.SetText(s)
	}
}

// MouseOut implements desktop.Hoverable.
func (a *plotArea) MouseOut() { a.hovering = false }

// MouseDown notes the button and modifiers of a press (for box zoom).
func (a *plotArea) MouseDown(e *desktop.MouseEvent) { a.button, a.modifier = e.Button, e.Modifier }

// MouseUp implements desktop.Mouseable.
func (a *plotArea) MouseUp(*desktop.MouseEvent) {}

// FocusGained implements fyne.Focusable.
func (a *plotArea) FocusGained() { a.focused = true }

// FocusLost implements fyne.Focusable.
func (a *plotArea) FocusLost() { a.focused = false }

// TypedRune implements fyne.Focusable: the plot's keys.
func (a *plotArea) TypedRune(r rune) { a.wb.plotRune(r) }

// TypedKey implements fyne.Focusable: the plot's keys.
func (a *plotArea) TypedKey(e *fyne.KeyEvent) { a.wb.plotKey(e.Name) }

var (
	_ fyne.Scrollable     = (*plotArea)(nil)
	_ fyne.Draggable      = (*plotArea)(nil)
	_ fyne.DoubleTappable = (*plotArea)(nil)
	_ fyne.Focusable      = (*plotArea)(nil)
	_ desktop.Hoverable   = (*plotArea)(nil)
	_ desktop.Mouseable   = (*plotArea)(nil)
)
