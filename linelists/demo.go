package linelists

import (
	"cmp"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
)

// This file generates the invented line lists of the built-in demo. They
// are random numbers with roughly the statistics of theoretical line lists
// of heavy elements, NOT atomic data; only the few lines in realLines are
// real transitions, and each is marked as such where it is written.

// DemoElement is one element of the demo line lists and what to invent for
// it.
type DemoElement struct {
	Symbol string
	// File is the base name of the line-list file (".txt.gz" is added;
	// the levels file adds "_levels.txt.gz").
	File   string
	Stages []DemoStage
}

// DemoStage sets the size of the invented level and line sets of one ion.
type DemoStage struct {
	Charge uint8
	Levels int     // invented levels, ground level included
	Lines  int     // invented lines
	Gap    float64 // eV: invented excited levels start above this energy
	JMax   float64 // largest J of invented levels
}

// DemoPlan returns the elements of the demo line lists. The file names are
// stable: other parts of the program read them.
func DemoPlan() []DemoElement {
	light := func(sym string, l1, l2, l3 int, gaps [3]float64) DemoElement {
		return DemoElement{Symbol: sym, File: "demo_" + strings.ToLower(sym), Stages: []DemoStage{
			{0, l1 / 12, l1, gaps[0], 4}, {1, l2 / 12, l2, gaps[1], 4}, {2, l3 / 12, l3, gaps[2], 4},
		}}
	}
	lan := func(sym string, gaps [3]float64) DemoElement {
		return DemoElement{Symbol: sym, File: "demo_" + strings.ToLower(sym), Stages: []DemoStage{
			{0, 1000, 14000, gaps[0], 8}, {1, 1500, 40000, gaps[1], 8}, {2, 600, 8000, gaps[2], 8},
		}}
	}
	return []DemoElement{
		{Symbol: "Ca", File: "demo_ca"}, // the real Ca II lines only
		light("Sr", 2500, 1500, 600, [3]float64{1.8, 5.0, 21}),
		light("Y", 4000, 5000, 1500, [3]float64{0, 0, 0}),
		light("Zr", 5000, 6000, 2500, [3]float64{0, 0, 0}),
		lan("Ce", [3]float64{0, 0, 0}),
		lan("Nd", [3]float64{0, 0, 0}),
		lan("Sm", [3]float64{0, 0, 0}),
		lan("Eu", [3]float64{1.6, 0, 0.3}),
	}
}

// RealLine is a real transition included in the demo lists.
type RealLine struct {
	Species    string
	Wavelength float64 // vacuum Å
	LogGF      float64
	LowerCm    float64 // lower level energy, cm⁻¹
	LowerG     float32
	UpperCm    float64
	UpperG     float32
	Note       string
}

// realLines are the real lines of the demo. Vacuum wavelengths and level
// energies are those of ../shared/REFERENCES.md ("Real strong lines" and
// the NIST level sets quoted there); the log gf values are typed from
// memory, as are the H&K and Sr II resonance lines, whose wavelengths
// follow from those levels (λ = 1/ΔE).
var realLines = []RealLine{
	{"Ca II", 3934.777, 0.135, 0, 2, 25414.40, 4, "real line: Ca II K (4s-4p), wavelength from the REFERENCES.md levels, log gf from memory"},
	{"Ca II", 3969.591, -0.180, 0, 2, 25191.51, 2, "real line: Ca II H (4s-4p), wavelength from the REFERENCES.md levels, log gf from memory"},
	{"Ca II", 8500.36, -1.318, 13650.19, 4, 25414.40, 4, "real line: Ca II triplet 8500 (REFERENCES.md; log gf from memory)"},
	{"Ca II", 8544.44, -0.360, 13710.88, 6, 25414.40, 4, "real line: Ca II triplet 8544 (REFERENCES.md; log gf from memory)"},
	{"Ca II", 8664.52, -0.622, 13650.19, 4, 25191.51, 2, "real line: Ca II triplet 8664 (REFERENCES.md; log gf from memory)"},
	{"Sr II", 4078.862, 0.150, 0, 2, 24516.65, 4, "real line: Sr II resonance 4078 (5s-5p), wavelength from the REFERENCES.md levels, log gf from memory"},
	{"Sr II", 4216.706, -0.170, 0, 2, 23715.19, 2, "real line: Sr II resonance 4216 (5s-5p), wavelength from the REFERENCES.md levels, log gf from memory"},
	{"Sr II", 10039.40, -1.31, 14555.90, 4, 24516.65, 4, "real line: Sr II near-IR 10039 (REFERENCES.md; log gf from memory)"},
	{"Sr II", 10330.14, -0.35, 14836.24, 6, 24516.65, 4, "real line: Sr II near-IR 10330 (REFERENCES.md; log gf from memory)"},
	{"Sr II", 10917.86, -0.64, 14555.90, 4, 23715.19, 2, "real line: Sr II near-IR 10918 (REFERENCES.md; log gf from memory)"},
}

// RealDemoLines returns the real lines included in the demo lists.
func RealDemoLines() []RealLine { return slices.Clone(realLines) }

// Demo wavelength window, vacuum Å.
const (
	demoMinWavelength = 3500
	demoMaxWavelength = 25000
	hcEVAngstrom      = 1e8 * invCmToEV // λ[Å] = hc/ΔE[eV]
)

// Demo generates the invented lines and levels of one element of the demo
// (plus its real lines) with a seeded random source: the same seed gives
// the same store. Every species gets a full level set (LevelSource
// FileLevels), so its partition function is that of the invented atom.
func Demo(el DemoElement, seed uint64) (*Store, error) {
	e, err := ElementBySymbol(el.Symbol)
	if err != nil {
		return nil, err
	}
	b := NewBuilder()
	for _, st := range el.Stages {
		sp := Species{Z: uint8(e.Z), Charge: st.Charge}
		rng := rand.New(rand.NewPCG(seed, uint64(e.Z)<<8|uint64(st.Charge)))
		ie := e.Ionization[st.Charge]
		if ie == 0 {
			return nil, fmt.Errorf("linelists: demo: %v has no ionisation energy", sp)
		}
		levels := demoLevels(rng, sp, st, ie)
		for _, l := range levels {
			b.AddLevel(sp, l.e, l.g)
		}
		for _, l := range demoLines(rng, sp, st, levels) {
			b.Add(l)
		}
	}
	for _, rl := range realLines {
		sp := MustSpecies(rl.Species)
		if int(sp.Z) != e.Z {
			continue
		}
		b.AddLevel(sp, 0, float32(mustGround(sp)))
		b.AddLevel(sp, rl.LowerCm*invCmToEV, rl.LowerG)
		b.AddLevel(sp, rl.UpperCm*invCmToEV, rl.UpperG)
		b.Add(Line{Wavelength: rl.Wavelength, LogGF: rl.LogGF, Species: sp, LowerEnergy: rl.LowerCm * invCmToEV, LowerG: rl.LowerG})
	}
	s, rep := b.Build()
	if rep.Duplicates > 0 {
		return nil, fmt.Errorf("linelists: demo %s: %d duplicate lines", el.Symbol, rep.Duplicates)
	}
	return s, nil
}

func mustGround(sp Species) float64 {
	g, known := GroundWeight(sp)
	if !known {
		panic("linelists: demo: unknown ground weight of " + sp.String())
	}
	return g
}

// RealNote returns the marking comment of line i of a demo store when it
// is one of the real lines, or "".
func RealNote(s *Store, i int) string {
	sp := s.SpeciesTable[s.Species[i]]
	for _, rl := range realLines {
		if math.Abs(rl.Wavelength-s.Wavelength[i]) < 1e-6 && MustSpecies(rl.Species) == sp {
			return rl.Note
		}
	}
	return ""
}

type demoLevel struct {
	e float64
	g float32
}

// demoLevels invents a level set: the ground level with the weight from
// the element table, 15 % of the excited levels spread evenly over the
// first eV above Gap (low-lying fine structure), the rest with a density
// rising as (E − Gap)^1.5 up to 85 % of the ionisation energy (at most
// Gap + 10 eV). J is whole or half-whole as the number of electrons is
// even or odd. Energies are rounded to 1e-4 eV.
func demoLevels(rng *rand.Rand, sp Species, st DemoStage, ie float64) []demoLevel {
	out := []demoLevel{{0, float32(mustGround(sp))}}
	top := math.Min(0.85*ie, st.Gap+10)
	half := (int(sp.Z)-int(sp.Charge))%2 == 1
	for len(out) < st.Levels {
		var e float64
		if rng.Float64() < 0.15 {
			e = st.Gap + 0.02 + 0.98*rng.Float64()
		} else {
			e = st.Gap + 0.02 + (top-st.Gap)*math.Pow(rng.Float64(), 1/2.5)
		}
		e = math.Round(e*1e4) / 1e4
		j := float64(rng.IntN(int(st.JMax) + 1))
		if half {
			j += 0.5
		}
		out = append(out, demoLevel{e, float32(2*j + 1)})
	}
	slices.SortFunc(out, func(a, b demoLevel) int { return cmp.Or(cmp.Compare(a.e, b.e), cmp.Compare(a.g, b.g)) })
	return slices.CompactFunc(out, func(a, b demoLevel) bool { return a == b })
}

// demoLines invents lines between the levels: the lower level drawn with
// weight exp(−E/2 eV) (lists hold lines from every level, but the demo
// wants those that matter at a few thousand K), the upper level uniformly
// among those that put the line in 3500–25000 Å, and log gf from a normal
// distribution (mean −2.3, σ 1.2, clipped to −7…+0.9), roughly the spread
// of theoretical lists of heavy elements.
func demoLines(rng *rand.Rand, sp Species, st DemoStage, levels []demoLevel) []Line {
	cum := make([]float64, len(levels))
	sum := 0.0
	for i, l := range levels {
		sum += math.Exp(-l.e / 2)
		cum[i] = sum
	}
	energies := make([]float64, len(levels))
	for i, l := range levels {
		energies[i] = l.e
	}
	type pair struct{ lo, up int }
	used := map[pair]bool{}
	out := make([]Line, 0, st.Lines)
	for tries := 0; len(out) < st.Lines && tries < 50*st.Lines; tries++ {
		lo, _ := slices.BinarySearch(cum, rng.Float64()*sum)
		lo = min(lo, len(levels)-1)
		eMin := levels[lo].e + hcEVAngstrom/demoMaxWavelength
		eMax := levels[lo].e + hcEVAngstrom/demoMinWavelength
		a, _ := slices.BinarySearch(energies, eMin)
		z, _ := slices.BinarySearch(energies, eMax)
		if z <= a {
			continue
		}
		up := a + rng.IntN(z-a)
		if used[pair{lo, up}] {
			continue
		}
		used[pair{lo, up}] = true
		lgf := math.Round(math.Max(-7, math.Min(0.9, -2.3+1.2*rng.NormFloat64()))*1e3) / 1e3
		w := hcEVAngstrom / (levels[up].e - levels[lo].e)
		out = append(out, Line{
			Wavelength: math.Round(w*1e4) / 1e4, LogGF: lgf, Species: sp,
			LowerEnergy: levels[lo].e, LowerG: levels[lo].g,
			HasUpper: true, UpperEnergy: levels[up].e, UpperG: levels[up].g,
		})
	}
	return out
}

// DemoComments is the header every demo file starts with.
func DemoComments(el DemoElement, seed uint64) []string {
	return []string{
		"INVENTED FOR DEMONSTRATION - NOT ATOMIC DATA.",
		"This file was made up by broadline's seeded demo generator (linelists.Demo,",
		fmt.Sprintf("seed %d, element %s): random level energies, weights and gf values with", seed, el.Symbol),
		"roughly the statistics of theoretical line lists of heavy elements. It is not",
		"a measurement or calculation of any real atom. Do not use it for science.",
		"The only real transitions are the few lines preceded by a comment that says",
		"\"real line\"; their log gf values are typed from memory and need checking.",
	}
}
