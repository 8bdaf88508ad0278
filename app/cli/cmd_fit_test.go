package cli

import (
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"broadline/app/core"
)

// cheapDataset writes the example dataset with its model range cut to
// 0.36–0.7 µm, so that each synthesis is quick; the samples outside it are
// left out of χ² (with a warning).
func cheapDataset(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	path, err := core.WriteExample(dir)
	if err != nil {
		t.Fatal(err)
	}
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
	return path
}

// TestFitCommand runs a one-element fit with a short posterior on the
// dataset's third epoch: the JSON names the dataset's epoch (3, not 1) in
// the per-epoch report and the parameters, states the flux-scale choice,
// has a summary per free parameter; the samples CSV has a column per
// parameter and walkers × steps rows; the same seed gives the same samples
// byte for byte.
func TestFitCommand(t *testing.T) {
	if raceEnabled {
		t.Skip("some 150 syntheses: run without the race detector (make test does)")
	}
	path := cheapDataset(t)
	dir := t.TempDir()
	run := func(name string) (fitReport, []byte) {
		csvPath := filepath.Join(dir, name)
		st, out, errs := runCmd("fit", "--dataset", path, "--free", "Sr", "--epochs", "3", "--fit-velocity", "--preview",
			"--samples", "6", "--walkers", "6", "--seed", "5", "--samples-csv", csvPath)
		if st != 0 {
			t.Fatalf("fit: status %d: %s", st, errs)
		}
		if !strings.Contains(errs, "X(Sr)") || !strings.Contains(errs, "v_ph/c (epoch 3)") {
			t.Errorf("summary on stderr does not name the parameters: %s", errs)
		}
		var rep fitReport
		if err := json.Unmarshal([]byte(out), &rep); err != nil {
			t.Fatalf("fit JSON: %v\n%s", err, out)
		}
		b, err := os.ReadFile(csvPath)
		if err != nil {
			t.Fatal(err)
		}
		return rep, b
	}
	rep, samples := run("a.csv")
	if len(rep.Epochs) != 1 || rep.Epochs[0] != 3 || len(rep.Best.Epochs) != 1 || rep.Best.Epochs[0].Epoch != 3 {
		t.Errorf("epochs %v, report %+v: want the dataset's epoch 3", rep.Epochs, rep.Best.Epochs)
	}
	if rep.Best.Scale != "free" || !rep.Best.Preview || rep.Best.Best == nil || len(rep.Best.Parameters) != 2 {
		t.Errorf("best: scale %q preview %v parameters %v", rep.Best.Scale, rep.Best.Preview, rep.Best.Parameters)
	}
	if names := []string{rep.Best.Parameters[0].Name, rep.Best.Parameters[1].Name}; names[0] != "log10_X_Sr" || names[1] != "v_ph_c_3" {
		t.Errorf("parameter names %v", names)
	}
	if p := rep.Posterior; p == nil || len(p.Summaries) != 2 || p.Walkers != 6 || p.Steps != 6 || p.Seed != 5 {
		t.Fatalf("posterior %+v", p)
	}
	rows, err := csv.NewReader(strings.NewReader(string(samples))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 1+36 || strings.Join(rows[0], ",") != "step,walker,log10_X_Sr,v_ph_c_3,log_posterior" {
		t.Errorf("samples CSV: %d rows, header %v", len(rows), rows[0])
	}
	// The demo dataset has an inner zone, held fixed and reported.
	if rep.InnerZone == "" || !(rep.ZoneBoundary > 0) || !strings.Contains(strings.Join(rep.Posterior.Warnings, " "), "inner zone") {
		t.Errorf("inner zone %q at %gc, warnings %q", rep.InnerZone, rep.ZoneBoundary, rep.Posterior.Warnings)
	}
	if !strings.Contains(rep.Cautions, "hypothesis") {
		t.Errorf("the result does not carry the model's cautions: %q", rep.Cautions)
	}
	if _, again := run("b.csv"); string(again) != string(samples) {
		t.Error("the same seed gave different samples")
	}
}

// TestFitCommandErrors: bad usage exits 2 and names the flag, a missing
// file exits 1, and neither writes anything to stdout.
func TestFitCommandErrors(t *testing.T) {
	path := cheapDataset(t)
	for _, c := range []struct {
		args   []string
		status int
		want   string
	}{
		{[]string{"--free", "Sr"}, 2, "--dataset"},
		{[]string{"--dataset", path}, 2, "nothing to fit"},
		{[]string{"--dataset", path, "--free", "Sr", "--epochs", "9"}, 2, "--epochs"},
		{[]string{"--dataset", path, "--free", "Sr", "--epochs", "0"}, 2, "--epochs"},
		{[]string{"--dataset", path, "--free", "Sr", "--lowest-fraction", "0.5", "--highest-fraction", "0.1"}, 2, "--lowest-fraction"},
		{[]string{"--dataset", path, "--free", "Sr,Sr"}, 2, "twice"},
		{[]string{"--dataset", path, "--free", "Xx"}, 2, "not an element"},
		{[]string{"--dataset", path, "--free", "Sr", "--samples-csv", "x.csv"}, 2, "--samples"},
		{[]string{"--dataset", path, "--free", "Sr", "--samples", "2"}, 2, "--samples"},
		{[]string{"--dataset", path, "--free", "Sr", "--correction-order", "7"}, 2, "--correction-order"},
		{[]string{"--dataset", path, "--free", "Sr", "--inner-mass-fractions", "Nd=1"}, 2, "together"},
		{[]string{"--dataset", path, "--free", "Sr", "--uniform", "--inner-mass-fractions", "Nd=1", "--zone-boundary", "0.15c"}, 2, "--uniform"},
		{[]string{"--dataset", path, "--free", "Sr", "--inner-mass-fractions", "Nd=1", "--zone-boundary", "0.5c"}, 2, "--zone-boundary"},
		{[]string{"--dataset", filepath.Join(t.TempDir(), "none.json"), "--free", "Sr"}, 1, "--dataset"},
	} {
		st, out, errs := runCmd(append([]string{"fit"}, c.args...)...)
		if st != c.status || !strings.Contains(errs, c.want) || out != "" {
			t.Errorf("fit %v: status %d, stderr %q, stdout %q; want %d and a message with %q", c.args, st, errs, out, c.status, c.want)
		}
	}
}
