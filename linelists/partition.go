package linelists

import (
	"fmt"
	"math"

	"broadline/physics"
)

// LevelSource says where the levels a store knows for a species came from,
// which bounds how complete a partition function summed over them is.
type LevelSource uint8

const (
	// NoLevels: nothing is known but the ground weight from the element
	// table; the partition function is the ground weight, a lower bound.
	NoLevels LevelSource = iota
	// LineLevels: only the distinct lower and upper levels that the line
	// list names (plus the ground level from the element table). Levels
	// without lines in the list are missing, so U is a lower bound; how low
	// depends on how complete the list is.
	LineLevels
	// FileLevels: a levels file gave the level set. U is as complete as that
	// file.
	FileLevels
)

func (s LevelSource) String() string {
	switch s {
	case NoLevels:
		return "ground weight only (lower bound)"
	case LineLevels:
		return "levels named by the line list (lower bound)"
	case FileLevels:
		return "levels file"
	}
	return fmt.Sprintf("LevelSource(%d)", uint8(s))
}

// SpeciesIndex returns the index of sp in s.SpeciesTable.
func (s *Store) SpeciesIndex(sp Species) (int, bool) {
	for i, x := range s.SpeciesTable {
		if x == sp {
			return i, true
		}
	}
	return -1, false
}

// LevelSourceOf says where the levels known for sp came from.
func (s *Store) LevelSourceOf(sp Species) LevelSource {
	i, ok := s.SpeciesIndex(sp)
	if !ok {
		return NoLevels
	}
	if i < len(s.LevelOrigin) {
		return s.LevelOrigin[i]
	}
	if s.levelCount(i) > 0 {
		return LineLevels
	}
	return NoLevels
}

// levelRange returns the levels of species index i as a contiguous range
// [lo, hi) when the level table is grouped by species (as the Builder and
// the cache leave it), or ok=false when it must be scanned.
func (s *Store) levelRange(i int) (lo, hi int, ok bool) {
	n := len(s.Levels.Species)
	if len(s.levelStart) != len(s.SpeciesTable)+1 || int(s.levelStart[len(s.levelStart)-1]) != n {
		return 0, 0, false
	}
	return int(s.levelStart[i]), int(s.levelStart[i+1]), true
}

func (s *Store) levelCount(i int) int {
	if lo, hi, ok := s.levelRange(i); ok {
		return hi - lo
	}
	n := 0
	for _, x := range s.Levels.Species {
		if int(x) == i {
			n++
		}
	}
	return n
}

// PartitionFunction returns U(T) = Σ g exp(−E/kT) over the levels the store
// knows for sp (levels with an unknown weight, g = 0, add nothing). When it
// knows none, U is the ground weight from the element table, or from
// s.Overrides when that sets it (1 if it is unknown) and complete is false: the true U is larger, so this is a
// lower bound. complete = true means a level set was summed; a level set
// taken from the line list alone is itself incomplete (see LevelSourceOf).
// A bare nucleus has U = 1 and complete = true. T is in K and must be > 0.
func (s *Store) PartitionFunction(sp Species, T float64) (u float64, complete bool) {
	var dst [1]float64
	complete = s.PartitionFunctions(sp, []float64{T}, dst[:])
	return dst[0], complete
}

// PartitionFunctions is PartitionFunction over a grid of temperatures: it
// writes U(temps[k]) to dst[k] and returns complete as PartitionFunction
// does. It panics if len(dst) != len(temps).
func (s *Store) PartitionFunctions(sp Species, temps, dst []float64) (complete bool) {
	if len(dst) != len(temps) {
		panic("linelists: PartitionFunctions: len(dst) != len(temps)")
	}
	if int(sp.Charge) >= int(sp.Z) {
		for k := range dst {
			dst[k] = 1
		}
		return true
	}
	i, ok := s.SpeciesIndex(sp)
	var lo, hi int
	scan := false
	if ok {
		lo, hi, ok = s.levelRange(i)
		if !ok {
			lo, hi, scan, ok = 0, len(s.Levels.Species), true, true
		}
	}
	for k := range dst {
		dst[k] = 0
	}
	summed := 0
	if ok {
		for k, T := range temps {
			beta := -1 / (physics.BoltzmannEV * T)
			sum := 0.0
			for l := lo; l < hi; l++ {
				if scan && int(s.Levels.Species[l]) != i {
					continue
				}
				g := float64(s.Levels.G[l])
				if g <= 0 {
					continue
				}
				if k == 0 {
					summed++
				}
				sum += g * math.Exp(beta*s.Levels.Energy[l])
			}
			dst[k] = sum
		}
	}
	if summed > 0 {
		return true
	}
	g, _ := s.Overrides.GroundWeight(sp)
	for k := range dst {
		dst[k] = g
	}
	return false
}
