package spectra

import (
	"bytes"
	"compress/gzip"
	"encoding/json"
	"errors"
	"os"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestUnitGrammarAgainstAstropy parses the unit strings of
// testdata/spectra/layouts/expected.json and compares the factor with the
// one astropy.units 5.2.1 computed (gen_layouts.py, section 15).
func TestUnitGrammarAgainstAstropy(t *testing.T) {
	raw, err := os.ReadFile("../testdata/spectra/layouts/expected.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Units []struct {
			Unit, Kind string
			Factor     float64
		} `json:"units"`
	}
	if err := json.Unmarshal(raw, &ref); err != nil || len(ref.Units) < 20 {
		t.Fatalf("%v, %d units", err, len(ref.Units))
	}
	for _, r := range ref.Units {
		if r.Kind == "wave" {
			f, lg, err := ParseWaveScale(r.Unit)
			if err != nil || lg || !scalar.EqualWithinRel(f, r.Factor, 1e-12) {
				t.Errorf("ParseWaveScale(%q) = %v, %v, %v; astropy %v Å", r.Unit, f, lg, err, r.Factor)
			}
			continue
		}
		u, f, err := ParseFluxUnitScale(r.Unit)
		if err != nil {
			t.Errorf("ParseFluxUnitScale(%q): %v", r.Unit, err)
			continue
		}
		// Express our (unit, factor) in astropy's target unit.
		var got float64
		switch {
		case r.Kind == "flam" && u == FluxPerAngstrom:
			got = f
		case r.Kind == "fnu" && u == FluxPerHz:
			got = f
		case r.Kind == "fnu" && u == FluxJansky:
			got = f * 1e-23
		case r.Kind == "fnu" && u == FluxMilliJansky:
			got = f * 1e-26
		default:
			t.Errorf("ParseFluxUnitScale(%q) = %v, want a %s unit", r.Unit, u, r.Kind)
			continue
		}
		if !scalar.EqualWithinRel(got, r.Factor, 1e-12) {
			t.Errorf("ParseFluxUnitScale(%q): factor %v, astropy %v", r.Unit, got, r.Factor)
		}
	}
}

// TestUnitGrammarForms: spellings astropy does not parse but files carry
// (capitals, Å, "ergs"), counts, and strings that are no flux density.
func TestUnitGrammarForms(t *testing.T) {
	for in, want := range map[string]FluxUnit{
		"ERG/S/CM2/A": FluxPerAngstrom, "erg/s/cm^2/Å": FluxPerAngstrom, "ergs/s/cm2/A": FluxPerAngstrom,
		"erg/cm2/s/AA": FluxPerAngstrom, "MJY": FluxMilliJansky, "flam": FluxPerAngstrom,
		"ct/s": FluxUnknown, "electron/s": FluxUnknown, "adu": FluxUnknown, "normalized": FluxNormalized,
	} {
		got, f, err := ParseFluxUnitScale(in)
		if err != nil || got != want || f != 1 {
			t.Errorf("ParseFluxUnitScale(%q) = %v × %v, %v; want %v × 1", in, got, f, err, want)
		}
	}
	for _, bad := range []string{"erg/s", "Angstrom", "furlong", "erg/s/cm2/A)", "((((", "10**", "cm^(-2", strings.Repeat("m ", 150)} {
		if u, _, err := ParseFluxUnitScale(bad); err == nil {
			t.Errorf("ParseFluxUnitScale(%q) = %v, want an error", bad, u)
		}
	}
	if !isCountUnit("ct/s") || isCountUnit("erg/s/cm2/A") {
		t.Error("count units")
	}
	if f, lg, err := ParseWaveScale("log(Angstrom)"); err != nil || !lg || f != 1 {
		t.Errorf("log(Angstrom): %v %v %v", f, lg, err)
	}
	if _, _, err := ParseWaveScale("erg"); err == nil {
		t.Error("erg taken as a wavelength unit")
	}
}

// TestReadTextRefusesBinary: a FITS file, a PNG, random binary or gzip
// inside gzip read as text give a short error that holds none of their
// bytes.
func TestReadTextRefusesBinary(t *testing.T) {
	fitsBytes, err := os.ReadFile("../testdata/spectra/table_rows.fits")
	if err != nil {
		t.Fatal(err)
	}
	bin := make([]byte, 3000)
	for i := range bin {
		bin[i] = byte(i * 7919 % 251)
	}
	var gz, gzgz bytes.Buffer
	w := gzip.NewWriter(&gz)
	w.Write([]byte("1 2\n3 4\n"))
	w.Close()
	w = gzip.NewWriter(&gzgz)
	w.Write(gz.Bytes())
	w.Close()
	for name, in := range map[string][]byte{
		"fits": fitsBytes, "png": append([]byte("\x89PNG\r\n\x1a\n"), bin...), "binary": bin,
		"gzip twice": gzgz.Bytes(), "nul in text": []byte("1 2\n3 4\x00\n"),
	} {
		_, err := ReadText(bytes.NewReader(in), ReadOptions{Name: "x.txt"})
		if !errors.Is(err, ErrUnsupported) {
			t.Errorf("%s: %v, want ErrUnsupported", name, err)
			continue
		}
		msg := err.Error()
		if len(msg) > 200 || strings.ContainsAny(msg, "\x00\x89\x1f") || strings.Contains(msg, "XTENSION") {
			t.Errorf("%s: message %q", name, msg)
		}
	}
	// Gzip once is read.
	s, err := ReadText(bytes.NewReader(gz.Bytes()), ReadOptions{})
	if err != nil || s.Len() != 2 || s.Meta.Read.Compression != "gzip" {
		t.Errorf("gzip text: %v", err)
	}
	// A long bad field is quoted in part only.
	_, err = ReadText(strings.NewReader("1 2\n3 "+strings.Repeat("x", 5000)+"\n"), ReadOptions{Name: "y.txt"})
	if !errors.Is(err, ErrSyntax) || len(err.Error()) > 150 {
		t.Errorf("long field: %v", err)
	}
}

// TestDecompressionBound: a small gzip stream that inflates past
// MaxBytes is ErrTooLarge, for text and FITS alike.
func TestDecompressionBound(t *testing.T) {
	var gz bytes.Buffer
	w := gzip.NewWriter(&gz)
	w.Write(bytes.Repeat([]byte("# a comment line\n"), 1<<16)) // 1 MiB of text
	w.Close()
	_, err := Read(bytes.NewReader(gz.Bytes()), ReadOptions{MaxBytes: 1 << 16})
	if !errors.Is(err, ErrTooLarge) {
		t.Errorf("text: %v", err)
	}
	fitsBytes, _ := os.ReadFile("../testdata/spectra/table_rows.fits")
	gz.Reset()
	w = gzip.NewWriter(&gz)
	w.Write(fitsBytes)
	w.Close()
	_, err = ReadFITS(bytes.NewReader(gz.Bytes()), ReadOptions{MaxBytes: 4000})
	if !errors.Is(err, ErrTooLarge) {
		t.Errorf("FITS: %v", err)
	}
	s, err := ReadFITS(bytes.NewReader(gz.Bytes()), ReadOptions{})
	if err != nil || s.Len() != 25 {
		t.Errorf("FITS gzip: %v", err)
	}
	// A gzip stream cut short is an unexpected EOF, not a panic.
	_, err = Read(bytes.NewReader(gz.Bytes()[:gz.Len()/2]), ReadOptions{})
	var pe *ParseError
	if !errors.As(err, &pe) {
		t.Errorf("cut gzip: %v", err)
	}
}
