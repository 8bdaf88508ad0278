package cli

import (
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// linesSample is a small list in our format; the wavelengths are the air
// values of REFERENCES.md's real strong lines.
const linesSample = `# medium: air
# source: test
wavelength_A species log_gf lower_energy_cm-1 lower_j
8542.09 Ca_II -0.360 13710.88 2.5
8498.02 Ca_II -1.318 13650.19 1.5
10327.31 Sr_II -0.35 14836.24 2.5
`

func TestLinesSummary(t *testing.T) {
	p := writeTemp(t, "list.txt", linesSample)
	status, out, errs := runCmd("lines", "summary", p, "--no-cache")
	if status != 0 {
		t.Fatalf("status %d: %s", status, errs)
	}
	for _, want := range []string{"3 rows, 3 lines added", "wavelengths in air", "3 lines, 2 species", "Ca II", "Sr II", "duplicates found: 0", "lower bound"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
	// Vacuum coverage: 8500.36 to 10330.14 Å (REFERENCES.md vacuum values,
	// given to 0.01 Å).
	checkCoverage(t, out, 8500.36, 10330.14)
	// Filter flags count what they leave out.
	status, out, _ = runCmd("lines", "summary", p, "--no-cache", "--wl-max", "9000", "--only", "Ca II")
	if status != 0 || !strings.Contains(out, "2 lines") || !strings.Contains(out, "left out by the filter: 1 outside the wavelength range") {
		t.Errorf("filtered summary (%d):\n%s", status, out)
	}
}

func TestLinesConvertImport(t *testing.T) {
	// Some other table: nm, cm⁻¹, a reference column, no species column.
	table := "# from elsewhere\nref lam loggf elow J\nA 849.802 -1.318 13650.19 1.5\nB 854.209 -0.360 13710.88 2.5\n"
	in := writeTemp(t, "table.dat", table)
	out := filepath.Join(t.TempDir(), "converted.txt.gz")
	status, stdout, errs := runCmd("lines", "convert", in, "--out", out, "--no-cache",
		"--columns", "wavelength=lam:nm,log_gf=loggf,lower_energy=elow:cm-1,lower_j=J", "--header-row",
		"--species", "Ca II", "--medium", "air")
	if status != 0 {
		t.Fatalf("status %d: %s", status, errs)
	}
	if !strings.Contains(stdout, "wrote 2 lines") {
		t.Errorf("stdout %q", stdout)
	}
	// The converted file is in our format and reads back: vacuum values of
	// REFERENCES.md to 0.01 Å.
	status, sum, errs := runCmd("lines", "summary", out, "--no-cache")
	if status != 0 {
		t.Fatalf("summary of converted file: %d %s", status, errs)
	}
	for _, want := range []string{"2 lines, 1 species", "wavelengths in vacuum"} {
		if !strings.Contains(sum, want) {
			t.Errorf("converted summary lacks %q:\n%s", want, sum)
		}
	}
	checkCoverage(t, sum, 8500.36, 8544.44) // REFERENCES.md vacuum values
}

// checkCoverage finds the summary's vacuum coverage and compares it with
// the expected range to 0.01 Å.
func checkCoverage(t *testing.T, sum string, wantLo, wantHi float64) {
	t.Helper()
	m := regexp.MustCompile(`([0-9.]+)–([0-9.]+) Å \(vacuum\)`).FindStringSubmatch(sum)
	if m == nil {
		t.Fatalf("no coverage in:\n%s", sum)
	}
	lo, _ := strconv.ParseFloat(m[1], 64)
	hi, _ := strconv.ParseFloat(m[2], 64)
	if math.Abs(lo-wantLo) > 0.01 || math.Abs(hi-wantHi) > 0.01 {
		t.Errorf("coverage %v–%v Å, want %v–%v ± 0.01", lo, hi, wantLo, wantHi)
	}
}

func TestLinesErrors(t *testing.T) {
	good := writeTemp(t, "good.txt", linesSample)
	bad := writeTemp(t, "bad.txt", "wavelength_A species log_gf lower_energy_eV\n5000 Nd_II -1 0\n5001 Nd_II oops 0\n")
	outDir := t.TempDir()
	out := filepath.Join(outDir, "x.txt")
	for _, tc := range []struct {
		args   []string
		status int
		has    string
	}{
		{[]string{"lines"}, 2, "want a sub-command"},
		{[]string{"lines", "tally", good}, 2, `unknown sub-command "tally"`},
		{[]string{"lines", "summary"}, 2, "no input files"},
		{[]string{"lines", "convert", good}, 2, "--out F is required"},
		{[]string{"lines", "summary", good, "--medium", "water"}, 2, "want vacuum or air"},
		{[]string{"lines", "summary", good, "--columns", "wavelength=1"}, 2, "needs a unit"},
		{[]string{"lines", "summary", good, "--species", "Xx II"}, 2, "unknown element"},
		{[]string{"lines", "summary", good, "--wl-min", "9000", "--wl-max", "8000"}, 2, "want 0 ≤ min < max"},
		{[]string{"lines", "summary", good, "--min-loggf", "abc"}, 2, "not a number"},
		{[]string{"lines", "summary", good, "--bogus"}, 2, "bogus"},
		{[]string{"lines", "convert", bad, "--out", out, "--no-cache"}, 1, "bad.txt:3: column 3"},
		{[]string{"lines", "summary", filepath.Join(outDir, "missing.txt")}, 1, "no such file"},
	} {
		status, stdout, errs := runCmd(tc.args...)
		if status != tc.status || !strings.Contains(errs, tc.has) {
			t.Errorf("%v: status %d stderr %q, want %d and %q", tc.args, status, errs, tc.status, tc.has)
		}
		if strings.Count(errs, "\n") != 1 {
			t.Errorf("%v: stderr not one line: %q", tc.args, errs)
		}
		if stdout != "" {
			t.Errorf("%v: partial output %q", tc.args, stdout)
		}
	}
	if ents, _ := os.ReadDir(outDir); len(ents) != 0 {
		t.Errorf("a failed convert left files: %v", ents)
	}
}

func TestLinesDemoFiles(t *testing.T) {
	// The committed demo lists load with their levels files.
	dir := filepath.Join("..", "demo", "lines")
	status, out, errs := runCmd("lines", "summary", filepath.Join(dir, "demo_sr.txt.gz"), "--levels", filepath.Join(dir, "demo_sr_levels.txt.gz"), "--no-cache")
	if status != 0 {
		t.Fatalf("%d %s", status, errs)
	}
	if !strings.Contains(out, "invented demonstration data") || !strings.Contains(out, "Sr II") {
		t.Errorf("demo summary:\n%s", out)
	}
}
