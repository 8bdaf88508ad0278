package cli

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"

	"broadline/physics"
	"broadline/spectra"

	"gonum.org/v1/gonum/floats/scalar"
)

func runPrepArgs(t *testing.T, args ...string) (status int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	status = dispatch(append([]string{"prep"}, args...), &out, &errb)
	return status, out.String(), errb.String()
}

type prepRow struct {
	um, flux, unc float64
	mask          int
}

func parsePrepCSV(t *testing.T, s string) []prepRow {
	t.Helper()
	lines := strings.Split(strings.TrimSpace(s), "\n")
	for len(lines) > 0 && strings.HasPrefix(lines[0], "#") {
		lines = lines[1:]
	}
	if lines[0] != "wavelength_um,flux,uncertainty,mask" {
		t.Fatalf("header %q", lines[0])
	}
	var rows []prepRow
	for _, l := range lines[1:] {
		f := strings.Split(l, ",")
		if len(f) != 4 {
			t.Fatalf("row %q", l)
		}
		var r prepRow
		var err error
		if r.um, err = strconv.ParseFloat(f[0], 64); err != nil {
			t.Fatal(err)
		}
		r.flux, _ = strconv.ParseFloat(f[1], 64)
		r.unc, _ = strconv.ParseFloat(f[2], 64)
		r.mask, _ = strconv.Atoi(f[3])
		rows = append(rows, r)
	}
	return rows
}

// TestPrepAirRedshiftTelluric: an air-wavelength table is converted with
// Morton (2000) (Paβ air 12818.08 → vacuum 12821.586536 Å by specutils
// 1.9.1, testdata/spectra/reference_values.json; 12821.59 in REFERENCES.md
// [src]), moved to the rest frame (λ/(1+z), F_λ·(1+z)) and telluric bands
// are flagged in the observer frame, keeping every sample.
func TestPrepAirRedshiftTelluric(t *testing.T) {
	in := "# flux_unit = erg/s/cm2/A\nwave,flux,err\n12818.08,1,0.1\n13600,2,0.1\n14600,3,0.1\n"
	p := writeTemp(t, "s.csv", in)
	st, out, errs := runPrepArgs(t, p, "--air", "--redshift", "0.01", "--mask-telluric")
	if st != 0 {
		t.Fatalf("status %d: %s", st, errs)
	}
	rows := parsePrepCSV(t, out)
	if len(rows) != 3 {
		t.Fatalf("%d rows, want 3 (nothing deleted)", len(rows))
	}
	if want := 12821.586535741171 / 1.01 / 1e4; !scalar.EqualWithinAbs(rows[0].um, want, 1e-11) {
		t.Errorf("λ %v µm, want %v", rows[0].um, want)
	}
	if !scalar.EqualWithinRel(rows[0].flux, 1.01, 1e-12) || !scalar.EqualWithinRel(rows[0].unc, 0.101, 1e-12) {
		t.Errorf("flux %v ± %v, want 1.01 ± 0.101", rows[0].flux, rows[0].unc)
	}
	// 13600 Å (air) lies in the 1.35–1.45 µm water band: flagged telluric.
	if rows[1].mask != int(spectra.MaskTelluric) || rows[0].mask != 0 || rows[2].mask != 0 {
		t.Errorf("masks %d %d %d", rows[0].mask, rows[1].mask, rows[2].mask)
	}
	if !strings.Contains(errs, "telluric 1") {
		t.Errorf("report %q lacks the telluric count", errs)
	}
}

// TestPrepBlackbodyJSON normalises the invented noisy blackbody of
// testdata/spectra by its fitted continuum, with a distance and epoch, and
// reads the JSON report: T matches the truth (4500 K) within 2σ, and
// v = R/t follows from the reported radius.
func TestPrepBlackbodyJSON(t *testing.T) {
	p := "../../testdata/spectra/blackbody_noisy.csv"
	st, out, errs := runPrepArgs(t, p, "--normalize-blackbody", "--distance-mpc", "40", "--epoch", "1.5", "--json")
	if st != 0 {
		t.Fatalf("status %d: %s", st, errs)
	}
	var rep prepReport
	if err := json.Unmarshal([]byte(errs), &rep); err != nil {
		t.Fatalf("report is not JSON: %v\n%s", err, errs)
	}
	b := rep.Blackbody
	if b == nil || math.Abs(b.TemperatureK-4500) > 2*b.TemperatureErrK {
		t.Fatalf("blackbody %+v", b)
	}
	// gen_reference.py made it with R = 5e14 cm at 40 Mpc.
	if math.Abs(b.RadiusCm-5e14) > 3*b.RadiusErrCm {
		t.Errorf("R = %g ± %g, true 5e14", b.RadiusCm, b.RadiusErrCm)
	}
	if v := b.RadiusCm / (1.5 * 86400) / 1e5; !scalar.EqualWithinRel(b.VelocityKmS, v, 1e-9) {
		t.Errorf("v = %v km/s, want R/t = %v", b.VelocityKmS, v)
	}
	// The weighted mean of the normalised flux is 1 within 3σ of the mean.
	rows := parsePrepCSV(t, out)
	var sw, swf float64
	for _, r := range rows {
		w := 1 / (r.unc * r.unc)
		sw += w
		swf += w * r.flux
	}
	mean := swf / sw
	if !scalar.EqualWithinAbs(mean, 1, 3/math.Sqrt(sw)) || rep.FluxUnit != "normalized" {
		t.Errorf("normalised mean %v, unit %v", mean, rep.FluxUnit)
	}
}

// TestPrepFITSRoundTrip reads an astropy-written FITS table, converts the
// flux to mJy and reads the CSV output back with spectra.ReadText, which
// finds the flux unit prep wrote (no option needed).
func TestPrepFITSRoundTrip(t *testing.T) {
	st, out, errs := runPrepArgs(t, "../../testdata/spectra/table_rows.fits", "--flux-out", "mJy", "--ebv", "0.05", "--law", "f99")
	if st != 0 {
		t.Fatalf("status %d: %s", st, errs)
	}
	s, err := spectra.ReadText(strings.NewReader(out), spectra.ReadOptions{Name: "out.csv"})
	if err != nil {
		t.Fatal(err)
	}
	if s.Meta.FluxUnit != spectra.FluxMilliJansky || s.Meta.Read.FluxUnitFrom != "file" {
		t.Errorf("read back in %v (%s), want mJy from the file", s.Meta.FluxUnit, s.Meta.Read.FluxUnitFrom)
	}
	if s.Len() != 25 || s.CountMasked(spectra.MaskFile) != 2 {
		t.Errorf("%d samples, %d flagged; want 25 and the 2 flagged by the file", s.Len(), s.CountMasked(spectra.MaskFile))
	}
	// Sample 0: 3e-17 erg/s/cm²/Å at 8000 Å, dereddened by 10^(0.4 A) with
	// A = E(B−V)·R_V·(A/A_V), then F_ν = F_λ λ²/c in mJy.
	r, _ := spectra.Extinction(spectra.F99, 8000, 3.1)
	want := 3.0000001167615996e-17 * math.Pow(10, 0.4*0.05*3.1*r) * 8000 * 8000 * 1e-8 / physics.SpeedOfLight / 1e-26
	if !scalar.EqualWithinRel(s.Flux[0], want, 1e-6) {
		t.Errorf("flux %v mJy, want %v", s.Flux[0], want)
	}
}

func TestPrepUsageErrors(t *testing.T) {
	p := writeTemp(t, "s.txt", "1000 1\n1001 2\n1002 3\n")
	for _, args := range [][]string{
		{},
		{p, p},
		{p, "--redshift", "-1"},
		{p, "--ebv", "-0.1"},
		{p, "--rv", "0"},
		{p, "--law", "odd"},
		{p, "--air", "--vacuum"},
		{p, "--resolving-power", "-5"},
		{p, "--epoch", "2"},
		{p, "--fit-windows", "0.5-0.4", "--fit-blackbody"},
		{p, "--flux-out", "furlongs"},
		{p, "--hdu", "x"},
		{p, "--telluric-bands", "0.7-0.8"},
		{p, "--mask", "1-x"},
		{p, "--bogus"},
		{p, "--mask-good", "2"},
		{p, "--ignore-mask", "--mask-good", "1"},
		{p, "--row", "1", "--merge-rows"},
		{p, "--band", "-1"},
		{p, "--days", "-3"},
		{p, "--days", "2", "--explosion-mjd", "60000"},
	} {
		st, out, errs := runPrepArgs(t, args...)
		if st != 2 || out != "" || strings.Count(errs, "\n") != 1 {
			t.Errorf("%v: status %d, stdout %q, stderr %q; want 2, nothing, one line", args, st, out, errs)
		}
	}
	if st, out, errs := runPrepArgs(t, "-h"); st != 0 || errs != "" || !strings.Contains(out, "--normalize-blackbody") {
		t.Errorf("-h: status %d, stdout %q, stderr %q", st, out, errs)
	}
	// Bad data: a failure (1) naming file:line, and no partial output.
	bad := writeTemp(t, "bad.txt", "1000 1\n1001 x\n")
	st, out, errs := runPrepArgs(t, bad)
	if st != 1 || out != "" || !strings.Contains(errs, "bad.txt:2:") {
		t.Errorf("bad data: status %d stdout %q stderr %q", st, out, errs)
	}
	// Converting an arbitrary flux unit is refused before anything is written.
	st, out, _ = runPrepArgs(t, p, "--flux-out", "Jy")
	if st != 2 || out != "" {
		t.Errorf("arbitrary → Jy: status %d, stdout %q", st, out)
	}
}

// TestPrepSmoothAndFeatures smooths a spectrum with one Gaussian dip and
// reports the feature at its wavelength.
func TestPrepSmoothAndFeatures(t *testing.T) {
	var b strings.Builder
	b.WriteString("wavelength_um,flux,uncertainty\n")
	for i := 0; i <= 2000; i++ {
		w := 0.8 + 0.0004*float64(i)
		z := (w - 1.2) / 0.02
		fmt.Fprintf(&b, "%.6f,%.6f,0.01\n", w, 1-0.4*math.Exp(-0.5*z*z))
	}
	p := writeTemp(t, "dip.csv", b.String())
	st, out, errs := runPrepArgs(t, p, "--resolving-power", "500", "--features", "--json")
	if st != 0 {
		t.Fatalf("status %d: %s", st, errs)
	}
	var rep prepReport
	if err := json.Unmarshal([]byte(errs), &rep); err != nil {
		t.Fatal(err)
	}
	if len(rep.Features) != 1 || !scalar.EqualWithinAbs(rep.Features[0].Wavelength, 12000, 2) {
		t.Errorf("features %+v", rep.Features)
	}
	if n := len(parsePrepCSV(t, out)); n != 2001 {
		t.Errorf("%d rows", n)
	}
}

// TestPrepUserBands: user telluric bands replace the defaults and user
// masks flag samples as "user"; nothing is deleted.
func TestPrepUserBands(t *testing.T) {
	p := writeTemp(t, "s.txt", "7600 1\n9500 2\n10500 3\n")
	st, out, errs := runPrepArgs(t, p, "--mask-telluric", "--telluric-bands", "1.04-1.06", "--mask", "0.75-0.77")
	if st != 0 {
		t.Fatalf("status %d: %s", st, errs)
	}
	rows := parsePrepCSV(t, out)
	// 7600 Å: user; 9500 Å: in a default band but not in the user's list; 10500 Å: telluric.
	if len(rows) != 3 || rows[0].mask != int(spectra.MaskUser) || rows[1].mask != 0 || rows[2].mask != int(spectra.MaskTelluric) {
		t.Errorf("rows %+v", rows)
	}
}

// TestPrepReadOptionsAndReport: prep passes the read options through
// (band, row, mask convention, days) and prints the read report on stderr,
// as text and in the JSON report; a refused read says which flag decides.
func TestPrepReadOptionsAndReport(t *testing.T) {
	dir := "../../testdata/spectra/layouts/"
	st, out, errs := runPrepArgs(t, dir+"image_sci_err_dq_gzipped.fits")
	if st != 0 {
		t.Fatalf("status %d: %s", st, errs)
	}
	for _, want := range []string{"read FITS image (gzip-compressed), HDU 1 (SCI)", "uncertainty: HDU 2 (ERR)", "mask: HDU 3 (DQ) (non-zero = bad)", "DQ = 4: 2", "values × 1e-17"} {
		if !strings.Contains(errs, want) {
			t.Errorf("report lacks %q:\n%s", want, errs)
		}
	}
	if rows := parsePrepCSV(t, out); len(rows) != 24 || rows[3].mask != int(spectra.MaskFile) {
		t.Errorf("%d rows, mask[3] %d", len(rows), rows[3].mask)
	}
	if !strings.HasPrefix(out, "# flux_unit = erg/s/cm2/A\n") {
		t.Errorf("output does not keep its flux unit: %q", out[:min(len(out), 60)])
	}
	st, _, errs = runPrepArgs(t, dir+"table_orders.fits")
	if st != 1 || !strings.Contains(errs, "--row N") || !strings.Contains(errs, "--merge-rows") {
		t.Errorf("overlapping orders: status %d, %s", st, errs)
	}
	st, out, errs = runPrepArgs(t, dir+"table_orders.fits", "--row", "2", "--json")
	if st != 0 {
		t.Fatalf("--row 2: status %d: %s", st, errs)
	}
	var rep struct {
		Read struct {
			Rows     []int  `json:"rows"`
			Format   string `json:"format"`
			WaveFrom string `json:"wave_unit_from"`
		} `json:"read"`
	}
	if err := json.Unmarshal([]byte(errs), &rep); err != nil || len(rep.Read.Rows) != 1 || rep.Read.Rows[0] != 2 || rep.Read.WaveFrom != "file" {
		t.Errorf("JSON report %+v (%v): %s", rep, err, errs)
	}
	if len(parsePrepCSV(t, out)) != 10 {
		t.Errorf("--row 2 read %d samples, want 10", len(parsePrepCSV(t, out)))
	}
	st, _, errs = runPrepArgs(t, dir+"image_bands_wave_row.fits")
	if st != 1 || !strings.Contains(errs, "--band N") {
		t.Errorf("unlabelled bands: status %d, %s", st, errs)
	}
	st, out, errs = runPrepArgs(t, dir+"image_bands_wave_row.fits", "--band", "2", "--unc-col", "3")
	if rows := parsePrepCSV(t, out); st != 0 || len(rows) != 24 || rows[0].unc != 0.2 {
		t.Errorf("--band 2: status %d, %s", st, errs)
	}
	st, out, errs = runPrepArgs(t, dir+"quirks.csv", "--mask-good", "1")
	if rows := parsePrepCSV(t, out); st != 0 || rows[3].mask&int(spectra.MaskFile) == 0 || rows[0].mask != 0 || !strings.Contains(errs, "1 = good") {
		t.Errorf("--mask-good 1: status %d, %s", st, errs)
	}
	st, out, _ = runPrepArgs(t, dir+"quirks.csv", "--ignore-mask")
	if rows := parsePrepCSV(t, out); st != 0 || rows[3].mask != 0 {
		t.Errorf("--ignore-mask: status %d", st)
	}
	st, _, errs = runPrepArgs(t, dir+"mjd_epoch.txt")
	if st != 1 || !strings.Contains(errs, "--days") || !strings.Contains(errs, "--explosion-mjd") {
		t.Errorf("MJD epoch: status %d, %s", st, errs)
	}
	if st, _, errs = runPrepArgs(t, dir+"mjd_epoch.txt", "--days", "3"); st != 0 {
		t.Errorf("--days: status %d, %s", st, errs)
	}
	st, _, errs = runPrepArgs(t, dir+"later_extension.fits")
	if st != 1 || !strings.Contains(errs, "--hdu 2") {
		t.Errorf("later extension: status %d, %s", st, errs)
	}
}
