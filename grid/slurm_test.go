package grid

import (
	"bytes"
	"context"
	"fmt"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// The helper process of TestSlurmArray reads these variables.
const (
	envHelperSpec = "GRID_TEST_HELPER_SPEC" // the spec file
	envHelperOut  = "GRID_TEST_HELPER_OUT"  // the directory of the parts
)

// TestHelperShard is not a test by itself: TestSlurmArray submits the test
// executable as the job of a Slurm array with -test.run=TestHelperShard,
// and each task computes the shard its SLURM_ARRAY_TASK_* variables name.
func TestHelperShard(t *testing.T) {
	specPath, out := os.Getenv(envHelperSpec), os.Getenv(envHelperOut)
	if specPath == "" || out == "" {
		t.Skip("helper process of TestSlurmArray; runs only inside its Slurm job array")
	}
	f, err := os.Open(specPath)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s, err := DecodeSpec(f, specPath)
	if err != nil {
		t.Fatal(err)
	}
	sh, found, err := ShardFromEnv(os.Getenv)
	if err != nil || !found {
		t.Fatalf("shard from the job-array variables: found %v, %v", found, err)
	}
	opt := testOptions(2)
	opt.Wavelengths = []float64{4000, 6000, 8000}
	path := filepath.Join(out, fmt.Sprintf("part-%d.csv", sh.Index))
	rep, err := Run(context.Background(), s, sh, &fake{epochs: 2, waves: opt.Wavelengths}, path, opt)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("shard %s: %d points, %d failed, written to %s", sh, rep.Points, rep.Failed, path)
}

// freePort returns a TCP port free on the loopback address just now.
func freePort(t *testing.T) int {
	t.Helper()
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Skipf("no free port for the test cluster: %v", err)
	}
	defer l.Close()
	return l.Addr().(*net.TCPAddr).Port
}

// TestSlurmArray runs a real scheduler: a one-node Slurm cluster started by
// scripts/slurm-local.sh runs a 4-task job array (sbatch --array=0-3
// --wait), each task one shard of a grid with the fake evaluator; the
// merged parts must be byte for byte the unsharded run's files.
func TestSlurmArray(t *testing.T) {
	if testing.Short() {
		t.Skip("-short: this test starts the Slurm and munge daemons")
	}
	if os.Geteuid() != 0 {
		t.Skip("not root: scripts/slurm-local.sh needs root to start munged, slurmctld and slurmd")
	}
	script, err := filepath.Abs(filepath.Join("..", "scripts", "slurm-local.sh"))
	if err != nil {
		t.Fatal(err)
	}
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	// Not t.TempDir: munge wants every directory above its socket to be
	// searchable by all, and t.TempDir's parent is private.
	dir, err := os.MkdirTemp("", "grid-slurm-")
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { os.RemoveAll(dir) })
	if err := os.Chmod(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	state := filepath.Join(dir, "slurm")
	conf := filepath.Join(state, "slurm.conf")
	env := append(os.Environ(),
		"SLURM_TMP="+state,
		fmt.Sprintf("SLURM_CTLD_PORT=%d", freePort(t)),
		fmt.Sprintf("SLURMD_PORT=%d", freePort(t)),
		"SLURM_UP_TIMEOUT=30",
		"SLURM_CONF="+conf,
	)
	script1 := func(ctx context.Context, arg string) ([]byte, error) {
		cmd := exec.CommandContext(ctx, "bash", script, arg)
		cmd.Env = env
		return cmd.CombinedOutput()
	}
	// Stop the daemons whatever happens (down is harmless when nothing runs).
	t.Cleanup(func() {
		ctx, cancel := context.WithTimeout(context.Background(), 30*time.Second)
		defer cancel()
		if out, err := script1(ctx, "down"); err != nil {
			t.Errorf("slurm-local.sh down: %v\n%s", err, out)
		}
	})
	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()
	if out, err := script1(ctx, "up"); err != nil {
		t.Skipf("the one-node Slurm cluster could not be started (scripts/slurm-local.sh up: %v):\n%s", err, out)
	}

	specPath := filepath.Join(dir, "spec.json")
	spec := `{"format":"broadline-grid/1","label":"invented grid for the scheduler test","axes":[
		{"quantity":"velocity","from":0.1,"to":0.3,"steps":9},
		{"quantity":"temperature","values":[3500,4000,4500,5000,5500]},
		{"quantity":"fraction","element":"Nd","from":1e-4,"to":1e-1,"steps":4,"spacing":"log"}]}`
	if err := os.WriteFile(specPath, []byte(spec), 0o644); err != nil {
		t.Fatal(err)
	}
	parts := filepath.Join(dir, "parts")
	if err := os.Mkdir(parts, 0o755); err != nil {
		t.Fatal(err)
	}
	job := filepath.Join(dir, "job.sh")
	jobText := fmt.Sprintf("#!/bin/sh\nexec %q -test.run='^TestHelperShard$' -test.count=1 -test.v\n", exe)
	if err := os.WriteFile(job, []byte(jobText), 0o755); err != nil {
		t.Fatal(err)
	}
	sb := exec.CommandContext(ctx, "sbatch", "--array=0-3", "--wait", "--chdir="+dir,
		"--output="+filepath.Join(dir, "task-%a.out"), "--job-name=grid-test", job)
	sb.Env = append(env, envHelperSpec+"="+specPath, envHelperOut+"="+parts)
	out, err := sb.CombinedOutput()
	if err != nil {
		logs, _ := filepath.Glob(filepath.Join(dir, "task-*.out"))
		var b strings.Builder
		for _, l := range logs {
			data, _ := os.ReadFile(l)
			fmt.Fprintf(&b, "--- %s\n%s", l, data)
		}
		t.Fatalf("sbatch --array=0-3 --wait: %v\n%s\n%s", err, out, b.String())
	}

	var paths, spectra []string
	for i := range 4 {
		p := filepath.Join(parts, fmt.Sprintf("part-%d.csv", i))
		f, err := os.Open(p)
		if err != nil {
			t.Fatalf("task %d wrote no part: %v", i, err)
		}
		info, err := ReadPart(f, p)
		f.Close()
		if err != nil {
			t.Fatal(err)
		}
		if want := (Shard{i, 4}); info.Shard != want {
			t.Errorf("%s holds shard %s, want %s (from SLURM_ARRAY_TASK_ID and _COUNT)", p, info.Shard, want)
		}
		paths = append(paths, p)
		spectra = append(spectra, SpectraPath(p))
	}
	merged := filepath.Join(dir, "merged.csv")
	if _, err := Merge(merged, paths...); err != nil {
		t.Fatal(err)
	}
	if _, err := Merge(SpectraPath(merged), spectra...); err != nil {
		t.Fatal(err)
	}
	// The unsharded run, here, with the same evaluator and options.
	s, err := DecodeSpec(strings.NewReader(spec), specPath)
	if err != nil {
		t.Fatal(err)
	}
	opt := testOptions(2)
	opt.Wavelengths = []float64{4000, 6000, 8000}
	whole := filepath.Join(dir, "whole.csv")
	if _, err := Run(context.Background(), s, Whole, &fake{epochs: 2, waves: opt.Wavelengths}, whole, opt); err != nil {
		t.Fatal(err)
	}
	for _, pair := range [][2]string{{merged, whole}, {SpectraPath(merged), SpectraPath(whole)}} {
		a, _ := os.ReadFile(pair[0])
		b, _ := os.ReadFile(pair[1])
		if len(a) == 0 || !bytes.Equal(a, b) {
			t.Errorf("%s (%d bytes) is not the unsharded %s (%d bytes)", pair[0], len(a), pair[1], len(b))
		}
	}
}
