package linelists

import "fmt"

// Physical ranges the readers accept. A value outside them is far more
// likely a slip (a gf in a log gf column, energies in the wrong unit, a
// corrupted number such as 1e308) than a real transition, so the row is
// rejected with ErrRange, the file and line, and the range expected; the
// file then adds nothing. The bounds are generous on purpose (common
// practice: wide enough for every atomic line list we know of, narrow
// enough to catch unit and column mistakes):
//
//   - wavelength (vacuum, after the unit is applied): 10 Å … 10⁷ Å (1 mm),
//     from the soft X-ray to the far infrared;
//   - log gf: −15 … +3. The strongest atomic lines have gf of a few tens
//     (log gf ≲ +2, e.g. resonance lines of heavy atoms with large g);
//     computed lists reach log gf ≈ −10 for forbidden and intercombination
//     lines, below which a line has no effect on an expansion opacity;
//   - lower level energy: 0 up to the ionisation energy of the line's
//     species (the element table's value, NIST ASD) plus 1 eV for the
//     uncertain third- and fourth-stage values; a level above the limit
//     is not bound and has no LTE population to speak of. When the table
//     has no ionisation energy for the stage, 100 eV;
//   - upper level energy: 0 up to twice that limit (at least 100 eV):
//     computed lists include autoionising upper levels above the limit;
//   - statistical weight g = 2J+1: a whole number 1 … 100 (J a whole or
//     half-whole number 0 … 49.5); atomic levels have J ≲ 20 (from memory
//     of the NIST level tables).
//
// The same energy and weight bounds apply to levels files.
const (
	minWavelengthA = 10.0
	maxWavelengthA = 1e7
	minLogGF       = -15.0
	maxLogGF       = 3.0
	// genericLevelLimit bounds level energies (eV) of a stage without a
	// tabulated ionisation energy.
	genericLevelLimit = 100.0
	// ionisationMargin (eV) is added to the tabulated ionisation energy.
	ionisationMargin = 1.0
	maxReadG         = 100
)

// lowerEnergyLimit returns the highest lower-level (or levels-file) energy
// in eV accepted for sp, and the reason, for messages.
func lowerEnergyLimit(sp Species) (float64, string) {
	if sp.Z > 0 && int(sp.Z) < len(elements) && sp.Charge < 4 {
		if ie := elements[sp.Z].Ionization[sp.Charge]; ie > 0 {
			return ie + ionisationMargin, fmt.Sprintf("the ionisation energy of %v, %.4g eV, plus %g eV", sp, ie, ionisationMargin)
		}
	}
	return genericLevelLimit, fmt.Sprintf("%g eV (no ionisation energy of %v in the element table)", genericLevelLimit, sp)
}

// upperEnergyLimit returns the highest upper-level energy in eV accepted
// for sp.
func upperEnergyLimit(sp Species) float64 {
	if sp.Z > 0 && int(sp.Z) < len(elements) && sp.Charge < 4 {
		if ie := elements[sp.Z].Ionization[sp.Charge]; ie > 0 {
			return max(2*ie, genericLevelLimit)
		}
	}
	return genericLevelLimit
}
