package linelists

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"unsafe"

	"broadline/physics"
)

// Bounds on what a reader accepts, so that no input allocates without
// bound. A longer line or a row with more fields is an error.
const (
	maxLineLength = 64 << 10 // bytes per line
	maxFields     = 256      // fields per row
	maxMetaLines  = 1000     // "# key: value" lines kept per file
)

var utf8BOM = []byte("\xef\xbb\xbf")

// ReadOptions controls reading one file.
type ReadOptions struct {
	// Name is the file name used in errors and reports.
	Name string
	// Import, when not nil, reads an arbitrary table with the given column
	// mapping instead of our format.
	Import *Import
	// Medium of the wavelengths when the file does not say ("# medium:").
	// If both say and disagree, reading fails.
	Medium physics.Medium
	// Species, when not the zero value, is the species of every line of a
	// file in our format that has no species column (the import path has
	// Import.Species).
	Species Species
	// Filter selects lines; the others are skipped and counted.
	Filter Filter
	// Workers is the number of goroutines that parse rows; ≤ 1 parses in
	// the calling goroutine. The result is the same either way.
	Workers int
}

// Filter selects lines by wavelength, species and strength. The zero value
// keeps everything.
type Filter struct {
	MinWavelength float64 // vacuum Å; 0 means no lower bound
	MaxWavelength float64 // vacuum Å; 0 means no upper bound
	// Species, when not empty, keeps only these species.
	Species []Species
	// MinLogGF keeps lines with log gf ≥ MinLogGF when HasMinLogGF is set.
	MinLogGF    float64
	HasMinLogGF bool
}

func (f *Filter) active() bool {
	return f.MinWavelength > 0 || f.MaxWavelength > 0 || len(f.Species) > 0 || f.HasMinLogGF
}

// Skipped counts lines left out on purpose, by reason.
type Skipped struct {
	Wavelength int // outside the wavelength range asked for
	Species    int // not among the species asked for
	Strength   int // log gf below the cut
}

// Total returns the number of skipped lines.
func (s Skipped) Total() int { return s.Wavelength + s.Species + s.Strength }

func (s *Skipped) add(o Skipped) {
	s.Wavelength += o.Wavelength
	s.Species += o.Species
	s.Strength += o.Strength
}

// KeyValue is one "# key: value" header line.
type KeyValue struct{ Key, Value string }

// FileReport says what reading one file did.
type FileReport struct {
	Name    string
	Medium  physics.Medium // medium the wavelengths were given in
	Meta    []KeyValue     // "# key: value" header lines, in order (medium included)
	Columns []string       // the columns read, as field_unit
	Ignored []string       // import path: columns present but not mapped
	Rows    int            // data rows read
	Added   int            // lines added
	Skipped Skipped        // lines left out on purpose
	Cached  bool           // loaded from the binary cache
	// Duplicates and GroundAdded as in Report, for this file alone (set
	// by Load).
	Duplicates  int
	GroundAdded int
}

// Line is one transition as a reader produces it, before it goes into a
// Store. Energies in eV, wavelength in vacuum Å; a weight of 0 is unknown.
type Line struct {
	Wavelength  float64
	LogGF       float64
	Species     Species
	LowerEnergy float64
	LowerG      float32
	// The upper level, when HasUpper, only feeds the level table.
	HasUpper    bool
	UpperEnergy float64
	UpperG      float32
}

// colMap is a resolved mapping: per field, the 0-based column or -1.
type colMap struct {
	col  [numFields]int
	unit [numFields]Unit
	// nfields is the exact field count of every row (our format), or 0 for
	// "at least maxCol+1" (import).
	nfields int
	maxCol  int
}

// Read reads one line-list file into a new Store; see Builder.Read.
func Read(r io.Reader, opts ReadOptions) (*Store, Report, error) {
	b := NewBuilder()
	fr, err := b.Read(r, opts)
	if err != nil {
		return nil, Report{}, err
	}
	s, rep := b.Build()
	rep.Files = []FileReport{fr}
	return s, rep, nil
}

// Read parses one line-list file (our format, or the table described by
// opts.Import; gzip-compressed input is recognised by its magic bytes) and
// adds its lines to b. On error nothing from this file stays in b, and the
// error is a *ParseError naming the line and column and what was expected.
func (b *Builder) Read(r io.Reader, opts ReadOptions) (FileReport, error) {
	mark := b.mark()
	fr, err := b.read(r, opts)
	if err != nil {
		b.rollback(mark)
		return FileReport{}, err
	}
	return fr, nil
}

func (b *Builder) read(r io.Reader, opts ReadOptions) (FileReport, error) {
	fr := FileReport{Name: opts.Name}
	perr := func(line, col int, err error) error {
		return &ParseError{File: opts.Name, Line: line, Column: col, Err: err}
	}
	br, gzipped, closeText, err := openText(r)
	if err != nil {
		return fr, perr(0, 0, err)
	}
	defer closeText()
	if n := inputSize(r); !gzipped && n > 0 {
		// Room for the lines, estimated from the input's size (rows of
		// our format are rarely under 40 bytes); appends grow it if not.
		b.reserve(int(min(n/40, 1<<30)))
	}
	imp := opts.Import
	fileMedium := physics.MediumDefault
	var cm colMap
	haveHeader := false
	comma := false
	fields := make([][]byte, 0, 32)
	lineNo := 0
	fixed := opts.Species
	if imp != nil {
		fixed = imp.Species
		if !imp.HeaderRow {
			var err error
			if cm, fr.Columns, err = resolveImport(imp, nil); err != nil {
				return fr, perr(0, 0, err)
			}
			haveHeader = true
		}
	}
	wantSpecies := speciesSet(opts.Filter.Species)
	medium := physics.MediumDefault
	started := false
	for {
		raw, last, err := nextLine(br, lineNo == 0)
		if err != nil {
			return fr, perr(lineNo+1, 0, err)
		}
		if raw == nil {
			break
		}
		lineNo++
		line := bytes.TrimRight(raw, "\r\n")
		line = bytes.TrimSpace(line)
		if len(line) == 0 {
			if last {
				break
			}
			continue
		}
		if line[0] == '#' {
			if !started {
				if k, v, ok := keyValue(line[1:]); ok {
					if len(fr.Meta) >= maxMetaLines {
						return fr, perr(lineNo, 0, fmt.Errorf("%w: more than %d \"# key: value\" lines", ErrHeader, maxMetaLines))
					}
					fr.Meta = append(fr.Meta, KeyValue{k, v})
					if strings.EqualFold(k, "medium") {
						m, err := physics.ParseMedium(v)
						if err != nil {
							return fr, perr(lineNo, 0, fmt.Errorf("%w: %w", ErrHeader, err))
						}
						fileMedium = m
					}
				}
			}
			if last {
				break
			}
			continue
		}
		if !started {
			// The first row that is not a comment: it fixes the separator
			// and ends the "# key: value" header.
			started = true
			comma = bytes.IndexByte(line, ',') >= 0
			if medium, err = pickMedium(fileMedium, opts, imp); err != nil {
				return fr, perr(lineNo, 0, err)
			}
		}
		if !haveHeader {
			fields, err = splitFields(fields[:0], line, comma)
			if err != nil {
				return fr, perr(lineNo, 0, err)
			}
			names := make([]string, len(fields))
			for i, f := range fields {
				names[i] = string(f)
			}
			var herr error
			if imp != nil {
				cm, fr.Columns, herr = resolveImport(imp, names)
				if herr == nil {
					fr.Ignored = ignoredColumns(names, cm)
				}
			} else {
				cm, fr.Columns, herr = resolveHeader(names, fixed)
			}
			if herr != nil {
				var ce *colError
				if errors.As(herr, &ce) {
					return fr, perr(lineNo, ce.col+1, ce.err)
				}
				return fr, perr(lineNo, 0, herr)
			}
			haveHeader = true
			if last {
				break
			}
			continue
		}
		// The first data row: from here on the rows are parsed in chunks
		// (by opts.Workers goroutines), this one first.
		rp := &rowParser{cm: cm, fixed: fixed, medium: medium, comma: comma, filter: &opts.Filter, want: wantSpecies, name: opts.Name}
		var res chunkResult
		rp.parseLine(line, lineNo, &res)
		if res.err != nil {
			return fr, res.err
		}
		b.addChunk(&res, &fr)
		if last {
			break
		}
		if err := b.readRows(br, lineNo, rp, opts.Name, opts.Workers, &fr); err != nil {
			return fr, err
		}
		break
	}
	if !haveHeader {
		return fr, perr(lineNo, 0, fmt.Errorf("%w: no header row naming the columns (want e.g. \"wavelength_A species log_gf lower_energy_eV\")", ErrHeader))
	}
	if !started {
		var err error
		if medium, err = pickMedium(fileMedium, opts, imp); err != nil {
			return fr, perr(lineNo, 0, err)
		}
	}
	fr.Medium = medium
	return fr, nil
}

// inputSize returns the number of bytes r holds when that is cheap to
// know (an in-memory reader or a regular file), else 0.
func inputSize(r io.Reader) int64 {
	switch v := r.(type) {
	case interface{ Len() int }:
		return int64(v.Len())
	case *os.File:
		if fi, err := v.Stat(); err == nil && fi.Mode().IsRegular() {
			off, _ := v.Seek(0, io.SeekCurrent)
			return fi.Size() - off
		}
	}
	return 0
}

func pickMedium(file physics.Medium, opts ReadOptions, imp *Import) (physics.Medium, error) {
	asked := opts.Medium
	if imp != nil && imp.Medium != physics.MediumDefault {
		asked = imp.Medium
	}
	switch {
	case file != physics.MediumDefault && asked != physics.MediumDefault && file != asked:
		return 0, fmt.Errorf("%w: the file says \"# medium: %v\" but %v was asked for", ErrHeader, file, asked)
	case file != physics.MediumDefault:
		return file, nil
	case asked != physics.MediumDefault:
		return asked, nil
	}
	return physics.Vacuum, nil
}

// keyValue recognises "key: value" after the '#': the key is a word of
// letters, digits, '_', '-' or spaces (at most 40 bytes) before a colon.
func keyValue(s []byte) (string, string, bool) {
	i := bytes.IndexByte(s, ':')
	if i <= 0 || i > 40 {
		return "", "", false
	}
	key := bytes.TrimSpace(s[:i])
	if len(key) == 0 {
		return "", "", false
	}
	for _, c := range key {
		if !(isLetter(c) || c >= '0' && c <= '9' || c == '_' || c == '-' || c == ' ') {
			return "", "", false
		}
	}
	return string(key), string(bytes.TrimSpace(s[i+1:])), true
}

// splitFields splits a row into fields: on runs of spaces and tabs, or on
// commas (fields then trimmed); a field in double quotes may hold the
// separator ("Nd II").
func splitFields(dst [][]byte, line []byte, comma bool) ([][]byte, error) {
	i := 0
	for i < len(line) {
		if !comma {
			for i < len(line) && (line[i] == ' ' || line[i] == '\t') {
				i++
			}
			if i == len(line) {
				break
			}
		} else {
			for i < len(line) && (line[i] == ' ' || line[i] == '\t') {
				i++
			}
		}
		if len(dst) >= maxFields {
			return dst, fmt.Errorf("%w: more than %d fields", ErrFieldCount, maxFields)
		}
		var f []byte
		if i < len(line) && line[i] == '"' {
			j := bytes.IndexByte(line[i+1:], '"')
			if j < 0 {
				return dst, fmt.Errorf("%w: unclosed quote in field %d", ErrSyntax, len(dst)+1)
			}
			f = line[i+1 : i+1+j]
			i += j + 2
			for i < len(line) && (line[i] == ' ' || line[i] == '\t') {
				i++
			}
			if comma {
				if i < len(line) && line[i] != ',' {
					return dst, fmt.Errorf("%w: text after the closing quote in field %d", ErrSyntax, len(dst)+1)
				}
				i++
			}
		} else {
			start := i
			if comma {
				for i < len(line) && line[i] != ',' {
					i++
				}
				f = bytes.TrimSpace(line[start:i])
				i++
			} else {
				for i < len(line) && line[i] != ' ' && line[i] != '\t' {
					i++
				}
				f = line[start:i]
			}
		}
		dst = append(dst, f)
		if comma && i == len(line) && line[len(line)-1] == ',' {
			dst = append(dst, line[len(line):]) // trailing empty field
		}
	}
	return dst, nil
}

// colError marks a header problem in one column.
type colError struct {
	col int
	err error
}

func (e *colError) Error() string { return e.err.Error() }
func (e *colError) Unwrap() error { return e.err }

// resolveHeader maps the header row of our format.
func resolveHeader(names []string, fixed Species) (colMap, []string, error) {
	var cm colMap
	for f := range cm.col {
		cm.col[f] = -1
	}
	cols := make([]string, 0, len(names))
	for i, n := range names {
		f, u, err := parseColumnName(n)
		if err != nil {
			return cm, nil, &colError{i, err}
		}
		if cm.col[f] >= 0 {
			return cm, nil, &colError{i, fmt.Errorf("%w: column %q repeats %s (column %d)", ErrHeader, n, f, cm.col[f]+1)}
		}
		cm.col[f], cm.unit[f] = i, u
		cols = append(cols, n)
	}
	cm.nfields = len(names)
	cm.maxCol = len(names) - 1
	return cm, cols, checkRequired(&cm, fixed)
}

func checkRequired(cm *colMap, fixed Species) error {
	var missing []string
	if cm.col[FieldWavelength] < 0 {
		missing = append(missing, "wavelength_A|wavelength_nm|wavelength_um")
	}
	if cm.col[FieldSpecies] < 0 && fixed == (Species{}) {
		missing = append(missing, "species")
	}
	if cm.col[FieldLogGF] < 0 && cm.col[FieldGF] < 0 {
		missing = append(missing, "log_gf|gf")
	}
	if cm.col[FieldLogGF] >= 0 && cm.col[FieldGF] >= 0 {
		return fmt.Errorf("%w: both log_gf and gf given; keep one", ErrHeader)
	}
	if cm.col[FieldLowerEnergy] < 0 {
		missing = append(missing, "lower_energy_eV|lower_energy_cm-1")
	}
	if cm.col[FieldLowerG] >= 0 && cm.col[FieldLowerJ] >= 0 {
		return fmt.Errorf("%w: both lower_g and lower_j given; keep one", ErrHeader)
	}
	if cm.col[FieldUpperG] >= 0 && cm.col[FieldUpperJ] >= 0 {
		return fmt.Errorf("%w: both upper_g and upper_j given; keep one", ErrHeader)
	}
	if len(missing) > 0 {
		return fmt.Errorf("%w: missing column(s) %s", ErrHeader, strings.Join(missing, ", "))
	}
	if cm.col[FieldSpecies] >= 0 && fixed != (Species{}) {
		return fmt.Errorf("%w: a species for the whole file was given, but the file has a species column", ErrHeader)
	}
	return nil
}

// resolveImport maps the columns of an imported table; names is the header
// row, or nil when the table has none.
func resolveImport(imp *Import, names []string) (colMap, []string, error) {
	var cm colMap
	for f := range cm.col {
		cm.col[f] = -1
	}
	var cols []string
	for _, cs := range imp.Columns {
		if cs.Field <= FieldNone || cs.Field >= numFields {
			return cm, nil, fmt.Errorf("%w: column mapping has an invalid field", ErrHeader)
		}
		if cm.col[cs.Field] >= 0 {
			return cm, nil, fmt.Errorf("%w: column mapping names %s twice", ErrHeader, cs.Field)
		}
		idx := cs.Index
		if cs.Name != "" {
			if names == nil {
				return cm, nil, fmt.Errorf("%w: column %q selected by name, but the table has no header row (select it by number or set the header-row option)", ErrHeader, cs.Name)
			}
			idx = -1
			for i, n := range names {
				if strings.EqualFold(n, cs.Name) {
					idx = i
					break
				}
			}
			if idx < 0 {
				return cm, nil, fmt.Errorf("%w: no column named %q in the header row (%s)", ErrHeader, cs.Name, strings.Join(names, " "))
			}
		}
		if idx < 0 || idx >= maxFields {
			return cm, nil, fmt.Errorf("%w: column number %d out of 1–%d", ErrHeader, idx+1, maxFields)
		}
		if names != nil && idx >= len(names) {
			return cm, nil, fmt.Errorf("%w: column %d for %s, but the header row has %d columns", ErrHeader, idx+1, cs.Field, len(names))
		}
		if u := fieldUnits(cs.Field); u != nil && !unitAllowed(cs.Field, cs.Unit) {
			return cm, nil, fmt.Errorf("%w: %s needs a unit, one of %s", ErrHeader, cs.Field, unitList(cs.Field))
		}
		cm.col[cs.Field], cm.unit[cs.Field] = idx, cs.Unit
		if idx > cm.maxCol {
			cm.maxCol = idx
		}
		name := cs.Field.String()
		if cs.Unit != UnitNone {
			name += "_" + cs.Unit.String()
		}
		cols = append(cols, name)
	}
	return cm, cols, checkRequired(&cm, imp.Species)
}

func ignoredColumns(names []string, cm colMap) []string {
	used := map[int]bool{}
	for _, c := range cm.col {
		if c >= 0 {
			used[c] = true
		}
	}
	var out []string
	for i, n := range names {
		if !used[i] {
			out = append(out, n)
		}
	}
	return out
}

// parseRow converts one row; on error it returns the 0-based column.
func parseRow(fields [][]byte, cm *colMap, fixed Species, sc *speciesCache) (Line, int, error) {
	var l Line
	c := cm.col[FieldWavelength]
	w, ok := parseFloat(fields[c])
	if !ok {
		return l, c, numErr(fields[c], "a wavelength")
	}
	w *= cm.unit[FieldWavelength].factor()
	if !(w > 0) || !isFinite(w) {
		return l, c, fmt.Errorf("%w: wavelength %q: want a finite number > 0", ErrRange, fields[c])
	}
	if w < minWavelengthA || w > maxWavelengthA {
		return l, c, fmt.Errorf("%w: wavelength %q (%g Å): want %g Å to %g Å", ErrRange, truncate(fields[c]), w, minWavelengthA, maxWavelengthA)
	}
	l.Wavelength = w
	if c = cm.col[FieldSpecies]; c >= 0 {
		sp, err := sc.parse(fields[c])
		if err != nil {
			return l, c, err
		}
		l.Species = sp
	} else {
		l.Species = fixed
	}
	if c = cm.col[FieldLogGF]; c >= 0 {
		v, ok := parseFloat(fields[c])
		if !ok {
			return l, c, numErr(fields[c], "log gf")
		}
		if !isFinite(v) {
			return l, c, fmt.Errorf("%w: log gf %q: want a finite number", ErrRange, fields[c])
		}
		if v < minLogGF || v > maxLogGF {
			return l, c, fmt.Errorf("%w: log gf %q: want %g to %+g", ErrRange, truncate(fields[c]), minLogGF, maxLogGF)
		}
		l.LogGF = v
	} else {
		c = cm.col[FieldGF]
		v, ok := parseFloat(fields[c])
		if !ok {
			return l, c, numErr(fields[c], "gf")
		}
		if !(v > 0) || !isFinite(v) {
			return l, c, fmt.Errorf("%w: gf %q: want a finite number > 0", ErrRange, fields[c])
		}
		if lg := math.Log10(v); lg < minLogGF || lg > maxLogGF {
			return l, c, fmt.Errorf("%w: gf %q: want 1e%g to 1e%g (log gf %g to %+g)", ErrRange, truncate(fields[c]), minLogGF, maxLogGF, minLogGF, maxLogGF)
		}
		l.LogGF = math.Log10(v)
	}
	c = cm.col[FieldLowerEnergy]
	e, err := parseEnergy(fields[c], cm.unit[FieldLowerEnergy], "lower level energy")
	if err != nil {
		return l, c, err
	}
	if lim, why := lowerEnergyLimit(l.Species); e > lim {
		return l, c, fmt.Errorf("%w: lower level energy %q (%.4g eV): want 0 to %.4g eV (%s); a level above the limit is not bound", ErrRange, truncate(fields[c]), e, lim, why)
	}
	l.LowerEnergy = e
	if g, col, err := parseWeight(fields, cm, FieldLowerG, FieldLowerJ, "lower"); err != nil {
		return l, col, err
	} else {
		l.LowerG = g
	}
	if c = cm.col[FieldUpperEnergy]; c >= 0 && !isMissing(fields[c]) {
		e, err := parseEnergy(fields[c], cm.unit[FieldUpperEnergy], "upper level energy")
		if err != nil {
			return l, c, err
		}
		if lim := upperEnergyLimit(l.Species); e > lim {
			return l, c, fmt.Errorf("%w: upper level energy %q (%.4g eV): want 0 to %.4g eV for %v (twice its ionisation energy, at least %g eV)", ErrRange, truncate(fields[c]), e, lim, l.Species, genericLevelLimit)
		}
		l.HasUpper, l.UpperEnergy = true, e
		g, col, err := parseWeight(fields, cm, FieldUpperG, FieldUpperJ, "upper")
		if err != nil {
			return l, col, err
		}
		l.UpperG = g
	}
	return l, -1, nil
}

func parseEnergy(b []byte, u Unit, what string) (float64, error) {
	e, ok := parseFloat(b)
	if !ok {
		return 0, numErr(b, "a "+what)
	}
	e *= u.factor()
	if !(e >= 0) || !(e <= maxLevelEnergy) {
		return 0, fmt.Errorf("%w: %s %q: want a finite number ≥ 0 (and below %g eV)", ErrRange, what, b, maxLevelEnergy)
	}
	return e, nil
}

// parseWeight reads g or J (g = 2J+1); "-" or an absent column means unknown.
func parseWeight(fields [][]byte, cm *colMap, fg, fj Field, which string) (float32, int, error) {
	if c := cm.col[fg]; c >= 0 {
		if isMissing(fields[c]) {
			return 0, -1, nil
		}
		g, ok := parseFloat(fields[c])
		if !ok {
			return 0, c, numErr(fields[c], "a "+which+" level weight g")
		}
		if !(g >= 1) || g > maxReadG || math.Abs(g-math.Round(g)) > 1e-6 {
			return 0, c, fmt.Errorf("%w: %s level weight %q: want a whole number g = 2J+1 from 1 to %d", ErrRange, which, truncate(fields[c]), maxReadG)
		}
		return float32(math.Round(g)), -1, nil
	}
	if c := cm.col[fj]; c >= 0 {
		if isMissing(fields[c]) {
			return 0, -1, nil
		}
		j, ok := parseFloat(fields[c])
		if !ok {
			return 0, c, numErr(fields[c], "a "+which+" level J")
		}
		if !(j >= 0) || 2*j+1 > maxReadG || math.Abs(2*j-math.Round(2*j)) > 1e-6 {
			return 0, c, fmt.Errorf("%w: %s level J %q: want a whole or half-whole number from 0 to %g", ErrRange, which, truncate(fields[c]), float64(maxReadG-1)/2)
		}
		return float32(math.Round(2*j) + 1), -1, nil
	}
	return 0, -1, nil
}

func isMissing(b []byte) bool { return len(b) == 1 && b[0] == '-' }

func numErr(b []byte, what string) error {
	if len(b) == 0 {
		return fmt.Errorf("%w: empty field: want %s", ErrSyntax, what)
	}
	return fmt.Errorf("%w: %q is not a number: want %s", ErrSyntax, truncate(b), what)
}

func truncate(b []byte) string {
	if len(b) > 40 {
		return string(b[:40]) + "…"
	}
	return string(b)
}

// parseFloat parses b without copying it. The strconv error, which would
// hold the transient string, is dropped.
func parseFloat(b []byte) (float64, bool) {
	if len(b) == 0 || len(b) > 64 {
		return 0, false
	}
	v, err := strconv.ParseFloat(unsafe.String(&b[0], len(b)), 64)
	if err != nil {
		var ne *strconv.NumError
		if errors.As(err, &ne) && ne.Err == strconv.ErrRange {
			return v, true // ±Inf or 0; range checks follow
		}
		return 0, false
	}
	return v, true
}

// speciesCache remembers parsed species strings (files repeat them).
type speciesCache struct {
	last    []byte
	lastSp  Species
	known   map[string]Species
	lastSet bool
}

func (c *speciesCache) parse(b []byte) (Species, error) {
	if c.lastSet && bytes.Equal(b, c.last) {
		return c.lastSp, nil
	}
	if sp, ok := c.known[string(b)]; ok {
		c.last, c.lastSp = append(c.last[:0], b...), sp
		return sp, nil
	}
	sp, err := ParseSpecies(string(b))
	if err != nil {
		return sp, err
	}
	if c.known == nil {
		c.known = map[string]Species{}
	}
	if len(c.known) < 4096 {
		c.known[string(b)] = sp
	}
	c.last, c.lastSp, c.lastSet = append(c.last[:0], b...), sp, true
	return sp, nil
}

func speciesSet(list []Species) map[Species]bool {
	if len(list) == 0 {
		return nil
	}
	m := make(map[Species]bool, len(list))
	for _, s := range list {
		m[s] = true
	}
	return m
}

// nextLine reads the next line from br, whose buffer (maxLineLength) bounds
// the line's length. It returns the raw line, nil at the end of the input,
// and whether it is the last line; first removes a byte-order mark some
// editors write. A line that is too long, compressed data that are damaged
// or a failing reader give a cause error for the caller to place.
func nextLine(br *bufio.Reader, first bool) (raw []byte, last bool, err error) {
	raw, err = br.ReadSlice('\n')
	switch {
	case err == nil:
	case err == io.EOF:
		if len(raw) == 0 {
			return nil, true, nil
		}
		last = true
	case errors.Is(err, bufio.ErrBufferFull):
		return nil, false, fmt.Errorf("%w: longer than %d bytes", ErrTooLong, maxLineLength)
	case errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, gzip.ErrChecksum) || errors.Is(err, gzip.ErrHeader):
		return nil, false, fmt.Errorf("%w: compressed data: %v", ErrSyntax, err)
	default:
		return nil, false, fmt.Errorf("reading: %w", err)
	}
	if first {
		raw = bytes.TrimPrefix(raw, utf8BOM)
	}
	return raw, last, nil
}

// openText returns a reader of r's text, decompressing gzip input
// (recognised by its magic bytes), and a function that releases it.
func openText(r io.Reader) (br *bufio.Reader, gzipped bool, closeFn func(), err error) {
	br = bufio.NewReaderSize(r, maxLineLength)
	if magic, _ := br.Peek(2); len(magic) == 2 && magic[0] == 0x1f && magic[1] == 0x8b {
		zr, err := gzip.NewReader(br)
		if err != nil {
			return nil, true, nil, fmt.Errorf("%w: gzip header: %v", ErrSyntax, err)
		}
		return bufio.NewReaderSize(zr, maxLineLength), true, func() { zr.Close() }, nil
	}
	return br, false, func() {}, nil
}
