package gui

import (
	"broadline/app/core"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"fyne.io/fyne/v2/test"
)

// TestWorkbenchOpensDataset: Session ▸ Open dataset… replaces the demo by
// the user's dataset in the same window, with a fresh session for it.
func TestWorkbenchOpensDataset(t *testing.T) {
	path := exampleDataset(t)
	wb := demoWorkbench(t)
	wb.done = func(*core.Overlay, error) {}
	nw := waitJob(t, wb, func() { wb.startOpenDataset(path) }).(*workbench)
	if nw.win != wb.win || nw.sess.Dataset != path || nw.bench.Name != path || !strings.Contains(nw.win.Title(), "DEMO-1") {
		t.Errorf("after opening: same window %v, session dataset %q, title %q", nw.win == wb.win, nw.sess.Dataset, nw.win.Title())
	}
	if got := waitDone(t, nw); got.N < 500 {
		t.Errorf("%d samples compared in the opened dataset", got.N)
	}
	// A bad path leaves the shown dataset as it was.
	ch := make(chan error, 1)
	nw.jobDone = func(_ any, err error) { ch <- err }
	nw.startOpenDataset(filepath.Join(t.TempDir(), "none.json"))
	if err := <-ch; err == nil || nw.bench.Name != path {
		t.Errorf("opening a missing file: %v; dataset now %q", err, nw.bench.Name)
	}
}

// TestWorkbenchIdentify: Identify fills the table's model columns, and a new
// model computation empties them again (they belonged to the old model).
func TestWorkbenchIdentify(t *testing.T) {
	wb := demoWorkbench(t)
	if got := wb.featureCell(0, 4); got != "(press Identify)" {
		t.Errorf("before: %q", got)
	}
	waitJob(t, wb, func() { wb.startIdentify() })
	if got := wb.featureCell(0, 4); !strings.Contains(got, "%") {
		t.Errorf("elements cell %q", got)
	}
	if got := wb.featureCell(0, 5); !strings.Contains(got, "Å (τ") {
		t.Errorf("lines cell %q", got)
	}
	waitDone(t, wb) // the same model again: the identification stays
	if got := wb.featureCell(0, 4); !strings.Contains(got, "%") {
		t.Errorf("after recomputing the same model: %q", got)
	}
	wb.temp.SetValue(wb.sess.Temperature + 500)
	waitDone(t, wb)
	if got := wb.featureCell(0, 4); got != "(press Identify)" {
		t.Errorf("after changing the model: %q", got)
	}
}

// TestWorkbenchToolKeepsModel: a sweep started while the model is
// computing runs beside it; the model's computation finishes (it is not
// cancelled), so the figure shows the session's model.
func TestWorkbenchToolKeepsModel(t *testing.T) {
	wb := demoWorkbench(t)
	ch := make(chan error, 8)
	wb.done = func(_ *core.Overlay, err error) { ch <- err }
	wb.sess.Temperature = 5200
	wb.syncControls()
	wb.recompute()
	v := wb.sess.PhotosphereVelocity
	waitJob(t, wb, func() { wb.startSweep(core.Velocity, v-0.02, v+0.02, 3) })
	if err := <-ch; err != nil {
		t.Errorf("the model's computation: %v", err)
	}
}

// TestWorkbenchKnockOut: choosing an element draws the model without its
// lines as well. Without Sr the model fits the invented data (made with Sr)
// worse, and at the 0.78-µm feature, which Sr II lines help make, it
// absorbs less: its flux there is higher than the full model's.
func TestWorkbenchKnockOut(t *testing.T) {
	wb := demoWorkbench(t)
	if got := wb.knockSel.Options; len(got) != 9 || got[0] != "nothing" || got[2] != "Sr" {
		t.Errorf("knock-out choices %q, want nothing and the eight elements with demo lines by Z", got)
	}
	full := waitDone(t, wb)
	if wb.lastKnock != nil {
		t.Error("a knock-out was drawn before one was chosen")
	}
	wb.done = nil
	ch := make(chan *core.Overlay, 1)
	wb.done = func(ov *core.Overlay, err error) {
		if err != nil {
			t.Error(err)
		}
		ch <- ov
	}
	wb.knockSel.SetSelected("Sr")
	<-ch
	k := wb.lastKnock
	if k == nil {
		t.Fatal("no knock-out computed")
	}
	if k.Chi2/float64(k.N) < 2*full.Chi2/float64(full.N) {
		t.Errorf("χ²/N without Sr %.2f, with it %.2f: want clearly worse", k.Chi2/float64(k.N), full.Chi2/float64(full.N))
	}
	var dk, df float64
	for i, w := range full.Wavelength {
		if math.Abs(w-7842) < 200 {
			dk += k.Flux[i]
			df += full.Flux[i]
		}
	}
	if !(dk > 1.02*df) {
		t.Errorf("at 0.78 µm the model without Sr has %.4g, with it %.4g: want less absorption without", dk, df)
	}
	// Figure ▸ Export the shown figure writes what the window shows, with
	// the caption naming the model, the knock-out and the cautions.
	out := filepath.Join(t.TempDir(), "shown.svg")
	if err := wb.exportCurrent(out); err != nil {
		t.Fatal(err)
	}
	svg, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"model without Sr", "without the lines of Sr", "v_ph = 0.240 c", "hypothesis", "INVENTED"} {
		if !strings.Contains(string(svg), want) {
			t.Errorf("exported figure lacks %q", want)
		}
	}
}

// TestWorkbenchUnits: choosing nm shows the feature table and the figure in
// nm (the 0.7842-µm feature as 784.2), is kept in the session, and survives
// saving; a session with an unknown unit is refused.
func TestWorkbenchUnits(t *testing.T) {
	wb := demoWorkbench(t)
	b := wb.bench
	if got := wb.featureCell(1, 0); got != "0.7842" {
		t.Errorf("in µm: %q", got)
	}
	ch := make(chan error, 4)
	wb.done = func(_ *core.Overlay, err error) { ch <- err }
	wb.unitSel.SetSelected("nm")
	if err := <-ch; err != nil {
		t.Fatal(err)
	}
	if got := wb.featureCell(1, 0); got != "784.2" || wb.sess.WavelengthUnit != "nm" {
		t.Errorf("in nm: cell %q, session unit %q", got, wb.sess.WavelengthUnit)
	}
	if lo, hi := wb.current.Plot.X.Min, wb.current.Plot.X.Max; lo < 300 || hi > 3000 {
		t.Errorf("figure's axis %g–%g, want nm (400–2400)", lo, hi)
	}
	path := filepath.Join(t.TempDir(), "s.json")
	if err := wb.sess.Save(path); err != nil {
		t.Fatal(err)
	}
	back, err := core.LoadSession(path, b)
	if err != nil || back.WavelengthUnit != "nm" {
		t.Errorf("saved unit %q, %v", back.WavelengthUnit, err)
	}
	bad := *wb.sess
	bad.WavelengthUnit = "furlong"
	if err := bad.Validate(b.Data); err == nil {
		t.Error("an unknown wavelength unit was accepted")
	}
}

// TestWorkbenchZone drives the inner-zone entries on the demo's last
// epoch: they show the recorded zone; the label says the photosphere is
// inside it and names the elements without lines; emptying the inner
// entry and applying gives uniform ejecta (a different model flux); typing
// the zone back restores the recorded model; a bad boundary changes
// nothing and says why; knocking out Nd on the zoned model changes the
// near-infrared flux by more than 20 % somewhere in 1.0–2.4 µm.
func TestWorkbenchZone(t *testing.T) {
	if testing.Short() {
		t.Skip("synthesises the demo")
	}
	wb := demoWorkbench(t)
	wb.epoch.SetSelectedIndex(2) // starts a computation
	recorded := wb.sess.Model
	if !recorded.HasZone() || wb.innerFractions.Text != recorded.InnerMassFractions.String() || wb.boundary.Text != "0.16c" {
		t.Fatalf("entries %q / %q for the recorded zone %+v", wb.innerFractions.Text, wb.boundary.Text, recorded)
	}
	if !strings.Contains(wb.zoneLabel.Text, "inside the inner zone") || !strings.Contains(wb.lineless.Text, "Se, Br, Kr") {
		t.Errorf("labels %q / %q", wb.zoneLabel.Text, wb.lineless.Text)
	}
	zoned := waitDone(t, wb)

	wb.innerFractions.SetText("")
	ch := make(chan *core.Overlay, 1)
	wb.done = func(ov *core.Overlay, err error) {
		if err != nil {
			t.Error(err)
		}
		ch <- ov
	}
	test.Tap(wb.applyBtn)
	flat := <-ch
	if wb.sess.HasZone() || wb.boundary.Text != "" || !strings.Contains(wb.zoneLabel.Text, "uniform") {
		t.Errorf("after emptying the inner zone: %+v, boundary entry %q, label %q", wb.sess.Model, wb.boundary.Text, wb.zoneLabel.Text)
	}
	if reflect.DeepEqual(flat.Flux, zoned.Flux) {
		t.Error("uniform ejecta give the zoned flux")
	}

	before := wb.sess.Model
	test.Type(wb.innerFractions, recorded.InnerMassFractions.String())
	wb.boundary.SetText("")
	test.Type(wb.boundary, "0.5c")
	test.Tap(wb.applyBtn)
	if wb.sess.Model != before || !strings.Contains(wb.status.Text, "not applied") || !strings.Contains(wb.status.Text, "outer velocity") {
		t.Errorf("bad boundary: model changed %v, status %q", wb.sess.Model != before, wb.status.Text)
	}
	wb.boundary.SetText("")
	test.Type(wb.boundary, "0.16c")
	test.Tap(wb.applyBtn)
	back := <-ch
	if wb.sess.Model != recorded || !reflect.DeepEqual(back.Flux, zoned.Flux) {
		t.Errorf("typed the zone back: %+v, want %+v", wb.sess.Model, recorded)
	}

	wb.knockSel.SetSelected("Nd")
	<-ch
	k := wb.lastKnock
	if k == nil {
		t.Fatal("no knock-out computed")
	}
	most := 0.0
	for i, w := range back.Wavelength {
		if w >= 10000 && w <= 24000 {
			most = math.Max(most, math.Abs(k.Flux[i]/back.Flux[i]-1))
		}
	}
	if most < 0.2 {
		t.Errorf("Nd knock-out on the last epoch changes the 1.0–2.4 µm flux by at most %.3g, want > 0.2", most)
	}
}
