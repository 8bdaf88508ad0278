package opacity

import (
	"math"
	"math/rand/v2"
	"sort"

	"broadline/linelists"
)

// testLine is one line for a hand-made store.
type testLine struct {
	sp     linelists.Species
	lambda float64 // vacuum Å
	loggf  float32
	energy float64 // lower level, eV
	g      float32 // lower level weight
}

// makeStore builds a Store from lines (any order), with one level per
// distinct (species, energy, g).
func makeStore(lines []testLine) *linelists.Store {
	sort.SliceStable(lines, func(i, j int) bool { return lines[i].lambda < lines[j].lambda })
	st := &linelists.Store{}
	spIdx := map[linelists.Species]uint16{}
	type lkey struct {
		s uint16
		e float64
		g float32
	}
	lvIdx := map[lkey]uint32{}
	for _, l := range lines {
		s, ok := spIdx[l.sp]
		if !ok {
			s = uint16(len(st.SpeciesTable))
			spIdx[l.sp] = s
			st.SpeciesTable = append(st.SpeciesTable, l.sp)
		}
		k := lkey{s, l.energy, l.g}
		lv, ok := lvIdx[k]
		if !ok {
			lv = uint32(len(st.Levels.Energy))
			lvIdx[k] = lv
			st.Levels.Species = append(st.Levels.Species, s)
			st.Levels.Energy = append(st.Levels.Energy, l.energy)
			st.Levels.G = append(st.Levels.G, l.g)
		}
		st.Wavelength = append(st.Wavelength, l.lambda)
		st.LogGF = append(st.LogGF, l.loggf)
		st.Species = append(st.Species, s)
		st.Lower = append(st.Lower, lv)
	}
	return st
}

// randomStore returns a synthetic store of n lines between 3000 and 25000 Å
// for the given species, with about levelsPerSpecies lower levels each
// (energies 0–6 eV) and log gf spread over −6…0.5, sorted by wavelength.
// Invented data for tests and benchmarks.
func randomStore(n int, species []linelists.Species, levelsPerSpecies int, seed uint64) *linelists.Store {
	r := rand.New(rand.NewPCG(seed, 1))
	st := &linelists.Store{SpeciesTable: species}
	for s := range species {
		for range levelsPerSpecies {
			st.Levels.Species = append(st.Levels.Species, uint16(s))
			st.Levels.Energy = append(st.Levels.Energy, 6*r.Float64()*r.Float64())
			st.Levels.G = append(st.Levels.G, float32(1+2*r.IntN(8)))
		}
	}
	st.Wavelength = make([]float64, n)
	st.LogGF = make([]float32, n)
	st.Species = make([]uint16, n)
	st.Lower = make([]uint32, n)
	lam := 3000.0
	step := 2 * 22000 / float64(n)
	for i := range n {
		lam += step * r.Float64()
		s := r.IntN(len(species))
		st.Wavelength[i] = lam
		st.LogGF[i] = float32(0.5 - 6.5*math.Sqrt(r.Float64()))
		st.Species[i] = uint16(s)
		st.Lower[i] = uint32(s*levelsPerSpecies + r.IntN(levelsPerSpecies))
	}
	return st
}

// speciesOf returns stages I–III of each element symbol.
func speciesOf(symbols ...string) []linelists.Species {
	var out []linelists.Species
	for _, s := range symbols {
		e, err := linelists.ElementBySymbol(s)
		if err != nil {
			panic(err)
		}
		for c := range 3 {
			out = append(out, linelists.Species{Z: uint8(e.Z), Charge: uint8(c)})
		}
	}
	return out
}

// benchLikeStore returns a synthetic store of n lines between 3000 and
// 25000 Å shaped like a large theoretical list of heavy elements (invented
// data): lower levels spread uniformly over 0–10 eV, log gf roughly normal
// about −3 with σ ≈ 1.5 (sum of three uniforms), clipped at +1.
func benchLikeStore(n int, species []linelists.Species, levelsPerSpecies int, seed uint64) *linelists.Store {
	st := randomStore(n, species, levelsPerSpecies, seed)
	r := rand.New(rand.NewPCG(seed, 2))
	for l := range st.Levels.Energy {
		st.Levels.Energy[l] = 10 * r.Float64()
	}
	st.Levels.Energy[0] = 0
	for i := range st.LogGF {
		g := -3 + 1.5*(r.Float64()+r.Float64()+r.Float64()-1.5)*2
		st.LogGF[i] = float32(min(g, 1))
	}
	return st
}
