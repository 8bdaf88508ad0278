package main

import (
	"math"
	"os"
	"path/filepath"
	"reflect"
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

// demoWorkbench opens a workbench on the built-in demo in a test app,
// closed when the test ends.
func demoWorkbench(t *testing.T) *workbench {
	t.Helper()
	b := demoBench(t)
	wb := newWorkbench(test.NewTempApp(t), b, newSession("demo", b.data))
	t.Cleanup(wb.win.Close)
	return wb
}

// await installs a completion hook with hook, runs start, and waits for
// the hook's result (failing the test on an error or after two minutes).
func await[T any](t *testing.T, hook func(func(T, error)), start func()) T {
	t.Helper()
	type res struct {
		v   T
		err error
	}
	ch := make(chan res, 4)
	hook(func(v T, err error) { ch <- res{v, err} })
	start()
	select {
	case r := <-ch:
		if r.err != nil {
			t.Fatal(r.err)
		}
		return r.v
	case <-time.After(2 * time.Minute):
		t.Fatal("computation did not finish")
	}
	var zero T
	return zero
}

// waitDone runs wb.recompute and waits for its result.
func waitDone(t *testing.T, wb *workbench) *overlay {
	t.Helper()
	return await(t, func(f func(*overlay, error)) { wb.done = f }, wb.recompute)
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
	if m := wb.win.MainMenu(); m == nil || len(m.Items) != 3 || m.Items[1].Label != "Figure" || m.Items[2].Label != "Help" {
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
	if !reflect.DeepEqual(*sess, saved) || wb.epoch.SelectedIndex() != saved.Epoch || wb.velocity.Value != saved.PhotosphereVelocity {
		t.Errorf("after opening: session %+v, epoch control %d, velocity control %g; want %+v", sess, wb.epoch.SelectedIndex(), wb.velocity.Value, saved)
	}
	// A session for another dataset is refused and changes nothing.
	bad := saved
	bad.Dataset = "other"
	if err := bad.Save(path); err != nil {
		t.Fatal(err)
	}
	if err := wb.openSession(path); err == nil || !reflect.DeepEqual(*sess, saved) {
		t.Errorf("foreign session accepted (err %v), session now %+v", err, sess)
	}
	waitDone(t, wb) // let the recomputation started by openSession finish
}

// waitJob runs start and waits for the sweep, comparison, identification
// or dataset load it begins.
func waitJob(t *testing.T, wb *workbench, start func()) any {
	t.Helper()
	return await(t, func(f func(any, error)) { wb.jobDone = f }, start)
}

// TestWorkbenchTools drives the sweep, the candidates and the comparison
// export through the workbench: a sweep from a wrong velocity finds the
// recorded one and "use" puts it in the session and the slider; two kept
// candidates appear in the list and are saved with the session; the
// comparison figure is exported as a PNG; removing a candidate updates the
// list.
func TestWorkbenchTools(t *testing.T) {
	a := test.NewTempApp(t)
	b := demoBench(t)
	sess := newSession("demo", b.data)
	truth := sess.PhotosphereVelocity
	wb := newWorkbench(a, b, sess)
	defer wb.win.Close()

	sess.PhotosphereVelocity = truth + 0.05
	wb.syncControls()
	sw := waitJob(t, wb, func() { wb.startSweep(sweepVelocityParam, truth-0.06, truth+0.06, 13) }).(*paramSweep)
	if math.Abs(sw.Best-truth) > 0.01 || !strings.Contains(wb.status.Text, "least") {
		t.Errorf("sweep best %.4f c (recorded %.4f), status %q", sw.Best, truth, wb.status.Text)
	}
	if sess.PhotosphereVelocity != truth+0.05 {
		t.Errorf("the sweep changed the session's velocity before it was used")
	}
	wb.done = func(*overlay, error) {}
	wb.useSweep(sw)
	if math.Abs(sess.PhotosphereVelocity-sw.Best) > 0.0005 || wb.velocity.Value != sess.PhotosphereVelocity {
		t.Errorf("use: session %g, slider %g, want %g", sess.PhotosphereVelocity, wb.velocity.Value, sw.Best)
	}
	waitDone(t, wb)

	if err := wb.keepCandidate(); err != nil {
		t.Fatal(err)
	}
	wb.fractions.SetText(noSr)
	sess.MassFractions = noSr
	if err := wb.keepCandidate(); err != nil {
		t.Fatal(err)
	}
	if wb.candList.Length() != 2 || !strings.HasPrefix(wb.candidateText(1), "B · 1.5 d") {
		t.Errorf("list of %d, second %q", wb.candList.Length(), wb.candidateText(1))
	}
	shown := waitJob(t, wb, func() { wb.startComparison() }).(*exportable)
	if len(shown.caption) != 4 {
		t.Errorf("caption %q", shown.caption)
	}
	out := filepath.Join(t.TempDir(), "fig.png")
	if err := wb.exportComparison(out); err != nil {
		t.Fatal(err)
	}
	if fi, err := os.Stat(out); err != nil || fi.Size() < 10000 {
		t.Errorf("exported figure: %v", err)
	}
	path := filepath.Join(t.TempDir(), "s.json")
	if err := sess.Save(path); err != nil {
		t.Fatal(err)
	}
	back, err := loadSession(path, "demo", b.data)
	if err != nil || len(back.Candidates) != 2 || back.Candidates[1].MassFractions != noSr {
		t.Errorf("saved candidates: %+v, %v", back, err)
	}
	wb.removeCandidate(0)
	if wb.candList.Length() != 1 || sess.Candidates[0].Label != "B" {
		t.Errorf("after removing A: %d candidates, first %q", wb.candList.Length(), sess.Candidates[0].Label)
	}
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
