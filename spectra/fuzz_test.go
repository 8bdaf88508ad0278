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
	for _, name := range files {
		b, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ReadFITS(bytes.NewReader(data), ReadOptions{Name: "fuzz.fits", MaxBytes: 1 << 20})
		if err != nil && strings.Contains(err.Error(), "decoder failed") {
			t.Logf("recovered library panic: %v", err)
		}
		checkReadResult(t, s, err)
	})
}

// FuzzReadText feeds mutated text tables to ReadText.
func FuzzReadText(f *testing.F) {
	for _, seed := range []string{
		"wavelength_um,flux,uncertainty,mask\n1.0,2,0.1,0\n1.1,3,0.1,1\n",
		"# object = X\n# medium = air\nlambda flux (mJy) err\n6562.8 1 0.1\n6563 2 nan\n",
		"3 2 1\n2 1 1\n1 0 1\n",
		"wave [nm]\tflux\n500\t1e-17\n501\t-inf\n",
	} {
		f.Add([]byte(seed))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ReadText(bytes.NewReader(data), ReadOptions{Name: "fuzz.txt"})
		checkReadResult(t, s, err)
	})
}
