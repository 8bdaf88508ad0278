package spectra

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"unsafe"

	"broadline/physics"
)

// maxTextLine bounds the length of one line of a text spectrum.
const maxTextLine = 1 << 16

// column roles in a text table or FITS binary table.
const (
	roleNone = iota
	roleWave
	roleFlux
	roleUnc
	roleIvar // inverse variance, converted to σ = 1/√ivar
	roleMask
)

// ReadText reads a spectrum from a plain-text table: one sample per line,
// fields separated by commas or by white space (tabs, spaces).
//
//   - Blank lines and comment lines (starting with '#', '%' or ';') are
//     skipped and counted. A comment of the form "key = value" or
//     "key: value" is metadata: object, date, exptime (s), airmass, epoch
//     (days since explosion), wave_unit, flux_unit and medium (air or
//     vacuum) are understood; other keys go to Meta.Extra.
//   - A header row (first non-comment line that does not start with a
//     number, or the last comment line before the data if it names the
//     columns) names the columns and may carry units: "wavelength_um",
//     "wave (nm)", "flux [mJy]", "flux_err". Columns are found by name:
//     wavelength (wave, lambda, wl, awav = air), flux, uncertainty (err,
//     unc, sigma, noise; ivar for inverse variance) and a mask (mask, flag,
//     quality; non-zero = bad, masked with MaskFile).
//   - Without a header there must be 2 or 3 columns: wavelength, flux and
//     optionally the uncertainty.
//
// Wavelengths must be strictly ascending or strictly descending; a
// descending table is reversed. Non-numeric values are an error naming the
// line and column; "nan" or "inf" fluxes are kept and masked as invalid.
// Options override what the file says.
func ReadText(r io.Reader, opt ReadOptions) (*Spectrum, error) {
	tr := &textReader{opt: opt, br: bufio.NewReaderSize(r, maxTextLine)}
	return tr.read()
}

type textReader struct {
	opt  ReadOptions
	br   *bufio.Reader
	line int

	meta         Metadata
	waveUnit     string // from the file
	fluxUnit     string
	mediumText   string
	lastComment  string
	commentLines int
	blankLines   int

	header   []string // column names, nil without a header
	roles    []int
	ncol     int
	iw, ifl  int
	iu, im   int
	uncRole  int
	comma    bool
	fields   [][]byte
	fieldCol []int

	wave, flux, unc []float64
	mask            []bool
	dir             int // +1 ascending, -1 descending, 0 unknown
}

func (t *textReader) errf(col int, sentinel error, format string, args ...any) error {
	return &ParseError{File: t.opt.Name, Line: t.line, Column: col, HDU: -1, Err: causef(sentinel, format, args...)}
}

func (t *textReader) read() (*Spectrum, error) {
	t.meta.Extra = map[string]string{}
	t.iw, t.ifl, t.iu, t.im = -1, -1, -1, -1
	configured := false
	for {
		raw, err := t.br.ReadSlice('\n')
		if len(raw) > 0 || err == nil {
			t.line++
		}
		if errors.Is(err, bufio.ErrBufferFull) {
			return nil, t.errf(0, ErrTooLarge, "line longer than %d bytes", maxTextLine)
		}
		if err != nil && err != io.EOF {
			return nil, &ParseError{File: t.opt.Name, Line: t.line, HDU: -1, Err: err}
		}
		if len(raw) > 0 {
			if perr := t.handleLine(raw, &configured); perr != nil {
				return nil, perr
			}
		}
		if err == io.EOF {
			break
		}
	}
	if len(t.wave) == 0 {
		return nil, &ParseError{File: t.opt.Name, Line: t.line, HDU: -1, Err: causef(ErrNoData, "no data rows (%d comment and %d blank lines)", t.commentLines, t.blankLines)}
	}
	return t.finish()
}

func (t *textReader) handleLine(raw []byte, configured *bool) error {
	s := bytes.TrimRight(raw, "\r\n")
	s = bytes.TrimSpace(s)
	if t.line == 1 {
		s = bytes.TrimPrefix(s, []byte("\xef\xbb\xbf")) // UTF-8 byte-order mark
	}
	if len(s) == 0 {
		t.blankLines++
		return nil
	}
	if c := s[0]; c == '#' || c == '%' || c == ';' {
		t.commentLines++
		if !*configured {
			return t.comment(string(bytes.TrimLeft(s, "#%; \t")))
		}
		return nil
	}
	if !*configured {
		*configured = true
		t.comma = bytes.IndexByte(s, ',') >= 0
		first := ""
		if f := t.split(s); len(f) > 0 {
			first = string(f[0])
		}
		if _, err := strconv.ParseFloat(first, 64); err != nil {
			// A header row.
			if err := t.setColumns(t.headerFields(string(s))); err != nil {
				return err
			}
			return nil
		}
		// Data first: maybe the last comment line named the columns.
		if err := t.setColumnsFromComment(s); err != nil {
			return err
		}
	}
	return t.row(s)
}

// comment handles a comment line before the data.
func (t *textReader) comment(c string) error {
	t.lastComment = c
	k, v, ok := strings.Cut(c, "=")
	if !ok {
		k, v, ok = strings.Cut(c, ":")
	}
	if !ok {
		return nil
	}
	k = strings.ToLower(strings.TrimSpace(k))
	v = strings.Trim(strings.TrimSpace(v), `"'`)
	if k == "" || strings.ContainsAny(k, " \t,") && !strings.HasPrefix(k, "wave") && !strings.HasPrefix(k, "flux") {
		return nil
	}
	num := func(dst *float64) error {
		x, err := strconv.ParseFloat(strings.Fields(v + " ")[0], 64)
		if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
			return t.errf(0, ErrSyntax, "metadata %q: %q is not a number", k, v)
		}
		*dst = x
		return nil
	}
	switch k {
	case "object", "target", "name":
		t.meta.Object = v
	case "date", "date-obs", "date_obs", "dateobs":
		t.meta.Date = v
	case "exptime", "exposure", "exposure_s", "exptime_s":
		return num(&t.meta.Exposure)
	case "airmass":
		return num(&t.meta.Airmass)
	case "epoch", "epoch_days", "phase", "time_since_explosion", "days_since_explosion":
		return num(&t.meta.Epoch)
	case "wave_unit", "wavelength_unit", "wavelength unit", "waveunit", "wunit":
		t.waveUnit = v
	case "flux_unit", "flux unit", "fluxunit", "funit", "bunit":
		t.fluxUnit = v
	case "medium", "wavelength_medium", "wavelength medium", "airorvac", "vacuum":
		t.mediumText = v
	default:
		t.meta.Extra[k] = v
	}
	return nil
}

// headerFields splits a header line into names, keeping bracketed units
// with their names ("flux (erg s-1 cm-2 A-1)").
func (t *textReader) headerFields(s string) []string {
	var out []string
	depth := 0
	start := 0
	emit := func(end int) {
		f := strings.Trim(strings.TrimSpace(s[start:end]), `"'`)
		if f != "" || t.comma {
			out = append(out, f)
		}
	}
	for i := 0; i < len(s); i++ {
		switch c := s[i]; {
		case c == '(' || c == '[':
			depth++
		case c == ')' || c == ']':
			if depth > 0 {
				depth--
			}
		case depth == 0 && ((t.comma && c == ',') || (!t.comma && (c == ' ' || c == '\t'))):
			emit(i)
			start = i + 1
		}
	}
	emit(len(s))
	if !t.comma {
		// Join "wave (nm)" written with a space before the bracket.
		var j []string
		for _, f := range out {
			if len(j) > 0 && (f[0] == '(' || f[0] == '[') {
				j[len(j)-1] += " " + f
				continue
			}
			j = append(j, f)
		}
		out = j
	}
	return out
}

// setColumnsFromComment uses the last comment line as a header when it
// names a wavelength and a flux column and has as many names as the first
// data row has fields.
func (t *textReader) setColumnsFromComment(first []byte) error {
	n := len(t.split(first))
	if t.lastComment != "" {
		names := t.headerFields(t.lastComment)
		if len(names) == n {
			roles, _ := classify(names)
			hasW, hasF := false, false
			for _, r := range roles {
				hasW = hasW || r == roleWave
				hasF = hasF || r == roleFlux
			}
			if hasW && hasF {
				return t.setColumns(names)
			}
		}
	}
	return t.setColumns(nil)
}

// classify assigns roles to column names and returns the unit each name
// carries ("" if none).
func classify(names []string) (roles []int, units []string) {
	roles = make([]int, len(names))
	units = make([]string, len(names))
	for i, n := range names {
		base, unit := splitNameUnit(n)
		units[i] = unit
		roles[i] = roleOf(base)
	}
	return roles, units
}

// splitNameUnit separates "wave (nm)", "wave[nm]", "wavelength_um",
// "flux/mJy" into a lower-case name and a unit.
func splitNameUnit(n string) (name, unit string) {
	n = strings.TrimSpace(n)
	if i := strings.IndexAny(n, "(["); i > 0 {
		j := strings.LastIndexAny(n, ")]")
		if j > i {
			return strings.ToLower(strings.TrimSpace(n[:i])), strings.TrimSpace(n[i+1 : j])
		}
	}
	l := strings.ToLower(n) // may differ from n in length (invalid UTF-8)
	for _, sep := range []string{"/", "_", " "} {
		if i := strings.LastIndex(l, sep); i > 0 {
			suf := l[i+1:]
			if _, err := ParseWaveUnit(suf); err == nil && suf != "" {
				return l[:i], suf
			}
			if fu, err := ParseFluxUnit(suf); err == nil && fu != FluxUnknown && fu != FluxNormalized {
				return l[:i], suf
			}
		}
	}
	return l, ""
}

func roleOf(base string) int {
	b := strings.Trim(base, " _-.")
	has := func(subs ...string) bool {
		for _, s := range subs {
			if strings.Contains(b, s) {
				return true
			}
		}
		return false
	}
	pre := func(ps ...string) bool {
		for _, p := range ps {
			if strings.HasPrefix(b, p) {
				return true
			}
		}
		return false
	}
	switch {
	case has("ivar", "inverse_var", "invvar"):
		return roleIvar
	case has("err", "unc", "sigma", "noise", "stddev", "std_dev") || b == "sig" || b == "e_flux" || b == "eflux" || b == "dflux":
		return roleUnc
	case pre("mask", "flag", "qual", "bad", "dq"):
		return roleMask
	case pre("wave", "wavelength", "lambda", "lam", "wl", "awav", "vwav", "wav", "loglam"):
		return roleWave
	case pre("flux", "f_lambda", "flam", "fnu", "f_nu", "fλ", "fν", "intensity", "spec", "counts") || b == "f":
		return roleFlux
	}
	return roleNone
}

// choose resolves a user's column choice (name or 1-based number).
func choose(names []string, ncol int, choice, what string) (int, error) {
	if n, err := strconv.Atoi(choice); err == nil {
		if n < 1 || n > ncol {
			return 0, causef(ErrColumns, "%s column %d out of range 1..%d", what, n, ncol)
		}
		return n - 1, nil
	}
	for i, nm := range names {
		base, _ := splitNameUnit(nm)
		if strings.EqualFold(nm, choice) || strings.EqualFold(base, choice) {
			return i, nil
		}
	}
	return 0, causef(ErrColumns, "no %s column named %q (columns: %s)", what, choice, strings.Join(names, ", "))
}

func (t *textReader) setColumns(names []string) error {
	t.header = names
	t.uncRole = roleUnc
	var units []string
	if names != nil {
		t.roles, units = classify(names)
		t.ncol = len(names)
		for i, r := range t.roles {
			switch {
			case r == roleWave && t.iw < 0:
				t.iw = i
			case r == roleFlux && t.ifl < 0:
				t.ifl = i
			case (r == roleUnc || r == roleIvar) && t.iu < 0:
				t.iu, t.uncRole = i, r
			case r == roleMask && t.im < 0:
				t.im = i
			}
		}
		// Unnamed leading columns fall back to position.
		if t.iw < 0 && t.ncol >= 2 && t.roles[0] == roleNone {
			t.iw = 0
		}
		if t.ifl < 0 && t.ncol >= 2 && t.roles[1] == roleNone && t.iw != 1 {
			t.ifl = 1
		}
	}
	// User choices override.
	if names == nil && (t.opt.WaveColumn != "" || t.opt.FluxColumn != "" || t.opt.UncColumn != "") {
		t.ncol = -1 // decided at the first row
	}
	pick := func(choice, what string, dst *int) error {
		if choice == "" {
			return nil
		}
		if strings.EqualFold(choice, "none") && what == "uncertainty" {
			*dst = -1
			return nil
		}
		if names == nil {
			n, err := strconv.Atoi(choice)
			if err != nil || n < 1 {
				return t.errf(0, ErrColumns, "the file has no header row, so choose the %s column by number, not %q", what, choice)
			}
			*dst = n - 1
			return nil
		}
		i, err := choose(names, t.ncol, choice, what)
		if err != nil {
			return &ParseError{File: t.opt.Name, Line: t.line, HDU: -1, Err: err}
		}
		*dst = i
		return nil
	}
	if err := pick(t.opt.WaveColumn, "wavelength", &t.iw); err != nil {
		return err
	}
	if err := pick(t.opt.FluxColumn, "flux", &t.ifl); err != nil {
		return err
	}
	if err := pick(t.opt.UncColumn, "uncertainty", &t.iu); err != nil {
		return err
	}
	if t.opt.UncColumn != "" && !strings.EqualFold(t.opt.UncColumn, "none") {
		t.uncRole = roleUnc
	}
	if names != nil {
		if t.iw < 0 || t.ifl < 0 {
			return t.errf(0, ErrColumns, "header %q names no wavelength and flux columns; choose them by name or number", strings.Join(names, ","))
		}
		if t.iw == t.ifl {
			return t.errf(0, ErrColumns, "wavelength and flux are the same column")
		}
		if units[t.iw] != "" && t.waveUnit == "" {
			t.waveUnit = units[t.iw]
		}
		if units[t.ifl] != "" && t.fluxUnit == "" {
			t.fluxUnit = units[t.ifl]
		}
		if strings.HasPrefix(strings.ToLower(names[t.iw]), "awav") || strings.Contains(strings.ToLower(names[t.iw]), "air") {
			if t.mediumText == "" {
				t.mediumText = "air"
			}
		}
	}
	return nil
}

// split splits a data row into fields (reusing t.fields) and records each
// field's 1-based byte column.
func (t *textReader) split(s []byte) [][]byte {
	t.fields = t.fields[:0]
	t.fieldCol = t.fieldCol[:0]
	if t.comma {
		start := 0
		for i := 0; i <= len(s); i++ {
			if i == len(s) || s[i] == ',' {
				f := s[start:i]
				off := start
				for len(f) > 0 && (f[0] == ' ' || f[0] == '\t') {
					f = f[1:]
					off++
				}
				f = bytes.TrimRight(f, " \t")
				if len(f) >= 2 && f[0] == '"' && f[len(f)-1] == '"' {
					f = f[1 : len(f)-1]
					off++
				}
				t.fields = append(t.fields, f)
				t.fieldCol = append(t.fieldCol, off+1)
				start = i + 1
			}
		}
		return t.fields
	}
	i := 0
	for i < len(s) {
		for i < len(s) && (s[i] == ' ' || s[i] == '\t') {
			i++
		}
		if i == len(s) {
			break
		}
		j := i
		for j < len(s) && s[j] != ' ' && s[j] != '\t' {
			j++
		}
		t.fields = append(t.fields, s[i:j])
		t.fieldCol = append(t.fieldCol, i+1)
		i = j
	}
	return t.fields
}

func parseNum(b []byte) (float64, error) {
	if len(b) == 0 {
		return 0, strconv.ErrSyntax
	}
	// strconv copies the string into any error it returns, so viewing the
	// line's bytes without a copy is safe here.
	return strconv.ParseFloat(unsafe.String(&b[0], len(b)), 64)
}

func (t *textReader) row(s []byte) error {
	// Strip a trailing comment.
	if i := bytes.IndexByte(s, '#'); i > 0 {
		s = bytes.TrimRight(s[:i], " \t")
	}
	f := t.split(s)
	if t.ncol <= 0 {
		// First data row without a header.
		t.ncol = len(f)
		if t.iw < 0 {
			t.iw = 0
		}
		if t.ifl < 0 {
			t.ifl = 1
		}
		if t.iu < 0 && t.opt.UncColumn == "" && t.ncol == 3 {
			t.iu = 2
		}
		if t.opt.WaveColumn == "" && t.opt.FluxColumn == "" && (t.ncol < 2 || t.ncol > 3) {
			return t.errf(1, ErrColumns, "found %d columns; without a header row a spectrum has 2 or 3 (wavelength, flux, uncertainty): add a header row or choose the columns", t.ncol)
		}
		for _, c := range []int{t.iw, t.ifl, t.iu} {
			if c >= t.ncol {
				return t.errf(1, ErrColumns, "column %d chosen but rows have %d", c+1, t.ncol)
			}
		}
	}
	if len(f) != t.ncol {
		// Point at the first extra field, or at the last one present.
		col := 1
		switch {
		case len(f) > t.ncol:
			col = t.fieldCol[t.ncol]
		case len(f) > 0:
			col = t.fieldCol[len(f)-1]
		}
		return t.errf(col, ErrColumns, "expected %d fields, found %d", t.ncol, len(f))
	}
	w, err := parseNum(f[t.iw])
	if err != nil {
		return t.errf(t.fieldCol[t.iw], ErrSyntax, "wavelength %q is not a number", f[t.iw])
	}
	if math.IsNaN(w) || math.IsInf(w, 0) || w <= 0 {
		return t.errf(t.fieldCol[t.iw], ErrOrder, "wavelength %v must be finite and positive", w)
	}
	if n := len(t.wave); n > 0 {
		prev := t.wave[n-1]
		d := 1
		if w < prev {
			d = -1
		}
		if w == prev || (t.dir != 0 && d != t.dir) {
			return t.errf(t.fieldCol[t.iw], ErrOrder, "wavelength %v after %v breaks the order of the previous rows", w, prev)
		}
		t.dir = d
	}
	fl, err := parseNum(f[t.ifl])
	if err != nil {
		return t.errf(t.fieldCol[t.ifl], ErrSyntax, "flux %q is not a number", f[t.ifl])
	}
	t.wave = append(t.wave, w)
	t.flux = append(t.flux, fl)
	if t.iu >= 0 {
		u, err := parseNum(f[t.iu])
		if err != nil {
			return t.errf(t.fieldCol[t.iu], ErrSyntax, "uncertainty %q is not a number", f[t.iu])
		}
		if t.uncRole == roleIvar {
			u = 1 / math.Sqrt(u)
		}
		t.unc = append(t.unc, u)
	}
	if t.im >= 0 {
		m, err := parseNum(f[t.im])
		if err != nil {
			return t.errf(t.fieldCol[t.im], ErrSyntax, "mask %q is not a number", f[t.im])
		}
		if t.mask == nil {
			t.mask = make([]bool, len(t.wave)-1, cap(t.wave))
		}
		t.mask = append(t.mask, m != 0)
	}
	return nil
}

func (t *textReader) finish() (*Spectrum, error) {
	fail := func(err error) error { return &ParseError{File: t.opt.Name, HDU: -1, Err: err} }
	wu := t.waveUnit
	if t.opt.WaveUnit != "" {
		wu = t.opt.WaveUnit
	}
	unit := UnitAngstrom
	if wu != "" {
		u, err := ParseWaveUnit(wu)
		if err != nil {
			return nil, fail(causef(ErrUnsupported, "%v", err))
		}
		unit = u
	}
	fu := t.fluxUnit
	if t.opt.FluxUnit != "" {
		fu = t.opt.FluxUnit
	}
	fluxUnit, err := ParseFluxUnit(fu)
	if err != nil {
		if t.opt.FluxUnit != "" {
			return nil, fail(causef(ErrUnsupported, "%v", err))
		}
		// An unknown unit in the file is kept as text, not an error.
		t.meta.Extra["flux_unit_text"] = fu
		fluxUnit = FluxUnknown
	}
	med, set, err := t.opt.medium()
	if err != nil {
		return nil, fail(err)
	}
	if !set && t.mediumText != "" {
		if med, err = physics.ParseMedium(t.mediumText); err != nil {
			return nil, fail(fmt.Errorf("%w: %w", ErrSyntax, err))
		}
	}
	meta := t.meta
	meta.Source = t.opt.Name
	meta.FluxUnit = fluxUnit
	meta.OriginalMedium = med
	if len(meta.Extra) == 0 {
		meta.Extra = nil
	}
	if f := unit.Factor(); f != 1 {
		for i := range t.wave {
			t.wave[i] *= f
		}
	}
	if med == physics.Air {
		physics.AirToVacuumAll(t.wave)
	}
	var unc []float64
	uncNote := ""
	if t.iu >= 0 {
		unc = t.unc
		// A column of nothing but NaN means "no uncertainties" (what the
		// prep command writes for a spectrum without them).
		allNaN := true
		for _, u := range unc {
			if !math.IsNaN(u) {
				allNaN = false
				break
			}
		}
		if allNaN {
			unc = nil
			uncNote = "; the uncertainty column holds only NaN and was ignored"
		}
	}
	s, err := New(t.wave, t.flux, unc, meta)
	if err != nil {
		return nil, fail(causef(ErrOrder, "%v", err))
	}
	if t.mask != nil {
		if t.dir < 0 {
			for i, j := 0, len(t.mask)-1; i < j; i, j = i+1, j-1 {
				t.mask[i], t.mask[j] = t.mask[j], t.mask[i]
			}
		}
		for i, bad := range t.mask {
			if bad {
				s.SetMask(i, MaskFile)
			}
		}
	}
	s.addHistory("read %d samples from %s (text; %d comment and %d blank lines skipped; wavelengths in %s, %s%s)",
		s.Len(), nameOr(t.opt.Name), t.commentLines, t.blankLines, unit, med, uncNote)
	return s, nil
}

func nameOr(n string) string {
	if n == "" {
		return "<input>"
	}
	return n
}
