package spectra

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func checkReadResult(t *testing.T, s *Spectrum, err error) {
	t.Helper()
	if err != nil {
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Fatalf("error %v (%T) is not a *ParseError", err, err)
		}
		if pe.Err == nil {
			t.Fatal("ParseError without a cause")
		}
		return
	}
	if s == nil || s.Len() == 0 {
		t.Fatal("nil error but no spectrum")
	}
	if verr := s.Validate(); verr != nil {
		t.Fatalf("reader returned an invalid spectrum: %v", verr)
	}
}

// FuzzReadFITS feeds mutated FITS files to ReadFITS: it must return a
// valid spectrum or a *ParseError, never panic or allocate beyond the
// input's size. Seeds: the astropy-written files and
// testdata/fuzz/FuzzReadFITS. With BROADLINE_FITS_PANICS=1 panics inside
// the library are not recovered, to see where they come from.
func FuzzReadFITS(f *testing.F) {
	if os.Getenv("BROADLINE_FITS_PANICS") == "1" {
		recoverFITSPanics = false
	}
	files, _ := filepath.Glob("../testdata/spectra/*.fits")
	layouts, _ := filepath.Glob("../testdata/spectra/layouts/*.fits*")
	for _, name := range append(files, layouts...) {
		b, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b, uint8(0))
	}
	f.Fuzz(func(t *testing.T, data []byte, mode uint8) {
		s, err := ReadFITS(bytes.NewReader(data), fuzzOptions("fuzz.fits", mode))
		if err != nil && strings.Contains(err.Error(), "decoder failed") {
			t.Logf("recovered library panic: %v", err)
		}
		checkReadResult(t, s, err)
	})
}

// fuzzOptions varies the read options with the fuzzer's mode byte, so
// that the band, row, merge, mask and epoch paths are fuzzed too.
func fuzzOptions(name string, mode uint8) ReadOptions {
	o := ReadOptions{Name: name, MaxBytes: 1 << 20}
	if mode&1 != 0 {
		o.Band = 1 + int(mode>>5)
	}
	if mode&2 != 0 {
		o.Row = 1 + int(mode>>5)
	}
	o.MergeRows = mode&4 != 0
	o.MaskGood = mode&8 != 0
	o.IgnoreMask = mode&16 != 0 && mode&8 == 0
	if mode&16 != 0 && mode&8 != 0 {
		o.ExplosionMJD = 60000
	}
	if mode == 255 {
		o.HDU, o.HDUSet = 1, true
	}
	return o
}

// FuzzReadText feeds mutated text tables (plain, ECSV, compressed) to
// ReadText with varied options.
func FuzzReadText(f *testing.F) {
	for _, seed := range []string{
		"wavelength_um,flux,uncertainty,mask\n1.0,2,0.1,0\n1.1,3,0.1,1\n",
		"# object = X\n# medium = air\nlambda flux (mJy) err\n6562.8 1 0.1\n6563 2 nan\n",
		"3 2 1\n2 1 1\n1 0 1\n",
		"wave [nm]\tflux\n500\t1e-17\n501\t-inf\n",
		"loglam,flux [1e-17 erg/s/cm2/Angstrom],ivar,goodpix\n3.7,1,4,1\n3.71,NA,,0\n",
		"# epoch = 60123.5\n# mjd = 60120\nwave_A flux_var\n5000 1 0.1\n",
	} {
		f.Add([]byte(seed), uint8(0))
	}
	layouts, _ := filepath.Glob("../testdata/spectra/layouts/*")
	for _, name := range layouts {
		if strings.HasSuffix(name, ".fits") || strings.HasSuffix(name, ".json") || strings.HasSuffix(name, ".py") {
			continue
		}
		b, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b, uint8(8))
	}
	f.Fuzz(func(t *testing.T, data []byte, mode uint8) {
		s, err := ReadText(bytes.NewReader(data), fuzzOptions("fuzz.txt", mode))
		checkReadResult(t, s, err)
		if err != nil && strings.ContainsRune(err.Error(), 0) {
			t.Fatalf("error message holds a NUL byte: %q", err)
		}
	})
}

// FuzzParseUnit: the unit grammar never panics and a parsed unit has a
// finite, non-zero scale.
func FuzzParseUnit(f *testing.F) {
	for _, s := range []string{"1e-17 erg/s/cm2/Angstrom", "Angstrom-1 cm-2 erg s-1", "erg / (Angstrom cm2 s)", "10**(-17) W m^-2 um^-1", "mJy", "log(Angstrom)"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if _, k, err := ParseFluxUnitScale(s); err == nil && (k == 0 || k != k || k > 1e300 || k < -1e300) {
			t.Fatalf("%q: scale %v", s, k)
		}
		ParseWaveScale(s)
	})
}
