package main

import (
	"path/filepath"
	"strings"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"
)

// demoBench loads the built-in demo once per test binary.
func demoBench(t *testing.T) *bench {
	t.Helper()
	d, err := loadDemo()
	if err != nil {
		t.Fatal(err)
	}
	b, err := newBench(d)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// waitDone runs wb.recompute and waits for its result.
func waitDone(t *testing.T, wb *workbench) *overlay {
	t.Helper()
	type res struct {
		ov  *overlay
		err error
	}
	ch := make(chan res, 4)
	wb.done = func(ov *overlay, err error) { ch <- res{ov, err} }
	wb.recompute()
	select {
	case r := <-ch:
		if r.err != nil {
			t.Fatal(r.err)
		}
		return r.ov
	case <-time.After(2 * time.Minute):
		t.Fatal("computation did not finish")
	}
	return nil
}

// TestWorkbenchOnDemo drives the workbench headless on the built-in demo: the
// window has its three panels and menus; the model at the scenario's recorded
// (true) parameters fits the invented observation to within its noise
// (χ²/N near 1, since the demo data are this model plus Gaussian noise of the
// recorded σ), a velocity far from the truth fits clearly worse, and the
// figure and feature table are filled.
func TestWorkbenchOnDemo(t *testing.T) {
	a := test.NewTempApp(t)
	b := demoBench(t)
	sess := newSession("demo", b.data)
	wb := newWorkbench(a, b, sess)
	defer wb.win.Close()

	if wb.win.Title() != "broadline" {
		t.Errorf("title %q", wb.win.Title())
	}
	var cards []string
	var walk func(o fyne.CanvasObject)
	walk = func(o fyne.CanvasObject) {
		if c, ok := o.(*widget.Card); ok {
			cards = append(cards, c.Title)
		}
		if w, ok := o.(fyne.Widget); ok {
			for _, ch := range test.WidgetRenderer(w).Objects() {
				walk(ch)
			}
		} else if c, ok := o.(*fyne.Container); ok {
			for _, ch := range c.Objects {
				walk(ch)
			}
		}
	}
	walk(wb.win.Content())
	if got := strings.Join(cards, ","); !strings.Contains(got, "Ejecta model") || !strings.Contains(got, "Spectrum") || !strings.Contains(got, "Features") {
		t.Errorf("panels %q", got)
	}
	if m := wb.win.MainMenu(); m == nil || len(m.Items) != 2 || m.Items[1].Label != "Help" {
		t.Errorf("menus wrong: %+v", m)
	}

	truth := waitDone(t, wb)
	if truth.N < 500 {
		t.Fatalf("only %d samples compared", truth.N)
	}
	red := truth.Chi2 / float64(truth.N)
	if red < 0.7 || red > 1.5 {
		t.Errorf("χ²/N at the recorded parameters = %.3f, want ≈ 1 (data = model + noise)", red)
	}
	if !strings.Contains(wb.status.Text, "χ²/N") {
		t.Errorf("status %q lacks the fit statistic", wb.status.Text)
	}
	if b := wb.figure.Image.Bounds(); b.Dx() < 500 || b.Dy() < 300 {
		t.Errorf("figure not drawn: %v", b)
	}
	if len(wb.featRows) == 0 {
		t.Errorf("no features found in the demo spectrum")
	}

	// Move the photosphere well away from the truth through the slider.
	v0 := sess.PhotosphereVelocity
	wb.velocity.SetValue(v0 * 0.5)
	if sess.PhotosphereVelocity != v0*0.5 {
		t.Fatalf("slider did not reach the session: %g", sess.PhotosphereVelocity)
	}
	off := waitDone(t, wb)
	if off.Chi2/float64(off.N) < 3*red {
		t.Errorf("χ²/N at half the true velocity %.3f is not clearly worse than at the truth %.3f", off.Chi2/float64(off.N), red)
	}

	// Save this state, change the epoch, then open the saved file: the
	// controls and the session return to the saved values.
	path := filepath.Join(t.TempDir(), "s.json")
	if err := sess.Save(path); err != nil {
		t.Fatal(err)
	}
	saved := *sess
	wb.epoch.SetSelectedIndex(2)
	if sess.Epoch != 2 || sess.PhotosphereVelocity == saved.PhotosphereVelocity {
		t.Fatalf("epoch change did not reach the session: %+v", sess)
	}
	wb.done = nil
	if err := wb.openSession(path); err != nil {
		t.Fatal(err)
	}
	if *sess != saved || wb.epoch.SelectedIndex() != saved.Epoch || wb.velocity.Value != saved.PhotosphereVelocity {
		t.Errorf("after opening: session %+v, epoch control %d, velocity control %g; want %+v", sess, wb.epoch.SelectedIndex(), wb.velocity.Value, saved)
	}
	// A session for another dataset is refused and changes nothing.
	bad := saved
	bad.Dataset = "other"
	if err := bad.Save(path); err != nil {
		t.Fatal(err)
	}
	if err := wb.openSession(path); err == nil || *sess != saved {
		t.Errorf("foreign session accepted (err %v), session now %+v", err, sess)
	}
	waitDone(t, wb) // let the recomputation started by openSession finish
}

// TestModelCautions checks that the help text names every approximation the
// project promises to state (LTE, Sobolev, sharp photosphere, incomplete
// atomic data; an identification is a hypothesis).
func TestModelCautions(t *testing.T) {
	for _, want := range []string{"LTE", "Sobolev", "sharp photosphere", "Incomplete atomic data", "hypothesis", "radiative-transfer"} {
		if !strings.Contains(modelCautions, want) {
			t.Errorf("help text lacks %q", want)
		}
	}
}
