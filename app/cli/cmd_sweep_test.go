package cli

import (
	"encoding/csv"
	"fmt"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// demoSweepArgs are the sweep command's flags for epoch i of the built-in
// demo, read from its files on disk with the scenario's recorded values.
func demoSweepArgs(t *testing.T, i int, extra ...string) []string {
	t.Helper()
	d := demoData(t)
	sc := d.Scenario
	ep := sc.Epochs[i]
	args := []string{"sweep", "--spectrum", filepath.Join("..", "demo", "spectra", ep.File),
		"--mass-fractions", sc.MassFractions, "--days", fmt.Sprint(ep.Days),
		"--outer-velocity", fmt.Sprintf("%gc", sc.OuterVelocity), "--inner-velocity", fmt.Sprintf("%gc", sc.InnerVelocity),
		"--density-index", fmt.Sprint(sc.DensityIndex), "--temperature", fmt.Sprint(ep.Temperature),
		"--ejecta-mass", fmt.Sprint(sc.EjectaMassSolar), "--distance-mpc", fmt.Sprint(sc.DistanceMpc),
		"--resolving-power", fmt.Sprint(sc.Instrument.ResolvingPower),
		"--from-um", fmt.Sprint(sc.ModelFromUm), "--to-um", fmt.Sprint(sc.ModelToUm)}
	for _, l := range sc.LineFiles {
		args = append(args, "--lines", filepath.Join("..", "demo", "spectra", l))
	}
	for _, l := range sc.LevelFiles {
		args = append(args, "--levels", filepath.Join("..", "demo", "spectra", l))
	}
	return append(args, extra...)
}

// TestSweepCommandRecoversDemo: the headless sweep on the demo's files (the
// invented spectrum is the model at recorded parameters plus noise) finds
// the recorded photosphere velocity to 0.002 c, reports it on stderr in its
// fixed form, and writes one CSV row per grid velocity.
func TestSweepCommandRecoversDemo(t *testing.T) {
	d := demoData(t)
	truth := d.Scenario.Epochs[1].PhotosphereVelocity
	status, out, errs := runCmd(demoSweepArgs(t, 1, "--from-velocity", fmt.Sprintf("%gc", truth-0.05),
		"--to-velocity", fmt.Sprintf("%gc", truth+0.05), "--steps", "6")...)
	if status != 0 {
		t.Fatalf("status %d: %s", status, errs)
	}
	rows := strings.Split(strings.TrimSpace(out), "\n")
	if rows[0] != "velocity_c,chi2_per_sample" || len(rows) != 7 {
		t.Fatalf("CSV %q", out)
	}
	i := strings.Index(errs, "sweep: best velocity_c=")
	if i < 0 {
		t.Fatalf("stderr %q", errs)
	}
	var best, chi float64
	var n int
	var edge bool
	if _, err := fmt.Sscanf(errs[i:], "sweep: best velocity_c=%g (%s km/s) chi2_per_sample=%g samples=%d at_edge=%t", &best, new(string), &chi, &n, &edge); err != nil {
		t.Fatalf("best line %q: %v", errs[i:], err)
	}
	t.Logf("recorded %.4f c, best %.5f c, χ²/N %.3f over %d samples", truth, best, chi, n)
	if math.Abs(best-truth) > 0.002 || edge || chi > 1.5 || n < 500 {
		t.Errorf("best %.5f c (recorded %.4f), χ²/N %.3f, %d samples, at edge %v", best, truth, chi, n, edge)
	}
	for _, r := range rows[1:] {
		c := strings.Split(r, ",")
		x, err := strconv.ParseFloat(c[1], 64)
		if len(c) != 2 || err != nil || x < chi {
			t.Errorf("row %q: a grid value below the refined best %g", r, chi)
		}
	}
}

// TestSweepCommandErrors: bad requests end with exit status 2, one line
// naming the flag, and nothing on stdout.
func TestSweepCommandErrors(t *testing.T) {
	for name, c := range map[string]struct {
		args []string
		want string
	}{
		"no spectrum": {demoSweepArgs(t, 0, "--spectrum", "", "--from-velocity", "0.1c", "--to-velocity", "0.3c"), "--spectrum"},
		"no range":    {demoSweepArgs(t, 0), "--from-velocity"},
		"beyond edge": {demoSweepArgs(t, 0, "--from-velocity", "0.1c", "--to-velocity", "0.36c"), "--to-velocity"},
		"reversed":    {demoSweepArgs(t, 0, "--from-velocity", "0.3c", "--to-velocity", "0.1c"), "--from-velocity"},
		"few steps":   {demoSweepArgs(t, 0, "--from-velocity", "0.1c", "--to-velocity", "0.3c", "--steps", "2"), "--steps"},
		"no distance": {demoSweepArgs(t, 0, "--from-velocity", "0.1c", "--to-velocity", "0.3c", "--distance-mpc", "0"), "--distance-mpc"},
	} {
		status, out, errs := runCmd(c.args...)
		if status != 2 || out != "" || !strings.Contains(errs, c.want) || strings.Count(strings.TrimSpace(errs), "\n") > 0 {
			t.Errorf("%s: status %d, stdout %q, stderr %q (want 2, nothing, one line naming %s)", name, status, out, errs, c.want)
		}
	}
}

// TestIdentifyCommand: the headless identification of the demo's first
// epoch at its recorded parameters gives one CSV row per feature of
// significance ≥ 5, as the workbench's table, and names Sr through its
// Sr II lines at the 0.78-µm feature (see TestIdentifyDemo).
func TestIdentifyCommand(t *testing.T) {
	d := demoData(t)
	args := demoSweepArgs(t, 0, "--photosphere-velocity", fmt.Sprintf("%gc", d.Scenario.Epochs[0].PhotosphereVelocity))
	args[0] = "identify"
	var keep []string
	for i := 0; i < len(args); i++ { // identify takes neither a distance nor a resolving power
		if args[i] == "--distance-mpc" || args[i] == "--resolving-power" {
			i++
			continue
		}
		keep = append(keep, args[i])
	}
	status, out, errs := runCmd(keep...)
	if status != 0 {
		t.Fatalf("status %d: %s", status, errs)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 3 || rows[0][0] != "minimum_um" || rows[0][len(rows[0])-1] != "lines" {
		t.Fatalf("CSV %q", out)
	}
	if !strings.HasPrefix(rows[2][0], "0.784") {
		t.Errorf("second feature at %s µm, want 0.784", rows[2][0])
	}
	// One column per element share (share_Sr …), each a number; the
	// shares of a feature add up to 1 (synth.ElementShare.Share).
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	for r := 1; r < len(rows); r++ {
		sum := 0.0
		for h, i := range col {
			if strings.HasPrefix(h, "share_") {
				v, err := strconv.ParseFloat(rows[r][i], 64)
				if err != nil {
					t.Fatalf("row %d, %s = %q: %v", r, h, rows[r][i], err)
				}
				sum += v
			}
		}
		if math.Abs(sum-1) > 1e-3 {
			t.Errorf("row %d: shares add up to %g", r, sum)
		}
	}
	sr, ok := col["share_Sr"]
	if !ok {
		t.Fatalf("no share_Sr column in %q", rows[0])
	}
	if v, _ := strconv.ParseFloat(rows[2][sr], 64); !(v > 0.05) || !strings.Contains(rows[2][col["lines"]], "Sr II 10") {
		t.Errorf("0.78-µm feature: Sr share %q, lines %q", rows[2][sr], rows[2][col["lines"]])
	}
	if !strings.Contains(errs, "hypothesis") {
		t.Errorf("stderr lacks the caution: %q", errs)
	}
	if status, out, _ := runCmd("identify", "--lines", "x"); status != 2 || out != "" {
		t.Errorf("identify without --spectrum: status %d, stdout %q", status, out)
	}
}

// withoutFlag returns args without flag and its value.
func withoutFlag(args []string, flag string) []string {
	var out []string
	for i := 0; i < len(args); i++ {
		if args[i] == flag {
			i++
			continue
		}
		out = append(out, args[i])
	}
	return out
}

// TestSweepCommandTemperature: the temperature sweep of the demo's second
// epoch, at the recorded velocity, finds the recorded temperature to 50 K
// and says so in its fixed form; mixing the two sweeps, or giving the
// swept value as a flag too, is refused.
func TestSweepCommandTemperature(t *testing.T) {
	d := demoData(t)
	ep := d.Scenario.Epochs[1]
	args := append(withoutFlag(demoSweepArgs(t, 1), "--temperature"),
		"--photosphere-velocity", fmt.Sprintf("%gc", ep.PhotosphereVelocity),
		"--from-temperature", fmt.Sprint(ep.Temperature-900), "--to-temperature", fmt.Sprint(ep.Temperature+900), "--steps", "7")
	args = slices.Clip(args) // each bad case below appends to its own copy
	status, out, errs := runCmd(args...)
	if status != 0 {
		t.Fatalf("status %d: %s", status, errs)
	}
	if !strings.HasPrefix(out, "temperature_k,chi2_per_sample\n") || strings.Count(out, "\n") != 8 {
		t.Errorf("CSV %q", out)
	}
	i := strings.Index(errs, "sweep: best temperature_k=")
	var best float64
	if i < 0 {
		t.Fatalf("stderr %q", errs)
	}
	if _, err := fmt.Sscanf(errs[i:], "sweep: best temperature_k=%g", &best); err != nil {
		t.Fatal(err)
	}
	t.Logf("recorded %.0f K, best %.1f K", ep.Temperature, best)
	if math.Abs(best-ep.Temperature) > 50 {
		t.Errorf("best %.1f K, recorded %.0f K", best, ep.Temperature)
	}
	for name, bad := range map[string][]string{
		"both":       append(args, "--from-velocity", "0.1c", "--to-velocity", "0.2c"),
		"T given":    append(args, "--temperature", "4000"),
		"v given":    append(demoSweepArgs(t, 1, "--from-velocity", "0.1c", "--to-velocity", "0.2c"), "--photosphere-velocity", "0.15c"),
		"half a T":   withoutFlag(args, "--to-temperature"),
		"reversed T": append(withoutFlag(withoutFlag(args, "--from-temperature"), "--to-temperature"), "--from-temperature", "5000", "--to-temperature", "4000"),
	} {
		status, out, errs := runCmd(bad...)
		if status != 2 || out != "" || strings.Count(strings.TrimSpace(errs), "\n") > 0 {
			t.Errorf("%s: status %d, stdout %q, stderr %q", name, status, out, errs)
		}
		t.Logf("%s: %s", name, strings.TrimSpace(errs))
	}
}
