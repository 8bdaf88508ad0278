package gui

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	stdpng "image/png"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"
	"gonum.org/v1/plot/vg"

	"broadline/app/core"
	"broadline/app/figure"
)

// cheapWorkbench is the workbench on the example dataset with its model
// range cut to 0.36–0.7 µm, in preview, so that a fit is quick.
func cheapWorkbench(t *testing.T) *workbench {
	t.Helper()
	path := exampleDataset(t)
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var d map[string]any
	if err := json.Unmarshal(raw, &d); err != nil {
		t.Fatal(err)
	}
	d["model_to_um"] = 0.7
	raw, _ = json.Marshal(d)
	if err := os.WriteFile(path, raw, 0o644); err != nil {
		t.Fatal(err)
	}
	b, err := core.OpenDataset(context.Background(), path, nil)
	if err != nil {
		t.Fatal(err)
	}
	s := core.NewSession(b)
	s.Preview = true
	wb := newWorkbench(test.NewTempApp(t), b, s)
	t.Cleanup(wb.win.Close)
	return wb
}

// TestFitFormRefuses: the form's request needs something free and an
// epoch, and readable numbers.
func TestFitFormRefuses(t *testing.T) {
	wb := cheapWorkbench(t)
	f := wb.newFitForm()
	if len(f.epochs.Selected) != 1 || !strings.HasPrefix(f.epochs.Selected[0], "1 ") {
		t.Errorf("epochs chosen at first: %v, want the shown one", f.epochs.Selected)
	}
	if _, err := f.request(); err == nil || !strings.Contains(err.Error(), "nothing to fit") {
		t.Errorf("nothing free: %v", err)
	}
	f.elements.SetSelected([]string{"Sr"})
	f.epochs.SetSelected(nil)
	if _, err := f.request(); err == nil || !strings.Contains(err.Error(), "epoch") {
		t.Errorf("no epoch: %v", err)
	}
	f.epochs.SetSelected(f.epochs.Options[1:3])
	f.samples.SetText("2")
	if _, err := f.request(); err == nil {
		t.Error("2 posterior steps accepted")
	}
	f.samples.SetText("10")
	f.seed.SetText("")
	test.Type(f.seed, "17")
	r, err := f.request()
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Free) != 1 || r.Free[0] != "Sr" || len(r.Epochs) != 2 || r.Epochs[0] != 1 || r.Epochs[1] != 2 || r.Samples != 10 || r.Seed != 17 {
		t.Errorf("request %+v", r)
	}
}

// TestWorkbenchFit runs a fit with a short posterior from the workbench:
// the result table has a row per parameter with the posterior's columns,
// the corner plot is drawn and exports as PNG and SVG, "Use best" sets the
// session to the best model exactly (the velocity not snapped to the
// slider's step), and is refused once the model has changed.
func TestWorkbenchFit(t *testing.T) {
	wb := cheapWorkbench(t)
	f := wb.newFitForm()
	f.elements.SetSelected([]string{"Sr"})
	f.velocity.SetChecked(true)
	f.samples.SetText("6")
	r, err := f.request()
	if err != nil {
		t.Fatal(err)
	}
	s := waitJob(t, wb, func() { wb.startFit(r) }).(*fitShown)
	rows := fitRows(s.out)
	if len(rows) != 3 || rows[1][0] != "X(Sr)" || rows[1][1] == "" || rows[1][2] == "" || rows[2][4] == "" {
		t.Errorf("result rows %q", rows)
	}
	if s.corner == nil || s.img == nil || s.img.Bounds().Dx() < 300 {
		t.Fatal("no corner plot")
	}
	dir := t.TempDir()
	for _, name := range []string{"c.png", "c.svg"} {
		if err := wb.exportCorner(s, filepath.Join(dir, name)); err != nil {
			t.Fatal(err)
		}
	}
	if b, _ := os.ReadFile(filepath.Join(dir, "c.png")); !bytes.HasPrefix(b, []byte("\x89PNG")) {
		t.Error("corner PNG not written")
	}
	if b, _ := os.ReadFile(filepath.Join(dir, "c.svg")); !bytes.Contains(b, []byte("<svg")) {
		t.Error("corner SVG not written")
	}
	if !strings.Contains(fitSummary(s.out), "hypothesis") {
		t.Error("the summary does not carry the caution")
	}
	best := s.out.Models[0]
	if err := wb.useFit(s.out); err != nil {
		t.Fatal(err)
	}
	if wb.sess.Model != best {
		t.Errorf("after Use best the session holds %+v, want %+v", wb.sess.Model, best)
	}
	if err := wb.useFit(s.out); err == nil {
		t.Error("Use best accepted for a model that has changed since the fit")
	}
}

// TestWorkbenchKeepsKnockOut: the knock-out chosen is the session's (saved
// with it) and a session's knock-out is selected when the window opens;
// one without lines in the line lists is dropped with a message.
func TestWorkbenchKeepsKnockOut(t *testing.T) {
	b := demoBench(t)
	s := core.NewSession(b)
	s.KnockOut = "Nd"
	wb := newWorkbench(test.NewTempApp(t), b, s)
	t.Cleanup(wb.win.Close)
	if wb.knockSel.Selected != "Nd" || wb.without != 60 {
		t.Errorf("opened with knock-out %q (Z %d), want Nd", wb.knockSel.Selected, wb.without)
	}
	wb.knockSel.SetSelected("Sr")
	if wb.sess.KnockOut != "Sr" || wb.without != 38 {
		t.Errorf("after choosing Sr: session %q, Z %d", wb.sess.KnockOut, wb.without)
	}
	wb.knockSel.SetSelectedIndex(0)
	if wb.sess.KnockOut != "" || wb.without != 0 {
		t.Errorf("after choosing nothing: session %q, Z %d", wb.sess.KnockOut, wb.without)
	}
	s2 := core.NewSession(b)
	s2.KnockOut = "Xe" // the demo has no Xe lines
	wb2 := newWorkbench(test.NewTempApp(t), b, s2)
	t.Cleanup(wb2.win.Close)
	if wb2.without != 0 || wb2.sess.KnockOut != "" || !strings.Contains(wb2.status.Text, "Xe") {
		t.Errorf("a knock-out without lines: Z %d, session %q, status %q", wb2.without, wb2.sess.KnockOut, wb2.status.Text)
	}
}

// TestUseTemperatureSweepExactly: "Use T_ph = …" puts the value the button
// gives (to 1 K) in the session, not the slider's 50-K step, and the label
// shows it; once the velocity has changed, the sweep is refused.
func TestUseTemperatureSweepExactly(t *testing.T) {
	wb := cheapWorkbench(t)
	t0 := wb.sess.Temperature
	sw := waitJob(t, wb, func() { wb.startSweep(core.Temperature, t0-700, t0+900, 5) }).(*core.Sweep)
	if !strings.Contains(wb.status.Text, "at v_ph = ") {
		t.Errorf("the sweep's message does not say the velocity it was made at: %q", wb.status.Text)
	}
	wb.done = func(*core.Overlay, error) {}
	want := math.Round(sw.Best)
	wb.useSweep(sw)
	if wb.sess.Temperature != want || !strings.Contains(wb.tempLabel.Text, strconv.Itoa(int(want))) {
		t.Errorf("used T = %g (label %q), want %g (best %g)", wb.sess.Temperature, wb.tempLabel.Text, want, sw.Best)
	}
	wb.sess.PhotosphereVelocity += 0.01
	before := wb.sess.Model
	wb.useSweep(sw)
	if wb.sess.Model != before || !strings.Contains(wb.status.Text, "another model") {
		t.Errorf("a sweep for another velocity was used: %q", wb.status.Text)
	}
}

// TestEpochSwitchKeepsValues drives the epoch selector: a new epoch starts
// at the dataset's values and says so, the composition stays, and going
// back restores the values left there; the selector gives up the keyboard.
func TestEpochSwitchKeepsValues(t *testing.T) {
	wb := cheapWorkbench(t)
	wb.done = func(*core.Overlay, error) {}
	wb.sess.PhotosphereVelocity, wb.sess.Temperature = 0.2, 4450
	comp, err := core.ParseComposition("Sr=0.2,Kr=0.8")
	if err != nil {
		t.Fatal(err)
	}
	wb.sess.MassFractions = comp
	wb.syncControls()
	wb.win.Canvas().Focus(wb.epoch)
	ch := make(chan struct{}, 4)
	wb.done = func(*core.Overlay, error) { ch <- struct{}{} }
	wb.epoch.SetSelectedIndex(1)
	<-ch
	st := wb.bench.Data.StartModel(1)
	if wb.sess.Epoch != 1 || wb.sess.Temperature != st.Temperature || wb.sess.MassFractions != comp {
		t.Errorf("on epoch 2: %+v", wb.sess.Model)
	}
	if !strings.Contains(wb.status.Text, "recorded") || wb.win.Canvas().Focused() != nil {
		t.Errorf("status %q, focus %v", wb.status.Text, wb.win.Canvas().Focused())
	}
	wb.epoch.SetSelectedIndex(0)
	<-ch
	if wb.sess.PhotosphereVelocity != 0.2 || wb.sess.Temperature != 4450 || !strings.Contains(wb.status.Text, "as you left") {
		t.Errorf("back on epoch 1: %+v, status %q", wb.sess.Model, wb.status.Text)
	}
}

// TestSelectorsOpen taps open every selector of the window — on the demo,
// on a dataset opened from a file, and while a computation runs — and
// checks that each shows its pop-up with all its options (an empty or
// rebuilt option list once crashed the pop-up).
func TestSelectorsOpen(t *testing.T) {
	// Each workbench is made just before its turn: a new test app replaces
	// the current one, whose driver finds the window a pop-up opens in.
	for _, c := range []struct {
		name string
		make func(*testing.T) *workbench
	}{{"demo", demoWorkbench}, {"dataset file", cheapWorkbench}, {"computing", demoWorkbench}} {
		name, wb := c.name, c.make(t)
		wb.done = func(*core.Overlay, error) {}
		if name == "computing" {
			wb.recompute()
		}
		for _, sel := range []*widget.Select{wb.epoch, wb.knockSel, wb.unitSel} {
			if len(sel.Options) == 0 {
				t.Errorf("%s: a selector without options", name)
				continue
			}
			wb.win.Resize(fyne.NewSize(1280, 800))
			wb.win.Canvas().Capture() // lay the window out, as showing it does
			test.Tap(sel)
			top := wb.win.Canvas().Overlays().Top()
			if top == nil {
				t.Errorf("%s: tapping the selector %v opened nothing", name, sel.Options)
				continue
			}
			shown := strings.Join(texts(top), "|")
			for _, o := range sel.Options {
				if !strings.Contains("|"+shown+"|", "|"+o+"|") {
					t.Errorf("%s: the pop-up of %v shows %q, without %q", name, sel.Options, shown, o)
				}
			}
			wb.win.Canvas().Overlays().Remove(top)
		}
	}
}

// texts returns the text of every canvas.Text drawn under o.
func texts(o fyne.CanvasObject) []string {
	var out []string
	switch x := o.(type) {
	case *canvas.Text:
		out = append(out, x.Text)
	case *fyne.Container:
		for _, c := range x.Objects {
			out = append(out, texts(c)...)
		}
	case fyne.Widget:
		for _, c := range test.WidgetRenderer(x).Objects() {
			out = append(out, texts(c)...)
		}
	}
	return out
}

// TestUnsavedCandidatesAndOverwrite: closing the window with candidates
// not saved asks first (a dialog, the window stays); after a save it does
// not; writing over an existing file asks first, a new file is written at
// once.
func TestUnsavedCandidatesAndOverwrite(t *testing.T) {
	wb := cheapWorkbench(t)
	wb.win.Resize(fyne.NewSize(1280, 800))
	if wb.unsavedCandidates() {
		t.Fatal("a fresh session has unsaved candidates")
	}
	if err := wb.keepCandidate(); err != nil {
		t.Fatal(err)
	}
	if !wb.unsavedCandidates() {
		t.Fatal("a kept candidate is not counted as unsaved")
	}
	wb.closeIntercept()
	top := wb.win.Canvas().Overlays().Top()
	if top == nil || !strings.Contains(strings.Join(texts(top), " "), "not saved") {
		t.Fatalf("closing with an unsaved candidate: overlay %v", top)
	}
	wb.win.Canvas().Overlays().Remove(top)
	path := filepath.Join(t.TempDir(), "s.json")
	written := 0
	wb.confirmOverwrite(path, func() { written++ })
	if written != 1 || wb.win.Canvas().Overlays().Top() != nil {
		t.Errorf("a new file: written %d times, overlay %v", written, wb.win.Canvas().Overlays().Top())
	}
	if err := os.WriteFile(path, []byte("{}"), 0o644); err != nil {
		t.Fatal(err)
	}
	wb.confirmOverwrite(path, func() { written++ })
	top = wb.win.Canvas().Overlays().Top()
	if written != 1 || top == nil || !strings.Contains(strings.Join(texts(top), " "), "Replace") {
		t.Errorf("an existing file: written %d times without asking, overlay %v", written, top)
	}
	wb.win.Canvas().Overlays().Remove(top)
	if err := wb.sess.Save(path); err != nil {
		t.Fatal(err)
	}
	wb.savedCands = append([]core.Candidate(nil), wb.sess.Candidates...)
	if wb.unsavedCandidates() {
		t.Error("saved candidates still counted as unsaved")
	}
	if row := wb.candidateText(0); !strings.Contains(row, "A · 1.5 d") {
		t.Errorf("candidate row %q", row)
	}
}

// TestFeaturesDividerMovesBothWays: at 1280×800 the divider between the
// spectrum and the features table can give most of the height to either.
func TestFeaturesDividerMovesBothWays(t *testing.T) {
	wb := demoWorkbench(t)
	wb.done = func(*core.Overlay, error) {}
	wb.win.Resize(fyne.NewSize(1280, 800))
	for _, c := range []struct {
		offset     float64
		plotTaller bool
	}{{0.2, false}, {0.85, true}} {
		wb.split.SetOffset(c.offset)
		wb.win.Canvas().Capture()
		p, tb := wb.plotCard.Size().Height, wb.tableCard.Size().Height
		if (p > 1.5*tb) != c.plotTaller || (tb > 1.5*p) == c.plotTaller {
			t.Errorf("divider at %.2f: spectrum %.0f px, table %.0f px high", c.offset, p, tb)
		}
	}
}

// TestAddSpectrumForm: the form refuses a missing file or days and bad
// numbers, naming the field; a filled form adds the spectrum as a new
// epoch shown at once (composition kept, on the new epoch), and the
// dataset saves and the session then saves too.
func TestAddSpectrumForm(t *testing.T) {
	wb := cheapWorkbench(t)
	f := wb.newSpectrumForm()
	if _, err := f.epoch(); err == nil || !strings.Contains(err.Error(), "file") {
		t.Errorf("no file: %v", err)
	}
	ex, err := core.WriteExample(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	f.file.SetText(filepath.Join(filepath.Dir(ex), wb.bench.Data.Epochs[2].File))
	if _, err := f.epoch(); err == nil || !strings.Contains(err.Error(), "days") {
		t.Errorf("no days: %v", err)
	}
	f.days.SetText("7.5")
	f.ebv.SetText("abc")
	if _, err := f.epoch(); err == nil || !strings.Contains(err.Error(), "E(B−V)") {
		t.Errorf("bad E(B−V): %v", err)
	}
	f.ebv.SetText("0.05")
	f.telluric.SetChecked(true)
	f.mask.SetSelectedIndex(2)
	e, err := f.epoch()
	if err != nil {
		t.Fatal(err)
	}
	if e.Prepare == nil || e.Prepare.EBV != 0.05 || e.Prepare.Law != "ccm89" || !e.Prepare.MaskTelluric || e.Read == nil || !e.Read.IgnoreMask {
		t.Fatalf("epoch %+v", e)
	}
	if R, d, err := f.instrument(); err != nil || R != wb.bench.Data.ResolvingPower || d != wb.bench.Data.DistanceMpc {
		t.Errorf("resolving power and distance start at the dataset's: %g %g (%v)", R, d, err)
	}
	f.distance.SetText("-3")
	if _, _, err := f.instrument(); err == nil || !strings.Contains(err.Error(), "distance") {
		t.Errorf("a distance of -3: %v", err)
	}
	comp := wb.sess.MassFractions
	nw := waitJob(t, wb, func() { wb.startAddEpochAt(e, wb.bench.Data.ResolvingPower, 70) }).(*workbench)
	if nw.bench.Data.DistanceMpc != 70 {
		t.Errorf("distance %g after adding at 70 Mpc", nw.bench.Data.DistanceMpc)
	}
	if len(nw.bench.Data.Epochs) != 4 || nw.sess.Epoch != 3 || nw.sess.MassFractions != comp || !nw.bench.Unsaved() {
		t.Fatalf("after adding: %d epochs, shown %d, unsaved %v", len(nw.bench.Data.Epochs), nw.sess.Epoch, nw.bench.Unsaved())
	}
	if got := waitDone(t, nw); got.N < 100 {
		t.Errorf("the new epoch compared %d samples", got.N)
	}
	out := filepath.Join(t.TempDir(), "mine.json")
	if err := nw.bench.SaveDataset(out); err != nil {
		t.Fatal(err)
	}
	if nw.bench.Unsaved() {
		t.Error("still unsaved after saving")
	}
}

// TestDropFiles: a session dropped onto the window opens with its dataset,
// a dataset file opens, a spectrum opens the Add a spectrum… form with
// its path filled in, and two files at once are refused with a message.
func TestDropFiles(t *testing.T) {
	wb := cheapWorkbench(t)
	wb.win.Resize(fyne.NewSize(1280, 800))
	wb.done = func(*core.Overlay, error) {}
	sess := filepath.Join(t.TempDir(), "s.json")
	s := core.NewSession(wb.bench)
	s.Temperature = 4321
	if err := s.Save(sess); err != nil {
		t.Fatal(err)
	}
	nw := waitJob(t, wb, func() { wb.dropped(fyne.Position{}, []fyne.URI{storage.NewFileURI(sess)}) }).(*workbench)
	if nw.sess.Temperature != 4321 || nw.bench.Name != wb.bench.Name {
		t.Errorf("dropped session: T = %g, dataset %q", nw.sess.Temperature, nw.bench.Name)
	}
	nw2 := waitJob(t, nw, func() { nw.dropped(fyne.Position{}, []fyne.URI{storage.NewFileURI(nw.bench.Name)}) }).(*workbench)
	if nw2.bench.Name != nw.bench.Name || nw2.sess.Temperature == 4321 {
		t.Errorf("dropped dataset: %q, T %g (want a fresh session)", nw2.bench.Name, nw2.sess.Temperature)
	}
	spec := filepath.Join(filepath.Dir(nw2.bench.Name), nw2.bench.Data.Epochs[0].File)
	nw2.dropped(fyne.Position{}, []fyne.URI{storage.NewFileURI(spec)})
	top := nw2.win.Canvas().Overlays().Top()
	if top == nil || !strings.Contains(strings.Join(texts(top), " "), "Add a spectrum") || !strings.Contains(strings.Join(texts(top), " "), filepath.Base(spec)) {
		t.Fatalf("dropped spectrum: overlay %v", top)
	}
	nw2.win.Canvas().Overlays().Remove(top)
	nw2.dropped(fyne.Position{}, []fyne.URI{storage.NewFileURI(spec), storage.NewFileURI(sess)})
	if !strings.Contains(nw2.status.Text, "one at a time") {
		t.Errorf("two files: status %q", nw2.status.Text)
	}
}

// TestCompositionRows drives the element rows: one row per element; an
// exact entry sets that element and renormalises the others (their rows
// follow); switching an element off takes it out and back on restores its
// fraction; a named mix replaces the composition; a bad entry changes
// nothing and says why.
func TestCompositionRows(t *testing.T) {
	wb := cheapWorkbench(t)
	ch := make(chan struct{}, 16)
	wb.done = func(*core.Overlay, error) { ch <- struct{}{} }
	c, _ := core.ParseComposition("Sr=0.5,Nd=0.25,Kr=0.25")
	wb.sess.MassFractions = c
	wb.syncControls()
	row := func(sym string) *compRow {
		for _, r := range wb.comp.rows {
			if r.sym == sym {
				return r
			}
		}
		t.Fatalf("no row for %s", sym)
		return nil
	}
	if len(wb.comp.rows) != 3 {
		t.Fatalf("%d rows for 3 elements", len(wb.comp.rows))
	}
	nd := row("Nd")
	nd.entry.SetText("0.5")
	nd.entry.OnSubmitted("0.5")
	<-ch
	syms, x := wb.sess.MassFractions.Fractions()
	if len(syms) != 3 || math.Abs(x[0]-0.5) > 1e-12 || syms[0] != "Nd" && syms[1] != "Nd" {
		t.Errorf("after Nd = 0.5: %v %v", syms, x)
	}
	if got := row("Sr").entry.Text; got != "0.3333" {
		t.Errorf("the Sr row shows %q after renormalisation, want 0.3333", got)
	}
	row("Kr").on.SetChecked(false)
	<-ch
	if strings.Contains(wb.sess.MassFractions.String(), "Kr") || len(wb.comp.rows) != 3 || row("Kr").on.Checked {
		t.Errorf("Kr switched off: %q, %d rows", wb.sess.MassFractions, len(wb.comp.rows))
	}
	row("Kr").on.SetChecked(true)
	<-ch
	if _, x := wb.sess.MassFractions.Fractions(); !strings.Contains(wb.sess.MassFractions.String(), "Kr") || len(x) != 3 {
		t.Errorf("Kr back on: %q", wb.sess.MassFractions)
	}
	before := wb.sess.MassFractions
	row("Sr").entry.OnSubmitted("2")
	if wb.sess.MassFractions != before || !strings.Contains(wb.status.Text, "not applied") {
		t.Errorf("a fraction of 2 applied: %q, status %q", wb.sess.MassFractions, wb.status.Text)
	}
	wb.comp.mix.SetSelectedIndex(2)
	<-ch
	if want := core.NamedMixes()[2].Composition; wb.sess.MassFractions != want || wb.fractions.Text != want.String() {
		t.Errorf("named mix: session %q, text %q, want %q", wb.sess.MassFractions, wb.fractions.Text, want)
	}
}

// TestExportFeaturesTable: the features table exports as CSV with a row
// per feature, and after Identify with the elements' share columns; the
// figure export honours the chosen journal size.
func TestExportFeaturesTable(t *testing.T) {
	wb := demoWorkbench(t)
	dir := t.TempDir()
	p := filepath.Join(dir, "f.csv")
	if err := wb.exportFeatures(p); err != nil {
		t.Fatal(err)
	}
	raw, _ := os.ReadFile(p)
	rows, err := csv.NewReader(strings.NewReader(string(raw))).ReadAll()
	if err != nil || len(rows) != 1+len(wb.featRows) {
		t.Fatalf("features CSV: %d rows for %d features (%v)", len(rows), len(wb.featRows), err)
	}
	waitJob(t, wb, func() { wb.startIdentify() })
	if err := wb.exportFeatures(p); err != nil {
		t.Fatal(err)
	}
	raw, _ = os.ReadFile(p)
	if !strings.Contains(strings.SplitN(string(raw), "\n", 2)[0], "share_Sr") {
		t.Errorf("after Identify the header lacks share_Sr: %q", strings.SplitN(string(raw), "\n", 2)[0])
	}
	waitDone(t, wb)
	wb.exportSize = figure.Sizes[1].Name
	png := filepath.Join(dir, "fig.png")
	if err := wb.exportCurrent(png); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(png)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	cfg, err := stdpng.DecodeConfig(f)
	want := int(float64(figure.Sizes[1].Width/vg.Inch)*float64(figure.Sizes[1].DPI) + 0.5)
	if err != nil || cfg.Width != want {
		t.Errorf("exported at %q: %d px wide (%v), want %d", figure.Sizes[1].Name, cfg.Width, err, want)
	}
}

// TestOpenLineLists: the form previews a table of one's own through its
// column map, shows what is wrong with a bad map in the reader's words
// (no package prefix), and opens the
// table in place of the dataset's lists, the session kept.
func TestOpenLineLists(t *testing.T) {
	wb := cheapWorkbench(t)
	wb.done = func(*core.Overlay, error) {}
	table := filepath.Join(t.TempDir(), "mine.csv")
	// Invented lines for the test (not atomic data).
	if err := os.WriteFile(table, []byte("lambda_nm,ion,loggf,elow_cm,jlow\n407.8,Sr_II,0.15,0,0.5\n421.6,Sr_II,-0.17,0,0.5\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	f := newLinesForm()
	if _, err := f.lists(); err == nil {
		t.Error("no files accepted")
	}
	f.files.SetText(table)
	f.columns.SetText("wavelength=lambda_nm:nm,species=ion")
	f.header.SetChecked(true)
	if p := f.previewText(); !strings.Contains(p, "Not read") || strings.Contains(p, "linelists:") {
		t.Errorf("a column map without log gf previews as %q", p)
	}
	f.columns.SetText("wavelength=lambda_nm:nm,species=ion,log_gf=loggf,lower_energy=elow_cm:cm-1,lower_j=jlow")
	if p := f.previewText(); !strings.Contains(p, "Sr II") || !strings.Contains(p, "407.8") {
		t.Errorf("preview %q", p)
	}
	l, err := f.lists()
	if err != nil || len(l.Imported) != 1 {
		t.Fatalf("lists %+v, %v", l, err)
	}
	before := wb.sess.Model
	nw := waitJob(t, wb, func() { wb.startOpenLines(l) }).(*workbench)
	if nw.bench.Store.Len() != 2 || nw.sess.Model != before || !nw.bench.Unsaved() {
		t.Errorf("after opening: %d lines, model kept %v, unsaved %v", nw.bench.Store.Len(), nw.sess.Model == before, nw.bench.Unsaved())
	}
}

// TestRecentFilesMenu: saving a session and opening a dataset put them at
// the top of Session ▸ Open recent; choosing an entry opens it.
func TestRecentFilesMenu(t *testing.T) {
	wb := cheapWorkbench(t)
	wb.done = func(*core.Overlay, error) {}
	wb.daily.stateDir = t.TempDir()
	wb.refreshRecent()
	if items := wb.recentItem.ChildMenu.Items; len(items) != 1 || !items[0].Disabled {
		t.Fatalf("a fresh list: %v", items)
	}
	sess := filepath.Join(t.TempDir(), "s.json")
	if err := wb.sess.Save(sess); err != nil {
		t.Fatal(err)
	}
	wb.noteRecent(sess, "session")
	nw := waitJob(t, wb, func() { wb.startOpenDataset(wb.bench.Name) }).(*workbench)
	items := nw.recentItem.ChildMenu.Items
	if len(items) != 2 || !strings.Contains(items[0].Label, "dataset: "+nw.bench.Name) || !strings.Contains(items[1].Label, sess) {
		t.Fatalf("recent items %v", func() (l []string) {
			for _, i := range items {
				l = append(l, i.Label)
			}
			return
		}())
	}
	nw2 := waitJob(t, nw, func() { items[1].Action() }).(*workbench)
	if nw2.sess.Dataset != nw.bench.Name {
		t.Errorf("the recent session opened %q", nw2.sess.Dataset)
	}
}
