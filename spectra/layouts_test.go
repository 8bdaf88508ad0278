package spectra

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/physics"
)

// layoutCase is one case of testdata/spectra/layouts/expected.json, written
// by gen_layouts.py (astropy 5.2.1, numpy) beside the files it describes.
type layoutCase struct {
	File    string `json:"file"`
	Options struct {
		HDU          *int    `json:"hdu"`
		Band         int     `json:"band"`
		Row          int     `json:"row"`
		MergeRows    bool    `json:"merge_rows"`
		WaveColumn   string  `json:"wave_column"`
		UncColumn    string  `json:"unc_column"`
		MaskGood     bool    `json:"mask_good"`
		IgnoreMask   bool    `json:"ignore_mask"`
		Days         float64 `json:"days"`
		ExplosionMJD float64 `json:"explosion_mjd"`
	} `json:"options"`
	Error       string                    `json:"error"`
	MessageHas  string                    `json:"message_has"`
	WarningHas  string                    `json:"warning_has"`
	Wave        []float64                 `json:"wave_A"`
	Medium      string                    `json:"medium"`
	FluxUnit    string                    `json:"flux_unit"`
	Flux        []*float64                `json:"flux"`
	Unc         []*float64                `json:"unc"`
	Flagged     []int                     `json:"flagged"`
	Invalid     []int                     `json:"invalid"`
	Compression string                    `json:"compression"`
	Format      string                    `json:"format"`
	Band        int                       `json:"band"`
	Rows        []int                     `json:"rows"`
	Object      string                    `json:"object"`
	Epoch       float64                   `json:"epoch"`
	Skipped     int                       `json:"skipped_rows"`
	Missing     int                       `json:"missing"`
	FlagValues  map[string]map[string]int `json:"flag_values"`
	Report      map[string]string         `json:"report"`
	FluxScale   float64                   `json:"flux_scale"`
}

func (c *layoutCase) options() ReadOptions {
	o := c.Options
	opt := ReadOptions{Band: o.Band, Row: o.Row, MergeRows: o.MergeRows, WaveColumn: o.WaveColumn, UncColumn: o.UncColumn,
		MaskGood: o.MaskGood, IgnoreMask: o.IgnoreMask, Days: o.Days, ExplosionMJD: o.ExplosionMJD}
	if o.HDU != nil {
		opt.HDU, opt.HDUSet = *o.HDU, true
	}
	return opt
}

func loadLayouts(t *testing.T) []layoutCase {
	t.Helper()
	raw, err := os.ReadFile("../testdata/spectra/layouts/expected.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref struct {
		Cases []layoutCase `json:"cases"`
	}
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) < 30 {
		t.Fatalf("%d cases", len(ref.Cases))
	}
	return ref.Cases
}

// TestReadLayoutsAgainstAstropy reads every layout fixture written by
// testdata/spectra/layouts/gen_layouts.py with the options of its case and
// checks each value (1e-6 relative) against what the script computed with
// astropy and numpy: units by astropy.units, WCS wavelengths by
// astropy.wcs, σ from variances and inverse variances, the samples the
// file flags and those that must be invalid; or, for a case that must
// fail, the error's cause and the advice in its message.
func TestReadLayoutsAgainstAstropy(t *testing.T) {
	for i, c := range loadLayouts(t) {
		name := c.File + "#" + strconv.Itoa(i)
		s, err := ReadFile(filepath.Join("../testdata/spectra/layouts", c.File), c.options())
		if c.Error != "" {
			want := map[string]error{"ambiguous": ErrAmbiguous, "unsupported": ErrUnsupported, "columns": ErrColumns}[c.Error]
			var pe *ParseError
			if err == nil || !errors.Is(err, want) || !errors.As(err, &pe) {
				t.Errorf("%s: error %v, want cause %v", name, err, want)
			} else if !strings.Contains(err.Error(), c.MessageHas) {
				t.Errorf("%s: message %q lacks %q", name, err, c.MessageHas)
			}
			continue
		}
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		rep := s.Meta.Read
		if rep == nil {
			t.Errorf("%s: no read report", name)
			continue
		}
		if s.Len() != len(c.Wave) {
			t.Errorf("%s: %d samples, want %d", name, s.Len(), len(c.Wave))
			continue
		}
		wantMed := physics.Vacuum
		if c.Medium == "air" {
			wantMed = physics.Air
		}
		if s.Meta.OriginalMedium != wantMed {
			t.Errorf("%s: medium %v, want %v", name, s.Meta.OriginalMedium, wantMed)
		}
		if got := s.Meta.FluxUnit.String(); got != c.FluxUnit {
			t.Errorf("%s: flux unit %s, want %s", name, got, c.FluxUnit)
		}
		for k := range c.Wave {
			w := s.Wavelength[k]
			if wantMed == physics.Air {
				w = physics.VacuumToAir(w)
			}
			if !scalar.EqualWithinAbsOrRel(w, c.Wave[k], 1e-9, 1e-9) {
				t.Errorf("%s: λ[%d] = %.12g Å, want %.12g", name, k, w, c.Wave[k])
				break
			}
		}
		same := func(what string, got []float64, want []*float64) {
			if want == nil {
				if got != nil {
					t.Errorf("%s: unexpected %s", name, what)
				}
				return
			}
			if got == nil {
				t.Errorf("%s: no %s", name, what)
				return
			}
			for k, w := range want {
				if w == nil {
					if !math.IsNaN(got[k]) && !math.IsInf(got[k], 0) {
						t.Errorf("%s: %s[%d] = %g, want missing", name, what, k, got[k])
					}
					continue
				}
				if !scalar.EqualWithinAbsOrRel(got[k], *w, 0, 1e-6) {
					t.Errorf("%s: %s[%d] = %.9g, want %.9g", name, what, k, got[k], *w)
					return
				}
			}
		}
		same("flux", s.Flux, c.Flux)
		same("uncertainty", s.Uncertainty, c.Unc)
		flagged := map[int]bool{}
		for _, k := range c.Flagged {
			flagged[k] = true
		}
		invalid := map[int]bool{}
		for _, k := range c.Invalid {
			invalid[k] = true
		}
		for k := 0; k < s.Len(); k++ {
			var m MaskReason
			if s.Mask != nil {
				m = s.Mask[k]
			}
			if (m&MaskFile != 0) != flagged[k] {
				t.Errorf("%s: sample %d mask %v, want file-flagged %v", name, k, m, flagged[k])
			}
			if (m&MaskInvalid != 0) != invalid[k] {
				t.Errorf("%s: sample %d mask %v, want invalid %v", name, k, m, invalid[k])
			}
		}
		if c.Compression != rep.Compression {
			t.Errorf("%s: compression %q, want %q", name, rep.Compression, c.Compression)
		}
		if c.Format != "" && rep.Format != c.Format {
			t.Errorf("%s: format %q, want %q", name, rep.Format, c.Format)
		}
		if c.Band != rep.Band {
			t.Errorf("%s: band %d, want %d", name, rep.Band, c.Band)
		}
		if len(c.Rows) > 0 && strconv.Quote(intList(rep.Rows)) != strconv.Quote(intList(c.Rows)) {
			t.Errorf("%s: rows %v, want %v", name, rep.Rows, c.Rows)
		}
		if c.Object != "" && s.Meta.Object != c.Object {
			t.Errorf("%s: object %q, want %q", name, s.Meta.Object, c.Object)
		}
		if c.Epoch != 0 && math.Abs(s.Meta.Epoch-c.Epoch) > 1e-9 {
			t.Errorf("%s: epoch %v, want %v", name, s.Meta.Epoch, c.Epoch)
		}
		if rep.SkippedRows != c.Skipped || (c.Missing > 0 && rep.Missing != c.Missing) {
			t.Errorf("%s: skipped %d missing %d, want %d and %d", name, rep.SkippedRows, rep.Missing, c.Skipped, c.Missing)
		}
		for src, vals := range c.FlagValues {
			for v, n := range vals {
				fv, _ := strconv.ParseFloat(v, 64)
				got := 0
				for _, f := range rep.Flags {
					if f.Source == src && f.Value == fv {
						got = f.Count
					}
				}
				if got != n {
					t.Errorf("%s: %s = %s flagged %d samples, want %d (flags %+v)", name, src, v, got, n, rep.Flags)
				}
			}
		}
		if c.WarningHas != "" && !strings.Contains(strings.Join(rep.Warnings, "\n"), c.WarningHas) {
			t.Errorf("%s: warnings %q lack %q", name, rep.Warnings, c.WarningHas)
		}
		if c.Report["flux"] != "" && rep.Flux != c.Report["flux"] || c.Report["uncertainty"] != "" && rep.Uncertainty != c.Report["uncertainty"] {
			t.Errorf("%s: report flux %q uncertainty %q, want %v", name, rep.Flux, rep.Uncertainty, c.Report)
		}
		if c.FluxScale != 0 && !scalar.EqualWithinRel(rep.FluxScale, c.FluxScale, 1e-12) {
			t.Errorf("%s: flux scale %g, astropy %g", name, rep.FluxScale, c.FluxScale)
		}
		if len(rep.Lines()) < 3 || rep.WaveUnitFrom == "" || rep.MediumFrom == "" || rep.FluxUnitFrom == "" {
			t.Errorf("%s: thin report %+v", name, rep)
		}
	}
}
