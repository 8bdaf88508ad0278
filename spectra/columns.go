package spectra

import (
	"strconv"
	"strings"
)

// Column choice shared by the text and FITS-table readers.

// columnChoice is what chooseColumns decided; -1 means none.
type columnChoice struct {
	wave, flux, unc, mask int
	uncKind               int // roleUnc, roleVar or roleIvar
	maskGood              bool
	waveLog               bool
}

func uncKindName(k int) string {
	switch k {
	case roleVar:
		return "variance"
	case roleIvar:
		return "inverse variance"
	}
	return "sigma"
}

// isLogWaveName reports a log10-wavelength column name: loglam, log_lambda,
// log10_wave, logwave.
func isLogWaveName(base string) bool {
	b := strings.TrimLeft(strings.TrimPrefix(strings.TrimSpace(base), "log"), "10_- ")
	if !strings.HasPrefix(strings.TrimSpace(base), "log") || b == "" {
		return false
	}
	for _, p := range []string{"lam", "wave", "wl", "wav"} {
		if strings.HasPrefix(b, p) {
			return true
		}
	}
	return false
}

// isGoodMaskName reports a mask column whose name says non-zero = good.
func isGoodMaskName(base string) bool {
	b := strings.Trim(base, " _-.")
	for _, p := range []string{"good", "valid", "use", "ok"} {
		if b == p || strings.HasPrefix(b, p+"_") || strings.HasPrefix(b, p+"pix") || strings.HasPrefix(b, p+"mask") {
			return true
		}
	}
	return false
}

// fluxScore ranks flux-column candidates: the calibrated flux beats raw,
// reduced, sky or count columns, and a flux unit beats a count unit.
func fluxScore(base, unit string) int {
	b := strings.Trim(base, " _-.")
	score := 5
	switch b {
	case "flux", "flam", "f_lambda", "fnu", "f_nu", "flux_density", "spec", "spectrum", "f", "fλ", "fν":
		score = 10
	}
	if (strings.Contains(b, "cal") || strings.Contains(b, "abs")) && !strings.Contains(b, "uncal") {
		score = 9
	}
	for _, w := range []string{"reduced", "raw", "uncal", "sky", "bkg", "background", "model", "cont", "count", "electron", "adu", "norm"} {
		if strings.Contains(b, w) {
			score -= 4
			break
		}
	}
	if unit != "" {
		if isCountUnit(unit) {
			score -= 3
		} else if fu, _, err := ParseFluxUnitScale(unit); err == nil && fu != FluxUnknown && fu != FluxNormalized {
			score += 3
		}
	}
	return score
}

// uncStem strips the words that make a name an uncertainty ("flux_err" →
// "flux", "err" → "", "ivar" → "").
func uncStem(base string) string {
	b := strings.Trim(base, " _-.")
	for _, w := range []string{"inverse_variance", "invvar", "ivar", "variance", "var", "error", "err", "uncertainty", "uncert", "unc", "sigma", "sig", "noise", "stddev", "std_dev", "e"} {
		for _, form := range []string{"_" + w, w + "_", "-" + w, w} {
			if strings.HasSuffix(b, form) && len(b) > len(form) {
				return strings.Trim(b[:len(b)-len(form)], " _-.")
			}
			if strings.HasPrefix(b, form) && len(b) > len(form) && strings.HasSuffix(form, "_") {
				return strings.Trim(b[len(form):], " _-.")
			}
		}
		if b == w {
			return ""
		}
	}
	if strings.HasPrefix(b, "d") && len(b) > 1 { // dflux
		return b[1:]
	}
	return b
}

// chooseColumns picks the wavelength, flux, uncertainty and mask columns
// from their names and units (units[i] may be ""), then applies the user's
// choices. Notes about the choice go to rep.
func chooseColumns(names, units []string, opt *ReadOptions, rep *ReadReport) (columnChoice, error) {
	c := columnChoice{wave: -1, flux: -1, unc: -1, mask: -1, uncKind: roleUnc}
	roles := make([]int, len(names))
	bases := make([]string, len(names))
	for i, n := range names {
		base, unit := splitNameUnit(n)
		if units[i] == "" {
			units[i] = unit
		}
		bases[i] = base
		roles[i] = roleOf(base)
	}
	bestFlux, bestScore := -1, -1<<30
	for i, r := range roles {
		switch r {
		case roleWave:
			if c.wave < 0 {
				c.wave = i
			}
		case roleFlux:
			if s := fluxScore(bases[i], units[i]); s > bestScore {
				bestFlux, bestScore = i, s
			}
		case roleMask:
			if c.mask < 0 {
				c.mask = i
			}
		}
	}
	c.flux = bestFlux
	// Unnamed leading columns fall back to position.
	if c.wave < 0 && len(names) >= 2 && roles[0] == roleNone {
		c.wave = 0
	}
	if c.flux < 0 && len(names) >= 2 && roles[1] == roleNone && c.wave != 1 {
		c.flux = 1
	}
	pick := func(choice, what string, dst *int) error {
		if choice == "" {
			return nil
		}
		if strings.EqualFold(choice, "none") && (what == "uncertainty" || what == "mask") {
			*dst = -1
			return nil
		}
		i, err := choose(names, len(names), choice, what)
		if err != nil {
			return err
		}
		*dst = i
		return nil
	}
	if err := pick(opt.WaveColumn, "wavelength", &c.wave); err != nil {
		return c, err
	}
	if err := pick(opt.FluxColumn, "flux", &c.flux); err != nil {
		return c, err
	}
	// The uncertainty that goes with the chosen flux.
	if c.flux >= 0 {
		fluxStem := strings.Trim(bases[c.flux], " _-.")
		fluxIsFlux := false
		if fu, _, err := ParseFluxUnitScale(units[c.flux]); err == nil && fu != FluxUnknown {
			fluxIsFlux = true
		}
		best, bestS := -1, -1<<30
		for i, r := range roles {
			if r != roleUnc && r != roleIvar && r != roleVar {
				continue
			}
			s := 0
			switch stem := uncStem(bases[i]); {
			case stem == fluxStem:
				s += 10
			case stem == "" || stem == "flux":
				s += 5
			default:
				if roleOf(stem) == roleFlux {
					s -= 5 // the error of another flux column
				}
			}
			if units[i] != "" && r == roleUnc {
				if isCountUnit(units[i]) && fluxIsFlux {
					s -= 8
				} else if fu, _, err := ParseFluxUnitScale(units[i]); err == nil && fu != FluxUnknown {
					s += 3
				}
			}
			if s > bestS {
				best, bestS = i, s
			}
		}
		if best >= 0 {
			c.unc, c.uncKind = best, roles[best]
			if r := roles[best]; r == roleUnc && strings.Contains(bases[best], "var") {
				c.uncKind = roleVar
			}
		}
	}
	if err := pick(opt.UncColumn, "uncertainty", &c.unc); err != nil {
		return c, err
	}
	if opt.UncColumn != "" && c.unc >= 0 {
		c.uncKind = roleOf(bases[c.unc])
		if c.uncKind != roleVar && c.uncKind != roleIvar {
			c.uncKind = roleUnc
		}
	}
	if err := pick(opt.MaskColumn, "mask", &c.mask); err != nil {
		return c, err
	}
	if opt.IgnoreMask {
		if c.mask >= 0 {
			rep.Mask, rep.MaskConvention = names[c.mask], "ignored"
		}
		c.mask = -1
	}
	if c.mask >= 0 {
		c.maskGood = opt.MaskGood || isGoodMaskName(bases[c.mask])
	}
	if c.wave >= 0 {
		c.waveLog = isLogWaveName(bases[c.wave])
	}
	// Tell about flux candidates not taken.
	var others []string
	for i, r := range roles {
		if r == roleFlux && i != c.flux && c.flux >= 0 {
			others = append(others, names[i])
		}
	}
	if len(others) > 0 && opt.FluxColumn == "" {
		rep.warnf("flux taken from column %q; the file also has %s (choose with --flux-col)", names[c.flux], quoteList(others))
	}
	return c, nil
}

func quoteList(v []string) string {
	q := make([]string, len(v))
	for i, s := range v {
		q[i] = strconv.Quote(s)
	}
	return strings.Join(q, ", ")
}

// maskBad applies a mask convention to one mask value.
func maskBad(v float64, good bool) bool {
	if good {
		return v != 1
	}
	return v != 0 // NaN != 0: bad
}

// maskConventionName names a convention for the report.
func maskConventionName(good bool) string {
	if good {
		return "1 = good"
	}
	return "non-zero = bad"
}

// checkMaskShare warns when a mask flags most samples: the convention is
// probably the other one.
func checkMaskShare(nbad, n int, good bool, rep *ReadReport) {
	if n < 4 || nbad*2 <= n {
		return
	}
	if good {
		rep.warnf("the mask (1 = good) flags %d of %d samples: if 0 means good, leave out --mask-good", nbad, n)
	} else {
		rep.warnf("the mask (non-zero = bad) flags %d of %d samples: if 1 means good, use --mask-good 1 (or --ignore-mask)", nbad, n)
	}
}
