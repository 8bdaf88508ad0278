package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"broadline/linelists"
)

// exampleDataset writes the demo as a dataset directory in a fresh
// temporary directory (as `broadline example` does) and returns the
// dataset file's path.
func exampleDataset(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	status, out, errs := runCmd("example", dir)
	if status != 0 {
		t.Fatalf("example: status %d, %s", status, errs)
	}
	path := strings.TrimSpace(out)
	if path != filepath.Join(dir, "dataset.json") {
		t.Fatalf("example wrote %q", path)
	}
	return path
}

// TestOpenDataset: the demo written out as a dataset file opens as a user's
// dataset (spectra and line lists read from disk, the line lists through
// their cache with progress reports) and, at its starting values, fits as
// the built-in demo does (χ²/N near 1); a session for it names its path.
func TestOpenDataset(t *testing.T) {
	path := exampleDataset(t)
	var files []string
	b, err := openDataset(context.Background(), path, func(p linelists.Progress) {
		if p.FileDone {
			files = append(files, filepath.Base(p.File))
		}
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(files) != 8 {
		t.Errorf("progress reported %d finished line lists, want the example's 8: %v", len(files), files)
	}
	if b.data.name != path || len(b.data.Observed) != 3 {
		t.Fatalf("dataset %q with %d spectra", b.data.name, len(b.data.Observed))
	}
	s := newSession(b.data.name, b.data)
	ov, err := b.compute(context.Background(), s)
	if err != nil {
		t.Fatal(err)
	}
	if red := ov.Chi2 / float64(ov.N); red < 0.7 || red > 1.5 || ov.N < 500 {
		t.Errorf("χ²/N %.3f over %d samples at the starting values, want ≈ 1", red, ov.N)
	}
	if _, err := os.Stat(filepath.Join(filepath.Dir(path), "lines", "demo_nd.txt.gz.blcache")); err != nil {
		t.Errorf("no line-list cache beside the dataset's files: %v", err)
	}
	// Writing the example again over it is refused.
	if status, _, errs := runCmd("example", filepath.Dir(path)); status == 0 || !strings.Contains(errs, "not overwritten") {
		t.Errorf("example over an existing dataset: status %d, %q", status, errs)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := openDataset(ctx, path, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled open: %v", err)
	}
}

// TestDatasetFileErrors: a dataset file with a bad or missing value is
// refused with the key at fault named.
func TestDatasetFileErrors(t *testing.T) {
	path := exampleDataset(t)
	orig, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	for name, c := range map[string]struct{ old, new, want string }{
		"unknown key":    {`"object"`, `"objet"`, "objet"},
		"distance":       {`"distance_mpc": 62`, `"distance_mpc": -1`, "distance_mpc"},
		"composition":    {`"mass_fractions": "Ca=`, `"mass_fractions": "Qq=`, "mass_fractions"},
		"velocity order": {`"photosphere_velocity_c": 0.24`, `"photosphere_velocity_c": 0.4`, "epochs[0]"},
		"temperature":    {`"temperature_k": 5000`, `"temperature_k": 50`, "temperature_k"},
		"missing file":   {`"spectra/demo_epoch1.txt"`, `"spectra/nothing.txt"`, "nothing.txt"},
		"missing list":   {`"lines/demo_ca.txt.gz"`, `"lines/none.txt.gz"`, "none.txt.gz"},
		"no R":           {`"resolving_power": 500`, `"resolving_power": 0`, "resolving_power"},
	} {
		bad := strings.Replace(string(orig), c.old, c.new, 1)
		if bad == string(orig) {
			t.Fatalf("%s: %q not in the example", name, c.old)
		}
		p := filepath.Join(filepath.Dir(path), "bad.json")
		if err := os.WriteFile(p, []byte(bad), 0o644); err != nil {
			t.Fatal(err)
		}
		if _, err := openDataset(context.Background(), p, nil); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one naming %q", name, err, c.want)
		}
	}
}

// TestWorkbenchOpensDataset: Session ▸ Open dataset… replaces the demo by
// the user's dataset in the same window, with a fresh session for it.
func TestWorkbenchOpensDataset(t *testing.T) {
	path := exampleDataset(t)
	wb := demoWorkbench(t)
	wb.done = func(*overlay, error) {}
	nw := waitJob(t, wb, func() { wb.startOpenDataset(path) }).(*workbench)
	if nw.win != wb.win || nw.sess.Dataset != path || nw.bench.data.name != path || !strings.Contains(nw.win.Title(), "DEMO-1") {
		t.Errorf("after opening: same window %v, session dataset %q, title %q", nw.win == wb.win, nw.sess.Dataset, nw.win.Title())
	}
	if got := waitDone(t, nw); got.N < 500 {
		t.Errorf("%d samples compared in the opened dataset", got.N)
	}
	// A bad path leaves the shown dataset as it was.
	ch := make(chan error, 1)
	nw.jobDone = func(_ any, err error) { ch <- err }
	nw.startOpenDataset(filepath.Join(t.TempDir(), "none.json"))
	if err := <-ch; err == nil || nw.bench.data.name != path {
		t.Errorf("opening a missing file: %v; dataset now %q", err, nw.bench.data.name)
	}
}

// FuzzDatasetFile: any bytes give a checked dataset or an error, never a
// panic; an accepted file has what the workbench relies on.
func FuzzDatasetFile(f *testing.F) {
	f.Add([]byte(`{"object":"X","distance_mpc":40,"resolving_power":500,"line_files":["a"],"mass_fractions":"Sr=1",` +
		`"ejecta_mass_msun":0.04,"inner_velocity_c":0.05,"outer_velocity_c":0.35,"density_index":3,"model_from_um":0.4,` +
		`"model_to_um":2.5,"epochs":[{"file":"s","days":1.5,"photosphere_velocity_c":0.2,"temperature_k":5000}]}`))
	f.Add([]byte(`{"object":"X","epochs":[]}`))
	f.Add([]byte(`{`))
	f.Fuzz(func(t *testing.T, data []byte) {
		d, err := readDatasetFile(bytes.NewReader(data), "fuzz.json")
		if err != nil {
			return
		}
		sc := d.scenario()
		if len(sc.Epochs) == 0 || len(sc.LineFiles) == 0 || !(sc.DistanceMpc > 0) || !(sc.Instrument.ResolvingPower > 0) {
			t.Fatalf("accepted an incomplete dataset: %+v", d)
		}
		for i := range sc.Epochs {
			if err := sc.Ejecta(i).Validate(); err != nil {
				t.Fatalf("accepted epoch %d with bad ejecta: %v", i, err)
			}
		}
	})
}

// FuzzSession: any bytes give a session or an error, never a panic; a
// session that validates against the demo can be saved and read back equal.
func FuzzSession(f *testing.F) {
	d, err := loadDemo()
	if err != nil {
		f.Fatal(err)
	}
	js, _ := json.Marshal(newSession("demo", d))
	f.Add(js)
	f.Add([]byte(`{"version":1,"dataset":"demo","candidates":[{"label":"A"}]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := readSession(bytes.NewReader(data))
		if err != nil || s.Validate(d) != nil {
			return
		}
		back, err := json.Marshal(s)
		if err != nil {
			t.Fatal(err)
		}
		s2, err := readSession(bytes.NewReader(back))
		if err != nil || s2.Validate(d) != nil {
			t.Fatalf("a valid session does not survive saving: %v", err)
		}
	})
}
