package spectra

import (
	"bytes"
	"encoding/json"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/physics"
)

type fitsRef struct {
	Wavelength  []float64 `json:"wavelength"`
	Flux        []float64 `json:"flux"`
	Uncertainty []float64 `json:"uncertainty"`
	Medium      string    `json:"medium"`
	RefWaveUnit string    `json:"ref_wave_unit"`
	Object      string    `json:"object"`
	Exptime     float64   `json:"exptime"`
	Airmass     float64   `json:"airmass"`
	Date        string    `json:"date"`
	Bad         []int     `json:"bad"`
	Null        []int     `json:"null"`
	NullFile    []int     `json:"null_file_order"`
}

func loadFITSRef(t *testing.T) map[string]fitsRef {
	t.Helper()
	raw, err := os.ReadFile("../testdata/spectra/fits_reference.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Files map[string]fitsRef `json:"files"`
	}
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Files) < 9 {
		t.Fatalf("reference has %d files", len(ref.Files))
	}
	return ref.Files
}

func readFITSFile(t testing.TB, name string, opt ReadOptions) (*Spectrum, error) {
	f, err := os.Open(filepath.Join("../testdata/spectra", name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	opt.Name = name
	return ReadFITS(f, opt)
}

// TestReadFITSAgainstAstropy compares every file written by
// testdata/spectra/gen_fits.py (astropy.io.fits 5.2.1) element by element
// with the arrays astropy read back: wavelengths from astropy.wcs (so the
// linear, -LOG and CD1_1 forms of Greisen et al. 2006 are checked against an
// independent implementation), fluxes with BSCALE/BZERO or TSCALn/TZEROn
// applied, and uncertainties. Air wavelengths are compared after our
// Morton (2000) conversion to vacuum is undone.
func TestReadFITSAgainstAstropy(t *testing.T) {
	for name, ref := range loadFITSRef(t) {
		s, err := readFITSFile(t, name, ReadOptions{})
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if s.Len() != len(ref.Flux) {
			t.Errorf("%s: %d samples, want %d", name, s.Len(), len(ref.Flux))
			continue
		}
		factor := map[string]float64{"m": 1e10, "Angstrom": 1, "um": 1e4}[ref.RefWaveUnit]
		if factor == 0 {
			t.Fatalf("%s: unknown reference unit %q", name, ref.RefWaveUnit)
		}
		wantMed := physics.Vacuum
		if ref.Medium == "air" {
			wantMed = physics.Air
		}
		if s.Meta.OriginalMedium != wantMed {
			t.Errorf("%s: medium %v, want %v", name, s.Meta.OriginalMedium, wantMed)
		}
		// The reference is in file order; a descending file is reversed.
		n := len(ref.Flux)
		at := func(i int) int { return i }
		if n > 1 && ref.Wavelength[0] > ref.Wavelength[n-1] {
			at = func(i int) int { return n - 1 - i }
		}
		// Samples flagged by the file: a quality column (bad) or a null
		// value (BLANK/TNULL, also NaN).
		bad, null := map[int]bool{}, map[int]bool{}
		for _, b := range ref.Bad {
			bad[b] = true
		}
		for _, b := range ref.Null {
			bad[b], null[b] = true, true
		}
		for _, b := range ref.NullFile {
			bad[at(b)], null[at(b)] = true, true
		}
		for i := range ref.Flux {
			j := at(i)
			w := s.Wavelength[j]
			if wantMed == physics.Air {
				w = physics.VacuumToAir(w)
			}
			if want := ref.Wavelength[i] * factor; !scalar.EqualWithinAbsOrRel(w, want, 1e-9, 1e-12) {
				t.Errorf("%s: λ[%d] = %.12g Å, astropy %.12g", name, i, w, want)
				break
			}
			if null[j] {
				// A null (BLANK/TNULL) value: kept, flagged, NaN.
				if !math.IsNaN(s.Flux[j]) || s.Mask[j]&MaskFile == 0 {
					t.Errorf("%s: null sample %d: flux %v mask %v", name, j, s.Flux[j], s.Mask[j])
				}
				continue
			}
			// Fluxes stored as float32 or scaled integers: astropy computes the
			// scaling in float32 for 16-bit data, so allow float32 rounding.
			if !scalar.EqualWithinAbsOrRel(s.Flux[j], ref.Flux[i], 1e-30, 1e-6) {
				t.Errorf("%s: flux[%d] = %.9g, astropy %.9g", name, i, s.Flux[j], ref.Flux[i])
				break
			}
			if ref.Uncertainty != nil && !scalar.EqualWithinAbsOrRel(s.Uncertainty[j], ref.Uncertainty[i], 1e-30, 1e-6) {
				t.Errorf("%s: σ[%d] = %.9g, astropy %.9g", name, i, s.Uncertainty[j], ref.Uncertainty[i])
				break
			}
		}
		if ref.Uncertainty == nil && s.Uncertainty != nil {
			t.Errorf("%s: unexpected uncertainty", name)
		}
		for b := range bad {
			if s.Mask == nil || s.Mask[b]&MaskFile == 0 {
				t.Errorf("%s: sample %d not flagged by the file", name, b)
			}
		}
		if got := s.CountMasked(MaskFile); got != len(bad) {
			t.Errorf("%s: %d samples flagged, want %d", name, got, len(bad))
		}
		if ref.Object != "" && (s.Meta.Object != ref.Object || s.Meta.Exposure != ref.Exptime ||
			s.Meta.Airmass != ref.Airmass || s.Meta.Date != ref.Date) {
			t.Errorf("%s: metadata %+v", name, s.Meta)
		}
	}
}

func TestReadFITSOptions(t *testing.T) {
	s, err := readFITSFile(t, "image_linear_f32.fits", ReadOptions{Medium: "air"})
	if err != nil {
		t.Fatal(err)
	}
	if s.Meta.OriginalMedium != physics.Air || s.Meta.FluxUnit != FluxPerAngstrom {
		t.Errorf("medium %v unit %v", s.Meta.OriginalMedium, s.Meta.FluxUnit)
	}
	if s.Meta.Extra["CTYPE1"] != "WAVE" {
		t.Errorf("header not kept: %v", s.Meta.Extra)
	}
	// Column choice by number, no uncertainty.
	s, err = readFITSFile(t, "table_rows.fits", ReadOptions{WaveColumn: "1", FluxColumn: "FLUX", UncColumn: "none"})
	if err != nil {
		t.Fatal(err)
	}
	if s.Uncertainty != nil || s.Wavelength[0] != 8000 {
		t.Errorf("column choice ignored")
	}
	_, err = readFITSFile(t, "table_rows.fits", ReadOptions{FluxColumn: "NOPE"})
	if !errors.Is(err, ErrColumns) {
		t.Errorf("missing column: %v", err)
	}
	_, err = readFITSFile(t, "image_int16_scaled.fits", ReadOptions{HDU: 0, HDUSet: true})
	if !errors.Is(err, ErrUnsupported) {
		t.Errorf("empty primary chosen: %v", err)
	}
}

// TestReadFITSDamaged truncates and corrupts a valid file: every result must
// be a *ParseError, never a panic, and truncation must say so.
func TestReadFITSDamaged(t *testing.T) {
	good, err := os.ReadFile("../testdata/spectra/table_rows.fits")
	if err != nil {
		t.Fatal(err)
	}
	for _, n := range []int{0, 10, 2879, 2880 + 100, 5760 - 1, 5760 + 100} {
		_, err := ReadFITS(bytes.NewReader(good[:n]), ReadOptions{Name: "cut.fits"})
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Errorf("cut at %d: %v", n, err)
		}
		if n >= 2880 && !errors.Is(err, io.ErrUnexpectedEOF) {
			t.Errorf("cut at %d: %v, want unexpected EOF", n, err)
		}
	}
	// A header claiming a huge image must not allocate it.
	bad := bytes.Clone(good[:2880])
	copy(bad[2*80:], []byte("NAXIS   =                    1                                                  "))
	copy(bad[3*80:], []byte("NAXIS1  =          99999999999                                                  "))
	_, err = ReadFITS(bytes.NewReader(bad), ReadOptions{})
	if !errors.Is(err, io.ErrUnexpectedEOF) {
		t.Errorf("huge NAXIS1: %v", err)
	}
	// The size bound.
	_, err = ReadFITS(bytes.NewReader(good), ReadOptions{MaxBytes: 1000})
	if !errors.Is(err, ErrTooLarge) {
		t.Errorf("MaxBytes: %v", err)
	}
}
