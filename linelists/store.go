package linelists

// Store is a compact, struct-of-arrays line list sorted by wavelength. The
// per-line slices all have the same length; Lower indexes Levels, so that a
// Boltzmann factor can be computed once per level rather than once per line.
type Store struct {
	// Per line, sorted by Wavelength ascending.
	Wavelength []float64 // vacuum wavelength, Å
	LogGF      []float32 // log10(g_lower · f)
	Species    []uint16  // index into SpeciesTable
	Lower      []uint32  // index of the lower level into Levels

	// SpeciesTable lists the distinct species the lines belong to.
	SpeciesTable []Species
	// Levels lists the distinct levels: the lower levels of the lines, and
	// any other levels known for the species (upper levels, a levels file).
	Levels LevelTable
	// LevelOrigin[i] says where the levels of SpeciesTable[i] came from;
	// it may be nil (then levels present count as LineLevels).
	LevelOrigin []LevelSource
	// Overrides, when not nil, are the user's corrections to ionisation
	// energies and ground weights (see ReadOverrides). They apply to the
	// ground-weight fallback of PartitionFunction and to Element.
	Overrides *Overrides

	// levelStart[i] is the first level of species i when Levels is grouped
	// by species (levelStart has len(SpeciesTable)+1 entries); nil
	// otherwise, and then the level table is scanned.
	levelStart []uint32
}

// LevelTable is a struct-of-arrays table of energy levels.
type LevelTable struct {
	Species []uint16  // index into the owning Store's SpeciesTable
	Energy  []float64 // excitation energy above the ion's ground level, eV
	G       []float32 // statistical weight 2J+1
}

// Len returns the number of lines.
func (s *Store) Len() int { return len(s.Wavelength) }

// GroundWeight returns the statistical weight of the ground level of sp, and
// whether it is known. A bare nucleus (Charge ≥ Z) has weight 1.
func GroundWeight(sp Species) (g float64, known bool) {
	if int(sp.Charge) >= int(sp.Z) {
		return 1, true
	}
	e, err := ElementByZ(int(sp.Z))
	if err != nil || int(sp.Charge) >= len(e.GroundG) || e.GroundG[sp.Charge] == 0 {
		return 1, false
	}
	return float64(e.GroundG[sp.Charge]), true
}

// Element returns element z with the store's overrides applied; physics
// code should read ionisation energies through it so that a user's
// corrections count.
func (s *Store) Element(z int) (Element, error) { return s.Overrides.Element(z) }
