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
	roleVar // variance, converted to σ = √var
)

// ReadText reads a spectrum from a plain-text table: one sample per line,
// fields separated by commas or by white space (tabs, spaces). A gzip- or
// bzip2-compressed input is decompressed first.
//
//   - Blank lines and comment lines (starting with '#', '%' or ';') are
//     skipped and counted. A comment of the form "key = value" or
//     "key: value" is metadata: object, date, exptime (s), airmass, epoch
//     (days since explosion), mjd (of the observation), wave_unit,
//     flux_unit and medium (air or vacuum) are understood; other keys go to
//     Meta.Extra. A value that cannot be read is a warning in the report,
//     not an error.
//   - An ECSV file (first line "# %ECSV") takes its column units, its
//     delimiter and its metadata from the YAML header.
//   - A header row (first non-comment line that does not start with a
//     number, or the last comment line before the data if it names the
//     columns) names the columns and may carry units: "wavelength_um",
//     "wave (nm)", "flux [mJy]", "flux_err". Columns are found by name:
//     wavelength (wave, lambda, wl, awav = air; loglam = log10 Å), flux (the
//     calibrated one when there are several), uncertainty (err, unc,
//     sigma, noise; var for variance, ivar for inverse variance) and a mask
//     (mask, flag, quality: non-zero = bad; good, valid: 1 = good).
//   - Without a header there must be 2 or 3 columns: wavelength, flux and
//     optionally the uncertainty.
//   - Missing values (NA, N/A, null, an empty field, nan, -nan) in flux or
//     uncertainty are kept as NaN and flagged invalid; a row without a
//     wavelength cannot be placed and is left out, counted and reported.
//
// Wavelengths must be strictly ascending or strictly descending; a
// descending table is reversed. Other non-numeric values are an error
// naming the line and column. An epoch that looks like an MJD (> 30000) is
// refused (ErrAmbiguous) unless opt.Days or opt.ExplosionMJD says how to
// read it. Options override what the file says; Meta.Read reports what
// was used and assumed.
func ReadText(r io.Reader, opt ReadOptions) (*Spectrum, error) {
	br := bufio.NewReaderSize(r, maxTextLine)
	u, comp, err := unwrap(br, &opt)
	if err != nil {
		return nil, err
	}
	return readText(u, comp, opt)
}

func readText(r io.Reader, comp string, opt ReadOptions) (*Spectrum, error) {
	br, ok := r.(*bufio.Reader)
	if !ok || br.Size() < maxTextLine {
		br = bufio.NewReaderSize(r, maxTextLine)
	}
	rep := newReport("text")
	rep.Compression = comp
	head, _ := br.Peek(4096)
	if bytes.HasPrefix(head, []byte("SIMPLE  =")) {
		return nil, &ParseError{File: opt.Name, HDU: -1, Err: causef(ErrUnsupported, "this is a FITS file, not a text table: read it with Read or ReadFile")}
	}
	if c := compression(head); c != "" && comp != "" {
		return nil, &ParseError{File: opt.Name, HDU: -1, Err: causef(ErrUnsupported, "compressed twice (%s inside %s): decompress it first", c, comp)}
	}
	if h := binaryHint(head); h != "" {
		return nil, &ParseError{File: opt.Name, HDU: -1, Err: causef(ErrUnsupported, "not a text table: %s", h)}
	}
	tr := &textReader{opt: opt, br: br, rep: rep}
	return tr.read()
}

type textReader struct {
	opt  ReadOptions
	br   *bufio.Reader
	rep  *ReadReport
	line int

	meta         Metadata
	mjd          float64
	waveUnit     string // from the file
	fluxUnit     string
	mediumText   string
	lastComment  string
	commentLines int
	blankLines   int

	ecsv      bool              // an ECSV header
	ecsvDone  bool              // past its YAML header
	ecsvUnits map[string]string // column name → unit
	ecsvSect  string            // current top-level YAML key
	ecsvCol   string            // the datatype entry being read
	ecsvDelim string

	header   []string // column names, nil without a header
	ncol     int
	iw, ifl  int
	iu, im   int
	uncRole  int
	maskGood bool
	maskName string
	waveLog  bool
	comma    bool
	fields   [][]byte
	fieldCol []int

	wave, flux, unc []float64
	mask            []float64
	dir             int // +1 ascending, -1 descending, 0 unknown
	skippedLines    []int
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
		what := ""
		if len(t.skippedLines) > 0 {
			what = fmt.Sprintf(", %d rows without a wavelength", len(t.skippedLines))
		}
		return nil, &ParseError{File: t.opt.Name, Line: t.line, HDU: -1, Err: causef(ErrNoData, "no data rows (%d comment and %d blank lines%s)", t.commentLines, t.blankLines, what)}
	}
	return t.finish()
}

func (t *textReader) handleLine(raw []byte, configured *bool) error {
	s := bytes.TrimRight(raw, "\r\n")
	s = bytes.TrimSpace(s)
	if t.line == 1 {
		s = bytes.TrimPrefix(s, []byte("\xef\xbb\xbf")) // UTF-8 byte-order mark
		if bytes.HasPrefix(s, []byte("# %ECSV")) {
			t.ecsv = true
			t.rep.Format = "ECSV"
			t.ecsvUnits = map[string]string{}
			t.commentLines++
			return nil
		}
	}
	if len(s) == 0 {
		t.blankLines++
		return nil
	}
	if c := s[0]; c == '#' || c == '%' || c == ';' {
		t.commentLines++
		if t.ecsv && !t.ecsvDone {
			t.ecsvLine(string(bytes.TrimPrefix(s[1:], []byte(" "))))
			return nil
		}
		if !*configured {
			t.comment(string(bytes.TrimLeft(s, "#%; \t")))
		}
		return nil
	}
	if !*configured {
		*configured = true
		if t.ecsv {
			t.ecsvDone = true
			t.comma = t.ecsvDelim == ","
			return t.setColumns(t.headerFields(string(s)))
		}
		t.comma = bytes.IndexByte(s, ',') >= 0
		first := ""
		if f := t.split(s); len(f) > 0 {
			first = string(f[0])
		}
		if _, err := strconv.ParseFloat(first, 64); err != nil && !isMissing([]byte(first)) {
			// A header row.
			return t.setColumns(t.headerFields(string(s)))
		}
		// Data first: maybe the last comment line named the columns.
		if err := t.setColumnsFromComment(s); err != nil {
			return err
		}
	}
	return t.row(s)
}

// ecsvLine reads one line of an ECSV YAML header (the subset astropy
// writes: datatype entries with name and unit, the delimiter, and flat
// meta entries).
func (t *textReader) ecsvLine(l string) {
	if strings.TrimSpace(l) == "---" || strings.TrimSpace(l) == "" {
		return
	}
	indent := len(l) - len(strings.TrimLeft(l, " "))
	body := strings.TrimSpace(l)
	if indent == 0 && !strings.HasPrefix(body, "-") {
		k, v, _ := strings.Cut(body, ":")
		t.ecsvSect = strings.TrimSpace(k)
		v = yamlUnquote(v)
		if t.ecsvSect == "delimiter" {
			t.ecsvDelim = v
		}
		return
	}
	entry := strings.HasPrefix(body, "- ")
	body = strings.TrimPrefix(body, "- ")
	var kv [][2]string
	if strings.HasPrefix(body, "{") && strings.HasSuffix(body, "}") {
		for _, part := range splitFlow(body[1 : len(body)-1]) {
			k, v, ok := strings.Cut(part, ":")
			if ok {
				kv = append(kv, [2]string{strings.TrimSpace(k), yamlUnquote(v)})
			}
		}
	} else if k, v, ok := strings.Cut(body, ":"); ok {
		kv = append(kv, [2]string{strings.TrimSpace(k), yamlUnquote(v)})
	}
	switch t.ecsvSect {
	case "datatype":
		if entry {
			t.ecsvCol = ""
		}
		var unit string
		for _, p := range kv {
			switch p[0] {
			case "name":
				t.ecsvCol = p[1]
			case "unit":
				unit = p[1]
			}
		}
		if unit != "" && t.ecsvCol != "" {
			t.ecsvUnits[t.ecsvCol] = unit
		} else if unit != "" {
			t.ecsvUnits["\x00pending"] = unit
		}
		if t.ecsvCol != "" {
			if u, ok := t.ecsvUnits["\x00pending"]; ok {
				t.ecsvUnits[t.ecsvCol] = u
				delete(t.ecsvUnits, "\x00pending")
			}
		}
	case "meta":
		for _, p := range kv {
			if p[1] != "" && !strings.HasPrefix(p[1], "!!") {
				t.comment(p[0] + " = " + p[1])
			}
		}
	}
}

// splitFlow splits the inside of a YAML flow mapping at commas outside
// quotes.
func splitFlow(s string) []string {
	var out []string
	q := byte(0)
	start := 0
	for i := 0; i < len(s); i++ {
		switch c := s[i]; {
		case q != 0 && c == q:
			q = 0
		case q == 0 && (c == '\'' || c == '"'):
			q = c
		case q == 0 && c == ',':
			out = append(out, s[start:i])
			start = i + 1
		}
	}
	return append(out, s[start:])
}

func yamlUnquote(v string) string {
	v = strings.TrimSpace(v)
	if len(v) >= 2 && (v[0] == '\'' && v[len(v)-1] == '\'') {
		return strings.ReplaceAll(v[1:len(v)-1], "''", "'")
	}
	if len(v) >= 2 && v[0] == '"' && v[len(v)-1] == '"' {
		if u, err := strconv.Unquote(v); err == nil {
			return u
		}
		return v[1 : len(v)-1]
	}
	return v
}

// comment handles a comment line before the data. A value it cannot read
// is a warning.
func (t *textReader) comment(c string) {
	t.lastComment = c
	k, v, ok := strings.Cut(c, "=")
	if !ok {
		k, v, ok = strings.Cut(c, ":")
	}
	if !ok {
		return
	}
	k = strings.ToLower(strings.TrimSpace(k))
	v = strings.Trim(strings.TrimSpace(v), `"'`)
	if k == "" || strings.ContainsAny(k, " \t,") && !strings.HasPrefix(k, "wave") && !strings.HasPrefix(k, "flux") {
		return
	}
	num := func(dst *float64) {
		first, _, _ := strings.Cut(strings.TrimSpace(v)+" ", " ")
		x, err := strconv.ParseFloat(first, 64)
		if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
			t.rep.warnf("line %d: metadata %q = %s is not a number: ignored", t.line, clip(k, 40), short([]byte(v)))
			t.meta.Extra[k] = v
			return
		}
		*dst = x
	}
	switch k {
	case "object", "target", "name":
		t.meta.Object = v
	case "date", "date-obs", "date_obs", "dateobs":
		t.meta.Date = v
	case "exptime", "exposure", "exposure_s", "exptime_s":
		num(&t.meta.Exposure)
	case "airmass":
		num(&t.meta.Airmass)
	case "epoch", "epoch_days", "phase", "time_since_explosion", "days_since_explosion", "days":
		num(&t.meta.Epoch)
	case "mjd", "mjd-obs", "mjd_obs", "mjdobs":
		num(&t.mjd)
	case "wave_unit", "wavelength_unit", "wavelength unit", "waveunit", "wunit":
		t.waveUnit = v
	case "flux_unit", "flux unit", "fluxunit", "funit", "bunit":
		t.fluxUnit = v
	case "medium", "wavelength_medium", "wavelength medium", "airorvac", "vacuum":
		t.mediumText = v
	default:
		t.meta.Extra[k] = v
	}
}

// clip shortens s to at most n bytes for a message.
func clip(s string, n int) string {
	if len(s) > n {
		return s[:n] + "…"
	}
	return s
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
	case b == "var" || has("variance") || strings.HasSuffix(b, "_var") || strings.HasPrefix(b, "var_"):
		return roleVar
	case has("err", "unc", "sigma", "noise", "stddev", "std_dev") || b == "sig" || b == "e_flux" || b == "eflux" || b == "dflux":
		return roleUnc
	case pre("mask", "flag", "qual", "bad", "dq") || strings.HasSuffix(b, "_mask") || isGoodMaskName(b):
		return roleMask
	case pre("wave", "wavelength", "lambda", "lam", "wl", "awav", "vwav", "wav", "loglam") || isLogWaveName(b):
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
	return 0, causef(ErrColumns, "no %s column named %q (columns: %s)", what, choice, clip(strings.Join(names, ", "), 200))
}

func (t *textReader) setColumns(names []string) error {
	t.header = names
	t.uncRole = roleUnc
	if names != nil {
		t.ncol = len(names)
		units := make([]string, len(names))
		for i, n := range names {
			if u, ok := t.ecsvUnits[n]; ok {
				units[i] = u
			}
		}
		c, err := chooseColumns(names, units, &t.opt, t.rep)
		if err != nil {
			return &ParseError{File: t.opt.Name, Line: t.line, HDU: -1, Err: err}
		}
		t.iw, t.ifl, t.iu, t.im, t.uncRole, t.maskGood, t.waveLog = c.wave, c.flux, c.unc, c.mask, c.uncKind, c.maskGood, c.waveLog
		if t.iw < 0 || t.ifl < 0 {
			return t.errf(0, ErrColumns, "header %s names no wavelength and flux columns; choose them by name or number", short([]byte(strings.Join(names, ","))))
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
		if t.iu >= 0 && units[t.iu] != "" && t.fluxUnit != "" && t.uncRole == roleUnc && units[t.iu] != t.fluxUnit {
			fu, fs, e1 := ParseFluxUnitScale(t.fluxUnit)
			uu, us, e2 := ParseFluxUnitScale(units[t.iu])
			if e1 != nil || e2 != nil || fu != uu || math.Abs(fs/us-1) > 1e-9 {
				t.rep.warnf("uncertainty column %q is in %q but the flux in %q: taken as in the flux's unit", names[t.iu], units[t.iu], t.fluxUnit)
			}
		}
		if strings.HasPrefix(strings.ToLower(names[t.iw]), "awav") || strings.Contains(strings.ToLower(names[t.iw]), "air") {
			if t.mediumText == "" {
				t.mediumText = "air"
			}
		}
		t.rep.Wave, t.rep.Flux = "column "+strconv.Quote(names[t.iw]), "column "+strconv.Quote(names[t.ifl])
		if t.iu >= 0 {
			t.rep.Uncertainty, t.rep.UncertaintyKind = "column "+strconv.Quote(names[t.iu]), uncKindName(t.uncRole)
		}
		if t.im >= 0 {
			t.rep.Mask, t.rep.MaskConvention = "column "+strconv.Quote(names[t.im]), maskConventionName(t.maskGood)
			t.maskName = names[t.im]
		}
		return nil
	}
	// No header: columns by position, or as the user chose by number.
	if t.opt.WaveColumn != "" || t.opt.FluxColumn != "" || t.opt.UncColumn != "" || t.opt.MaskColumn != "" {
		t.ncol = -1 // decided at the first row
	}
	pick := func(choice, what string, dst *int) error {
		if choice == "" {
			return nil
		}
		if strings.EqualFold(choice, "none") && (what == "uncertainty" || what == "mask") {
			*dst = -2 // none, and no positional default
			return nil
		}
		n, err := strconv.Atoi(choice)
		if err != nil || n < 1 {
			return t.errf(0, ErrColumns, "the file has no header row, so choose the %s column by number, not %s", what, short([]byte(choice)))
		}
		*dst = n - 1
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
	if err := pick(t.opt.MaskColumn, "mask", &t.im); err != nil {
		return err
	}
	if t.opt.IgnoreMask {
		t.im = -2
	}
	t.maskGood = t.opt.MaskGood
	return nil
}

// split splits a data row into fields (reusing t.fields) and records each
// field's 1-based byte column. Quoted fields lose their quotes ("" is an
// empty field).
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
		f := s[i:j]
		if len(f) >= 2 && f[0] == '"' && f[len(f)-1] == '"' {
			f = f[1 : len(f)-1]
		}
		t.fields = append(t.fields, f)
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

// isMissing reports a field that spells a missing value.
func isMissing(b []byte) bool {
	switch len(b) {
	case 0:
		return true
	case 1:
		return b[0] == '?' || b[0] == '-' || b[0] == '.'
	}
	if len(b) > 5 {
		return false
	}
	switch strings.ToLower(string(b)) {
	case "na", "n/a", "nan", "-nan", "+nan", "null", "none", "--", "nil", "masked":
		return true
	}
	return false
}

// value parses a flux-like field: missing values become NaN and are
// counted.
func (t *textReader) value(f []byte) (float64, bool) {
	v, err := parseNum(f)
	if err == nil {
		if v != v {
			t.rep.Missing++
		}
		return v, true
	}
	if isMissing(f) {
		t.rep.Missing++
		return math.NaN(), true
	}
	return 0, false
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
		if t.iu == -1 && t.opt.UncColumn == "" && t.ncol == 3 {
			t.iu = 2
		}
		if t.iu < 0 {
			t.iu = -1
		}
		if t.im < 0 {
			t.im = -1
		}
		if t.opt.WaveColumn == "" && t.opt.FluxColumn == "" && (t.ncol < 2 || t.ncol > 3) {
			return t.errf(1, ErrColumns, "found %d columns; without a header row a spectrum has 2 or 3 (wavelength, flux, uncertainty): add a header row or choose the columns", t.ncol)
		}
		for _, c := range []int{t.iw, t.ifl, t.iu, t.im} {
			if c >= t.ncol {
				return t.errf(1, ErrColumns, "column %d chosen but rows have %d", c+1, t.ncol)
			}
		}
		t.rep.Wave, t.rep.Flux = fmt.Sprintf("column %d", t.iw+1), fmt.Sprintf("column %d", t.ifl+1)
		if t.iu >= 0 {
			t.rep.Uncertainty, t.rep.UncertaintyKind = fmt.Sprintf("column %d", t.iu+1), "sigma"
		}
		if t.im >= 0 {
			t.rep.Mask, t.rep.MaskConvention = fmt.Sprintf("column %d", t.im+1), maskConventionName(t.maskGood)
			t.maskName = t.rep.Mask
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
		if isMissing(f[t.iw]) {
			// No wavelength: the sample cannot be placed.
			t.rep.SkippedRows++
			if len(t.skippedLines) < 10 {
				t.skippedLines = append(t.skippedLines, t.line)
			}
			return nil
		}
		return t.errf(t.fieldCol[t.iw], ErrSyntax, "wavelength %s is not a number", short(f[t.iw]))
	}
	if t.waveLog {
		if math.IsNaN(w) || math.IsInf(w, 0) || w < -300 || w > 300 {
			return t.errf(t.fieldCol[t.iw], ErrOrder, "log10 wavelength %v out of range", w)
		}
	} else if math.IsNaN(w) || math.IsInf(w, 0) || w <= 0 {
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
	fl, ok := t.value(f[t.ifl])
	if !ok {
		return t.errf(t.fieldCol[t.ifl], ErrSyntax, "flux %s is not a number", short(f[t.ifl]))
	}
	t.wave = append(t.wave, w)
	t.flux = append(t.flux, fl)
	if t.iu >= 0 {
		u, ok := t.value(f[t.iu])
		if !ok {
			return t.errf(t.fieldCol[t.iu], ErrSyntax, "uncertainty %s is not a number", short(f[t.iu]))
		}
		t.unc = append(t.unc, u)
	}
	if t.im >= 0 {
		m, err := parseNum(f[t.im])
		if err != nil {
			switch strings.ToLower(string(f[t.im])) {
			case "true", "t":
				m, err = 1, nil
			case "false", "f":
				m, err = 0, nil
			}
		}
		if err != nil {
			if !isMissing(f[t.im]) {
				return t.errf(t.fieldCol[t.im], ErrSyntax, "mask %s is not a number", short(f[t.im]))
			}
			m = math.NaN() // a missing mask value: flagged
		}
		if t.mask == nil {
			t.mask = make([]float64, len(t.wave)-1, cap(t.wave))
		}
		t.mask = append(t.mask, m)
	}
	return nil
}

func (t *textReader) finish() (*Spectrum, error) {
	rep := t.rep
	fail := func(err error) error { return &ParseError{File: t.opt.Name, HDU: -1, Err: err} }
	if rep.Wave == "" {
		rep.Wave, rep.Flux = fmt.Sprintf("column %d", t.iw+1), fmt.Sprintf("column %d", t.ifl+1)
	}
	rep.WaveLog = t.waveLog
	factor, lg, err := resolveWave(t.waveUnit, &t.opt, rep)
	if err != nil {
		return nil, fail(err)
	}
	fluxUnit, scale, err := resolveFlux(t.fluxUnit, &t.opt, rep)
	if err != nil {
		return nil, fail(err)
	}
	if fluxUnit == FluxUnknown && rep.FluxUnitText != "" && len(rep.UnknownUnits) > 0 {
		t.meta.Extra["flux_unit_text"] = rep.FluxUnitText
	}
	med, set, err := t.opt.medium()
	if err != nil {
		return nil, fail(err)
	}
	rep.MediumFrom = "option"
	if !set {
		rep.MediumFrom = "assumed"
		if t.mediumText != "" {
			m, err := physics.ParseMedium(t.mediumText)
			if err != nil {
				rep.warnf("medium %s not understood: wavelengths taken as vacuum (set it with --air or --vacuum)", short([]byte(t.mediumText)))
			} else {
				med, rep.MediumFrom = m, "file"
			}
		}
	}
	rep.Medium = med.String()
	meta := t.meta
	meta.Source = t.opt.Name
	meta.FluxUnit = fluxUnit
	meta.OriginalMedium = med
	if err := resolveEpoch(&meta, t.mjd, &t.opt, rep); err != nil {
		return nil, fail(err)
	}
	if len(meta.Extra) == 0 {
		meta.Extra = nil
	}
	toAngstrom(t.wave, factor, lg)
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
			rep.Missing -= len(t.unc)
			rep.Uncertainty, rep.UncertaintyKind = "", ""
			rep.warnf("the uncertainty column holds only NaN: the spectrum has no uncertainties")
		}
	}
	uncToSigma(unc, t.uncRole)
	scaleFlux(t.flux, unc, scale)
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
		nbad := 0
		for i, v := range t.mask {
			if maskBad(v, t.maskGood) {
				s.SetMask(i, MaskFile)
				rep.flag(t.maskName, v)
				nbad++
			}
		}
		checkMaskShare(nbad, len(t.mask), t.maskGood, rep)
	}
	if rep.SkippedRows > 0 {
		rep.warnf("%d rows have no wavelength and were left out (lines %s)", rep.SkippedRows, intList(t.skippedLines))
	}
	checkPlausible(s, rep)
	s.Meta.Read = rep
	s.addHistory("read %d samples from %s (%s; %d comment and %d blank lines skipped; wavelengths in %s, %s%s)",
		s.Len(), nameOr(t.opt.Name), rep.Format, t.commentLines, t.blankLines, rep.WaveUnit, med, uncNote)
	return s, nil
}

// uncToSigma turns variances or inverse variances into σ in place.
func uncToSigma(unc []float64, kind int) {
	switch kind {
	case roleVar:
		for i, v := range unc {
			unc[i] = math.Sqrt(v)
		}
	case roleIvar:
		for i, v := range unc {
			unc[i] = 1 / math.Sqrt(v)
		}
	}
}

// scaleFlux multiplies flux and uncertainty by a unit's scale factor.
func scaleFlux(flux, unc []float64, scale float64) {
	if scale == 1 {
		return
	}
	for i := range flux {
		flux[i] *= scale
	}
	for i := range unc {
		unc[i] *= scale
	}
}

func nameOr(n string) string {
	if n == "" {
		return "<input>"
	}
	return n
}
