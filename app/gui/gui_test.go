package gui

import (
	"broadline/app/core"
	"broadline/app/figure"
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
func demoBench(t *testing.T) *core.Bench {
	t.Helper()
	b, err := core.Demo()
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
	wb := newWorkbench(test.NewTempApp(t), b, core.NewSession(b))
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
func waitDone(t *testing.T, wb *workbench) *core.Overlay {
	t.Helper()
	return await(t, func(f func(*core.Overlay, error)) { wb.done = f }, wb.recompute)
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
	sess := core.NewSession(b)
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
	if m := wb.win.MainMenu(); m == nil || len(m.Items) != 4 || m.Items[1].Label != "Edit" || m.Items[2].Label != "Figure" || m.Items[3].Label != "Help" {
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
	sess := core.NewSession(b)
	truth := sess.PhotosphereVelocity
	wb := newWorkbench(a, b, sess)
	defer wb.win.Close()

	sess.PhotosphereVelocity = truth + 0.05
	wb.syncControls()
	sw := waitJob(t, wb, func() { wb.startSweep(core.Velocity, truth-0.06, truth+0.06, 13) }).(*core.Sweep)
	if math.Abs(sw.Best-truth) > 0.01 || !strings.Contains(wb.status.Text, "least") || !strings.Contains(wb.status.Text, "at T_ph = ") {
		t.Errorf("sweep best %.4f c (recorded %.4f), status %q", sw.Best, truth, wb.status.Text)
	}
	if sess.PhotosphereVelocity != truth+0.05 {
		t.Errorf("the sweep changed the session's velocity before it was used")
	}
	wb.done = func(*core.Overlay, error) {}
	wb.useSweep(sw)
	if sess.PhotosphereVelocity != core.Velocity.Round(sw.Best) || wb.velocity.Value != sess.PhotosphereVelocity {
		t.Errorf("use: session %g, slider %g, want %g", sess.PhotosphereVelocity, wb.velocity.Value, sw.Best)
	}
	waitDone(t, wb)

	if err := wb.keepCandidate(); err != nil {
		t.Fatal(err)
	}
	// A bad composition typed and applied changes nothing and says why.
	before := sess.Model
	wb.fractions.SetText("")
	test.Type(wb.fractions, "Sr=abc")
	test.Tap(wb.applyBtn)
	if sess.Model != before || !strings.Contains(wb.status.Text, "not applied") {
		t.Errorf("after a bad composition: model changed %v, status %q", sess.Model != before, wb.status.Text)
	}
	wb.fractions.SetText("")
	test.Type(wb.fractions, noSr)
	test.Tap(wb.applyBtn)
	if sess.MassFractions.String() == before.MassFractions.String() {
		t.Error("the typed composition was not applied")
	}
	waitDone(t, wb)
	if err := wb.keepCandidate(); err != nil {
		t.Fatal(err)
	}
	if wb.candList.Length() != 2 || !strings.HasPrefix(wb.candidateText(1), "B · 1.5 d") {
		t.Errorf("list of %d, second %q", wb.candList.Length(), wb.candidateText(1))
	}
	shown := waitJob(t, wb, func() { wb.startComparison() }).(*figure.Captioned)
	if len(shown.Caption) != 4 {
		t.Errorf("caption %q", shown.Caption)
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
	back, err := core.LoadSession(path, b)
	if err != nil || len(back.Candidates) != 2 || back.Candidates[1].MassFractions.String() != mustComp(t, noSr).String() {
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
		if !strings.Contains(core.ModelCautions, want) {
			t.Errorf("help text lacks %q", want)
		}
	}
}

// noSr is the demo composition with its strontium moved to xenon (which
// has no demo lines): a wrong candidate.
const noSr = "Ca=0.002,Y=0.002,Zr=0.008,Ce=4e-5,Nd=7e-5,Sm=2.5e-5,Eu=1.5e-5,Se=0.25,Br=0.04,Kr=0.25,Rb=0.05,Mo=0.05,Ru=0.06,Pd=0.05,Te=0.13,Xe=0.10785"

// mustComp parses a composition the test writes.
func mustComp(t testing.TB, s string) core.Composition {
	t.Helper()
	c, err := core.ParseComposition(s)
	if err != nil {
		t.Fatal(err)
	}
	return c
}
