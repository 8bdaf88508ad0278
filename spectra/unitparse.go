package spectra

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// The unit grammar. No maintained Go module parses the unit strings of
// FITS headers and astropy-written files (gonum's unit package has unit
// types but no parser), so the readers use this small one. It accepts the
// forms of the FITS standard (version 4.0, section 4.3: "erg/s/cm2/Angstrom",
// "erg.s**-1.cm**-2", "10**-17 W m^-2"), astropy's generic and FITS output
// ("erg / (Angstrom cm2 s)", "Angstrom-1 cm-2 erg s-1") and common
// hand-written spellings ("erg/s/cm^2/Å", "ergs/s/cm2/A", "1e-17 erg/s/cm2/A"):
//
//	unit    = [scale] product
//	scale   = number                       1e-17, 0.5, 1E-17
//	        | "10" ("**" | "^") exponent   10**-17, 10^(-17)
//	product = factor { [sep] factor | "/" factor }
//	sep     = " " | "." | "*"
//	factor  = ( symbol | "(" product ")" ) [power]
//	power   = integer | ("**" | "^") exponent    cm2, cm-2, cm**-2, cm^(-2)
//	exponent= integer | "(" integer ")"
//	symbol  = [prefix] base
//
// "/" divides by the one factor that follows it, so "erg/s/cm2" is
// erg s⁻¹ cm⁻² and "erg / (s cm2)" the same. Bases: length m, Angstrom
// (Å, AA, A, Ang, angstrom), micron; energy erg, J, eV; power W; time s,
// sec, min, h; frequency Hz; flux density Jy; counts ct, count, counts,
// electron, adu, DN, ph, photon (a "count" dimension that is not energy).
// Prefixes n, u, µ, m, c, k, M, G on m, s, Hz, Jy, J, W and eV. Symbols are
// case-sensitive as the standard says; a string that does not parse that
// way is tried again in lower case (headers in capitals: "ERG/S/CM2/A"),
// where "mjy" is the millijansky.
//
// A parsed unit is Scale × erg^Erg × s^Sec × cm^Cm × count^Count.
type parsedUnit struct {
	Scale               float64
	Erg, Sec, Cm, Count int
}

func (u parsedUnit) mul(v parsedUnit, p int) parsedUnit {
	return parsedUnit{
		Scale: u.Scale * math.Pow(v.Scale, float64(p)),
		Erg:   u.Erg + p*v.Erg, Sec: u.Sec + p*v.Sec, Cm: u.Cm + p*v.Cm, Count: u.Count + p*v.Count,
	}
}

type unitBase struct {
	u      parsedUnit
	prefix bool // takes SI prefixes
}

var unitBases = map[string]unitBase{
	"m":        {parsedUnit{Scale: 100, Cm: 1}, true},
	"Angstrom": {parsedUnit{Scale: 1e-8, Cm: 1}, false},
	"angstrom": {parsedUnit{Scale: 1e-8, Cm: 1}, false},
	"Å":        {parsedUnit{Scale: 1e-8, Cm: 1}, false},
	"AA":       {parsedUnit{Scale: 1e-8, Cm: 1}, false},
	"A":        {parsedUnit{Scale: 1e-8, Cm: 1}, false}, // in spectra, always ångström
	"Ang":      {parsedUnit{Scale: 1e-8, Cm: 1}, false},
	"micron":   {parsedUnit{Scale: 1e-4, Cm: 1}, false},
	"erg":      {parsedUnit{Scale: 1, Erg: 1}, false},
	"ergs":     {parsedUnit{Scale: 1, Erg: 1}, false},
	"J":        {parsedUnit{Scale: 1e7, Erg: 1}, true},
	"eV":       {parsedUnit{Scale: 1.602176634e-12, Erg: 1}, true}, // CODATA 2018, exact
	"W":        {parsedUnit{Scale: 1e7, Erg: 1, Sec: -1}, true},
	"s":        {parsedUnit{Scale: 1, Sec: 1}, true},
	"sec":      {parsedUnit{Scale: 1, Sec: 1}, false},
	"min":      {parsedUnit{Scale: 60, Sec: 1}, false},
	"h":        {parsedUnit{Scale: 3600, Sec: 1}, false},
	"Hz":       {parsedUnit{Scale: 1, Sec: -1}, true},
	"Jy":       {parsedUnit{Scale: 1e-23, Erg: 1, Cm: -2}, true}, // erg s⁻¹ cm⁻² Hz⁻¹ = erg cm⁻²
	"ct":       {parsedUnit{Scale: 1, Count: 1}, false},
	"count":    {parsedUnit{Scale: 1, Count: 1}, false},
	"counts":   {parsedUnit{Scale: 1, Count: 1}, false},
	"electron": {parsedUnit{Scale: 1, Count: 1}, false},
	"adu":      {parsedUnit{Scale: 1, Count: 1}, false},
	"ADU":      {parsedUnit{Scale: 1, Count: 1}, false},
	"DN":       {parsedUnit{Scale: 1, Count: 1}, false},
	"ph":       {parsedUnit{Scale: 1, Count: 1}, false},
	"photon":   {parsedUnit{Scale: 1, Count: 1}, false},
	"photons":  {parsedUnit{Scale: 1, Count: 1}, false},
}

// lower-case spellings accepted on the second, case-folded pass.
var unitBasesLower = map[string]unitBase{
	"m": unitBases["m"], "angstrom": unitBases["Angstrom"], "å": unitBases["Å"], "aa": unitBases["AA"],
	"a": unitBases["A"], "ang": unitBases["Ang"], "micron": unitBases["micron"], "erg": unitBases["erg"],
	"ergs": unitBases["ergs"], "j": unitBases["J"], "ev": unitBases["eV"], "w": unitBases["W"],
	"s": unitBases["s"], "sec": unitBases["sec"], "hz": unitBases["Hz"], "jy": unitBases["Jy"],
	"ct": unitBases["ct"], "count": unitBases["count"], "counts": unitBases["counts"],
	"electron": unitBases["electron"], "adu": unitBases["adu"], "dn": unitBases["DN"],
	"ph": unitBases["ph"], "photon": unitBases["photon"], "photons": unitBases["photons"],
}

var unitPrefixes = map[string]float64{"n": 1e-9, "u": 1e-6, "µ": 1e-6, "μ": 1e-6, "m": 1e-3, "c": 1e-2, "k": 1e3, "M": 1e6, "G": 1e9}

// parseUnit parses s by the grammar above.
func parseUnit(s string) (parsedUnit, error) {
	u, err := parseUnitCase(s, unitBases)
	if err == nil {
		return u, nil
	}
	if l := strings.ToLower(s); l != s {
		if u2, err2 := parseUnitCase(l, unitBasesLower); err2 == nil {
			return u2, nil
		}
	}
	return parsedUnit{}, err
}

type unitParser struct {
	s     string
	pos   int
	bases map[string]unitBase
}

func parseUnitCase(s string, bases map[string]unitBase) (parsedUnit, error) {
	p := &unitParser{s: strings.TrimSpace(s), bases: bases}
	if p.s == "" {
		return parsedUnit{}, fmt.Errorf("empty unit")
	}
	if len(p.s) > 200 {
		return parsedUnit{}, fmt.Errorf("unit string longer than 200 bytes")
	}
	scale, err := p.scale()
	if err != nil {
		return parsedUnit{}, err
	}
	p.skipSpace()
	u := parsedUnit{Scale: scale}
	if p.pos < len(p.s) {
		v, err := p.product(0)
		if err != nil {
			return parsedUnit{}, err
		}
		u = u.mul(v, 1)
	}
	if p.pos != len(p.s) {
		return parsedUnit{}, fmt.Errorf("unexpected %q at byte %d", p.s[p.pos:], p.pos+1)
	}
	if math.IsInf(u.Scale, 0) || math.IsNaN(u.Scale) || u.Scale == 0 {
		return parsedUnit{}, fmt.Errorf("scale factor out of range")
	}
	return u, nil
}

func (p *unitParser) skipSpace() {
	for p.pos < len(p.s) && p.s[p.pos] == ' ' {
		p.pos++
	}
}

// scale reads an optional leading numeric factor.
func (p *unitParser) scale() (float64, error) {
	rest := p.s[p.pos:]
	if rest == "" || !(rest[0] >= '0' && rest[0] <= '9' || rest[0] == '.' || rest[0] == '+' || rest[0] == '-') {
		return 1, nil
	}
	if strings.HasPrefix(rest, "10**") || strings.HasPrefix(rest, "10^") {
		p.pos += 3
		if rest[2] == '*' {
			p.pos++
		}
		e, err := p.exponent()
		if err != nil {
			return 0, err
		}
		return math.Pow(10, float64(e)), nil
	}
	j := 0
	for j < len(rest) && strings.IndexByte("0123456789.eE+-", rest[j]) >= 0 {
		j++
	}
	v, err := strconv.ParseFloat(rest[:j], 64)
	if err != nil {
		return 0, fmt.Errorf("scale factor %q is not a number", rest[:j])
	}
	p.pos += j
	return v, nil
}

func (p *unitParser) exponent() (int, error) {
	paren := p.pos < len(p.s) && p.s[p.pos] == '('
	if paren {
		p.pos++
	}
	j := p.pos
	if j < len(p.s) && (p.s[j] == '+' || p.s[j] == '-') {
		j++
	}
	for j < len(p.s) && p.s[j] >= '0' && p.s[j] <= '9' {
		j++
	}
	e, err := strconv.Atoi(p.s[p.pos:j])
	if err != nil || e < -99 || e > 99 {
		return 0, fmt.Errorf("bad exponent at byte %d", p.pos+1)
	}
	p.pos = j
	if paren {
		if p.pos >= len(p.s) || p.s[p.pos] != ')' {
			return 0, fmt.Errorf("missing ) after exponent")
		}
		p.pos++
	}
	return e, nil
}

func (p *unitParser) product(depth int) (parsedUnit, error) {
	if depth > 10 {
		return parsedUnit{}, fmt.Errorf("parentheses nested too deep")
	}
	u := parsedUnit{Scale: 1}
	first := true
	for {
		p.skipSpace()
		if p.pos >= len(p.s) || p.s[p.pos] == ')' {
			if first {
				return parsedUnit{}, fmt.Errorf("missing unit at byte %d", p.pos+1)
			}
			return u, nil
		}
		sign := 1
		switch c := p.s[p.pos]; {
		case c == '/':
			sign = -1
			p.pos++
		case c == '.' || c == '*':
			if first {
				return parsedUnit{}, fmt.Errorf("unexpected %q at byte %d", c, p.pos+1)
			}
			p.pos++
		}
		p.skipSpace()
		f, err := p.factor(depth)
		if err != nil {
			return parsedUnit{}, err
		}
		u = u.mul(f, sign)
		first = false
	}
}

func (p *unitParser) factor(depth int) (parsedUnit, error) {
	var f parsedUnit
	if p.pos < len(p.s) && p.s[p.pos] == '(' {
		p.pos++
		v, err := p.product(depth + 1)
		if err != nil {
			return parsedUnit{}, err
		}
		if p.pos >= len(p.s) || p.s[p.pos] != ')' {
			return parsedUnit{}, fmt.Errorf("missing )")
		}
		p.pos++
		f = v
	} else {
		j := p.pos
		for j < len(p.s) {
			r, n := utf8.DecodeRuneInString(p.s[j:])
			if !unicode.IsLetter(r) && r != 'µ' {
				break
			}
			j += n
		}
		if j == p.pos {
			return parsedUnit{}, fmt.Errorf("expected a unit symbol at byte %d", p.pos+1)
		}
		sym := p.s[p.pos:j]
		v, ok := p.symbol(sym)
		if !ok {
			return parsedUnit{}, fmt.Errorf("unknown unit symbol %q", sym)
		}
		p.pos = j
		f = v
	}
	// Power.
	if p.pos < len(p.s) {
		switch c := p.s[p.pos]; {
		case c == '^' || strings.HasPrefix(p.s[p.pos:], "**"):
			p.pos++
			if c == '*' {
				p.pos++
			}
			e, err := p.exponent()
			if err != nil {
				return parsedUnit{}, err
			}
			return parsedUnit{Scale: 1}.mul(f, e), nil
		case c == '-' || c == '+' || (c >= '0' && c <= '9'):
			e, err := p.exponent()
			if err != nil {
				return parsedUnit{}, err
			}
			return parsedUnit{Scale: 1}.mul(f, e), nil
		}
	}
	return f, nil
}

func (p *unitParser) symbol(sym string) (parsedUnit, bool) {
	if b, ok := p.bases[sym]; ok {
		return b.u, true
	}
	for pre, f := range unitPrefixes {
		if !strings.HasPrefix(sym, pre) {
			continue
		}
		if b, ok := p.bases[sym[len(pre):]]; ok && b.prefix {
			u := b.u
			u.Scale *= f
			return u, true
		}
	}
	return parsedUnit{}, false
}

// ParseFluxUnitScale parses a flux-density unit string by the grammar
// above and returns the canonical unit and the factor that turns a value
// written in s into that unit: "1e-17 erg/s/cm2/Angstrom" is
// (FluxPerAngstrom, 1e-17); "W m-2 um-1" is (FluxPerAngstrom, 0.1);
// "uJy" is (FluxMilliJansky, 1e-3); "Angstrom-1 cm-2 erg s-1" is
// (FluxPerAngstrom, 1). Per-frequency units in jansky stay in Jy or mJy,
// other per-frequency units become erg s⁻¹ cm⁻² Hz⁻¹. Counts and count
// rates ("ct/s", "adu", "electron/s") are FluxUnknown with factor 1:
// understood, but not a calibrated flux. A unit that parses but is no flux
// density (erg/s, Angstrom) is an error.
func ParseFluxUnitScale(s string) (FluxUnit, float64, error) {
	if u, ok := fluxUnitWord(s); ok {
		return u, 1, nil
	}
	pu, err := parseUnit(s)
	if err != nil {
		return FluxUnknown, 1, fmt.Errorf("spectra: flux unit %q: %v", s, err)
	}
	switch {
	case pu.Count != 0:
		return FluxUnknown, 1, nil
	case pu.Erg == 1 && pu.Sec == -1 && pu.Cm == -3:
		// 1 erg s⁻¹ cm⁻³ = 1e-8 erg s⁻¹ cm⁻² Å⁻¹.
		return FluxPerAngstrom, pu.Scale * 1e-8, nil
	case pu.Erg == 1 && pu.Sec == 0 && pu.Cm == -2:
		if strings.Contains(strings.ToLower(s), "jy") {
			if pu.Scale >= 1e-23*(1-1e-12) {
				return FluxJansky, pu.Scale / 1e-23, nil
			}
			return FluxMilliJansky, pu.Scale / 1e-26, nil
		}
		return FluxPerHz, pu.Scale, nil
	case pu.Erg == 0 && pu.Sec == 0 && pu.Cm == 0:
		return FluxNormalized, pu.Scale, nil
	}
	return FluxUnknown, 1, fmt.Errorf("spectra: %q is not a flux density (want energy per time, area and wavelength or frequency, e.g. erg/s/cm2/Angstrom or mJy)", s)
}

// isCountUnit reports whether s parses as counts or a count rate.
func isCountUnit(s string) bool {
	if k := unitKey(s); k == "counts" || k == "count" || k == "adu" || k == "dn" {
		return true
	}
	pu, err := parseUnit(s)
	return err == nil && pu.Count != 0
}

// fluxUnitWord recognises the named flux units that are no products of
// symbols ("flam", "arbitrary", "normalized").
func fluxUnitWord(s string) (FluxUnit, bool) {
	switch unitKey(s) {
	case "", "arbitrary", "arb", "counts", "count", "adu", "relative", "dn", "unknown":
		return FluxUnknown, true
	case "normalized", "normalised", "norm", "dimensionless", "1":
		return FluxNormalized, true
	case "jy", "jansky":
		return FluxJansky, true
	case "mjy", "millijansky":
		return FluxMilliJansky, true
	case "flam", "f_lambda", "flambda":
		return FluxPerAngstrom, true
	case "fnu", "f_nu":
		return FluxPerHz, true
	}
	return 0, false
}

func unitKey(s string) string {
	return strings.ToLower(strings.Join(strings.Fields(s), ""))
}

// ParseWaveScale parses a wavelength unit by the grammar above and returns
// the number of ångström in one unit, and whether the string names the
// base-10 logarithm of a wavelength ("log(Angstrom)", "log10(AA)",
// "dex(Angstrom)"); "A", "nm", "um", "micron", "m", "0.1 nm" all work.
func ParseWaveScale(s string) (factor float64, log10 bool, err error) {
	t := strings.TrimSpace(s)
	l := strings.ToLower(t)
	for _, pre := range []string{"log10(", "log(", "dex("} {
		if strings.HasPrefix(l, pre) && strings.HasSuffix(l, ")") {
			f, _, err := ParseWaveScale(t[len(pre) : len(t)-1])
			return f, true, err
		}
	}
	if u, err := ParseWaveUnit(t); err == nil {
		return u.Factor(), false, nil
	}
	pu, err := parseUnit(strings.Trim(t, "()[]"))
	if err != nil {
		return 1, false, fmt.Errorf("spectra: wavelength unit %q: %v", s, err)
	}
	if pu.Cm != 1 || pu.Erg != 0 || pu.Sec != 0 || pu.Count != 0 {
		return 1, false, fmt.Errorf("spectra: %q is not a length unit (want A, nm, um or m)", s)
	}
	return pu.Scale / 1e-8, false, nil
}
