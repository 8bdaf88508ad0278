package spectra

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"broadline/physics"
)

func TestReadSniffsFormat(t *testing.T) {
	b, err := os.ReadFile("../testdata/spectra/image_linear_f32.fits")
	if err != nil {
		t.Fatal(err)
	}
	s, err := Read(bytes.NewReader(b), ReadOptions{})
	if err != nil || s.Len() != 64 {
		t.Fatalf("FITS via Read: %v", err)
	}
	s, err = Read(strings.NewReader("1 2\n3 4\n"), ReadOptions{})
	if err != nil || s.Len() != 2 {
		t.Fatalf("text via Read: %v", err)
	}
	s, err = ReadFile("../testdata/spectra/table_rows.fits", ReadOptions{})
	if err != nil || s.Len() != 25 || s.Meta.Source != "../testdata/spectra/table_rows.fits" {
		t.Fatalf("ReadFile: %v", err)
	}
	p := filepath.Join(t.TempDir(), "x.txt")
	os.WriteFile(p, []byte("wave flux\n1 2\n3 x\n"), 0o644)
	if _, err := ReadFile(p, ReadOptions{}); err == nil || !strings.HasPrefix(err.Error(), p+":3:") {
		t.Errorf("error %v does not start with %s:3:", err, p)
	}
}

// TestSpectrumJSON: a spectrum saved as JSON (as a session would) reads
// back equal, with readable unit and medium names.
func TestSpectrumJSON(t *testing.T) {
	s, _ := New([]float64{1, 2}, []float64{3, 4}, []float64{0.1, 0.2}, Metadata{FluxUnit: FluxMilliJansky, OriginalMedium: physics.Air, Object: "INVENTED-3"})
	s.SetMask(1, MaskTelluric)
	raw, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(raw, []byte(`"flux_unit":"mJy"`)) || !bytes.Contains(raw, []byte(`"original_medium":"air"`)) {
		t.Errorf("JSON %s", raw)
	}
	var back Spectrum
	if err := json.Unmarshal(raw, &back); err != nil {
		t.Fatal(err)
	}
	if back.Meta.FluxUnit != s.Meta.FluxUnit || back.Meta.OriginalMedium != physics.Air || back.Meta.Object != "INVENTED-3" || back.Mask[1] != MaskTelluric || back.Uncertainty[1] != 0.2 {
		t.Errorf("round trip %+v", back)
	}
}

func TestParseFluxUnit(t *testing.T) {
	for in, want := range map[string]FluxUnit{
		"erg/s/cm2/A": FluxPerAngstrom, "erg s-1 cm-2 Angstrom-1": FluxPerAngstrom,
		"erg / (Angstrom cm2 s)": FluxPerAngstrom, "erg/s/cm^2/Å": FluxPerAngstrom,
		"erg s^-1 cm^-2 Hz^-1": FluxPerHz, "Jy": FluxJansky, "mJy": FluxMilliJansky, "": FluxUnknown,
		"counts": FluxUnknown, "normalised": FluxNormalized,
	} {
		got, err := ParseFluxUnit(in)
		if err != nil || got != want {
			t.Errorf("ParseFluxUnit(%q) = %v, %v; want %v", in, got, err, want)
		}
	}
	if _, err := ParseFluxUnit("W/m2/um"); err == nil {
		t.Error("SI unit accepted silently")
	}
}
