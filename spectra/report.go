package spectra

import (
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
)

// ReadReport says what a reader took from the file and what it assumed.
// Every reader fills one and leaves it in the spectrum's Meta.Read; the
// prep command prints it and dataset loading turns its warnings into load
// warnings. Fields that do not apply are empty.
type ReadReport struct {
	// Format is "text", "ECSV", "FITS image", "FITS multi-band image" or
	// "FITS binary table".
	Format string `json:"format"`
	// Compression is "gzip" or "bzip2" when the input was compressed
	// (detected by its first bytes, not by the file name).
	Compression string `json:"compression,omitempty"`
	// HDU is the FITS header-data unit read (0 = primary; -1 for text) and
	// HDUName its EXTNAME.
	HDU     int    `json:"hdu"`
	HDUName string `json:"hdu_name,omitempty"`
	// Band is the image row read as flux (1-based; 0 for a 1-D image);
	// Rows lists the table rows read (1-based).
	Band int   `json:"band,omitempty"`
	Rows []int `json:"rows,omitempty"`
	// Wave, Flux, Uncertainty and Mask say where each came from: a column
	// name, "WCS (CTYPE1 = WAVE)", "HDU 2 (ERR)", "band 3 (sigma …)".
	Wave        string `json:"wave"`
	Flux        string `json:"flux"`
	Uncertainty string `json:"uncertainty,omitempty"`
	Mask        string `json:"mask,omitempty"`
	// UncertaintyKind is "sigma", "variance" or "inverse variance" (as
	// stored; the spectrum always holds σ).
	UncertaintyKind string `json:"uncertainty_kind,omitempty"`
	// MaskConvention is "non-zero = bad", "1 = good" or "ignored".
	MaskConvention string `json:"mask_convention,omitempty"`
	// WaveUnit is the unit the wavelengths were read in, WaveUnitFrom
	// "file", "option" or "assumed"; WaveLog is true for log10 values.
	WaveUnit     string `json:"wave_unit"`
	WaveUnitFrom string `json:"wave_unit_from"`
	WaveLog      bool   `json:"wave_log10,omitempty"`
	// FluxUnitText is the flux unit as written (verbatim), FluxUnit the
	// unit the values are in after reading, FluxScale the factor applied to
	// get there (1e-17 for "1e-17 erg/s/cm2/Angstrom"), FluxUnitFrom
	// "file", "option" or "assumed".
	FluxUnitText string   `json:"flux_unit_text,omitempty"`
	FluxUnit     FluxUnit `json:"flux_unit"`
	FluxScale    float64  `json:"flux_scale"`
	FluxUnitFrom string   `json:"flux_unit_from"`
	// Medium is "vacuum" or "air", MediumFrom "file", "option" or
	// "assumed".
	Medium     string `json:"medium"`
	MediumFrom string `json:"medium_from"`
	// UnknownUnits lists unit strings the reader did not understand,
	// verbatim.
	UnknownUnits []string `json:"unknown_units,omitempty"`
	// Flags counts the samples the file flagged, by source and value (the
	// reason kept: "DQ = 4", "QUAL = 1", "null value").
	Flags []FlagCount `json:"flags,omitempty"`
	// Missing counts values written as missing (NA, empty, -nan, null):
	// kept as NaN and flagged invalid. SkippedRows counts rows without a
	// usable wavelength, which cannot be placed and are left out; the
	// warnings name their lines.
	Missing     int `json:"missing,omitempty"`
	SkippedRows int `json:"skipped_rows,omitempty"`
	// Warnings are things the user should check: an implausible
	// wavelength range, a unit not understood, an unreadable metadata
	// line, a choice among several candidate HDUs.
	Warnings []string `json:"warnings,omitempty"`
}

// FlagCount is how many samples one source flagged with one value.
type FlagCount struct {
	Source string  `json:"source"`
	Value  float64 `json:"value"`
	Count  int     `json:"count"`
}

func newReport(format string) *ReadReport {
	return &ReadReport{Format: format, HDU: -1, FluxScale: 1}
}

func (r *ReadReport) warnf(format string, args ...any) {
	if len(r.Warnings) < 100 {
		r.Warnings = append(r.Warnings, fmt.Sprintf(format, args...))
	}
}

func (r *ReadReport) unknownUnit(s string) {
	for _, u := range r.UnknownUnits {
		if u == s {
			return
		}
	}
	r.UnknownUnits = append(r.UnknownUnits, s)
}

// flag counts one flagged sample.
func (r *ReadReport) flag(source string, value float64) {
	for i := range r.Flags {
		if r.Flags[i].Source == source && (r.Flags[i].Value == value || math.IsNaN(value) && math.IsNaN(r.Flags[i].Value)) {
			r.Flags[i].Count++
			return
		}
	}
	if len(r.Flags) >= 64 {
		source, value = "other flag values", 0
		for i := range r.Flags {
			if r.Flags[i].Source == source {
				r.Flags[i].Count++
				return
			}
		}
	}
	r.Flags = append(r.Flags, FlagCount{Source: source, Value: value, Count: 1})
}

// Clone returns a deep copy (nil for nil).
func (r *ReadReport) Clone() *ReadReport {
	if r == nil {
		return nil
	}
	c := *r
	c.Rows = append([]int(nil), r.Rows...)
	c.UnknownUnits = append([]string(nil), r.UnknownUnits...)
	c.Flags = append([]FlagCount(nil), r.Flags...)
	c.Warnings = append([]string(nil), r.Warnings...)
	return &c
}

// Lines describes the read in a few lines of text, as prep prints it:
// what was used, what was assumed, and the warnings (each starting
// "warning: ").
func (r *ReadReport) Lines() []string {
	if r == nil {
		return nil
	}
	var out []string
	where := r.Format
	if r.Compression != "" {
		where += " (" + r.Compression + "-compressed)"
	}
	if r.HDU >= 0 {
		where += fmt.Sprintf(", HDU %d", r.HDU)
		if r.HDUName != "" {
			where += " (" + r.HDUName + ")"
		}
	}
	if r.Band > 0 {
		where += fmt.Sprintf(", band %d", r.Band)
	}
	if len(r.Rows) > 0 {
		where += ", rows " + intList(r.Rows)
	}
	out = append(out, "read "+where)
	wl := fmt.Sprintf("wavelength: %s, unit %s (%s)", r.Wave, r.WaveUnit, r.WaveUnitFrom)
	if r.WaveLog {
		wl += ", log10 values"
	}
	out = append(out, wl+fmt.Sprintf(", %s (%s)", r.Medium, r.MediumFrom))
	fl := fmt.Sprintf("flux: %s, unit %v (%s", r.Flux, r.FluxUnit, r.FluxUnitFrom)
	if r.FluxUnitText != "" {
		fl += fmt.Sprintf(": %q", r.FluxUnitText)
	}
	fl += ")"
	if r.FluxScale != 1 {
		fl += fmt.Sprintf(", values × %g", r.FluxScale)
	}
	out = append(out, fl)
	if r.Uncertainty != "" {
		out = append(out, fmt.Sprintf("uncertainty: %s (%s)", r.Uncertainty, r.UncertaintyKind))
	} else {
		out = append(out, "uncertainty: none")
	}
	if r.Mask != "" {
		m := "mask: " + r.Mask
		if r.MaskConvention != "" {
			m += " (" + r.MaskConvention + ")"
		}
		out = append(out, m)
	}
	if len(r.Flags) > 0 {
		var parts []string
		fl := append([]FlagCount(nil), r.Flags...)
		sort.SliceStable(fl, func(i, j int) bool { return fl[i].Source < fl[j].Source })
		for _, f := range fl {
			parts = append(parts, fmt.Sprintf("%s = %s: %d", f.Source, strconv.FormatFloat(f.Value, 'g', -1, 64), f.Count))
		}
		out = append(out, "flagged by the file: "+strings.Join(parts, ", "))
	}
	if r.Missing > 0 {
		out = append(out, fmt.Sprintf("missing values (NA, empty, nan): %d, kept as NaN and flagged invalid", r.Missing))
	}
	for _, w := range r.Warnings {
		out = append(out, "warning: "+w)
	}
	return out
}

func intList(v []int) string {
	if len(v) > 8 {
		return fmt.Sprintf("%d–%d (%d rows)", v[0], v[len(v)-1], len(v))
	}
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.Itoa(x)
	}
	return strings.Join(s, ", ")
}

// short quotes at most 40 bytes of b for an error message, so that a
// binary file never pours its bytes into a message.
func short(b []byte) string {
	const max = 40
	if len(b) > max {
		return strconv.Quote(string(b[:max])) + "…"
	}
	return strconv.Quote(string(b))
}

// Plausible wavelengths for the spectra this program reads: 0.1–30 µm.
const (
	plausibleLo = 1e3 // Å
	plausibleHi = 3e5
)

// resolveWave decides the wavelength unit (option, file, or Å assumed)
// and records it.
func resolveWave(fileUnit string, opt *ReadOptions, rep *ReadReport) (factor float64, log10 bool, err error) {
	src := "file"
	u := strings.TrimSpace(fileUnit)
	if opt.WaveUnit != "" {
		u, src = opt.WaveUnit, "option"
	}
	if u == "" {
		rep.WaveUnit, rep.WaveUnitFrom = "A", "assumed"
		return 1, rep.WaveLog, nil
	}
	f, lg, err := ParseWaveScale(u)
	if err != nil {
		if src == "file" {
			rep.unknownUnit(u)
			return 0, false, causef(ErrUnsupported, "wavelength unit %q not understood: give it with --wave-unit (A, nm, um, m)", u)
		}
		return 0, false, causef(ErrUnsupported, "%v", err)
	}
	rep.WaveUnit, rep.WaveUnitFrom = u, src
	if lg {
		rep.WaveLog = true
	}
	return f, rep.WaveLog, nil
}

// toAngstrom turns wavelengths in a unit of factor Å (log10 values when
// log10) into Å.
func toAngstrom(wave []float64, factor float64, log10 bool) {
	for i, w := range wave {
		if log10 {
			w = math.Pow(10, w)
		}
		wave[i] = w * factor
	}
}

// resolveFlux decides the flux unit and scale (option, file, or
// arbitrary).
func resolveFlux(fileUnit string, opt *ReadOptions, rep *ReadReport) (FluxUnit, float64, error) {
	src := "file"
	u := strings.TrimSpace(fileUnit)
	if opt.FluxUnit != "" {
		u, src = opt.FluxUnit, "option"
	}
	rep.FluxUnitText = u
	if u == "" {
		rep.FluxUnit, rep.FluxUnitFrom, rep.FluxScale = FluxUnknown, "assumed", 1
		return FluxUnknown, 1, nil
	}
	fu, scale, err := ParseFluxUnitScale(u)
	if err != nil {
		if src == "option" {
			return FluxUnknown, 1, causef(ErrUnsupported, "%v", err)
		}
		rep.unknownUnit(u)
		rep.warnf("flux unit %q not understood: flux kept as arbitrary (give it with --flux-unit)", u)
		rep.FluxUnit, rep.FluxUnitFrom, rep.FluxScale = FluxUnknown, "assumed", 1
		return FluxUnknown, 1, nil
	}
	rep.FluxUnit, rep.FluxUnitFrom, rep.FluxScale = fu, src, scale
	return fu, scale, nil
}

// checkPlausible warns when the wavelengths (vacuum Å) are not those of a
// 0.1–30 µm spectrum, the sign of a wrong unit.
func checkPlausible(s *Spectrum, rep *ReadReport) {
	lo, hi := s.Range()
	if lo < plausibleLo || hi > plausibleHi {
		how := rep.WaveUnitFrom
		rep.warnf("wavelengths span %.4g–%.4g µm, outside 0.1–30 µm: is the unit right (%s %s)? Set it with --wave-unit",
			lo/1e4, hi/1e4, how, rep.WaveUnit)
	}
}

// looksLikeMJD is the threshold above which an "epoch" is taken for a
// modified Julian date (MJD 30000 is in 1941), not days since explosion
// (common practice).
const looksLikeMJD = 30000

// resolveEpoch sets meta.Epoch from the options, or checks the file's.
// mjd is the observation's MJD from the file (0: none). A file epoch above
// looksLikeMJD is never taken as days since explosion: without Days or
// ExplosionMJD it is an error (ErrAmbiguous).
func resolveEpoch(meta *Metadata, mjd float64, opt *ReadOptions, rep *ReadReport) error {
	epochIsMJD := meta.Epoch > looksLikeMJD
	if epochIsMJD {
		if mjd == 0 {
			mjd = meta.Epoch
		}
		meta.Epoch = 0
	}
	switch {
	case opt.Days > 0:
		if meta.Epoch != 0 && math.Abs(meta.Epoch-opt.Days) > 1e-6*opt.Days {
			rep.warnf("the file says epoch %g d; using the %g d given", meta.Epoch, opt.Days)
		}
		meta.Epoch = opt.Days
	case opt.ExplosionMJD > 0:
		if mjd == 0 {
			return causef(ErrNoData, "an explosion MJD was given but the file has no observation MJD: give the days since explosion (--days)")
		}
		d := mjd - opt.ExplosionMJD
		if !(d > 0) || math.IsInf(d, 0) {
			return causef(ErrSyntax, "the observation (MJD %g) is not after the explosion (MJD %g)", mjd, opt.ExplosionMJD)
		}
		meta.Epoch = d
	case epochIsMJD:
		return causef(ErrAmbiguous, "the epoch %g looks like an MJD, not days since explosion: give the days (--days D) or the explosion time (--explosion-mjd MJD)", mjd)
	}
	if meta.Epoch < 0 {
		rep.warnf("the epoch %g d is before the explosion", meta.Epoch)
	}
	if mjd != 0 {
		if meta.Extra == nil {
			meta.Extra = map[string]string{}
		}
		meta.Extra["mjd"] = strconv.FormatFloat(mjd, 'g', -1, 64)
	}
	return nil
}
