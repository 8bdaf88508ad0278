package cli

import (
	"context"
	"fmt"
	"os"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/physics"
)

func parseOpacityCSV(t *testing.T, out string) (header []string, rows [][]float64) {
	t.Helper()
	lines := strings.Split(strings.TrimSuffix(out, "\n"), "\n")
	header = strings.Split(lines[0], ",")
	for _, l := range lines[1:] {
		var row []float64
		for _, f := range strings.Split(l, ",") {
			v, err := strconv.ParseFloat(f, 64)
			if err != nil {
				t.Fatalf("row %q: %v", l, err)
			}
			row = append(row, v)
		}
		if len(row) != len(header) {
			t.Fatalf("row %q has %d fields, header %d", l, len(row), len(header))
		}
		rows = append(rows, row)
	}
	return header, rows
}

func TestOpacityCommand(t *testing.T) {
	lines := writeTemp(t, "casr.txt", opacityTestList)
	args := []string{"opacity", "--lines", lines, "--mass-fractions", "Ca=0.4,Sr=0.3,Nd=0.3", "--temperature", "5000",
		"--density", "1e-13", "--days", "1", "--from-um", "0.8", "--to-um", "1.3", "--bin-um", "0.1"}
	s, out, errs := runCmd(args...)
	if s != 0 {
		t.Fatalf("status %d, stderr %q", s, errs)
	}
	header, rows := parseOpacityCSV(t, out)
	if strings.Join(header, ",") != "wavelength_um,kappa_cm2_g,Ca,Sr,Nd" {
		t.Errorf("header %v", header)
	}
	if len(rows) != 5 {
		t.Fatalf("%d rows, want 5 bins of 0.1 µm in 0.8–1.3 µm", len(rows))
	}
	for k, r := range rows {
		if c := 0.85 + 0.1*float64(k); !scalar.EqualWithinAbsOrRel(r[0], c, 1e-12, 0) {
			t.Errorf("row %d: centre %v µm, want %v", k, r[0], c)
		}
		if sum := r[2] + r[3] + r[4]; !scalar.EqualWithinAbsOrRel(sum, r[1], 1e-300, 1e-7) {
			t.Errorf("row %d: element columns sum to %v, κ = %v", k, sum, r[1])
		}
	}
	// Ca lines lie in [0.8, 0.9), Sr in [1.0, 1.1), Nd (and unmodelled Fe) in [1.2, 1.3).
	if rows[0][2] <= 0 || rows[0][3] != 0 || rows[2][3] <= 0 || rows[2][2] != 0 || rows[4][4] <= 0 || rows[1][1] != 0 || rows[3][1] != 0 {
		t.Errorf("lines in the wrong bins: %v", rows)
	}
	// The same numbers from the package on the same file (8 digits printed).
	f, err := os.Open(lines)
	if err != nil {
		t.Fatal(err)
	}
	st, _, err := linelists.Read(f, linelists.ReadOptions{Name: lines})
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	comp, _ := opacity.ParseComposition("Ca=0.4,Sr=0.3,Nd=0.3")
	p, err := opacity.SolveAtoms(comp, 1e-13, 5000, opacity.StoreAtoms(st))
	if err != nil {
		t.Fatal(err)
	}
	g, _ := opacity.LinearGrid(8000, 13000, 1000)
	x, err := opacity.ExpansionOpacity(context.Background(), st, p, physics.Day, g, 1)
	if err != nil {
		t.Fatal(err)
	}
	for k := range rows {
		if !scalar.EqualWithinAbsOrRel(rows[k][1], x.Kappa[k], 1e-300, 1e-7) {
			t.Errorf("bin %d: command κ %v, package %v", k, rows[k][1], x.Kappa[k])
		}
	}
	if !strings.Contains(errs, "1 of elements or stages not modelled") || strings.Count(errs, "\n") != 1 {
		t.Errorf("summary %q should count the one Fe line as not modelled", errs)
	}

	// --census counts, per species, the lines above a Sobolev τ threshold:
	// the package's own depths decide what the command must print.
	tau := make([]float64, st.Len())
	if err := opacity.Sobolev(context.Background(), tau, st, opacity.PlasmaLevelDensities(nil, st, p), 5000, physics.Day, 1); err != nil {
		t.Fatal(err)
	}
	for _, thr := range []float64{1e-3, 1, 1e3} {
		s, _, errs := runCmd(append(append([]string(nil), args...), "--census", strconv.FormatFloat(thr, 'g', -1, 64))...)
		if s != 0 {
			t.Fatalf("census: status %d, %q", s, errs)
		}
		want := opacity.CountAbove(st, tau, thr)
		for i, sp := range want.Species {
			frag := fmt.Sprintf("%s %d of %d", sp, want.Above[i], want.Total[i])
			if !strings.Contains(errs, frag) {
				t.Errorf("census τ > %g: stderr %q lacks %q", thr, errs, frag)
			}
		}
	}
	if s, _, _ := runCmd(append(append([]string(nil), args...), "--census", "-1")...); s != 2 {
		t.Errorf("--census -1: status %d, want 2", s)
	}

	// A line exactly on an edge belongs to the bin that starts there.
	edge := writeTemp(t, "edge.txt", "# medium: vacuum\nwavelength_A species log_gf lower_energy_eV lower_g\n9000.0 Ca_II 0 0 2\n")
	args[2] = edge
	s, out, errs = runCmd(args...)
	if s != 0 {
		t.Fatalf("edge: status %d, %q", s, errs)
	}
	_, rows = parseOpacityCSV(t, out)
	if rows[0][1] != 0 || !(rows[1][1] > 0) {
		t.Errorf("line at 0.9 µm: κ = %v in [0.8, 0.9) and %v in [0.9, 1.0); want 0 and > 0", rows[0][1], rows[1][1])
	}
}

func TestOpacityCommandErrors(t *testing.T) {
	lines := writeTemp(t, "casr.txt", opacityTestList)
	base := map[string]string{"--lines": lines, "--mass-fractions": "Ca=1", "--temperature": "5000", "--density": "1e-13",
		"--days": "1", "--from-um": "0.8", "--to-um": "1.3", "--bin-um": "0.1"}
	order := []string{"--lines", "--mass-fractions", "--temperature", "--density", "--days", "--from-um", "--to-um", "--bin-um"}
	with := func(kv ...string) []string {
		m := map[string]string{}
		for k, v := range base {
			m[k] = v
		}
		for i := 0; i < len(kv); i += 2 {
			m[kv[i]] = kv[i+1]
		}
		a := []string{"opacity"}
		for _, k := range order {
			if m[k] != "" {
				a = append(a, k, m[k])
			}
		}
		return a
	}
	for _, tc := range []struct {
		args []string
		flag string
	}{
		{with("--temperature", "0"), "--temperature"},
		{with("--temperature", "-5"), "--temperature"},
		{with("--density", "0"), "--density"},
		{with("--mass-fractions", "Ca=1,Qq=2"), "--mass-fractions"},
		{with("--mass-fractions", "Ca=0"), "--mass-fractions"},
		{with("--from-um", "1.3"), "--from-um"},
		{with("--to-um", "0.5"), "--to-um"},
		{with("--bin-um", "0"), "--bin-um"},
		{with("--bin-um", "1e-12"), "--bin-um"},
		{with("--days", "0"), "--days"},
		{with("--days", ""), "--days"},
		{with("--lines", ""), "--lines"},
		{with("--temperature", "inf"), "--temperature"},
	} {
		s, out, errs := runCmd(tc.args...)
		if s != 2 || out != "" || strings.Count(errs, "\n") != 1 || !strings.Contains(errs, tc.flag) {
			t.Errorf("%v: status %d, stdout %q, stderr %q; want 2, nothing, one line naming %s", tc.args[1:], s, out, errs, tc.flag)
		}
	}
}
