package cli

import (
	"bytes"
	"context"
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"broadline/app/core"
)

// TestGridCommand: a 2 × 2 × 1 grid on the example dataset, run whole and
// in two shards (one from --shard, one from the job-array variables), merges
// byte for byte into the whole run's file; a point's χ²/N is what the
// workbench computes for that model; a finished part is skipped when run
// again.
func TestGridCommand(t *testing.T) {
	dir := t.TempDir()
	path, err := core.WriteExample(dir)
	if err != nil {
		t.Fatal(err)
	}
	spec := filepath.Join(dir, "grid.json")
	if err := os.WriteFile(spec, []byte(`{"format":"broadline-grid/1","label":"test",
		"axes":[{"quantity":"epoch","values":[0]},{"quantity":"velocity","values":[0.22,0.24]},{"quantity":"temperature","values":[4800,5000]}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	whole := filepath.Join(dir, "whole.csv")
	if st, _, errs := runCmd("grid", "--dataset", path, "--spec", spec, "--out", whole); st != 0 {
		t.Fatalf("whole: %d %s", st, errs)
	}
	part := filepath.Join(dir, "part.csv")
	if st, out, errs := runCmd("grid", "--dataset", path, "--spec", spec, "--out", part, "--shard", "0/2"); st != 0 || !strings.Contains(out, "part.part0-of-2.csv") {
		t.Fatalf("shard 0/2: %d %q %s", st, out, errs)
	}
	t.Setenv("SLURM_ARRAY_TASK_ID", "1")
	t.Setenv("SLURM_ARRAY_TASK_COUNT", "2")
	t.Setenv("SLURM_ARRAY_TASK_MIN", "0")
	t.Setenv("SLURM_ARRAY_TASK_MAX", "1")
	if st, out, errs := runCmd("grid", "--dataset", path, "--spec", spec, "--out", part); st != 0 || !strings.Contains(out, "part.part1-of-2.csv") {
		t.Fatalf("shard from the environment: %d %q %s", st, out, errs)
	}
	if st, _, errs := runCmd("grid", "--dataset", path, "--spec", spec, "--out", part); st != 0 || !strings.Contains(errs, "skipped") {
		t.Errorf("a finished part run again: %d %s", st, errs)
	}
	merged := filepath.Join(dir, "merged.csv")
	p0, p1 := filepath.Join(dir, "part.part0-of-2.csv"), filepath.Join(dir, "part.part1-of-2.csv")
	if st, _, errs := runCmd("grid", "merge", merged, p0, p1); st != 0 {
		t.Fatalf("merge: %d %s", st, errs)
	}
	a, _ := os.ReadFile(whole)
	b, _ := os.ReadFile(merged)
	if len(a) == 0 || !bytes.Equal(a, b) {
		t.Errorf("merged file differs from the whole run (%d and %d bytes)", len(a), len(b))
	}
	if st, _, _ := runCmd("grid", "merge", filepath.Join(dir, "m2.csv"), p0); st != 1 {
		t.Errorf("merge with a shard missing: status %d, want 1", st)
	}

	// The point (0.24 c, 5000 K) against the workbench's own computation.
	bench, err := core.OpenDataset(context.Background(), path, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := bench.Data.StartModel(0)
	m.PhotosphereVelocity, m.Temperature = 0.24, 5000
	ov, err := bench.Compute(context.Background(), m, 0)
	if err != nil {
		t.Fatal(err)
	}
	var rows [][]string
	for _, l := range strings.Split(string(a), "\n") {
		if l != "" && !strings.HasPrefix(l, "#") {
			r, err := csv.NewReader(strings.NewReader(l)).Read()
			if err != nil {
				t.Fatal(err)
			}
			rows = append(rows, r)
		}
	}
	if len(rows) != 5 {
		t.Fatalf("%d rows, want a header and 4 points", len(rows))
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	found := false
	for _, r := range rows[1:] {
		if r[col["velocity"]] == "0.24" && r[col["temperature"]] == "5000" {
			found = true
			got, err := strconv.ParseFloat(r[col["chi2n"]], 64)
			if err != nil || math.Abs(got-ov.Reduced()) > 1e-12*ov.Reduced() {
				t.Errorf("grid χ²/N %q, workbench %.15g", r[col["chi2n"]], ov.Reduced())
			}
		}
	}
	if !found {
		t.Errorf("no row for 0.24 c, 5000 K: %v", rows)
	}
}

// TestGridCommandSpectra: --spectra keeps each point's model spectrum in a
// second part file, one row per point and epoch on the asked wavelengths;
// a row holds the flux the workbench's model gives at that point, bit for
// bit; a bad range is a usage error.
func TestGridCommandSpectra(t *testing.T) {
	dir := t.TempDir()
	path, err := core.WriteExample(dir)
	if err != nil {
		t.Fatal(err)
	}
	spec := filepath.Join(dir, "grid.json")
	if err := os.WriteFile(spec, []byte(`{"format":"broadline-grid/1","label":"test",
		"axes":[{"quantity":"epoch","values":[0]},{"quantity":"velocity","values":[0.22,0.24]}]}`), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "g.csv")
	st, stdout, errs := runCmd("grid", "--dataset", path, "--spec", spec, "--out", out, "--spectra", "0.5,0.6,0.01")
	if st != 0 {
		t.Fatalf("grid --spectra: %d %s", st, errs)
	}
	spath := filepath.Join(dir, "g.spectra.csv")
	if !strings.Contains(stdout, spath) {
		t.Errorf("stdout %q does not name the spectra part", stdout)
	}
	raw, err := os.ReadFile(spath)
	if err != nil {
		t.Fatal(err)
	}
	var rows [][]string
	for _, l := range strings.Split(string(raw), "\n") {
		if l != "" && !strings.HasPrefix(l, "#") {
			r, err := csv.NewReader(strings.NewReader(l)).Read()
			if err != nil {
				t.Fatal(err)
			}
			rows = append(rows, r)
		}
	}
	if len(rows) != 3 || len(rows[0]) != 2+11 || rows[0][0] != "point" || rows[2][0] != "1" {
		t.Fatalf("spectra part rows %v", rows)
	}
	bench, err := core.OpenDataset(context.Background(), path, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := bench.Data.StartModel(0)
	m.PhotosphereVelocity = 0.24
	var wave []float64
	for i := range 11 {
		wave = append(wave, (0.5+float64(i)*0.01)*1e4)
	}
	_, flux, err := bench.ComputeSpectrum(context.Background(), m, 0, 0, wave)
	if err != nil {
		t.Fatal(err)
	}
	for i, f := range flux {
		if got, _ := strconv.ParseFloat(rows[2][2+i], 64); got != f || !(got > 0) {
			t.Errorf("point 1 at %g Å: %v in the part, %v from the workbench's model", wave[i], rows[2][2+i], f)
		}
	}
	for _, bad := range []string{"0.5,0.6", "0.6,0.5,0.01", "0.5,0.6,0", "0.1,30,1e-6", "a,b,c", "0.5,0.51,0.02"} {
		if st, _, errs := runCmd("grid", "--dataset", path, "--spec", spec, "--out", out, "--spectra", bad); st != 2 || !strings.Contains(errs, "--spectra") {
			t.Errorf("--spectra %s: status %d, %s", bad, st, errs)
		}
	}
}
