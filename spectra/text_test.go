package spectra

import (
	"errors"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/physics"
)

func TestReadTextHeaderUnitsAndComments(t *testing.T) {
	in := `# object = INVENTED-2
# exptime: 900
# medium = vacuum
# telescope = none (invented)

wavelength_um, flux (mJy), flux_err, mask
1.000, 2.0, 0.1, 0
1.001, nan, 0.1, 0   # a bad pixel
1.002, 2.2, 0.1, 1
`
	s, err := ReadText(strings.NewReader(in), ReadOptions{Name: "a.csv"})
	if err != nil {
		t.Fatal(err)
	}
	if s.Len() != 3 {
		t.Fatalf("%d samples, want 3 (none dropped)", s.Len())
	}
	for i, w := range []float64{10000, 10010, 10020} {
		if !scalar.EqualWithinAbsOrRel(s.Wavelength[i], w, 1e-9, 1e-12) {
			t.Errorf("λ[%d] = %v, want %v", i, s.Wavelength[i], w)
		}
	}
	if s.Meta.FluxUnit != FluxMilliJansky || s.Meta.Object != "INVENTED-2" || s.Meta.Exposure != 900 {
		t.Errorf("meta %+v", s.Meta)
	}
	if s.Meta.Extra["telescope"] != "none (invented)" {
		t.Errorf("extra %v", s.Meta.Extra)
	}
	if s.Mask[1] != MaskInvalid || s.Mask[2] != MaskFile || s.Mask[0] != 0 {
		t.Errorf("mask %v", s.Mask)
	}
	if s.Uncertainty == nil || s.Uncertainty[0] != 0.1 {
		t.Errorf("uncertainty %v", s.Uncertainty)
	}
}

func TestReadTextNoHeaderDescendingAir(t *testing.T) {
	// Whitespace separated, descending, air wavelengths by option.
	in := "6564.0 1\n6563.0\t2\n6562.801   3\n"
	s, err := ReadText(strings.NewReader(in), ReadOptions{Medium: "air"})
	if err != nil {
		t.Fatal(err)
	}
	// Hα air 6562.801 ↔ vacuum 6564.614 (REFERENCES.md [calc], Morton 2000).
	if !scalar.EqualWithinAbs(s.Wavelength[0], 6564.614, 2e-3) || s.Flux[0] != 3 {
		t.Errorf("first sample %v %v", s.Wavelength[0], s.Flux[0])
	}
	if s.Uncertainty != nil || s.Meta.OriginalMedium != physics.Air {
		t.Error("unexpected uncertainty or medium")
	}
}

func TestReadTextCommentHeaderAndUnitOption(t *testing.T) {
	in := "# lambda flux sigma\n500 1 0.5\n501 2 0.5\n"
	s, err := ReadText(strings.NewReader(in), ReadOptions{WaveUnit: "nm", FluxUnit: "erg/s/cm2/A"})
	if err != nil {
		t.Fatal(err)
	}
	if s.Wavelength[1] != 5010 || s.Uncertainty[1] != 0.5 || s.Meta.FluxUnit != FluxPerAngstrom {
		t.Errorf("%v %v %v", s.Wavelength, s.Uncertainty, s.Meta.FluxUnit)
	}
}

func TestReadTextErrors(t *testing.T) {
	for _, tc := range []struct {
		in        string
		line, col int
		cause     error
		msgHas    string
		opt       ReadOptions
	}{
		{in: "1 2\n3 x\n", line: 2, col: 3, cause: ErrSyntax, msgHas: "flux"},
		{in: "1,2\n3\n", line: 2, col: 1, cause: ErrColumns},
		{in: "1 2\n3 4 5\n", line: 2, col: 5, cause: ErrColumns},
		{in: "1 2 3 4\n", line: 1, cause: ErrColumns, msgHas: "2 or 3"},
		{in: "1 2\n3 4\n2 5\n", line: 3, col: 1, cause: ErrOrder},
		{in: "1 2\n1 4\n", line: 2, cause: ErrOrder},
		{in: "-1 2\n", line: 1, cause: ErrOrder},
		{in: "# nothing\n\n", cause: ErrNoData},
		{in: "flux,err\n1,2\n", line: 1, cause: ErrColumns},
		{in: "wave,flux\n1,2\n", cause: ErrColumns, opt: ReadOptions{UncColumn: "err"}},
		{in: "1 2\n", cause: ErrUnsupported, opt: ReadOptions{WaveUnit: "furlong"}},
		{in: strings.Repeat("9", maxTextLine+10), line: 1, cause: ErrTooLarge},
	} {
		tc.opt.Name = "x.txt"
		_, err := ReadText(strings.NewReader(tc.in), tc.opt)
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Errorf("%q: error %v is not a *ParseError", tc.in, err)
			continue
		}
		if !errors.Is(err, tc.cause) || (tc.line > 0 && pe.Line != tc.line) || (tc.col > 0 && pe.Column != tc.col) {
			t.Errorf("%q: got %v (line %d col %d), want cause %v at %d:%d", tc.in, err, pe.Line, pe.Column, tc.cause, tc.line, tc.col)
		}
		if !strings.HasPrefix(err.Error(), "x.txt") || !strings.Contains(err.Error(), tc.msgHas) {
			t.Errorf("%q: message %q", tc.in, err)
		}
	}
}
