package cli

import (
	"strings"
	"testing"

	"broadline/app/core"
)

// TestModelZones checks --inner-mass-fractions and --zone-boundary on the
// Ca II / Sr II test list (photosphere 0.2 c, outer edge 0.3 c): an inner
// zone below the photosphere leaves the CSV as the uniform model writes it;
// Ca only in an inner zone up to 0.25 c still makes the triplet's
// absorption at 0.65–0.69 µm (λ₀(1 − v/c) for v between v_ph and the
// boundary), which the Ca-free outer mix alone does not; bad zone flags
// are usage errors.
func TestModelZones(t *testing.T) {
	_, uniform, _ := runCmd(modelArgs()...)
	status, below, errs := runCmd(modelArgs("--inner-mass-fractions", "Nd=1", "--zone-boundary", "0.1c")...)
	if status != 0 || below != uniform {
		t.Errorf("zone below the photosphere: status %d, same CSV %v (%s)", status, below == uniform, errs)
	}
	if !strings.Contains(errs, "two zones") || !strings.Contains(errs, "above it") {
		t.Errorf("stderr does not describe the zones: %q", errs)
	}
	minIn := func(csv string) float64 {
		w, _, n := readModelCSV(t, csv)
		m := 2.0
		for i := range w {
			if w[i] > 0.65 && w[i] < 0.69 {
				m = min(m, n[i])
			}
		}
		return m
	}
	noCa := modelArgs("--resolving-power", "1000")
	for i := range noCa {
		if noCa[i] == "--mass-fractions" {
			noCa[i+1] = "Sr=1"
		}
	}
	_, outer, _ := runCmd(noCa...)
	status, zoned, errs := runCmd(append(noCa, "--inner-mass-fractions", "Ca=0.5,Sr=0.5", "--zone-boundary", "0.25c")...)
	if status != 0 {
		t.Fatalf("status %d: %s", status, errs)
	}
	if a, b := minIn(outer), minIn(zoned); a < 0.98 || b > 0.9 {
		t.Errorf("min F/F_c in 0.65–0.69 µm: %g without Ca, %g with Ca inside 0.25 c; want ≈ 1 and < 0.9", a, b)
	}
	if !strings.Contains(errs, "inside it") {
		t.Errorf("stderr %q", errs)
	}
	for _, tc := range []struct {
		extra []string
		has   string
	}{
		{[]string{"--zone-boundary", "0.25c"}, "go together"},
		{[]string{"--inner-mass-fractions", "Ca=1"}, "go together"},
		{[]string{"--inner-mass-fractions", "Ca=1", "--zone-boundary", "0.4c"}, "--zone-boundary"},
		{[]string{"--inner-mass-fractions", "Ca=1", "--zone-boundary", "0.02c"}, "--zone-boundary"},
		{[]string{"--inner-mass-fractions", "Qq=1", "--zone-boundary", "0.25c"}, "--inner-mass-fractions"},
		{[]string{"--uniform"}, "--uniform"},
	} {
		status, out, errs := runCmd(modelArgs(tc.extra...)...)
		if status != 2 || out != "" || !strings.Contains(errs, tc.has) || strings.Count(errs, "\n") != 1 {
			t.Errorf("%v: status %d, stderr %q; want 2 and one line naming %q", tc.extra, status, errs, tc.has)
		}
	}
}

// TestZonesWithDataset checks the zone flags beside --dataset on the demo
// written as an example dataset: its last epoch has the recorded inner
// zone, --uniform leaves it out (a different spectrum), the zone flags
// replace it, and knocking out Nd changes the spectrum; identify names the
// elements without lines; a sweep accepts the zone.
func TestZonesWithDataset(t *testing.T) {
	if testing.Short() {
		t.Skip("synthesises the demo")
	}
	path, err := core.WriteExample(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	run := func(extra ...string) (string, string) {
		t.Helper()
		status, out, errs := runCmd(append([]string{"model", "--dataset", path, "--epoch", "3", "--preview"}, extra...)...)
		if status != 0 {
			t.Fatalf("%v: status %d: %s", extra, status, errs)
		}
		return out, errs
	}
	zoned, errs := run()
	if !strings.Contains(errs, "two zones") || !strings.Contains(errs, "inside it") {
		t.Errorf("stderr %q", errs)
	}
	flat, errs := run("--uniform")
	if flat == zoned || strings.Contains(errs, "two zones") {
		t.Error("--uniform kept the zone")
	}
	same, _ := run("--zone-boundary", "0.16c")
	if same != zoned {
		t.Error("--zone-boundary at the recorded value changed the spectrum")
	}
	moved, _ := run("--zone-boundary", "0.1c") // below the photosphere at 0.11 c
	if moved != flat {
		t.Error("a zone below the photosphere differs from the uniform model")
	}
	if noNd, _ := run("--without", "Nd"); noNd == zoned {
		t.Error("the Nd knock-out changed nothing")
	}
	if status, _, errs := runCmd("model", "--dataset", path, "--uniform", "--zone-boundary", "0.2c"); status != 2 || !strings.Contains(errs, "--uniform") {
		t.Errorf("--uniform with --zone-boundary: status %d, %q", status, errs)
	}
	status, _, errs := runCmd("identify", "--dataset", path, "--epoch", "3", "--preview")
	if status != 0 || !strings.Contains(errs, "No lines in the line lists") || !strings.Contains(errs, "Se, Br, Kr, Rb, Mo, Ru, Pd, Te, Xe") {
		t.Errorf("identify: status %d, stderr %q", status, errs)
	}
	status, _, errs = runCmd("sweep", "--dataset", path, "--epoch", "3", "--preview", "--steps", "3",
		"--from-velocity", "0.1c", "--to-velocity", "0.12c")
	if status != 0 || !strings.Contains(errs, "two zones") {
		t.Errorf("sweep: status %d, stderr %q", status, errs)
	}
}

// TestLinesSummaryLineless checks that lines summary names the elements
// with lines, and with --mass-fractions those of the mix without any.
func TestLinesSummaryLineless(t *testing.T) {
	p := writeTemp(t, "list.txt", linesSample)
	status, out, errs := runCmd("lines", "summary", p, "--no-cache", "--mass-fractions", "Ca=1,Te=1,Xe=1")
	if status != 0 {
		t.Fatalf("status %d: %s", status, errs)
	}
	if !strings.Contains(out, "elements with lines: Ca, Sr;") || !strings.Contains(out, "only supply electrons") || !strings.Contains(out, ": Te, Xe") {
		t.Errorf("summary:\n%s", out)
	}
	_, out, _ = runCmd("lines", "summary", p, "--no-cache", "--mass-fractions", "Ca=1")
	if !strings.Contains(out, "every element has lines") {
		t.Errorf("summary:\n%s", out)
	}
	if status, _, errs := runCmd("lines", "summary", p, "--no-cache", "--mass-fractions", "Q=1"); status != 2 || !strings.Contains(errs, "--mass-fractions") {
		t.Errorf("bad mix: status %d %q", status, errs)
	}
}
