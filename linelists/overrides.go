package linelists

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"strings"
)

// Overrides are a user's corrections to the element table: ionisation
// energies and ground-level weights per species. A nil *Overrides is valid
// and changes nothing. The package's own table is never modified.
type Overrides struct {
	// Ionization[sp] is the energy in eV to ionise sp (sp → next stage).
	Ionization map[Species]float64
	// GroundG[sp] is the statistical weight of the ground level of sp.
	GroundG map[Species]float64
}

// maxOverrides bounds the rows of an overrides file.
const maxOverrides = 10000

// ReadOverrides reads an overrides file: "#" comments, a header row naming
// the columns species, ionization_eV and/or ground_g (any order,
// whitespace- or comma-separated), then one species per row; "-" leaves a
// value as the table has it. Ionisation energies are for stages I→II to
// IV→V (the stages the element table holds), in eV, > 0; ground weights
// are whole numbers ≥ 1. Errors are *ParseError.
func ReadOverrides(r io.Reader, name string) (*Overrides, error) {
	o := &Overrides{Ionization: map[Species]float64{}, GroundG: map[Species]float64{}}
	perr := func(line, col int, err error) error {
		return &ParseError{File: name, Line: line, Column: col, Err: err}
	}
	br, _, closeText, err := openText(r)
	if err != nil {
		return nil, perr(0, 0, err)
	}
	defer closeText()
	colSp, colI, colG := -1, -1, -1
	nf := 0
	comma := false
	lineNo, rows := 0, 0
	var fields [][]byte
	for {
		raw, last, err := nextLine(br, lineNo == 0)
		if err != nil {
			return nil, perr(lineNo+1, 0, err)
		}
		if raw == nil {
			break
		}
		lineNo++
		line := bytes.TrimSpace(raw)
		if len(line) > 0 && line[0] != '#' {
			if nf == 0 {
				comma = bytes.IndexByte(line, ',') >= 0
			}
			var serr error
			fields, serr = splitFields(fields[:0], line, comma)
			if serr != nil {
				return nil, perr(lineNo, 0, serr)
			}
			if nf == 0 {
				for i, f := range fields {
					switch strings.ToLower(string(f)) {
					case "species":
						colSp = i
					case "ionization_ev", "ionisation_ev":
						colI = i
					case "ground_g":
						colG = i
					default:
						return nil, perr(lineNo, i+1, fmt.Errorf("%w: unknown column %q (want species, ionization_eV, ground_g)", ErrHeader, f))
					}
				}
				if colSp < 0 || colI < 0 && colG < 0 {
					return nil, perr(lineNo, 0, fmt.Errorf("%w: want a species column and ionization_eV and/or ground_g", ErrHeader))
				}
				nf = len(fields)
			} else {
				if len(fields) != nf {
					return nil, perr(lineNo, 0, fmt.Errorf("%w: %d fields, the header names %d", ErrFieldCount, len(fields), nf))
				}
				if rows++; rows > maxOverrides {
					return nil, perr(lineNo, 0, fmt.Errorf("%w: more than %d rows", ErrRange, maxOverrides))
				}
				sp, serr := ParseSpecies(string(fields[colSp]))
				if serr != nil {
					return nil, perr(lineNo, colSp+1, serr)
				}
				if colI >= 0 && !isMissing(fields[colI]) {
					v, ok := parseFloat(fields[colI])
					switch {
					case !ok:
						return nil, perr(lineNo, colI+1, numErr(fields[colI], "an ionisation energy in eV or -"))
					case !(v > 0) || v > maxLevelEnergy:
						return nil, perr(lineNo, colI+1, fmt.Errorf("%w: ionisation energy %q: want a number > 0 eV", ErrRange, fields[colI]))
					case sp.Charge > 3 || sp.Charge >= sp.Z:
						return nil, perr(lineNo, colSp+1, fmt.Errorf("%w: %v: ionisation energies can be set for stages I to IV of an ion with electrons", ErrRange, sp))
					}
					o.Ionization[sp] = v
				}
				if colG >= 0 && !isMissing(fields[colG]) {
					g, ok := parseFloat(fields[colG])
					if !ok || !(g >= 1) || g > maxReadG || math.Abs(g-math.Round(g)) > 1e-6 {
						return nil, perr(lineNo, colG+1, fmt.Errorf("%w: ground weight %q: want a whole number g = 2J+1 from 1 to %d", ErrRange, truncate(fields[colG]), maxReadG))
					}
					o.GroundG[sp] = math.Round(g)
				}
			}
		}
		if last {
			break
		}
	}
	if nf == 0 {
		return nil, perr(lineNo, 0, fmt.Errorf("%w: no header row (want e.g. \"species ionization_eV ground_g\")", ErrHeader))
	}
	return o, nil
}

// Element returns element z from the table with the overrides applied.
func (o *Overrides) Element(z int) (Element, error) {
	e, err := ElementByZ(z)
	if err != nil {
		return Element{}, err
	}
	out := *e
	if o == nil {
		return out, nil
	}
	for c := 0; c < len(out.Ionization); c++ {
		if v, ok := o.Ionization[Species{Z: uint8(z), Charge: uint8(c)}]; ok {
			out.Ionization[c] = v
		}
	}
	for c := 0; c < len(out.GroundG); c++ {
		if g, ok := o.GroundG[Species{Z: uint8(z), Charge: uint8(c)}]; ok {
			out.GroundG[c] = float32(g)
		}
	}
	return out, nil
}

// GroundWeight is the package-level GroundWeight with the overrides
// applied.
func (o *Overrides) GroundWeight(sp Species) (float64, bool) {
	if o != nil && int(sp.Charge) < int(sp.Z) {
		if g, ok := o.GroundG[sp]; ok {
			return g, true
		}
	}
	return GroundWeight(sp)
}
