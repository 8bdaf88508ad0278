package gui

import (
	"math"
	"strings"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/test"

	"broadline/app/core"
	"broadline/app/figure"
	"broadline/linelists"
)

// plotBench opens the demo workbench at 1280×800, computes its model once
// and counts the computations that finish after that (wb.done) in *n.
func plotBench(t *testing.T) (*workbench, *int) {
	t.Helper()
	wb := demoWorkbench(t)
	wb.win.Resize(fyne.NewSize(1280, 800))
	waitDone(t, wb)
	n := new(int)
	wb.done = func(*core.Overlay, error) { *n++ }
	return wb, n
}

// awaitRedraw runs act and waits until the plot has been drawn again.
func awaitRedraw(t *testing.T, wb *workbench, act func()) {
	t.Helper()
	ch := make(chan error, 8)
	wb.plot.drawn = func(err error) { ch <- err }
	act()
	select {
	case err := <-ch:
		if err != nil {
			t.Fatal(err)
		}
	case <-time.After(time.Minute):
		t.Fatal("no redraw")
	}
	wb.plot.drawn = nil
}

// areaPos is the canvas position of image pixel (px, py) of the plot.
func areaPos(wb *workbench, px, py float64) fyne.Position {
	a := wb.plot.area
	fr := wb.plot.frame
	sz := a.Size()
	s := math.Min(float64(sz.Width)/float64(fr.Width), float64(sz.Height)/float64(fr.Height))
	ox := (float64(sz.Width) - float64(fr.Width)*s) / 2
	oy := (float64(sz.Height) - float64(fr.Height)*s) / 2
	abs := fyne.CurrentApp().Driver().AbsolutePositionForObject(a)
	return abs.Add(fyne.NewPos(float32(ox+px*s), float32(oy+py*s)))
}

// TestPlotZoomAndReset: the mouse wheel over the plot (fyne's test driver)
// narrows the wavelength range about the pointer, a drag pans it, a box
// drawn with Shift held zooms to the box, and double-click, the R key and
// the Reset view button restore the whole spectrum; none of it runs a
// new synthesis, and each redraw reuses the last overlays.
func TestPlotZoomAndReset(t *testing.T) {
	wb, computed := plotBench(t)
	full := wb.plot.frame.View()
	if !(full.XMax > full.XMin) {
		t.Fatalf("no frame after the computation: %+v", wb.plot.frame)
	}
	m := wb.plot.frame.Main
	cx, cy := (m.Left*2+m.Right)/3, (m.Top+m.Bottom)/2
	pos := areaPos(wb, cx, cy)
	test.MoveMouse(wb.win.Canvas(), pos)
	if got := wb.plot.readout.Text; !strings.Contains(got, "µm") || !strings.Contains(got, "flux") {
		t.Errorf("readout %q", got)
	}
	lamAt, _, _ := wb.plot.area.dataAt(wb.plot.area.hover)
	awaitRedraw(t, wb, func() { test.Scroll(wb.win.Canvas(), pos, 0, 10) })
	z := wb.plot.frame.View()
	if w, w0 := z.XMax-z.XMin, full.XMax-full.XMin; math.Abs(w-0.85*w0) > 1e-6*w0 {
		t.Errorf("one wheel step: width %g Å, want 0.85 × %g", w, w0)
	}
	// About the pointer: the wavelength under it stays where it was (in
	// the data area's fraction of the width).
	if f, f0 := (lamAt-z.XMin)/(z.XMax-z.XMin), (lamAt-full.XMin)/(full.XMax-full.XMin); math.Abs(f-f0) > 1e-9 || math.Abs(f0-1.0/3) > 0.01 {
		t.Errorf("zoom not about the pointer: %g Å at fraction %g, was %g", lamAt, f, f0)
	}
	// Pan: dragging 100 px to the right moves the view to the blue.
	before := wb.plot.frame.View()
	awaitRedraw(t, wb, func() { test.Drag(wb.win.Canvas(), pos, 100, 0) })
	after := wb.plot.frame.View()
	shift := before.XMin - after.XMin
	perPx := (before.XMax - before.XMin) / (m.Right - m.Left) // image px
	scale := float64(wb.plot.area.Size().Width) / float64(wb.plot.frame.Width)
	if want := 100 / math.Min(scale, float64(wb.plot.area.Size().Height)/float64(wb.plot.frame.Height)) * perPx; math.Abs(shift-want) > 1e-3*want {
		t.Errorf("drag of 100 px moved the view by %g Å, want %g", shift, want)
	}
	// Box zoom with Shift: fyne's test.Drag gives the start as the
	// position, so the drag is sent as the desktop driver sends it (the
	// pointer's position, the move since the press).
	a := wb.plot.area
	abs := fyne.CurrentApp().Driver().AbsolutePositionForObject(a)
	x0, y0 := (m.Left*3+m.Right)/4, (m.Top*3+m.Bottom)/4
	x1, y1 := (m.Left+m.Right*3)/4, (m.Top+m.Bottom*3)/4
	p0, p1 := areaPos(wb, x0, y0).Subtract(abs), areaPos(wb, x1, y1).Subtract(abs)
	la, fa, _ := a.dataAt(p0)
	lb, fb, _ := a.dataAt(p1)
	a.MouseDown(&desktop.MouseEvent{Button: desktop.MouseButtonPrimary, Modifier: fyne.KeyModifierShift})
	awaitRedraw(t, wb, func() {
		a.Dragged(&fyne.DragEvent{PointEvent: fyne.PointEvent{Position: p1}, Dragged: fyne.Delta{DX: p1.X - p0.X, DY: p1.Y - p0.Y}})
		if !a.box.Visible() {
			t.Error("no box drawn while dragging")
		}
		a.DragEnd()
	})
	a.MouseDown(&desktop.MouseEvent{Button: desktop.MouseButtonPrimary})
	bx := wb.plot.frame.View()
	if math.Abs(bx.XMin-la) > 1e-6*la || math.Abs(bx.XMax-lb) > 1e-6*lb ||
		math.Abs(bx.YMin-fb) > 1e-6*math.Abs(fb-fa) || math.Abs(bx.YMax-fa) > 1e-6*math.Abs(fb-fa) {
		t.Errorf("box zoom to %g–%g Å, %g–%g: view %+v", la, lb, fb, fa, bx)
	}
	for name, reset := range map[string]func(){
		"double-click": func() { test.DoubleTap(wb.plot.area) },
		"R key":        func() { test.TypeOnCanvas(wb.win.Canvas(), "r") },
		"Home key":     func() { wb.win.Canvas().OnTypedKey()(&fyne.KeyEvent{Name: fyne.KeyHome}) },
		"button":       func() { wb.resetView() },
	} {
		awaitRedraw(t, wb, func() { test.Scroll(wb.win.Canvas(), pos, 0, 20) })
		if v := wb.plot.frame.View(); v == full {
			t.Fatalf("%s: the wheel did not zoom", name)
		}
		awaitRedraw(t, wb, reset)
		if v := wb.plot.frame.View(); math.Abs(v.XMin-full.XMin) > 1e-9 || math.Abs(v.XMax-full.XMax) > 1e-9 || v.YMax != full.YMax {
			t.Errorf("%s: view %+v, want the whole %+v", name, v, full)
		}
	}
	if *computed != 0 {
		t.Errorf("%d syntheses ran for zooms and resets, want none", *computed)
	}
	if wb.plot.redraws < 10 {
		t.Errorf("only %d redraws counted", wb.plot.redraws)
	}
}

// TestPlotSwitches: the keys V (with a rest line entered), D and U switch
// the velocity axis, the residual panel and the band without a synthesis;
// the readout then gives the velocity from the rest line; L's species
// choice marks the lines (no synthesis either); the Figure menu shows the
// switches' states; Help lists every shortcut, Ctrl+Z and Ctrl+Shift+Z
// too.
func TestPlotSwitches(t *testing.T) {
	wb, computed := plotBench(t)
	test.Type(wb.plot.restEntry, "1.0 µm")
	if wb.plot.rest != 10000 {
		t.Fatalf("rest line %g Å, want 10000", wb.plot.rest)
	}
	wb.win.Canvas().Unfocus()
	awaitRedraw(t, wb, func() { test.TypeOnCanvas(wb.win.Canvas(), "v") })
	fr := wb.plot.frame
	if !fr.Axis.Velocity() || !wb.plot.velItem.Checked || !strings.HasPrefix(wb.current.Plot.X.Label.Text, "velocity relative to 1.0000 µm") {
		t.Errorf("V: axis %+v, label %q", fr.Axis, wb.current.Plot.X.Label.Text)
	}
	// The readout at a pixel: λ from the frame, v = c(λ_rest − λ)/λ_rest.
	m := fr.Main
	px, py := (m.Left+m.Right)/2, (m.Top+m.Bottom)/2
	x, _ := m.ToData(px, py)
	lam := fr.Axis.Wavelength(x)
	got := wb.readoutText(px, py)
	want := figure.VelocityKmS(lam, 10000)
	if !strings.Contains(got, " v "+strings.TrimSpace(fmtFloat(want, 0))+" km/s") {
		t.Errorf("readout %q, want v = %.0f km/s", got, want)
	}
	awaitRedraw(t, wb, func() { test.TypeOnCanvas(wb.win.Canvas(), "d") })
	if wb.current.Residual == nil || !wb.plot.frame.Residual.Shown {
		t.Error("D: no residual panel")
	}
	if s := wb.readoutText((m.Left+m.Right)/2, (wb.plot.frame.Residual.Top+wb.plot.frame.Residual.Bottom)/2); !strings.Contains(s, "(obs − model)/σ") {
		t.Errorf("readout over the residual panel %q", s)
	}
	awaitRedraw(t, wb, func() { test.TypeOnCanvas(wb.win.Canvas(), "u") })
	if !wb.plot.disp.Band || !wb.plot.bandItem.Checked {
		t.Error("U: no band")
	}
	var sp []linelists.Species
	for _, s := range wb.bench.LineSpecies() {
		if s.Charge == 1 && len(sp) < 2 {
			sp = append(sp, s)
		}
	}
	awaitRedraw(t, wb, func() { wb.setTickSpecies(sp) })
	if len(wb.plot.scene.Ticks) != len(sp) || len(wb.plot.scene.Ticks[0].Acting) == 0 {
		t.Errorf("ticks %+v for %v", wb.plot.scene.Ticks, sp)
	}
	if *computed != 0 {
		t.Errorf("%d syntheses for display switches, want none", *computed)
	}
	// A new computation keeps the ticks (found again for its model) and
	// the display.
	waitDone(t, wb)
	if len(wb.plot.scene.Ticks) != len(sp) || !wb.plot.frame.Axis.Velocity() || !wb.plot.frame.Residual.Shown {
		t.Errorf("after a computation: ticks %d, axis %+v", len(wb.plot.scene.Ticks), wb.plot.frame.Axis)
	}
	help := shortcutsText()
	for _, k := range []string{"Ctrl+Z", "Ctrl+Shift+Z", "wheel", "drag", "double-click", "R,", "+ / −", "← / →", "A —", "V —", "D —", "U —", "B —", "L —"} {
		if !strings.Contains(help, k) {
			t.Errorf("shortcuts lack %q", k)
		}
	}
	found := false
	for _, mn := range wb.win.MainMenu().Items {
		for _, it := range mn.Items {
			if mn.Label == "Help" && strings.HasPrefix(it.Label, "Keyboard and mouse") {
				found = true
			}
		}
	}
	if !found {
		t.Error("no Help ▸ Keyboard and mouse")
	}
}
