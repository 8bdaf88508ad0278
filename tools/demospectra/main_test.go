package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"broadline/internal/demogen"
	"broadline/spectra"
)

const demoDir = "../../app/demo/spectra"

func loadDemo(t *testing.T) *demogen.Scenario {
	t.Helper()
	f, err := os.Open(filepath.Join(demoDir, "scenario.json"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc, err := demogen.ReadScenario(f)
	if err != nil {
		t.Fatal(err)
	}
	return sc
}

// TestScenarioRecorded checks that the committed scenario.json is the
// scenario this program generates (so the recorded truth is the truth).
func TestScenarioRecorded(t *testing.T) {
	sc := loadDemo(t)
	want := demoScenario()
	if sc.MassFractions != want.MassFractions || sc.InnerMassFractions != want.InnerMassFractions ||
		sc.ZoneBoundary != want.ZoneBoundary || sc.DistanceMpc != want.DistanceMpc || len(sc.Epochs) != len(want.Epochs) {
		t.Fatalf("scenario.json differs from demoScenario(); run go run ./tools/demospectra")
	}
	a, _ := json.Marshal(sc)
	b, _ := json.Marshal(want)
	if !bytes.Equal(a, b) {
		t.Errorf("scenario.json differs from demoScenario() (label, instrument or another key); run go run ./tools/demospectra")
	}
	for i := range sc.Epochs {
		if sc.Epochs[i] != want.Epochs[i] {
			t.Errorf("epoch %d: recorded %+v, generator %+v", i+1, sc.Epochs[i], want.Epochs[i])
		}
	}
}

// TestDemoFiles checks the committed spectra: they regenerate from the
// scenario and seed, spectra.ReadText reads them with the recorded
// epoch, the removed telluric ranges hold no pixel, and the flagged ones are
// masked.
func TestDemoFiles(t *testing.T) {
	if testing.Short() {
		t.Skip("regenerates three spectra")
	}
	sc := loadDemo(t)
	st, _, err := LoadStore(demoDir, sc)
	if err != nil {
		t.Fatal(err)
	}
	total := 0
	for i, e := range sc.Epochs {
		if raceEnabled && i > 0 {
			break // one epoch is enough to exercise the code under the race detector
		}
		raw, err := os.ReadFile(filepath.Join(demoDir, e.File))
		if err != nil {
			t.Fatal(err)
		}
		total += len(raw)
		s, err := Observe(context.Background(), sc, st, i)
		if err != nil {
			t.Fatal(err)
		}
		// Regeneration: the same pixels and masks, and fluxes within 1 % of
		// the noise (the noise is seeded, so any difference is the model's;
		// a tolerance rather than byte equality allows for floating-point
		// contraction on other CPUs).
		again, err := spectra.ReadText(bytes.NewReader(Format(sc, i, s)), spectra.ReadOptions{Name: e.File})
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Contains(raw, []byte("INVENTED")) {
			t.Errorf("%s lacks the INVENTED label", e.File)
		}
		got, err := spectra.ReadText(bytes.NewReader(raw), spectra.ReadOptions{Name: e.File})
		if err != nil {
			t.Fatal(err)
		}
		if got.Meta.Epoch != e.Days || got.Meta.FluxUnit != spectra.FluxPerAngstrom || !got.HasUncertainty() {
			t.Errorf("%s read back with %+v", e.File, got.Meta)
		}
		if again.Len() != got.Len() {
			t.Fatalf("%s: %d pixels, regenerated %d; run go run ./tools/demospectra", e.File, got.Len(), again.Len())
		}
		for k := range got.Wavelength {
			if got.Wavelength[k] != again.Wavelength[k] || got.Masked(k) != again.Masked(k) ||
				math.Abs(got.Flux[k]-again.Flux[k]) > 0.01*got.Uncertainty[k] {
				t.Fatalf("%s: pixel %d (%g Å) does not regenerate (flux %g vs %g); run go run ./tools/demospectra",
					e.File, k, got.Wavelength[k], got.Flux[k], again.Flux[k])
			}
		}
		flagged := 0
		for k, l := range got.Wavelength {
			for _, r := range sc.Instrument.Removed {
				if l >= r[0]*1e4 && l <= r[1]*1e4 {
					t.Fatalf("%s: pixel at %g Å inside a removed range", e.File, l)
				}
			}
			in := false
			for _, r := range sc.Instrument.Flagged {
				in = in || (l >= r[0]*1e4 && l <= r[1]*1e4)
			}
			if in != got.Masked(k) {
				t.Fatalf("%s: pixel at %g Å flagged=%v, masked=%v", e.File, l, in, got.Masked(k))
			}
			if in {
				flagged++
			}
		}
		if flagged == 0 {
			t.Errorf("%s: no flagged pixels", e.File)
		}
	}
	if total > 1<<20 {
		t.Errorf("demo spectra take %d bytes, want ≤ 1 MiB", total)
	}
}

// TestInjectionRecovery fits the photosphere velocity of the first two
// epochs back from the noisy demo spectra: χ² over unmasked pixels with the
// flux scale free (so only the line profiles constrain v_ph), on a grid of
// 0.01 c around the truth, must be smallest at the recorded value.
func TestInjectionRecovery(t *testing.T) {
	if testing.Short() {
		t.Skip("many model evaluations")
	}
	sc := loadDemo(t)
	st, _, err := LoadStore(demoDir, sc)
	if err != nil {
		t.Fatal(err)
	}
	m, err := NewModel(sc, st)
	if err != nil {
		t.Fatal(err)
	}
	epochs := 2
	if raceEnabled {
		epochs = 1
	}
	for i := range epochs {
		e := sc.Epochs[i]
		raw, err := os.ReadFile(filepath.Join(demoDir, e.File))
		if err != nil {
			t.Fatal(err)
		}
		obs, err := spectra.ReadText(bytes.NewReader(raw), spectra.ReadOptions{Name: e.File})
		if err != nil {
			t.Fatal(err)
		}
		best, bestChi := 0.0, math.Inf(1)
		for k := -2; k <= 2; k++ {
			v := e.PhotosphereVelocity + 0.01*float64(k)
			wave, flux, _, err := Noiseless(context.Background(), sc, m, i, v)
			if err != nil {
				t.Fatal(err)
			}
			// Model on the observed pixels: the pixel grid is the
			// instrument's, minus the removed ranges.
			step := 1 / (sc.Instrument.ResolvingPower * sc.Instrument.PixelsPerResolution)
			pixel := func(w float64) int { return int(math.Round(math.Log(w/wave[0]) / step)) }
			var sfm, smm float64
			type px struct{ f, m, s float64 }
			var use []px
			for j, w := range obs.Wavelength {
				if obs.Masked(j) {
					continue
				}
				p := pixel(w)
				if p < 0 || p >= len(wave) || math.Abs(wave[p]-w) > 0.01 {
					t.Fatalf("observed pixel %g Å not on the instrument grid", w)
				}
				mv := flux[p]
				s := obs.Uncertainty[j]
				use = append(use, px{obs.Flux[j], mv, s})
				sfm += obs.Flux[j] * mv / (s * s)
				smm += mv * mv / (s * s)
			}
			a := sfm / smm
			chi := 0.0
			for _, p := range use {
				d := (p.f - a*p.m) / p.s
				chi += d * d
			}
			t.Logf("epoch %d: v_ph = %.2f c: χ²/N = %.3f", i+1, v, chi/float64(len(use)))
			if k == 0 && math.Abs(chi/float64(len(use))-1) > 0.1 {
				t.Errorf("epoch %d: χ²/N = %.3f at the truth; the recorded noise should give ≈ 1", i+1, chi/float64(len(use)))
			}
			if chi < bestChi {
				best, bestChi = v, chi
			}
		}
		if math.Abs(best-e.PhotosphereVelocity) > 1e-9 {
			t.Errorf("epoch %d: χ² minimum at v_ph = %.2f c, recorded %.2f c", i+1, best, e.PhotosphereVelocity)
		}
	}
}
