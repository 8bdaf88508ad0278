package linelists

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"math"
	"strings"
)

// LevelsOptions controls ReadLevels.
type LevelsOptions struct {
	// Name is the file name used in errors and reports.
	Name string
	// Species, when not the zero value, is the species of every level; the
	// file then needs no species column.
	Species Species
}

// LevelsReport says what reading a levels file did.
type LevelsReport struct {
	Name    string
	Meta    []KeyValue
	Rows    int       // levels read
	Species []Species // species that got levels, in order of appearance
}

// ReadLevels reads a levels file and adds its levels to b. The format
// follows the line-list format: "#" comments, optional "# key: value"
// lines, a header row, then one level per row, whitespace- or
// comma-separated, any column order, gzip recognised. Columns:
//
//	species                      (unless opts.Species is set)
//	energy_eV | energy_cm-1      above the ion's ground level, ≥ 0
//	g | j                        g = 2J+1 ≥ 1, or J, whole or half-whole
//
// Unknown columns are an error. On error nothing is added to b.
func (b *Builder) ReadLevels(r io.Reader, opts LevelsOptions) (LevelsReport, error) {
	rep := LevelsReport{Name: opts.Name}
	perr := func(line, col int, err error) error {
		return &ParseError{File: opts.Name, Line: line, Column: col, Err: err}
	}
	br, _, closeText, err := openText(r)
	if err != nil {
		return rep, perr(0, 0, err)
	}
	defer closeText()
	type lv struct {
		sp Species
		e  float64
		g  float32
	}
	var levels []lv
	colSp, colE, colG, colJ := -1, -1, -1, -1
	eUnit := UnitEV
	nfields := 0
	comma := false
	fields := make([][]byte, 0, 8)
	var sc speciesCache
	seen := map[Species]bool{}
	lineNo := 0
	started := false
	for {
		raw, last, err := nextLine(br, lineNo == 0)
		if err != nil {
			return rep, perr(lineNo+1, 0, err)
		}
		if raw == nil {
			break
		}
		lineNo++
		line := bytes.TrimSpace(raw)
		switch {
		case len(line) == 0:
		case line[0] == '#':
			if !started {
				if k, v, ok := keyValue(line[1:]); ok && len(rep.Meta) < maxMetaLines {
					rep.Meta = append(rep.Meta, KeyValue{k, v})
				}
			}
		case !started:
			started = true
			comma = bytes.IndexByte(line, ',') >= 0
			fields, err = splitFields(fields[:0], line, comma)
			if err != nil {
				return rep, perr(lineNo, 0, err)
			}
			for i, f := range fields {
				name := strings.ToLower(string(f))
				var dup bool
				switch name {
				case "species":
					dup, colSp = colSp >= 0, i
				case "energy_ev":
					dup, colE, eUnit = colE >= 0, i, UnitEV
				case "energy_cm-1":
					dup, colE, eUnit = colE >= 0, i, UnitInvCm
				case "g":
					dup, colG = colG >= 0, i
				case "j":
					dup, colJ = colJ >= 0, i
				default:
					return rep, perr(lineNo, i+1, fmt.Errorf("%w: unknown column %q in a levels file (want species, energy_eV|energy_cm-1, g|j)", ErrHeader, f))
				}
				if dup {
					return rep, perr(lineNo, i+1, fmt.Errorf("%w: column %q repeats an earlier one", ErrHeader, f))
				}
			}
			nfields = len(fields)
			switch {
			case colE < 0:
				return rep, perr(lineNo, 0, fmt.Errorf("%w: missing column energy_eV|energy_cm-1", ErrHeader))
			case colG < 0 && colJ < 0:
				return rep, perr(lineNo, 0, fmt.Errorf("%w: missing column g|j", ErrHeader))
			case colG >= 0 && colJ >= 0:
				return rep, perr(lineNo, 0, fmt.Errorf("%w: both g and j given; keep one", ErrHeader))
			case colSp < 0 && opts.Species == (Species{}):
				return rep, perr(lineNo, 0, fmt.Errorf("%w: missing column species (or give one species for the whole file)", ErrHeader))
			case colSp >= 0 && opts.Species != (Species{}):
				return rep, perr(lineNo, 0, fmt.Errorf("%w: a species for the whole file was given, but the file has a species column", ErrHeader))
			}
		default:
			fields, err = splitFields(fields[:0], line, comma)
			if err != nil {
				return rep, perr(lineNo, 0, err)
			}
			if len(fields) != nfields {
				return rep, perr(lineNo, 0, fmt.Errorf("%w: %d fields, the header names %d", ErrFieldCount, len(fields), nfields))
			}
			l := lv{sp: opts.Species}
			if colSp >= 0 {
				sp, err := sc.parse(fields[colSp])
				if err != nil {
					return rep, perr(lineNo, colSp+1, err)
				}
				l.sp = sp
			}
			e, perr2 := parseEnergy(fields[colE], eUnit, "level energy")
			if perr2 != nil {
				return rep, perr(lineNo, colE+1, perr2)
			}
			if lim, why := lowerEnergyLimit(l.sp); e > lim {
				return rep, perr(lineNo, colE+1, fmt.Errorf("%w: level energy %q (%.4g eV): want 0 to %.4g eV (%s); a level above the limit is not bound", ErrRange, truncate(fields[colE]), e, lim, why))
			}
			l.e = e
			if colG >= 0 {
				g, ok := parseFloat(fields[colG])
				if !ok || !(g >= 1) || g > maxReadG || math.Abs(g-math.Round(g)) > 1e-6 {
					return rep, perr(lineNo, colG+1, fmt.Errorf("%w: weight %q: want a whole number g = 2J+1 from 1 to %d", ErrRange, truncate(fields[colG]), maxReadG))
				}
				l.g = float32(math.Round(g))
			} else {
				j, ok := parseFloat(fields[colJ])
				if !ok || !(j >= 0) || 2*j+1 > maxReadG || math.Abs(2*j-math.Round(2*j)) > 1e-6 {
					return rep, perr(lineNo, colJ+1, fmt.Errorf("%w: J %q: want a whole or half-whole number from 0 to %g", ErrRange, truncate(fields[colJ]), float64(maxReadG-1)/2))
				}
				l.g = float32(math.Round(2*j) + 1)
			}
			levels = append(levels, l)
			if !seen[l.sp] {
				seen[l.sp] = true
				rep.Species = append(rep.Species, l.sp)
			}
		}
		if last {
			break
		}
	}
	if !started {
		return rep, perr(lineNo, 0, fmt.Errorf("%w: no header row (want e.g. \"species energy_eV g\")", ErrHeader))
	}
	for _, l := range levels {
		b.AddLevel(l.sp, l.e, l.g)
	}
	rep.Rows = len(levels)
	return rep, nil
}

// WriteLevels writes the levels of s for the species in want (all when
// want is empty) in the levels-file format, energies in eV.
func WriteLevels(w io.Writer, s *Store, want []Species, comments []string) error {
	bw := bufio.NewWriter(w)
	for _, c := range comments {
		for _, l := range strings.Split(c, "\n") {
			fmt.Fprintf(bw, "# %s\n", l)
		}
	}
	bw.WriteString("species energy_eV g\n")
	set := speciesSet(want)
	for i := range s.Levels.Energy {
		sp := s.SpeciesTable[s.Levels.Species[i]]
		if set != nil && !set[sp] || s.Levels.G[i] <= 0 {
			continue
		}
		fmt.Fprintf(bw, "%s %.6f %g\n", strings.ReplaceAll(sp.String(), " ", "_"), s.Levels.Energy[i], s.Levels.G[i])
	}
	return bw.Flush()
}
