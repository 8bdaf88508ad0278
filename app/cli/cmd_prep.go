package cli

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"broadline/physics"
	"broadline/spectra"
)

func init() {
	c := &command{
		name: "prep",
		args: "SPECTRUM [--air] [--redshift Z] [--ebv E --rv R --law ccm89|f99] [--mask-telluric] [--resolving-power R] [--normalize-blackbody] [flags]",
		summary: "read an observed spectrum (text or FITS), calibrate and mask it, and write " +
			"wavelength_um,flux,uncertainty,mask as CSV (vacuum, rest frame)",
	}
	c.run = func(args []string, stdout, stderr io.Writer) error { return runPrep(c, args, stdout, stderr) }
	register(c)
}

// prepFlags are the flags of "broadline prep".
type prepFlags struct {
	air, vacuum, maskTelluric, normBB, fitBB, jsonOut, features bool
	redshift, ebv, rv, resPower, inputRes, distMpc, epoch       float64
	law, waveUnit, fluxUnit, fluxOut, waveCol, fluxCol          string
	uncCol, windows, hdu, tellBands, userMask                   string
	featureR, featureSig                                        float64
	maskCol, maskGood                                           string
	band, row                                                   int
	mergeRows, ignoreMask                                       bool
	days, explosionMJD                                          float64
}

// prepReport is what prep writes to stderr (as text, or JSON with --json).
type prepReport struct {
	Source    string              `json:"source"`
	Read      *spectra.ReadReport `json:"read,omitempty"`
	Samples   int                 `json:"samples"`
	Masked    map[string]int      `json:"masked"`
	FluxUnit  string              `json:"flux_unit"`
	Redshift  float64             `json:"redshift"`
	History   []string            `json:"history"`
	Blackbody *prepBlackbody      `json:"blackbody,omitempty"`
	Features  []spectra.Feature   `json:"features,omitempty"`
	Metadata  map[string]string   `json:"metadata,omitempty"`
}

type prepBlackbody struct {
	TemperatureK     float64 `json:"temperature_K"`
	TemperatureErrK  float64 `json:"temperature_err_K"`
	Scale            float64 `json:"scale"`
	ScaleErr         float64 `json:"scale_err"`
	Correlation      float64 `json:"correlation"`
	Chi2             float64 `json:"chi2"`
	DOF              int     `json:"dof"`
	Weighted         bool    `json:"weighted"`
	RadiusCm         float64 `json:"radius_cm,omitempty"`
	RadiusErrCm      float64 `json:"radius_err_cm,omitempty"`
	LuminosityErgS   float64 `json:"luminosity_erg_s,omitempty"`
	LuminosityErr    float64 `json:"luminosity_err_erg_s,omitempty"`
	EpochRestDays    float64 `json:"epoch_rest_days,omitempty"`
	VelocityKmS      float64 `json:"velocity_km_s,omitempty"`
	VelocityErrKmS   float64 `json:"velocity_err_km_s,omitempty"`
	VelocityFracC    float64 `json:"velocity_c,omitempty"`
	VelocityErrFracC float64 `json:"velocity_err_c,omitempty"`
}

func runPrep(c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlagSet(c, stdout)
	var f prepFlags
	fs.BoolVar(&f.air, "air", false, "the file's wavelengths are in air (overrides the file; converted with Morton 2000)")
	fs.BoolVar(&f.vacuum, "vacuum", false, "the file's wavelengths are in vacuum (overrides the file)")
	fs.StringVar(&f.waveUnit, "wave-unit", "", "wavelength unit of the file when it does not say: A, nm, um")
	fs.StringVar(&f.fluxUnit, "flux-unit", "", "flux unit of the file when it does not say: erg/s/cm2/A, erg/s/cm2/Hz, Jy, mJy")
	fs.StringVar(&f.waveCol, "wave-col", "", "wavelength column (name or 1-based number)")
	fs.StringVar(&f.fluxCol, "flux-col", "", "flux column (name or 1-based number)")
	fs.StringVar(&f.uncCol, "unc-col", "", `uncertainty column (name or number; "none" to ignore one)`)
	fs.StringVar(&f.hdu, "hdu", "", "FITS header-data unit to read (0 = primary; default: the first holding a spectrum)")
	fs.StringVar(&f.maskCol, "mask-col", "", `mask or quality column (name or number; "none" to ignore one)`)
	fs.StringVar(&f.maskGood, "mask-good", "", "the mask value that marks a good sample: 1 (1 = good, anything else flagged) or 0 (the default: non-zero = bad)")
	fs.BoolVar(&f.ignoreMask, "ignore-mask", false, "ignore the file's mask and quality columns and extensions")
	fs.IntVar(&f.band, "band", 0, "FITS 2-D image of bands: the row (1-based) holding the flux (default: the one labelled as the spectrum)")
	fs.IntVar(&f.row, "row", 0, "FITS table whose rows hold whole arrays (orders, segments): read this row (1-based)")
	fs.BoolVar(&f.mergeRows, "merge-rows", false, "FITS table whose rows hold whole arrays: merge all rows, sorted by wavelength")
	fs.Float64Var(&f.days, "days", 0, "time since explosion in days (observer frame), overriding the file's epoch")
	fs.Float64Var(&f.explosionMJD, "explosion-mjd", 0, "MJD of the explosion: the file's observation MJD becomes days since explosion")
	fs.Float64Var(&f.redshift, "redshift", 0, "redshift to remove (rest frame: λ/(1+z), F_λ·(1+z))")
	fs.Float64Var(&f.ebv, "ebv", 0, "E(B−V) of foreground dust to correct, in mag (observer frame)")
	fs.Float64Var(&f.rv, "rv", 3.1, "R_V of the extinction law")
	fs.StringVar(&f.law, "law", "ccm89", "extinction law: ccm89 or f99")
	fs.BoolVar(&f.maskTelluric, "mask-telluric", false, "flag the default telluric bands (observer frame); samples are kept")
	fs.StringVar(&f.tellBands, "telluric-bands", "", "with --mask-telluric: use these observer-frame bands instead of the defaults, µm: 0.759-0.770,1.35-1.45")
	fs.StringVar(&f.userMask, "mask", "", "flag these observer-frame ranges as excluded by the user, µm: 1.05-1.07,2.2-2.3")
	fs.Float64Var(&f.resPower, "resolving-power", 0, "smooth with a Gaussian to this resolving power λ/Δλ (0: no smoothing)")
	fs.Float64Var(&f.inputRes, "input-resolving-power", 0, "the spectrum's own resolving power, if known (0: treat as unresolved)")
	fs.BoolVar(&f.fitBB, "fit-blackbody", false, "fit a blackbody continuum and report it (without normalising)")
	fs.BoolVar(&f.normBB, "normalize-blackbody", false, "fit a blackbody continuum, report it and divide the spectrum by it")
	fs.StringVar(&f.windows, "fit-windows", "", "fit the blackbody only in these rest-frame ranges, µm: 0.45-0.9,1.5-1.75")
	fs.Float64Var(&f.distMpc, "distance-mpc", 0, "distance in Mpc, to turn the blackbody scale into a radius")
	fs.Float64Var(&f.epoch, "epoch", 0, "time since explosion in days (observer frame), to turn the radius into a velocity (default: the file's epoch, if any)")
	fs.StringVar(&f.fluxOut, "flux-out", "", "convert the output flux to this unit: erg/s/cm2/A, erg/s/cm2/Hz, Jy, mJy")
	fs.BoolVar(&f.features, "features", false, "find absorption features and report them")
	fs.Float64Var(&f.featureR, "feature-resolving-power", 200, "smoothing for --features, resolving power (0: none)")
	fs.Float64Var(&f.featureSig, "feature-significance", 3, "smallest significance (depth/σ) for --features")
	fs.BoolVar(&f.jsonOut, "json", false, "write the report (continuum fit, masks, history) to stderr as JSON instead of text")
	pos, err := fs.parse(args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("prep: want exactly one SPECTRUM file, got %d arguments", len(pos))
	}
	opt, law, windows, err := f.check()
	if err != nil {
		return err
	}
	tell, err := parseMicronRanges("--telluric-bands", f.tellBands)
	if err != nil {
		return err
	}
	if tell != nil && !f.maskTelluric {
		return usagef("prep: --telluric-bands needs --mask-telluric")
	}
	user, err := parseMicronRanges("--mask", f.userMask)
	if err != nil {
		return err
	}
	s, err := spectra.ReadFile(pos[0], opt)
	if err != nil {
		return err
	}
	rep := prepReport{Source: pos[0], Read: s.Meta.Read}
	if f.ebv > 0 {
		if _, err := s.Deredden(law, f.ebv, f.rv); err != nil {
			return err
		}
	}
	if f.maskTelluric {
		if tell == nil {
			s.MaskTelluric()
		} else {
			n := s.MaskBands(tell, spectra.MaskTelluric)
			s.Meta.History = append(s.Meta.History, fmt.Sprintf("masked %d samples in %d telluric bands given by the user", n, len(tell)))
		}
	}
	if user != nil {
		n := s.MaskBands(user, spectra.MaskUser)
		s.Meta.History = append(s.Meta.History, fmt.Sprintf("masked %d samples in %d ranges given by the user", n, len(user)))
	}
	if f.redshift != 0 {
		if err := s.ToRestFrame(f.redshift); err != nil {
			return usagef("prep: %v", err)
		}
	}
	if f.resPower > 0 {
		if s, err = s.Smooth(f.resPower, f.inputRes); err != nil {
			return usagef("prep: %v", err)
		}
	}
	if f.fitBB || f.normBB {
		bopt := spectra.BlackbodyFitOptions{Windows: windows, Distance: f.distMpc * physics.Megaparsec}
		epoch := f.epoch
		if epoch == 0 && bopt.Distance > 0 {
			epoch = s.Meta.Epoch // from the file's metadata, if it says
		}
		if epoch > 0 {
			bopt.Epoch = epoch / (1 + f.redshift)
		}
		fit, err := spectra.FitBlackbody(s, bopt)
		if err != nil {
			return err
		}
		rep.Blackbody = reportFit(fit)
		if f.normBB {
			if _, err := s.Normalize(fit.Model(s.Wavelength)); err != nil {
				return err
			}
		}
	}
	if f.fluxOut != "" {
		u, _ := spectra.ParseFluxUnit(f.fluxOut)
		if err := s.ConvertFlux(u); err != nil {
			return usagef("prep: --flux-out: %v", err)
		}
	}
	if f.features {
		feats, err := spectra.FindFeatures(s, spectra.FeatureOptions{ResolvingPower: f.featureR, MinSignificance: f.featureSig})
		if err != nil {
			return err
		}
		rep.Features = feats
	}
	// Everything succeeded: format the output, then write it.
	var out bytes.Buffer
	writePrepCSV(&out, s)
	rep.Samples = s.Len()
	rep.FluxUnit = s.Meta.FluxUnit.String()
	rep.Redshift = s.Meta.Redshift
	rep.History = s.Meta.History
	rep.Masked = map[string]int{}
	for _, r := range []spectra.MaskReason{spectra.MaskInvalid, spectra.MaskTelluric, spectra.MaskUser, spectra.MaskFile, spectra.MaskEdge, spectra.MaskOutlier} {
		if n := s.CountMasked(r); n > 0 {
			rep.Masked[r.String()] = n
		}
	}
	rep.Metadata = map[string]string{}
	for k, v := range map[string]string{"object": s.Meta.Object, "date": s.Meta.Date} {
		if v != "" {
			rep.Metadata[k] = v
		}
	}
	var msg bytes.Buffer
	if f.jsonOut {
		enc := json.NewEncoder(&msg)
		enc.SetIndent("", " ")
		if err := enc.Encode(rep); err != nil {
			return err
		}
	} else {
		writePrepText(&msg, &rep)
	}
	if _, err := stdout.Write(out.Bytes()); err != nil {
		return err
	}
	_, err = stderr.Write(msg.Bytes())
	return err
}

// check validates flag values and builds the read options.
func (f *prepFlags) check() (spectra.ReadOptions, spectra.ExtinctionLaw, []spectra.Band, error) {
	var opt spectra.ReadOptions
	if f.air && f.vacuum {
		return opt, 0, nil, usagef("prep: --air and --vacuum exclude each other")
	}
	if f.air {
		opt.Medium = "air"
	} else if f.vacuum {
		opt.Medium = "vacuum"
	}
	if f.waveUnit != "" {
		if _, err := spectra.ParseWaveUnit(f.waveUnit); err != nil {
			return opt, 0, nil, usagef("prep: --wave-unit: %v", err)
		}
	}
	for _, u := range []struct{ name, v string }{{"--flux-unit", f.fluxUnit}, {"--flux-out", f.fluxOut}} {
		if u.v != "" {
			if _, err := spectra.ParseFluxUnit(u.v); err != nil {
				return opt, 0, nil, usagef("prep: %s: %v", u.name, err)
			}
		}
	}
	opt.WaveUnit, opt.FluxUnit = f.waveUnit, f.fluxUnit
	opt.WaveColumn, opt.FluxColumn, opt.UncColumn, opt.MaskColumn = f.waveCol, f.fluxCol, f.uncCol, f.maskCol
	switch f.maskGood {
	case "", "0":
	case "1":
		opt.MaskGood = true
	default:
		return opt, 0, nil, usagef("prep: --mask-good must be 1 (1 = good) or 0 (non-zero = bad), got %q", f.maskGood)
	}
	if f.ignoreMask && (f.maskGood != "" || f.maskCol != "") {
		return opt, 0, nil, usagef("prep: --ignore-mask excludes --mask-good and --mask-col")
	}
	opt.IgnoreMask = f.ignoreMask
	if f.band < 0 || f.row < 0 {
		return opt, 0, nil, usagef("prep: --band and --row are 1-based row numbers")
	}
	if f.row > 0 && f.mergeRows {
		return opt, 0, nil, usagef("prep: --row and --merge-rows exclude each other")
	}
	opt.Band, opt.Row, opt.MergeRows = f.band, f.row, f.mergeRows
	if f.days < 0 || f.explosionMJD < 0 || math.IsNaN(f.days) || math.IsNaN(f.explosionMJD) || math.IsInf(f.days+f.explosionMJD, 0) {
		return opt, 0, nil, usagef("prep: --days and --explosion-mjd must be finite and ≥ 0")
	}
	if f.days > 0 && f.explosionMJD > 0 {
		return opt, 0, nil, usagef("prep: --days and --explosion-mjd exclude each other")
	}
	opt.Days, opt.ExplosionMJD = f.days, f.explosionMJD
	if f.hdu != "" {
		n, err := strconv.Atoi(f.hdu)
		if err != nil || n < 0 {
			return opt, 0, nil, usagef("prep: --hdu must be a number ≥ 0, got %q", f.hdu)
		}
		opt.HDU, opt.HDUSet = n, true
	}
	finite := func(name string, v float64) error {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return usagef("prep: %s must be finite, got %v", name, v)
		}
		return nil
	}
	for _, v := range []struct {
		name string
		v    float64
	}{{"--redshift", f.redshift}, {"--ebv", f.ebv}, {"--rv", f.rv}, {"--resolving-power", f.resPower},
		{"--input-resolving-power", f.inputRes}, {"--distance-mpc", f.distMpc}, {"--epoch", f.epoch}} {
		if err := finite(v.name, v.v); err != nil {
			return opt, 0, nil, err
		}
	}
	if f.redshift <= -1 {
		return opt, 0, nil, usagef("prep: --redshift must be > -1, got %v", f.redshift)
	}
	if f.ebv < 0 {
		return opt, 0, nil, usagef("prep: --ebv must be ≥ 0, got %v", f.ebv)
	}
	if f.rv <= 0 {
		return opt, 0, nil, usagef("prep: --rv must be positive, got %v", f.rv)
	}
	law, err := spectra.ParseExtinctionLaw(f.law)
	if err != nil {
		return opt, 0, nil, usagef("prep: --law: %v", err)
	}
	if f.resPower < 0 || f.inputRes < 0 {
		return opt, 0, nil, usagef("prep: resolving powers must be ≥ 0")
	}
	if f.inputRes > 0 && f.resPower == 0 {
		return opt, 0, nil, usagef("prep: --input-resolving-power needs --resolving-power")
	}
	if f.distMpc < 0 || f.epoch < 0 {
		return opt, 0, nil, usagef("prep: --distance-mpc and --epoch must be ≥ 0")
	}
	if (f.distMpc > 0 || f.epoch > 0 || f.windows != "") && !(f.fitBB || f.normBB) {
		return opt, 0, nil, usagef("prep: --distance-mpc, --epoch and --fit-windows need --fit-blackbody or --normalize-blackbody")
	}
	if f.epoch > 0 && f.distMpc == 0 {
		return opt, 0, nil, usagef("prep: --epoch needs --distance-mpc (the velocity comes from the radius)")
	}
	if f.featureSig <= 0 || f.featureR < 0 {
		return opt, 0, nil, usagef("prep: --feature-significance must be > 0 and --feature-resolving-power ≥ 0")
	}
	windows, err := parseMicronRanges("--fit-windows", f.windows)
	if err != nil {
		return opt, 0, nil, err
	}
	return opt, law, windows, nil
}

func reportFit(fit *spectra.BlackbodyFit) *prepBlackbody {
	b := &prepBlackbody{
		TemperatureK: fit.Temperature, TemperatureErrK: fit.TemperatureErr,
		Scale: fit.Scale, ScaleErr: fit.ScaleErr, Correlation: fit.Correlation,
		Chi2: fit.Chi2, DOF: fit.DOF, Weighted: fit.Weighted,
		RadiusCm: fit.Radius, RadiusErrCm: fit.RadiusErr,
		LuminosityErgS: fit.Luminosity, LuminosityErr: fit.LumErr,
		EpochRestDays: fit.Epoch,
	}
	if fit.Velocity > 0 {
		b.VelocityKmS = fit.Velocity / 1e5
		b.VelocityErrKmS = fit.VelErr / 1e5
		b.VelocityFracC = fit.Velocity / physics.SpeedOfLight
		b.VelocityErrFracC = fit.VelErr / physics.SpeedOfLight
	}
	return b
}

// writePrepCSV writes the spectrum: a "# flux_unit = U" comment (so that
// the file reads back in its unit), then vacuum wavelength in µm, flux,
// uncertainty ("nan" when the spectrum has none) and the mask bits (0:
// used; see docs/spectra.md for the bits).
func writePrepCSV(w *bytes.Buffer, s *spectra.Spectrum) {
	w.Grow(s.Len()*48 + 64)
	fmt.Fprintf(w, "# flux_unit = %v\n# medium = vacuum\n", s.Meta.FluxUnit)
	w.WriteString("wavelength_um,flux,uncertainty,mask\n")
	var b []byte
	for i := range s.Wavelength {
		b = b[:0]
		b = strconv.AppendFloat(b, s.Wavelength[i]/1e4, 'g', -1, 64)
		b = append(b, ',')
		b = strconv.AppendFloat(b, s.Flux[i], 'g', -1, 64)
		b = append(b, ',')
		if s.Uncertainty != nil {
			b = strconv.AppendFloat(b, s.Uncertainty[i], 'g', -1, 64)
		} else {
			b = append(b, "nan"...)
		}
		b = append(b, ',')
		m := 0
		if s.Mask != nil {
			m = int(s.Mask[i])
		}
		b = strconv.AppendInt(b, int64(m), 10)
		b = append(b, '\n')
		w.Write(b)
	}
}

func writePrepText(w *bytes.Buffer, r *prepReport) {
	for _, l := range r.Read.Lines() {
		fmt.Fprintf(w, "%s\n", l)
	}
	fmt.Fprintf(w, "%s: %d samples, flux in %s, rest frame of z = %g\n", r.Source, r.Samples, r.FluxUnit, r.Redshift)
	if len(r.Masked) > 0 {
		keys := []string{"invalid", "telluric", "user", "file", "edge", "outlier"}
		var parts []string
		for _, k := range keys {
			if n, ok := r.Masked[k]; ok {
				parts = append(parts, fmt.Sprintf("%s %d", k, n))
			}
		}
		fmt.Fprintf(w, "masked (kept, flagged): %s\n", strings.Join(parts, ", "))
	}
	for _, h := range r.History {
		fmt.Fprintf(w, "  %s\n", h)
	}
	if b := r.Blackbody; b != nil {
		fmt.Fprintf(w, "blackbody: T = %.1f ± %.1f K, scale = %.6g ± %.2g (corr %.3f), χ² = %.2f for %d dof",
			b.TemperatureK, b.TemperatureErrK, b.Scale, b.ScaleErr, b.Correlation, b.Chi2, b.DOF)
		if !b.Weighted {
			fmt.Fprint(w, " (unweighted: errors scaled by √(χ²/dof))")
		}
		fmt.Fprintln(w)
		if b.RadiusCm > 0 {
			fmt.Fprintf(w, "photosphere: R = %.4g ± %.2g cm, L = %.4g ± %.2g erg/s\n", b.RadiusCm, b.RadiusErrCm, b.LuminosityErgS, b.LuminosityErr)
		}
		if b.VelocityKmS > 0 {
			fmt.Fprintf(w, "velocity at %.3g d (rest frame): v = R/t = %.0f ± %.0f km/s = %.4f ± %.4f c\n",
				b.EpochRestDays, b.VelocityKmS, b.VelocityErrKmS, b.VelocityFracC, b.VelocityErrFracC)
		}
	}
	if r.Features != nil {
		fmt.Fprintf(w, "absorption features: %d\n", len(r.Features))
		for _, f := range r.Features {
			fmt.Fprintf(w, "  %.4f µm  depth %.3f ± %.3f  width %.4f µm  EW %.1f Å  %.1fσ\n",
				f.Wavelength/1e4, f.Depth, f.DepthErr, f.Width/1e4, f.EquivalentWidth, f.Significance)
		}
	}
}

// parseMicronRanges reads "LO-HI,LO-HI" in µm into bands in Å; "" gives nil.
func parseMicronRanges(flagName, v string) ([]spectra.Band, error) {
	if v == "" {
		return nil, nil
	}
	var out []spectra.Band
	for _, part := range strings.Split(v, ",") {
		lo, hi, ok := strings.Cut(strings.TrimSpace(part), "-")
		a, err1 := strconv.ParseFloat(strings.TrimSpace(lo), 64)
		b, err2 := strconv.ParseFloat(strings.TrimSpace(hi), 64)
		if !ok || err1 != nil || err2 != nil || !(a > 0) || !(b > a) || math.IsInf(b, 0) {
			return nil, usagef("prep: %s: %q is not a range LO-HI in µm with 0 < LO < HI", flagName, part)
		}
		out = append(out, spectra.Band{Lo: a * 1e4, Hi: b * 1e4})
	}
	return out, nil
}
