package linelists

import (
	"fmt"
	"strconv"
	"strings"

	"broadline/physics"
)

// Field is a quantity a line-list column can hold.
type Field uint8

// The fields a line can carry. Wavelength, species (unless given for the
// whole file), log gf or gf, and the lower level energy are required.
const (
	FieldNone Field = iota
	FieldWavelength
	FieldSpecies
	FieldLogGF
	FieldGF
	FieldLowerEnergy
	FieldLowerG
	FieldLowerJ
	FieldUpperEnergy
	FieldUpperG
	FieldUpperJ
	numFields
)

var fieldNames = [numFields]string{"", "wavelength", "species", "log_gf", "gf", "lower_energy", "lower_g", "lower_j", "upper_energy", "upper_g", "upper_j"}

func (f Field) String() string {
	if f < numFields && f != FieldNone {
		return fieldNames[f]
	}
	return fmt.Sprintf("Field(%d)", uint8(f))
}

// Unit is the unit of a column; it is part of the column name in our format
// ("wavelength_nm") so that a reader never guesses.
type Unit uint8

// Units of wavelength and energy columns. UnitNone is for dimensionless
// columns (species, log gf, gf, g, J).
const (
	UnitNone Unit = iota
	UnitAngstrom
	UnitNanometre
	UnitMicron
	UnitEV
	UnitInvCm
)

var unitNames = []string{"", "A", "nm", "um", "eV", "cm-1"}

func (u Unit) String() string {
	if int(u) < len(unitNames) {
		return unitNames[u]
	}
	return fmt.Sprintf("Unit(%d)", uint8(u))
}

// factor converts a value in u to Å (wavelengths) or eV (energies).
func (u Unit) factor() float64 {
	switch u {
	case UnitNanometre:
		return 10
	case UnitMicron:
		return 1e4
	case UnitInvCm:
		return physics.InvCmToEV
	}
	return 1
}

// parseUnit reads a unit suffix; several spellings are accepted.
func parseUnit(s string) (Unit, bool) {
	switch strings.ToLower(s) {
	case "a", "aa", "å", "angstrom", "ang":
		return UnitAngstrom, true
	case "nm":
		return UnitNanometre, true
	case "um", "µm", "μm", "micron":
		return UnitMicron, true
	case "ev":
		return UnitEV, true
	case "cm-1", "cm^-1", "1/cm", "invcm":
		return UnitInvCm, true
	}
	return UnitNone, false
}

// fieldUnits lists which units each field takes (nil: dimensionless).
func fieldUnits(f Field) []Unit {
	switch f {
	case FieldWavelength:
		return []Unit{UnitAngstrom, UnitNanometre, UnitMicron}
	case FieldLowerEnergy, FieldUpperEnergy:
		return []Unit{UnitEV, UnitInvCm}
	}
	return nil
}

// knownColumns is the list of column names of our format, for messages.
const knownColumns = "wavelength_A|wavelength_nm|wavelength_um, species, log_gf|gf, " +
	"lower_energy_eV|lower_energy_cm-1, lower_g|lower_j, upper_energy_eV|upper_energy_cm-1, upper_g|upper_j"

// parseColumnName reads a header name of our format, e.g. "wavelength_nm".
func parseColumnName(name string) (Field, Unit, error) {
	n := strings.ToLower(name)
	for f := FieldWavelength; f < numFields; f++ {
		base := fieldNames[f]
		units := fieldUnits(f)
		if units == nil {
			if n == base {
				return f, UnitNone, nil
			}
			continue
		}
		if !strings.HasPrefix(n, base) {
			continue
		}
		rest := n[len(base):]
		if rest == "" {
			return FieldNone, UnitNone, fmt.Errorf("%w: column %q has no unit suffix (want e.g. %s_%s)", ErrHeader, name, base, units[0])
		}
		if rest[0] != '_' {
			continue
		}
		u, ok := parseUnit(rest[1:])
		if !ok || !unitAllowed(f, u) {
			return FieldNone, UnitNone, fmt.Errorf("%w: column %q has an unknown unit %q for %s (want one of %s)", ErrHeader, name, rest[1:], base, unitList(f))
		}
		return f, u, nil
	}
	return FieldNone, UnitNone, fmt.Errorf("%w: unknown column %q (our format knows %s; to read a file with other columns use the import path, which ignores unmapped columns)", ErrHeader, name, knownColumns)
}

func unitAllowed(f Field, u Unit) bool {
	for _, x := range fieldUnits(f) {
		if x == u {
			return true
		}
	}
	return false
}

func unitList(f Field) string {
	var s []string
	for _, u := range fieldUnits(f) {
		s = append(s, u.String())
	}
	return strings.Join(s, ", ")
}

// ColumnSpec maps one input column to a field, for the import path.
type ColumnSpec struct {
	Field Field
	Unit  Unit // required for wavelength and energy fields
	// Index is the 0-based column number; used when Name is empty.
	Index int
	// Name selects the column by its header name (the file must then have
	// a header row; see Import.HeaderRow).
	Name string
}

// Import describes an arbitrary whitespace- or comma-separated table: which
// column holds what, in which unit. Columns not mapped are ignored and
// named in the report.
type Import struct {
	Columns []ColumnSpec
	// Species, when not the zero value, is the species of every line; the
	// table then needs no species column.
	Species Species
	// Medium of the wavelengths (vacuum unless the file's "# medium:" says
	// otherwise, or this is set).
	Medium physics.Medium
	// HeaderRow says that the first non-comment row names the columns (it
	// is then skipped). Required when a column is selected by Name.
	HeaderRow bool
}

// ParseColumnMap reads a column mapping such as
//
//	wavelength=1:nm,species=2,log_gf=3,lower_energy=4:cm-1,lower_j=5
//
// Each item is field=column[:unit]; the column is a 1-based number or a
// header name. Fields are those of our format without the unit suffix
// (wavelength, species, log_gf, gf, lower_energy, lower_g, lower_j,
// upper_energy, upper_g, upper_j).
func ParseColumnMap(s string) ([]ColumnSpec, error) {
	var out []ColumnSpec
	seen := map[Field]bool{}
	for _, item := range strings.Split(s, ",") {
		item = strings.TrimSpace(item)
		if item == "" {
			continue
		}
		k, v, ok := strings.Cut(item, "=")
		if !ok {
			return nil, fmt.Errorf("%w: column mapping item %q: want field=column[:unit], e.g. wavelength=1:nm", ErrHeader, item)
		}
		f := FieldNone
		for x := FieldWavelength; x < numFields; x++ {
			if strings.EqualFold(strings.TrimSpace(k), fieldNames[x]) {
				f = x
			}
		}
		if f == FieldNone {
			return nil, fmt.Errorf("%w: column mapping item %q: unknown field %q (want one of %s)", ErrHeader, item, k, strings.Join(fieldNames[1:], ", "))
		}
		if seen[f] {
			return nil, fmt.Errorf("%w: column mapping names %s twice", ErrHeader, f)
		}
		seen[f] = true
		col, unit, hasUnit := strings.Cut(strings.TrimSpace(v), ":")
		cs := ColumnSpec{Field: f}
		if n, err := strconv.Atoi(col); err == nil {
			if n < 1 || n > maxFields {
				return nil, fmt.Errorf("%w: column mapping item %q: column number %d out of 1–%d", ErrHeader, item, n, maxFields)
			}
			cs.Index = n - 1
		} else if col != "" {
			cs.Name = col
		} else {
			return nil, fmt.Errorf("%w: column mapping item %q: no column given", ErrHeader, item)
		}
		if units := fieldUnits(f); units != nil {
			if !hasUnit {
				return nil, fmt.Errorf("%w: column mapping item %q: %s needs a unit (one of %s), e.g. %s=%s:%s", ErrHeader, item, f, unitList(f), f, col, units[0])
			}
			u, ok := parseUnit(unit)
			if !ok || !unitAllowed(f, u) {
				return nil, fmt.Errorf("%w: column mapping item %q: unit %q not one of %s", ErrHeader, item, unit, unitList(f))
			}
			cs.Unit = u
		} else if hasUnit {
			return nil, fmt.Errorf("%w: column mapping item %q: %s takes no unit", ErrHeader, item, f)
		}
		out = append(out, cs)
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("%w: empty column mapping", ErrHeader)
	}
	return out, nil
}
