package core

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/linelists"
	"broadline/spectra"
)

// exampleDataset writes the demo as a dataset directory in a fresh
// temporary directory (as `broadline example` does) and returns the
// dataset file's path.
func exampleDataset(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	path, err := WriteExample(dir)
	if err != nil {
		t.Fatalf("example: %v", err)
	}
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
	b, err := OpenDataset(context.Background(), path, func(p linelists.Progress) {
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
	if b.Name != path || len(b.Observed) != 3 {
		t.Fatalf("dataset %q with %d spectra", b.Name, len(b.Observed))
	}
	s := NewSession(b)
	ov, err := b.Compute(context.Background(), s.Model, 0)
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
	if _, err := WriteExample(filepath.Dir(path)); err == nil || !strings.Contains(err.Error(), "not overwritten") {
		t.Errorf("example over an existing dataset: %v", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := OpenDataset(ctx, path, nil); !errors.Is(err, context.Canceled) {
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
		"composition":    {`"mass_fractions": "Ca=`, `"mass_fractions": "Qq=`, `mass fractions "Qq=`},
		"inner zone":     {`"inner_mass_fractions": "Ca=`, `"inner_mass_fractions": "Ca=-`, `mass fractions "Ca=-`},
		"zone boundary":  {`"zone_boundary_c": 0.16`, `"zone_boundary_c": 0.5`, "zone_boundary_c"},
		"velocity order": {`"photosphere_velocity_c": 0.24`, `"photosphere_velocity_c": 0.4`, "epoch 1 "},
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
		if _, err := OpenDataset(context.Background(), p, nil); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one naming %q", name, err, c.want)
		}
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
		d, err := ReadDataset(bytes.NewReader(data), "fuzz.json")
		if err != nil {
			return
		}
		if len(d.Epochs) == 0 || len(d.LineFiles) == 0 || !(d.DistanceMpc > 0) || !(d.ResolvingPower > 0) || d.MassFractions.IsZero() {
			t.Fatalf("accepted an incomplete dataset: %+v", d)
		}
		for i := range d.Epochs {
			if err := d.Ejecta(d.StartModel(i)).Validate(); err != nil {
				t.Fatalf("accepted epoch %d with bad ejecta: %v", i, err)
			}
		}
	})
}

// FuzzSession: any bytes give a session or an error, never a panic; a
// session that validates against the demo can be saved and read back equal.
func FuzzSession(f *testing.F) {
	b := demoBench(f)
	d := b.Data
	js, _ := json.Marshal(NewSession(b))
	f.Add(js)
	f.Add([]byte(`{"version":1,"dataset":"demo","candidates":[{"label":"A"}]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ReadSession(bytes.NewReader(data))
		if err != nil || s.Validate(d) != nil {
			return
		}
		back, err := json.Marshal(s)
		if err != nil {
			t.Fatal(err)
		}
		s2, err := ReadSession(bytes.NewReader(back))
		if err != nil || s2.Validate(d) != nil {
			t.Fatalf("a valid session does not survive saving: %v", err)
		}
	})
}

// TestDatasetEpochReadOptions: an epoch's "read" options reach the reader;
// a spectrum in mJy is converted to erg/s/cm²/Å before any χ² (the
// comparison then matches the original F_λ file's); the dataset's days
// override an MJD-like epoch in the file; the readers' notes become load
// warnings naming the epoch; bad read options are refused with their key.
func TestDatasetEpochReadOptions(t *testing.T) {
	path := exampleDataset(t)
	dir := filepath.Dir(path)
	orig, err := spectra.ReadFile(filepath.Join(dir, "spectra", "demo_epoch1.txt"), spectra.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	fnu := orig.Clone()
	if err := fnu.ConvertFlux(spectra.FluxMilliJansky); err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	b.WriteString("# epoch = 60000.5\n# fluxes converted to mJy from the invented demo\nwave,flux,err,mask\n")
	for i := range fnu.Wavelength {
		m := 0
		if fnu.Masked(i) {
			m = 1
		}
		fmt.Fprintf(&b, "%.17g,%.17g,%.17g,%d\n", fnu.Wavelength[i]/1e4, fnu.Flux[i], fnu.Uncertainty[i], m)
	}
	if err := os.WriteFile(filepath.Join(dir, "spectra", "epoch1_mjy.csv"), []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	raw, _ := os.ReadFile(path)
	js := strings.Replace(string(raw), `"file": "spectra/demo_epoch1.txt",`,
		`"file": "spectra/epoch1_mjy.csv", "read": {"wave_unit": "um", "flux_unit": "mJy", "medium": "vacuum"},`, 1)
	if js == string(raw) {
		t.Fatal("epoch 1 not found in the example")
	}
	p := filepath.Join(dir, "mjy.json")
	os.WriteFile(p, []byte(js), 0o644)
	bm, err := OpenDataset(context.Background(), p, nil)
	if err != nil {
		t.Fatal(err)
	}
	got := bm.Observed[0]
	if got.Meta.FluxUnit != spectra.FluxPerAngstrom || got.Meta.Epoch != bm.Data.Epochs[0].Days {
		t.Fatalf("unit %v epoch %v", got.Meta.FluxUnit, got.Meta.Epoch)
	}
	for i := range orig.Flux {
		if !scalar.EqualWithinRel(got.Flux[i], orig.Flux[i], 1e-9) || !scalar.EqualWithinRel(got.Uncertainty[i], orig.Uncertainty[i], 1e-9) {
			t.Fatalf("sample %d: %v ± %v, want %v ± %v", i, got.Flux[i], got.Uncertainty[i], orig.Flux[i], orig.Uncertainty[i])
		}
	}
	if w := strings.Join(bm.LoadWarnings, "\n"); !strings.Contains(w, "epoch 1 (spectra/epoch1_mjy.csv): flux in mJy converted") {
		t.Errorf("load warnings %q", bm.LoadWarnings)
	}
	bo, err := OpenDataset(context.Background(), path, nil)
	if err != nil {
		t.Fatal(err)
	}
	m := NewSession(bo).Model
	a, err := bo.Compute(context.Background(), m, 0)
	if err != nil {
		t.Fatal(err)
	}
	c, err := bm.Compute(context.Background(), m, 0)
	if err != nil {
		t.Fatal(err)
	}
	if a.N != c.N || !scalar.EqualWithinRel(a.Chi2, c.Chi2, 1e-6) {
		t.Errorf("χ² %v over %d (F_λ file) vs %v over %d (mJy file)", a.Chi2, a.N, c.Chi2, c.N)
	}
	for name, c := range map[string]struct{ read, want string }{
		"unit":        {`{"flux_unit": "furlong"}`, "epoch 1: read.flux_unit"},
		"medium":      {`{"medium": "water"}`, "epoch 1: read.medium"},
		"unknown key": {`{"hdu_number": 1}`, "hdu_number"},
		"row+merge":   {`{"row": 1, "merge_rows": true}`, "read.row"},
	} {
		bad := strings.Replace(string(raw), `"file": "spectra/demo_epoch1.txt",`, `"file": "spectra/demo_epoch1.txt", "read": `+c.read+`,`, 1)
		os.WriteFile(p, []byte(bad), 0o644)
		if _, err := OpenDataset(context.Background(), p, nil); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want an error naming %q", name, err, c.want)
		}
	}
}
