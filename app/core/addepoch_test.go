package core

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestWithEpochAndSaveDataset: a spectrum added from a file becomes a new
// epoch — read with its options, prepared (here: a rest-frame shift), the
// bench marked unsaved; saved as a dataset file (the demo's embedded files
// written beside it), it reopens with the same epochs and spectra, and the
// bench then carries the file's name.
func TestWithEpochAndSaveDataset(t *testing.T) {
	b := demoBench(t)
	ex, err := WriteExample(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(filepath.Dir(ex), "spectra", filepath.Base(b.Data.Epochs[2].File))
	nb, err := b.WithEpoch(Epoch{File: file, Days: 7.5, Prepare: &Preparation{Redshift: 0.01}})
	if err != nil {
		t.Fatal(err)
	}
	if len(nb.Data.Epochs) != 4 || len(b.Data.Epochs) != 3 || !nb.Unsaved() || b.Unsaved() {
		t.Fatalf("epochs %d (was %d), unsaved %v", len(nb.Data.Epochs), len(b.Data.Epochs), nb.Unsaved())
	}
	got, orig := nb.Observed[3], b.Observed[2]
	if got.Len() != orig.Len() || math.Abs(got.Wavelength[0]*1.01/orig.Wavelength[0]-1) > 1e-12 {
		t.Errorf("added epoch: λ₀ %g (from %g), %d samples", got.Wavelength[0], orig.Wavelength[0], got.Len())
	}
	if ep := nb.Data.Epochs[3]; ep.PhotosphereVelocity != b.Data.Epochs[2].PhotosphereVelocity || !filepath.IsAbs(ep.File) {
		t.Errorf("added epoch %+v: want the last epoch's photosphere and an absolute path", ep)
	}
	out := filepath.Join(t.TempDir(), "mine.json")
	if err := nb.SaveDataset(out); err != nil {
		t.Fatal(err)
	}
	if nb.Name != out || nb.Unsaved() {
		t.Errorf("after saving the bench is named %q", nb.Name)
	}
	rb, err := OpenDataset(context.Background(), out, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(rb.Data.Epochs) != 4 || rb.Observed[3].Wavelength[0] != got.Wavelength[0] || rb.Observed[0].Flux[5] != b.Observed[0].Flux[5] {
		t.Errorf("reopened: %d epochs", len(rb.Data.Epochs))
	}
	if rb.Data.Epochs[3].Prepare == nil || rb.Data.Epochs[3].Prepare.Redshift != 0.01 {
		t.Errorf("the preparation was not saved: %+v", rb.Data.Epochs[3])
	}
	for _, bad := range []Epoch{
		{File: file, Days: 0},
		{File: file, Days: 7.5, Prepare: &Preparation{EBV: -1}},
		{File: file, Days: 7.5, Prepare: &Preparation{Law: "x"}},
		{File: filepath.Join(t.TempDir(), "none.txt"), Days: 7.5},
	} {
		if _, err := b.WithEpoch(bad); err == nil {
			t.Errorf("epoch %+v accepted", bad)
		} else if strings.Contains(err.Error(), "json:") {
			t.Errorf("message leaks internals: %v", err)
		}
	}
}

// TestSniffJSON tells sessions from dataset files from anything else.
func TestSniffJSON(t *testing.T) {
	dir := t.TempDir()
	for name, c := range map[string]struct {
		text string
		want JSONKind
	}{
		"s.json": {`{"version":1,"dataset":"demo","epoch":0}`, SessionFile},
		"d.json": {`{"object":"x","epochs":[]}`, DatasetFile},
		"x.txt":  {"5000 1e-17 1e-18\n", OtherFile},
		"e.json": {`[1,2]`, OtherFile},
	} {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(c.text), 0o644); err != nil {
			t.Fatal(err)
		}
		if got := SniffJSON(p); got != c.want {
			t.Errorf("%s: %v, want %v", name, got, c.want)
		}
	}
	if SniffJSON(filepath.Join(dir, "none")) != OtherFile {
		t.Error("a missing file is not OtherFile")
	}
}

// TestLineListsImportAndPreview: a table in a layout of its own (nm,
// cm⁻¹, a header row) previews its first rows parsed with the column map
// (a bad map or a bad row is the reader's file:line error), replaces the
// demo's lists in a bench, is saved in the dataset as an imported line
// file, and the dataset reopens with the same store.
func TestLineListsImportAndPreview(t *testing.T) {
	b := demoBench(t)
	dir := t.TempDir()
	table := filepath.Join(dir, "mine.csv")
	// Invented lines for the test (not atomic data): Sr II and Ca II.
	text := "# my table\nlambda_nm,ion,loggf,elow_cm,jlow\n407.8,Sr_II,0.15,0,0.5\n421.6,Sr_II,-0.17,0,0.5\n854.4,Ca_II,-0.36,13710.88,2.5\n"
	if err := os.WriteFile(table, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	imp := ImportedLineFile{File: table, Columns: "wavelength=lambda_nm:nm,species=ion,log_gf=loggf,lower_energy=elow_cm:cm-1,lower_j=jlow", HeaderRow: true, Medium: "air"}
	raw, lines, err := PreviewLineTable(imp, 2)
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(raw, "407.8") || strings.Contains(raw, "854.4") || len(lines) != 2 || lines[0].Species != "Sr II" || math.Abs(lines[0].Wavelength-4079.0) > 1.5 {
		t.Errorf("preview: %q, %+v", raw, lines)
	}
	bad := imp
	bad.Columns = "wavelength=lambda_nm:nm,species=ion"
	if _, _, err := PreviewLineTable(bad, 2); err == nil {
		t.Error("a column map without log gf previewed")
	}
	if err := os.WriteFile(table+".bad", []byte("lambda_nm,ion,loggf,elow_cm,jlow\n407.8,Sr_II,abc,0,0.5\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	bad = imp
	bad.File = table + ".bad"
	if _, _, err := PreviewLineTable(bad, 5); err == nil || !strings.Contains(err.Error(), ":2") {
		t.Errorf("a bad row: %v (want file:line)", err)
	}
	nb, err := b.WithLineLists(context.Background(), LineLists{Imported: []ImportedLineFile{imp}}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if nb.Store.Len() != 3 || !nb.Unsaved() || len(nb.Data.LineFiles) != 0 {
		t.Fatalf("bench with the table: %d lines, unsaved %v, %d line files", nb.Store.Len(), nb.Unsaved(), len(nb.Data.LineFiles))
	}
	kept, err := b.WithLineLists(context.Background(), LineLists{Imported: []ImportedLineFile{imp}, Keep: true}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if kept.Store.Len() != b.Store.Len()+3 {
		t.Errorf("kept the demo's lists: %d lines, the demo %d", kept.Store.Len(), b.Store.Len())
	}
	out := filepath.Join(t.TempDir(), "ds.json")
	if err := nb.SaveDataset(out); err != nil {
		t.Fatal(err)
	}
	rb, err := OpenDataset(context.Background(), out, nil)
	if err != nil {
		t.Fatal(err)
	}
	if rb.Store.Len() != 3 || len(rb.Data.ImportedLineFiles) != 1 || rb.Data.ImportedLineFiles[0].Columns != imp.Columns {
		t.Errorf("reopened: %d lines, %+v", rb.Store.Len(), rb.Data.ImportedLineFiles)
	}
}
