package synth

import (
	"bytes"
	"context"
	"os"
	"strings"
	"testing"
)

// TestReadScenario reads the committed demo scenario and checks that bad
// scenarios are refused with an error.
func TestReadScenario(t *testing.T) {
	t.Parallel()
	raw, err := os.ReadFile("../../app/demo/spectra/scenario.json")
	if err != nil {
		t.Fatal(err)
	}
	sc, err := ReadScenario(bytes.NewReader(raw))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(sc.Label, "INVENTED") || !strings.Contains(sc.Object, "invented") {
		t.Errorf("demo scenario not labelled as invented: %q, %q", sc.Label, sc.Object)
	}
	for i := range sc.Epochs {
		if err := sc.Ejecta(i).Validate(); err != nil {
			t.Errorf("epoch %d: %v", i+1, err)
		}
	}
	px := sc.Instrument.Pixels()
	if px[0] != sc.Instrument.FromUm*1e4 || px[len(px)-1] > sc.Instrument.ToUm*1e4 {
		t.Errorf("pixels %g–%g Å outside %g–%g µm", px[0], px[len(px)-1], sc.Instrument.FromUm, sc.Instrument.ToUm)
	}
	for _, bad := range []string{
		`{`, `[]`, `{"unknown_field": 1}`,
		strings.Replace(string(raw), `"days": 1.5`, `"days": -1.5`, 1),
		strings.Replace(string(raw), `"resolving_power": 500`, `"resolving_power": 1e300`, 1),
		strings.Replace(string(raw), `"mass_fractions": "`, `"mass_fractions": "Qq=1,`, 1),
	} {
		if _, err := ReadScenario(strings.NewReader(bad)); err == nil {
			t.Errorf("accepted bad scenario %.60q", bad)
		}
	}
}

// FuzzReadScenario checks that no input makes ReadScenario panic or accept a
// scenario whose pixel grid is unbounded.
func FuzzReadScenario(f *testing.F) {
	if raw, err := os.ReadFile("../../app/demo/spectra/scenario.json"); err == nil {
		f.Add(raw)
	}
	f.Add([]byte(`{"epochs": [{"days": 1}]}`))
	f.Fuzz(func(t *testing.T, b []byte) {
		sc, err := ReadScenario(bytes.NewReader(b))
		if err != nil {
			return
		}
		if n := len(sc.Instrument.Pixels()); n > 1<<28 {
			t.Fatalf("accepted a scenario with %d pixels", n)
		}
	})
}

// TestScenarioTruth loads the demo's line lists through io/fs and checks
// the noiseless truth of the last epoch: positive flux that stays within a
// factor 2 of the blackbody continuum at the recorded distance (a
// scattering envelope only redistributes the photosphere's light).
func TestScenarioTruth(t *testing.T) {
	t.Parallel()
	raw, err := os.ReadFile("../../app/demo/spectra/scenario.json")
	if err != nil {
		t.Fatal(err)
	}
	sc, err := ReadScenario(bytes.NewReader(raw))
	if err != nil {
		t.Fatal(err)
	}
	st, err := sc.LoadStore(os.DirFS("../../app/demo"), "spectra")
	if err != nil {
		t.Fatal(err)
	}
	if len(st.SpeciesTable) < 8 {
		t.Fatalf("demo store has %d species", len(st.SpeciesTable))
	}
	m, err := sc.NewModel(st)
	if err != nil {
		t.Fatal(err)
	}
	last := len(sc.Epochs) - 1
	wave, flux, cont, err := sc.Truth(context.Background(), m, last, 0, 2)
	if err != nil {
		t.Fatal(err)
	}
	if len(wave) != len(flux) || len(wave) != len(cont) {
		t.Fatalf("lengths %d, %d, %d", len(wave), len(flux), len(cont))
	}
	for i := range wave {
		if r := flux[i] / cont[i]; !(r > 0) || r > 2 {
			t.Fatalf("F/F_bb = %g at %g Å", r, wave[i])
		}
	}
	if _, err := sc.LoadStore(os.DirFS("."), "nowhere"); err == nil {
		t.Error("missing line files: no error")
	}
}
