package cli

import (
	"context"
	"fmt"
	"math"
	"strings"
	"testing"

	"broadline/app/core"
)

// TestDatasetFlagReproducesWorkbench: with --dataset the headless sweep
// computes what the workbench's sweep does for the same epoch (both go
// through core and opacity/fit), so their refined best velocities agree to
// the printed precision; and the flags the dataset fixes are refused
// beside it.
func TestDatasetFlagReproducesWorkbench(t *testing.T) {
	path, err := core.WriteExample(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	b, err := core.OpenDataset(context.Background(), path, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := b.Data.StartModel(1)
	lo, hi := m.PhotosphereVelocity-0.04, m.PhotosphereVelocity+0.04
	sw, err := b.Sweep(context.Background(), m, core.Velocity, lo, hi, 5, nil)
	if err != nil {
		t.Fatal(err)
	}
	status, out, errs := runCmd("sweep", "--dataset", path, "--epoch", "2", "--from-velocity", fmt.Sprintf("%gc", lo),
		"--to-velocity", fmt.Sprintf("%gc", hi), "--steps", "5")
	if status != 0 {
		t.Fatalf("status %d: %s", status, errs)
	}
	var best float64
	i := strings.Index(errs, "best velocity_c=")
	if i < 0 {
		t.Fatalf("stderr %q", errs)
	}
	if _, err := fmt.Sscanf(errs[i:], "best velocity_c=%g", &best); err != nil {
		t.Fatal(err)
	}
	if math.Abs(best-sw.Best) > 5e-6 || len(strings.Split(strings.TrimSpace(out), "\n")) != 6 {
		t.Errorf("command best %.5f c, workbench %.5f c; CSV %q", best, sw.Best, out)
	}
	if !strings.Contains(errs, "from the dataset") {
		t.Errorf("stderr does not say the lines came from the dataset: %q", errs)
	}
	for _, bad := range [][]string{
		{"model", "--dataset", path, "--days", "3"},
		{"model", "--dataset", path, "--epoch", "4"},
		{"model", "--dataset", path, "--lines", "x.txt"},
		{"model", "--epoch", "2", "--lines", "x.txt"},
	} {
		if status, out, errs := runCmd(bad...); status != 2 || out != "" {
			t.Errorf("%v: status %d, stdout %d bytes, stderr %q: want 2 and nothing", bad, status, len(out), errs)
		}
	}
	status, out, errs = runCmd("model", "--dataset", path, "--epoch", "1", "--preview")
	if status != 0 || !strings.HasPrefix(out, "wavelength_um,flux,normalized_flux\n") || !strings.Contains(errs, "PREVIEW") {
		t.Errorf("model --dataset: status %d, stderr %q", status, errs)
	}
}
