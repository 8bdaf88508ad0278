package spectra

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"strings"
	"testing"

	"github.com/astrogo/fitsio"
)

// fitsHeader builds one header block (or more) from "KEY = value" cards.
func fitsHeader(cards ...string) []byte {
	var b bytes.Buffer
	for _, c := range cards {
		k, v, ok := strings.Cut(c, "=")
		if !ok {
			fmt.Fprintf(&b, "%-80s", c)
			continue
		}
		fmt.Fprintf(&b, "%-8s= %20s%50s", strings.TrimSpace(k), strings.TrimSpace(v), "")
	}
	fmt.Fprintf(&b, "%-80s", "END")
	for b.Len()%fitsBlock != 0 {
		b.WriteByte(' ')
	}
	return b.Bytes()
}

func pad(b []byte) []byte {
	for len(b)%fitsBlock != 0 {
		b = append(b, 0)
	}
	return b
}

// TestFITSGuard lists header defects that make fitsio v0.3.0 panic or
// allocate without bound when called directly, and checks that ReadFITS
// turns each into a *ParseError with the expected cause. Where fitsio
// itself panics, the test also records that (so a future fitsio that
// fixes it is noticed, and docs/spectra.md can be updated).
func TestFITSGuard(t *testing.T) {
	prim := []string{"SIMPLE = T", "BITPIX = 8", "NAXIS = 0"}
	table := func(extra ...string) []byte {
		h := fitsHeader(prim...)
		cards := append([]string{"XTENSION = 'BINTABLE'", "BITPIX = 8"}, extra...)
		return append(h, pad(append(fitsHeader(cards...), make([]byte, 16)...))...)
	}
	for _, tc := range []struct {
		name         string
		data         []byte
		cause        error
		fitsioPanics bool // fitsio.Open alone panics on it
	}{
		{"negative NAXIS1", pad(fitsHeader("SIMPLE = T", "BITPIX = -32", "NAXIS = 1", "NAXIS1 = -5")), ErrMalformed, true},
		{"NAXIS not an integer", pad(fitsHeader("SIMPLE = T", "BITPIX = -32", "NAXIS = 1.0", "NAXIS1 = 5")), ErrMalformed, true},
		{"NAXIS1 beyond the file", pad(fitsHeader("SIMPLE = T", "BITPIX = -64", "NAXIS = 1", "NAXIS1 = 2000000000")), io.ErrUnexpectedEOF, false},
		{"NAXIS huge", pad(fitsHeader("SIMPLE = T", "BITPIX = -64", "NAXIS = 100000000")), ErrMalformed, false},
		{"table with one axis", table("NAXIS = 1", "NAXIS1 = 8", "PCOUNT = 0", "GCOUNT = 1", "TFIELDS = 1", "TTYPE1 = 'A'", "TFORM1 = 'D'"), ErrMalformed, true},
		{"table without TTYPE", table("NAXIS = 2", "NAXIS1 = 8", "NAXIS2 = 2", "PCOUNT = 0", "GCOUNT = 1", "TFIELDS = 1", "TFORM1 = 'D'"), ErrMalformed, true},
		{"columns wider than rows", table("NAXIS = 2", "NAXIS1 = 8", "NAXIS2 = 2", "PCOUNT = 0", "GCOUNT = 1", "TFIELDS = 1", "TTYPE1 = 'A'", "TFORM1 = '3D'"), ErrMalformed, false},
		{"THEAP outside the heap", table("NAXIS = 2", "NAXIS1 = 8", "NAXIS2 = 2", "PCOUNT = 0", "GCOUNT = 1", "TFIELDS = 1", "TTYPE1 = 'A'", "TFORM1 = 'D'", "THEAP = -99999"), ErrMalformed, true},
		{"CONTINUE after a number", pad(fitsHeader("SIMPLE = T", "BITPIX = 8", "CONTINUE  'x'", "NAXIS = 0")), ErrMalformed, true},
		{"duplicate NAXIS1", pad(fitsHeader("SIMPLE = T", "BITPIX = 8", "NAXIS = 1", "NAXIS1 = 1", "NAXIS1 = 99999")), ErrMalformed, false},
	} {
		_, err := ReadFITS(bytes.NewReader(tc.data), ReadOptions{Name: "bad.fits"})
		var pe *ParseError
		if !errors.As(err, &pe) || !errors.Is(err, tc.cause) {
			t.Errorf("%s: got %v, want a *ParseError with cause %v", tc.name, err, tc.cause)
		}
		if tc.fitsioPanics {
			panicked := func() (p bool) {
				defer func() { p = recover() != nil }()
				fitsio.Open(bytes.NewReader(tc.data))
				return false
			}()
			if !panicked {
				t.Logf("%s: fitsio v0.3.0 no longer panics here; update docs/spectra.md", tc.name)
			}
		}
	}
}
