package main

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"broadline/spectra"
)

// TestIdentifyDemo attributes the features of the demo's first epoch at the
// recorded (true) parameters. The invented data were made with Sr at 3 % and
// an invented Sr II list that has lines at 1.03–1.09 µm; at v_ph = 0.24 c
// they act near 0.78–0.83 µm, so the model must name Sr, through Sr II
// lines, in the feature at 0.78 µm. For every feature the element shares
// are sorted and add up to 1, and the listed lines act inside the window.
func TestIdentifyDemo(t *testing.T) {
	b := demoBench(t)
	s := newSession("demo", b.data)
	all, err := spectra.FindFeatures(b.data.Observed[0], spectra.FeatureOptions{ResolvingPower: 150})
	if err != nil {
		t.Fatal(err)
	}
	var feats []spectra.Feature
	for _, f := range all {
		if f.Significance >= 5 {
			feats = append(feats, f)
		}
	}
	calls := 0
	attr, err := b.identify(context.Background(), s, feats, func(done, total int) { calls = done })
	if err != nil {
		t.Fatal(err)
	}
	if len(attr) != len(feats) || calls != len(feats) {
		t.Fatalf("%d attributions, %d progress calls for %d features", len(attr), calls, len(feats))
	}
	found := false
	for i, a := range attr {
		f := feats[i]
		t.Logf("%.4f µm: %s; %s", f.Wavelength/1e4, elementsText(a), linesText(a))
		sum := 0.0
		for k, e := range a.Elements {
			sum += e.Share
			if k > 0 && e.Share > a.Elements[k-1].Share {
				t.Errorf("feature %d: shares not sorted", i)
			}
		}
		if math.Abs(sum-1) > 1e-9 {
			t.Errorf("feature %d: shares add up to %g", i, sum)
		}
		for _, l := range a.Lines {
			if l.Acting < a.From || l.Acting > a.To {
				t.Errorf("feature %d: line %v acts at %.1f Å, outside %.1f–%.1f", i, l.Species, l.Acting, a.From, a.To)
			}
		}
		if math.Abs(f.Wavelength-7842) < 100 {
			found = strings.Contains(elementsText(a), "Sr ") && strings.Contains(linesText(a), "Sr II 10")
		}
	}
	if !found {
		t.Error("the 0.78-µm feature is not attributed to Sr through its Sr II lines")
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
	wb.done = func(_ *overlay, err error) { ch <- err }
	wb.sess.Temperature = 5200
	wb.syncControls()
	wb.recompute()
	v := wb.sess.PhotosphereVelocity
	waitJob(t, wb, func() { wb.startSweep(sweepVelocityParam, v-0.02, v+0.02, 3) })
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
	ch := make(chan *overlay, 1)
	wb.done = func(ov *overlay, err error) {
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
	wb.done = func(_ *overlay, err error) { ch <- err }
	wb.unitSel.SetSelected("nm")
	if err := <-ch; err != nil {
		t.Fatal(err)
	}
	if got := wb.featureCell(1, 0); got != "784.2" || wb.sess.WavelengthUnit != "nm" {
		t.Errorf("in nm: cell %q, session unit %q", got, wb.sess.WavelengthUnit)
	}
	if lo, hi := wb.current.fig.X.Min, wb.current.fig.X.Max; lo < 300 || hi > 3000 {
		t.Errorf("figure's axis %g–%g, want nm (400–2400)", lo, hi)
	}
	path := filepath.Join(t.TempDir(), "s.json")
	if err := wb.sess.Save(path); err != nil {
		t.Fatal(err)
	}
	back, err := loadSession(path, "demo", b.data)
	if err != nil || back.WavelengthUnit != "nm" {
		t.Errorf("saved unit %q, %v", back.WavelengthUnit, err)
	}
	bad := *wb.sess
	bad.WavelengthUnit = "furlong"
	if err := bad.Validate(b.data); err == nil {
		t.Error("an unknown wavelength unit was accepted")
	}
}
