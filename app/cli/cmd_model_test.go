package cli

import (
	"bytes"
	"math"
	"strconv"
	"strings"
	"testing"

	"broadline/app/core"
	"broadline/spectra"
)

const modelLines = "../../testdata/synth/ca_sr_lines.txt"

func modelArgs(extra ...string) []string {
	a := []string{"model", "--lines", modelLines, "--mass-fractions", "Ca=0.5,Sr=0.5",
		"--days", "1.5", "--photosphere-velocity", "0.2c", "--outer-velocity", "90000km/s",
		"--temperature", "5000", "--ejecta-mass", "0.03", "--inner-velocity", "0.05c", "--density-index", "3",
		"--from-um", "0.6", "--to-um", "1.2"}
	return append(a, extra...)
}

// readModelCSV parses the command's CSV into columns.
func readModelCSV(t *testing.T, s string) (w, f, n []float64) {
	t.Helper()
	rows := strings.Split(strings.TrimSpace(s), "\n")
	if rows[0] != "wavelength_um,flux,normalized_flux" {
		t.Fatalf("header %q", rows[0])
	}
	for i, r := range rows[1:] {
		c := strings.Split(r, ",")
		if len(c) != 3 {
			t.Fatalf("row %d: %q", i+2, r)
		}
		var v [3]float64
		for k := range c {
			x, err := strconv.ParseFloat(c[k], 64)
			if err != nil {
				t.Fatalf("row %d: %v", i+2, err)
			}
			v[k] = x
		}
		w, f, n = append(w, v[0]), append(f, v[1]), append(n, v[2])
	}
	return
}

// TestModelCommand runs the command on the Ca II / Sr II test list and
// checks the CSV: the range asked for, the flux equal to π B_λ(T) times the
// normalised flux (REFERENCES.md blackbody), an absorption where the Ca II
// triplet acts, λ₀(1 − v/c) for v between v_ph and v_max, and a bare
// continuum without both elements.
func TestModelCommand(t *testing.T) {
	var out, errb bytes.Buffer
	if s := dispatch(modelArgs("--resolving-power", "1000"), &out, &errb); s != 0 {
		t.Fatalf("status %d: %s", s, errb.String())
	}
	w, f, n := readModelCSV(t, out.String())
	if math.Abs(w[0]-0.6) > 1e-6 || w[len(w)-1] < 1.2-1e-4 {
		t.Errorf("range %g–%g µm, want 0.6–1.2", w[0], w[len(w)-1])
	}
	minN, minW := 2.0, 0.0
	for i := range w {
		if w[i] > 0.65 && w[i] < 0.70 && n[i] < minN {
			minN, minW = n[i], w[i]
		}
		if i > 5 && i < len(w)-5 {
			bb := math.Pi * spectra.PlanckLambdaPerAngstrom(w[i]*1e4, 5000)
			if rel := f[i]/(bb*n[i]) - 1; math.Abs(rel) > 2e-3 {
				t.Fatalf("flux %g at %g µm is not π B_λ × %g (rel. diff %g)", f[i], w[i], n[i], rel)
			}
		}
	}
	if minN > 0.8 {
		t.Errorf("no Ca II absorption in 0.65–0.70 µm: minimum F/F_c %g at %g µm", minN, minW)
	}
	out.Reset()
	errb.Reset()
	if s := dispatch(modelArgs("--without", "Ca", "--without", "Sr"), &out, &errb); s != 0 {
		t.Fatalf("status %d: %s", s, errb.String())
	}
	_, _, n = readModelCSV(t, out.String())
	for i, v := range n {
		if v != 1 {
			t.Fatalf("without Ca and Sr F/F_c = %g at row %d, want 1", v, i+2)
		}
	}
}

// TestModelVelocities checks the velocity syntax: "0.2c" and "km/s" agree
// (c = 299792.458 km/s, exact).
func TestModelVelocities(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want float64
		ok   bool
	}{
		{"0.2c", 0.2, true}, {"59958.4916km/s", 0.2, true}, {"60000 km/s", 60000 / 299792.458, true},
		{" 0.1C ", 0.1, true}, {"0.2", 0, false}, {"1.2c", 0, false}, {"-0.1c", 0, false}, {"fastc", 0, false},
		{"3e5km/s", 0, false}, {"NaNc", 0, false},
	} {
		got, err := core.ParseVelocity(tc.in)
		if (err == nil) != tc.ok {
			t.Errorf("%q: error %v, want ok=%v", tc.in, err, tc.ok)
			continue
		}
		if tc.ok && math.Abs(got-tc.want) > 1e-9 {
			t.Errorf("%q = %g c, want %g", tc.in, got, tc.want)
		}
	}
}

// TestModelBadInput checks that bad values give a one-line error naming the
// problem, exit status 2 and no output.
func TestModelBadInput(t *testing.T) {
	replace := func(flag, val string) []string {
		a := modelArgs()
		for i := range a {
			if a[i] == flag {
				a[i+1] = val
			}
		}
		return a
	}
	for _, tc := range []struct {
		args []string
		has  string
	}{
		{replace("--photosphere-velocity", "0.2"), "needs a unit"},
		{replace("--outer-velocity", "0.1c"), "outer velocity"},
		{replace("--days", "-1"), "--days"},
		{replace("--temperature", "abc"), "temperature"},
		{replace("--mass-fractions", "Xx=1"), "--mass-fractions"},
		{replace("--mass-fractions", "Ca=0"), "--mass-fractions"},
		{replace("--from-um", "1.3"), "--from-um"},
		{replace("--inner-velocity", "0c"), "inner velocity"},
		{append(modelArgs(), "--without", "Qq"), "--without"},
		{append(modelArgs(), "--doppler", "exact"), "--doppler"},
		{append(modelArgs(), "--resolving-power", "-3"), "--resolving-power"},
		{[]string{"model", "--lines", modelLines}, "--mass-fractions"},
		{append(modelArgs(), "stray"), "unexpected argument"},
	} {
		var out, errb bytes.Buffer
		s := dispatch(tc.args, &out, &errb)
		if s != 2 {
			t.Errorf("%v: status %d, want 2 (stderr %q)", tc.args, s, errb.String())
		}
		if out.Len() != 0 {
			t.Errorf("%v: partial output %q", tc.args, out.String())
		}
		if !strings.Contains(errb.String(), tc.has) || strings.Count(errb.String(), "\n") != 1 {
			t.Errorf("%v: stderr %q, want one line mentioning %q", tc.args, errb.String(), tc.has)
		}
	}
}

// FuzzParseVelocity checks that no string makes parseVelocity panic or
// return a velocity outside [0, c).
func FuzzParseVelocity(f *testing.F) {
	for _, s := range []string{"0.2c", "60000km/s", "60000 km/s", "1e5km/s", "c", "km/s", "-0c", "0x1p-2c", "Infc", "1e-400c"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		b, err := core.ParseVelocity(s)
		if err == nil && !(b >= 0 && b < 1) {
			t.Fatalf("%q accepted as %g c", s, b)
		}
	})
}
