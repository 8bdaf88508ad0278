package linelists

import (
	"cmp"
	"fmt"
	"math"
	"slices"
)

// Tolerances of the level table and of duplicate detection.
const (
	// levelQuantum is the energy resolution, in eV, at which two levels of
	// one species with the same weight count as the same level (1e-5 eV is
	// 0.08 cm⁻¹, finer than the rounding of most tables).
	levelQuantum = 1e-5
	// groundTolerance: a level below this energy (eV, ~0.8 cm⁻¹) is taken
	// to be the ground level.
	groundTolerance = 1e-4
	// levelMatchTolerance: a lower level named by a line matches a level of
	// the levels file within this energy (eV, ~8 cm⁻¹) and the same g.
	levelMatchTolerance = 1e-3
	// Two lines are duplicates when they share species and lower level and
	// agree in wavelength to dupWavelength Å and in log gf to dupLogGF.
	dupWavelength = 1e-3
	dupLogGF      = 1e-3
	// dupLookback bounds how many earlier lines a line is compared with,
	// so that a list with thousands of lines at one wavelength cannot make
	// the search quadratic (lines of equal wavelength are ordered by
	// species and lower level, so true duplicates sit close together).
	dupLookback = 256
)

// Report says what loading did: per file, and for the store built.
type Report struct {
	Files []FileReport
	// Lines is the number of lines in the store.
	Lines int
	// Duplicates counts lines dropped as duplicates of another line (same
	// species and lower level, wavelength within 0.001 Å, log gf within
	// 0.001); with Builder.KeepDuplicates they are kept and only counted.
	Duplicates int
	// Skipped totals the lines left out on purpose over all files.
	Skipped Skipped
	// GroundAdded counts species whose level table lacked the ground level,
	// which was added from the element table.
	GroundAdded int
	// LevelsMatched counts levels named by lines that were matched to a
	// level of a levels file.
	LevelsMatched int
	// Warnings are plain sentences for the user.
	Warnings []string
}

// levelKey identifies a level while building: species (16 bits), weight
// (14 bits) and energy rounded to levelQuantum (34 bits, up to 1.7e5 eV)
// packed in one word, which makes the map lookup per line cheap.
type levelKey uint64

// Bounds that levelKey needs; readers reject values beyond them.
const (
	maxLevelEnergy = 1e5 // eV
	maxLevelG      = 1e4
)

func makeLevelKey(sp uint16, e float64, g float32) levelKey {
	if !(e >= 0 && e <= maxLevelEnergy) || !(g >= 0 && g <= maxLevelG) {
		panic(fmt.Sprintf("linelists: level out of range: E = %v eV, g = %v", e, g))
	}
	q := uint64(math.Round(e / levelQuantum))
	return levelKey(uint64(sp)<<48 | uint64(math.Round(float64(g)))<<34 | q)
}

// Builder collects lines and levels and turns them into a Store. The zero
// value is not ready; use NewBuilder.
type Builder struct {
	// KeepDuplicates keeps duplicate lines (they are counted either way).
	KeepDuplicates bool

	wl  []float64
	lgf []float32
	sp  []uint16
	lo  []uint32

	species  []Species
	spIdx    map[Species]uint16
	fromFile []bool // per species: levels came from a levels file

	lvSp   []uint16
	lvE    []float64
	lvG    []float32
	lvFile []bool // level came from a levels file
	lvIdx  map[levelKey]uint32
}

// NewBuilder returns an empty Builder.
func NewBuilder() *Builder {
	return &Builder{spIdx: map[Species]uint16{}, lvIdx: map[levelKey]uint32{}}
}

// reserve makes room for n more lines.
func (b *Builder) reserve(n int) {
	b.wl = slices.Grow(b.wl, n)
	b.lgf = slices.Grow(b.lgf, n)
	b.sp = slices.Grow(b.sp, n)
	b.lo = slices.Grow(b.lo, n)
}

// Len returns the number of lines added so far.
func (b *Builder) Len() int { return len(b.wl) }

func (b *Builder) speciesIndex(sp Species) uint16 {
	if i, ok := b.spIdx[sp]; ok {
		return i
	}
	i := uint16(len(b.species))
	b.species = append(b.species, sp)
	b.fromFile = append(b.fromFile, false)
	b.spIdx[sp] = i
	return i
}

func (b *Builder) level(sp uint16, e float64, g float32) uint32 {
	k := makeLevelKey(sp, e, g)
	if i, ok := b.lvIdx[k]; ok {
		return i
	}
	i := uint32(len(b.lvE))
	b.lvSp = append(b.lvSp, sp)
	b.lvE = append(b.lvE, e)
	b.lvG = append(b.lvG, g)
	b.lvFile = append(b.lvFile, false)
	b.lvIdx[k] = i
	return i
}

// AddLevel adds a level from a levels file: energy in eV above the ion's
// ground level, weight g = 2J+1 (> 0). The species' partition function is
// then summed over the file's levels (see LevelSource FileLevels); lower
// levels that lines name are matched to the file's levels when they agree
// to 1e-3 eV with the same weight, and kept as extra levels otherwise.
func (b *Builder) AddLevel(sp Species, energy float64, g float32) {
	if sp.Z < 1 || sp.Z > 100 || sp.Charge > sp.Z {
		panic(fmt.Sprintf("linelists: Builder.AddLevel: invalid species %+v", sp))
	}
	s := b.speciesIndex(sp)
	b.fromFile[s] = true
	i := b.level(s, energy, g)
	b.lvFile[i] = true
}

// Add adds one line (already checked: finite positive wavelength, finite
// log gf, energies ≥ 0). Its lower level, and its upper level when known,
// join the level table.
func (b *Builder) Add(l Line) {
	if l.Species.Z < 1 || l.Species.Z > 100 || l.Species.Charge > l.Species.Z {
		panic(fmt.Sprintf("linelists: Builder.Add: invalid species %+v", l.Species))
	}
	s := b.speciesIndex(l.Species)
	lo := b.level(s, l.LowerEnergy, l.LowerG)
	if l.HasUpper {
		b.level(s, l.UpperEnergy, l.UpperG)
	}
	b.wl = append(b.wl, l.Wavelength)
	b.lgf = append(b.lgf, float32(l.LogGF))
	b.sp = append(b.sp, s)
	b.lo = append(b.lo, lo)
}

// builderMark records the sizes of a Builder, to undo a failed read.
type builderMark struct{ lines, species, levels int }

func (b *Builder) mark() builderMark {
	return builderMark{len(b.wl), len(b.species), len(b.lvE)}
}

func (b *Builder) rollback(m builderMark) {
	b.wl, b.lgf, b.sp, b.lo = b.wl[:m.lines], b.lgf[:m.lines], b.sp[:m.lines], b.lo[:m.lines]
	for i := m.levels; i < len(b.lvE); i++ {
		delete(b.lvIdx, makeLevelKey(b.lvSp[i], b.lvE[i], b.lvG[i]))
	}
	b.lvSp, b.lvE, b.lvG, b.lvFile = b.lvSp[:m.levels], b.lvE[:m.levels], b.lvG[:m.levels], b.lvFile[:m.levels]
	for i := m.species; i < len(b.species); i++ {
		delete(b.spIdx, b.species[i])
	}
	b.species, b.fromFile = b.species[:m.species], b.fromFile[:m.species]
}

// Build sorts and indexes what was added and returns the Store. Lines are
// sorted by wavelength, ties by species, lower level and log gf. The
// Builder hands its data over and is empty afterwards. The level table is
// grouped by species (in Z, charge order) and sorted by energy; species
// whose levels lack a ground level get one from the element table (when
// its weight is known).
func (b *Builder) Build() (*Store, Report) {
	var rep Report
	// Ground levels.
	hasGround := make([]bool, len(b.species))
	hasLevels := make([]bool, len(b.species))
	for i, e := range b.lvE {
		hasLevels[b.lvSp[i]] = true
		if e < groundTolerance {
			hasGround[b.lvSp[i]] = true
		}
	}
	for i, sp := range b.species {
		if hasLevels[i] && !hasGround[i] {
			if g, known := GroundWeight(sp); known {
				b.level(uint16(i), 0, float32(g))
				rep.GroundAdded++
			} else {
				rep.Warnings = append(rep.Warnings, fmt.Sprintf("%v: no ground level in the data and its weight is unknown; the partition function misses it", sp))
			}
		}
	}
	// Line levels of species with a levels file: match them to file levels.
	remap, dropped, unmatched := b.matchFileLevels()
	if unmatched > 0 {
		rep.Warnings = append(rep.Warnings, fmt.Sprintf("%d lower levels named by lines are not in the levels file (no level within %g eV with the same g); they are kept as extra levels", unmatched, levelMatchTolerance))
	}
	rep.LevelsMatched = 0
	for _, d := range dropped {
		if d {
			rep.LevelsMatched++
		}
	}
	// Species in (Z, charge) order.
	spOrder := make([]uint16, len(b.species))
	for i := range spOrder {
		spOrder[i] = uint16(i)
	}
	slices.SortFunc(spOrder, func(x, y uint16) int {
		a, c := b.species[x], b.species[y]
		return cmp.Or(cmp.Compare(a.Z, c.Z), cmp.Compare(a.Charge, c.Charge))
	})
	newSp := make([]uint16, len(b.species))
	st := &Store{SpeciesTable: make([]Species, len(b.species)), LevelOrigin: make([]LevelSource, len(b.species))}
	for n, old := range spOrder {
		newSp[old] = uint16(n)
		st.SpeciesTable[n] = b.species[old]
		switch {
		case b.fromFile[old]:
			st.LevelOrigin[n] = FileLevels
		case hasLevels[old]:
			st.LevelOrigin[n] = LineLevels
		}
	}
	// Levels grouped by species, by energy, then weight.
	nl := len(b.lvE)
	lvOrder := make([]uint32, 0, nl)
	for i := 0; i < nl; i++ {
		if !dropped[i] {
			lvOrder = append(lvOrder, uint32(i))
		}
	}
	slices.SortFunc(lvOrder, func(x, y uint32) int {
		return cmp.Or(cmp.Compare(newSp[b.lvSp[x]], newSp[b.lvSp[y]]), cmp.Compare(b.lvE[x], b.lvE[y]), cmp.Compare(b.lvG[x], b.lvG[y]))
	})
	newLv := make([]uint32, nl)
	kept := len(lvOrder)
	st.Levels = LevelTable{Species: make([]uint16, kept), Energy: make([]float64, kept), G: make([]float32, kept)}
	for n, old := range lvOrder {
		newLv[old] = uint32(n)
		st.Levels.Species[n] = newSp[b.lvSp[old]]
		st.Levels.Energy[n] = b.lvE[old]
		st.Levels.G[n] = b.lvG[old]
	}
	for old := range newLv {
		if dropped[old] {
			newLv[old] = newLv[remap[old]]
		}
	}
	st.levelStart = groupStarts(st.Levels.Species, len(st.SpeciesTable))
	// Lines: remap, then sort by wavelength (ties by species, level, gf).
	n := len(b.wl)
	for i := 0; i < n; i++ {
		b.sp[i] = newSp[b.sp[i]]
		b.lo[i] = newLv[b.lo[i]]
	}
	sorted := true
	for i := 1; i < n; i++ {
		if b.wl[i] < b.wl[i-1] || b.wl[i] == b.wl[i-1] && cmp.Or(cmp.Compare(b.sp[i-1], b.sp[i]), cmp.Compare(b.lo[i-1], b.lo[i]), cmp.Compare(b.lgf[i-1], b.lgf[i])) > 0 {
			sorted = false
			break
		}
	}
	if sorted {
		st.Wavelength, st.LogGF, st.Species, st.Lower = b.wl, b.lgf, b.sp, b.lo
	} else {
		// Radix sort on wavelength, then runs of equal wavelength ordered
		// by species, lower level and log gf, so that the order does not
		// depend on the order lines were added in.
		perm := radixSortFloat64(b.wl)
		tie := func(x, y uint32) int {
			return cmp.Or(cmp.Compare(b.sp[x], b.sp[y]), cmp.Compare(b.lo[x], b.lo[y]), cmp.Compare(b.lgf[x], b.lgf[y]))
		}
		for i := 0; i < n; {
			j := i + 1
			for j < n && b.wl[perm[j]] == b.wl[perm[i]] {
				j++
			}
			if j-i > 1 {
				slices.SortFunc(perm[i:j], tie)
			}
			i = j
		}
		st.Wavelength = make([]float64, n)
		st.LogGF = make([]float32, n)
		st.Species = make([]uint16, n)
		st.Lower = make([]uint32, n)
		for k, i := range perm {
			st.Wavelength[k], st.LogGF[k], st.Species[k], st.Lower[k] = b.wl[i], b.lgf[i], b.sp[i], b.lo[i]
		}
	}
	rep.Duplicates = st.dedup(b.KeepDuplicates)
	rep.Lines = st.Len()
	*b = *NewBuilder()
	return st, rep
}

// groupStarts returns, for a species column grouped in order, the first
// index of each of n species (n+1 entries), or nil if it is not grouped.
func groupStarts(sp []uint16, n int) []uint32 {
	starts := make([]uint32, n+1)
	k := 0
	for s := 0; s < n; s++ {
		starts[s] = uint32(k)
		for k < len(sp) && int(sp[k]) == s {
			k++
		}
	}
	if k != len(sp) {
		return nil
	}
	starts[n] = uint32(k)
	return starts
}

// dedup counts (and unless keep, removes) duplicate lines in a sorted store.
func (s *Store) dedup(keep bool) int {
	n := s.Len()
	dups := 0
	w := 0
	for i := 0; i < n; i++ {
		dup := false
		for k := w - 1; k >= 0 && k >= w-dupLookback && s.Wavelength[i]-s.Wavelength[k] <= dupWavelength; k-- {
			if s.Species[k] == s.Species[i] && s.Lower[k] == s.Lower[i] && math.Abs(float64(s.LogGF[k]-s.LogGF[i])) <= dupLogGF {
				dup = true
				break
			}
		}
		if dup {
			dups++
			if !keep {
				continue
			}
		}
		s.Wavelength[w], s.LogGF[w], s.Species[w], s.Lower[w] = s.Wavelength[i], s.LogGF[i], s.Species[i], s.Lower[i]
		w++
	}
	s.Wavelength, s.LogGF, s.Species, s.Lower = s.Wavelength[:w], s.LogGF[:w], s.Species[:w], s.Lower[:w]
	return dups
}

// AddStore adds every line and level of s to b (used by Merge).
func (b *Builder) AddStore(s *Store) {
	lvMap := make([]uint32, len(s.Levels.Energy))
	spMap := make([]uint16, len(s.SpeciesTable))
	for i, sp := range s.SpeciesTable {
		spMap[i] = b.speciesIndex(sp)
		if i < len(s.LevelOrigin) && s.LevelOrigin[i] == FileLevels {
			b.fromFile[spMap[i]] = true
		}
	}
	for i := range s.Levels.Energy {
		lvMap[i] = b.level(spMap[s.Levels.Species[i]], s.Levels.Energy[i], s.Levels.G[i])
	}
	for i := range s.Wavelength {
		b.wl = append(b.wl, s.Wavelength[i])
		b.lgf = append(b.lgf, s.LogGF[i])
		b.sp = append(b.sp, spMap[s.Species[i]])
		b.lo = append(b.lo, lvMap[s.Lower[i]])
	}
}

// Merge combines stores into one: species and levels are matched, lines
// sorted, and lines that appear in more than one store counted as
// duplicates and kept once.
func Merge(stores ...*Store) (*Store, Report) {
	b := NewBuilder()
	for _, s := range stores {
		b.AddStore(s)
	}
	return b.Build()
}

// Filter returns a store holding only the lines that f selects, and the
// counts of those left out. The species and level tables are shared with
// s (levels without lines still count in partition functions).
func (s *Store) Filter(f Filter) (*Store, Skipped) {
	var sk Skipped
	want := speciesSet(f.Species)
	var wantIdx []bool
	if want != nil {
		wantIdx = make([]bool, len(s.SpeciesTable))
		for i, sp := range s.SpeciesTable {
			wantIdx[i] = want[sp]
		}
	}
	lo, hi := 0, s.Len()
	if f.MinWavelength > 0 {
		lo, _ = slices.BinarySearch(s.Wavelength, f.MinWavelength)
	}
	if f.MaxWavelength > 0 {
		hi = lo + sort64Upper(s.Wavelength[lo:], f.MaxWavelength)
	}
	sk.Wavelength = lo + (s.Len() - hi)
	out := &Store{SpeciesTable: s.SpeciesTable, Levels: s.Levels, LevelOrigin: s.LevelOrigin, levelStart: s.levelStart, Overrides: s.Overrides}
	for i := lo; i < hi; i++ {
		switch {
		case wantIdx != nil && !wantIdx[s.Species[i]]:
			sk.Species++
			continue
		case f.HasMinLogGF && float64(s.LogGF[i]) < f.MinLogGF:
			sk.Strength++
			continue
		}
		out.Wavelength = append(out.Wavelength, s.Wavelength[i])
		out.LogGF = append(out.LogGF, s.LogGF[i])
		out.Species = append(out.Species, s.Species[i])
		out.Lower = append(out.Lower, s.Lower[i])
	}
	return out, sk
}

// sort64Upper returns the number of leading elements ≤ x in sorted a.
func sort64Upper(a []float64, x float64) int {
	i, j := 0, len(a)
	for i < j {
		h := int(uint(i+j) >> 1)
		if a[h] <= x {
			i = h + 1
		} else {
			j = h
		}
	}
	return i
}

// matchFileLevels maps each non-file level of a species that has a levels
// file to the nearest file level within levelMatchTolerance with the same
// weight (any weight when the line's is unknown). It returns the map, which
// levels are dropped (mapped), and how many stay unmatched.
func (b *Builder) matchFileLevels() (remap []uint32, dropped []bool, unmatched int) {
	nl := len(b.lvE)
	remap = make([]uint32, nl)
	dropped = make([]bool, nl)
	any := false
	for _, f := range b.fromFile {
		any = any || f
	}
	if !any {
		return remap, dropped, 0
	}
	// File levels per species, sorted by energy.
	bySp := map[uint16][]uint32{}
	for i := 0; i < nl; i++ {
		if b.lvFile[i] {
			bySp[b.lvSp[i]] = append(bySp[b.lvSp[i]], uint32(i))
		}
	}
	for _, l := range bySp {
		slices.SortFunc(l, func(x, y uint32) int { return cmp.Compare(b.lvE[x], b.lvE[y]) })
	}
	for i := 0; i < nl; i++ {
		if b.lvFile[i] || !b.fromFile[b.lvSp[i]] {
			continue
		}
		fl := bySp[b.lvSp[i]]
		e := b.lvE[i]
		k, _ := slices.BinarySearchFunc(fl, e, func(x uint32, t float64) int { return cmp.Compare(b.lvE[x], t) })
		best, bestD := -1, levelMatchTolerance
		// Look at most dupLookback file levels each way (bounded work on
		// pathological input with many levels at one energy).
		for j := k - 1; j >= 0 && j >= k-dupLookback && e-b.lvE[fl[j]] <= levelMatchTolerance; j-- {
			if d := e - b.lvE[fl[j]]; d <= bestD && (b.lvG[i] == 0 || b.lvG[fl[j]] == b.lvG[i]) {
				best, bestD = int(fl[j]), d
			}
		}
		for j := k; j < len(fl) && j < k+dupLookback && b.lvE[fl[j]]-e <= levelMatchTolerance; j++ {
			if d := b.lvE[fl[j]] - e; d <= bestD && (b.lvG[i] == 0 || b.lvG[fl[j]] == b.lvG[i]) {
				best, bestD = int(fl[j]), d
			}
		}
		if best >= 0 {
			remap[i], dropped[i] = uint32(best), true
		} else {
			unmatched++
		}
	}
	return remap, dropped, unmatched
}
