package demogen

import (
	"cmp"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"

	"broadline/linelists"
	"broadline/physics"
)

// This file generates the invented line lists of the built-in demo. They
// are random numbers, NOT atomic data; only the few lines in realLines are
// real transitions, and each is marked as such where it is written.
//
// The invented atoms are shaped after the qualitative statistics of
// published theoretical line lists of r-process elements (from memory, not
// their numbers): ions with open d shells (Sr, Y, Zr) have some hundred
// levels below ~5 eV and hundreds to a few thousand lines in the optical and
// near-infrared, and their levels of the parity opposite to the ground's
// start some 2–3 eV up, so that their strong lines from low levels fall in
// the blue and ultraviolet; ions with open f shells (the lanthanides) have
// thousands of levels of both parities within the first one or two eV and
// 10⁵–10⁶ lines, most of them weak. The demo keeps that contrast (a factor
// of about 65–400 in line count between a lanthanide and a d-shell element)
// at a size that fits the program (~3 MB compressed): a real list of a
// lanthanide ion is 10–100 times longer still.

// Element is one element of the demo line lists and what to invent for
// it.
type Element struct {
	Symbol string
	// File is the base name of the line-list file (".txt.gz" is added;
	// the levels file adds "_levels.txt.gz").
	File   string
	Stages []Stage
}

// Stage sets the size and shape of the invented level and line sets of
// one ion.
type Stage struct {
	Charge uint8
	Levels int // invented levels, ground level included
	Lines  int // invented lines (fewer when the levels allow no more)
	// Gap is the energy (eV) above which the excited levels of the ground's
	// parity start; CrossGap is where the levels of the opposite parity
	// start. Lines join levels of opposite parity (electric dipole), so
	// CrossGap sets where the strong lines from the lowest levels fall.
	Gap, CrossGap float64
	// Spread is the width (eV) of the band each parity's levels fill above
	// its start, at most up to 85 % of the ionisation energy: a couple of eV
	// for the few low configurations of a light ion, ~10 eV for the many
	// overlapping configurations of a lanthanide ion.
	Spread float64
	JMax   float64 // largest J of invented levels
	// LowerScale (eV), when > 0, draws the lower levels of the lines with
	// weight exp(−E/LowerScale), to keep a big list to the lines that matter
	// at a few thousand K; 0 draws them uniformly, as a complete list of a
	// small ion has lines from every level.
	LowerScale float64
	// LogGFMean and LogGFSigma are the mean and spread at 5000 Å of the
	// normal distribution log gf is drawn from (see demoLines).
	LogGFMean, LogGFSigma float64
	// Arrays are low-lying excited configurations whose lines from the
	// lowest levels fall in the near-infrared (see Array).
	Arrays []Array
}

// Array is an invented transition array: an excited configuration of the
// parity opposite to the ground's, Levels levels within ±Spread eV of
// Energy, and Lines lines to it from the levels of the ground's parity
// below LowerMax eV (the ground configuration). Because the lower levels
// lie close together and the upper ones too, the lines cluster around
// λ ≈ hc/Energy; an open-f-shell ion has several such arrays within the
// first couple of eV, which is what makes lanthanide-rich matter opaque in
// the near-infrared (the pattern of published theoretical lists, from
// memory; the numbers are invented).
type Array struct {
	Energy, Spread float64 // eV
	Levels, Lines  int
	LowerMax       float64 // eV
	// LogGFShift is added to the stage's mean log gf for the array's
	// lines (their spread is the stage's).
	LogGFShift float64
}

// Plan returns the elements of the demo line lists. The file names are
// stable: other parts of the program read them.
//
// The sizes, gaps and gf distributions are invented; their pattern follows
// the published theoretical lists qualitatively (from memory):
//   - Sr: Sr II has the real lines only (its invented levels begin above
//     5.5 eV, where the real ion's 6s and 5d levels lie, so their lines are
//     weak at kilonova temperatures); Sr I and Sr III are small.
//   - Y, Zr (open 4d shell): ~10² levels per ion in a couple of eV per
//     parity, opposite parity from ~1.3–2 eV (neutral) and ~3 eV (singly
//     ionised), 10²–10³ lines per element, log gf centred near −1.8 with
//     σ 1.0 (fewer, on average stronger lines), lower levels uniform.
//   - Ce, Nd, Sm (open 4f shell): ~10³ levels per ion over ~10 eV, the
//     ground's parity from the ground up and the other from 1–2 eV,
//     10⁴–10⁵ lines per ion, log gf centred near −3.1 with σ 1.3 (many
//     weak lines), lower levels weighted exp(−E/2 eV).
//   - Eu (half-filled 4f shell): fewer levels and lines than its
//     neighbours, and its singly ionised lines from the ground need ~3 eV.
func Plan() []Element {
	const lgLight, sdLight = -1.8, 1.0 // log gf of the d-shell ions
	const lgLan, sdLan = -3.1, 1.3     // log gf of the f-shell ions
	el := func(sym string, st ...Stage) Element {
		return Element{Symbol: sym, File: "demo_" + strings.ToLower(sym), Stages: st}
	}
	d := func(charge uint8, levels, lines int, gap, cross float64) Stage {
		return Stage{charge, levels, lines, gap, cross, 2.2, 4, 0, lgLight, sdLight, nil}
	}
	f := func(charge uint8, levels, lines int, gap, cross float64, arrays ...Array) Stage {
		return Stage{charge, levels, lines, gap, cross, 10, 8, 2, lgLan, sdLan, arrays}
	}
	// A near-infrared transition array from the ground configuration's
	// levels below 0.1 eV.
	const irShift = -2.0
	ir := func(energy, spread float64, levels, lines int) Array {
		return Array{Energy: energy, Spread: spread, Levels: levels, Lines: lines, LowerMax: 0.1, LogGFShift: irShift}
	}
	return []Element{
		{Symbol: "Ca", File: "demo_ca"}, // the real Ca II lines only
		el("Sr", d(0, 50, 150, 2.2, 1.8), d(1, 40, 60, 5.5, 6.6), d(2, 30, 40, 21, 21.5)),
		el("Y", d(0, 80, 150, 1.3, 1.3), d(1, 90, 250, 0, 2.9), d(2, 30, 40, 0.9, 5.4)),
		// Zr III's opposite parity starts so high that none of its lines
		// falls in the window: levels only (they count in the partition
		// function).
		el("Zr", d(0, 110, 200, 0, 1.8), d(1, 110, 300, 0, 3.0), d(2, 40, 0, 0, 7.5)),
		el("Ce", f(0, 900, 20000, 0, 1.0), f(1, 1200, 45000, 0, 1.2, ir(1.30, 0.04, 200, 700)), f(2, 500, 12000, 0, 1.1)),
		el("Nd", f(0, 1200, 25000, 0, 1.0),
			f(1, 1800, 65000, 0, 1.5, ir(1.10, 0.04, 200, 700), ir(0.80, 0.04, 200, 700), ir(0.60, 0.03, 150, 500)),
			f(2, 700, 20000, 0, 1.7)),
		el("Sm", f(0, 1200, 25000, 0, 1.2), f(1, 1700, 60000, 0, 1.3, ir(1.45, 0.04, 200, 700)), f(2, 600, 15000, 0, 2.0)),
		el("Eu", f(0, 400, 8000, 1.6, 1.6), f(1, 700, 22000, 1.2, 2.7), f(2, 400, 8000, 0.3, 2.5)),
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

// RealLines returns the real lines included in the demo lists.
func RealLines() []RealLine { return slices.Clone(realLines) }

// Demo wavelength window, vacuum Å.
const (
	demoMinWavelength = 3500
	demoMaxWavelength = 25000
	hcEVAngstrom      = 1e8 * physics.InvCmToEV // λ[Å] = hc/ΔE[eV]
	// demoGFWavelength is where the invented log gf has the stage's mean;
	// it falls as log10(5000 Å/λ) on either side.
	demoGFWavelength = 5000
)

// Demo generates the invented lines and levels of one element of the demo
// (plus its real lines) with a seeded random source: the same seed gives
// the same store. Every species gets a full level set (LevelSource
// linelists.FileLevels), so its partition function is that of the invented atom.
func Lines(el Element, seed uint64) (*linelists.Store, error) {
	e, err := linelists.ElementBySymbol(el.Symbol)
	if err != nil {
		return nil, err
	}
	b := linelists.NewBuilder()
	for _, st := range el.Stages {
		sp := linelists.Species{Z: uint8(e.Z), Charge: st.Charge}
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
		// Each array draws from its own stream, so adding one leaves the
		// other lines of the ion as they were.
		for k, a := range st.Arrays {
			arng := rand.New(rand.NewPCG(seed, uint64(e.Z)<<8|uint64(st.Charge)|uint64(k+1)<<16))
			upper, lines := arrayLines(arng, sp, st, a, levels)
			for _, l := range upper {
				b.AddLevel(sp, l.e, l.g)
			}
			for _, l := range lines {
				b.Add(l)
			}
		}
	}
	for _, rl := range realLines {
		sp := linelists.MustSpecies(rl.Species)
		if int(sp.Z) != e.Z {
			continue
		}
		b.AddLevel(sp, 0, float32(mustGround(sp)))
		b.AddLevel(sp, rl.LowerCm*physics.InvCmToEV, rl.LowerG)
		b.AddLevel(sp, rl.UpperCm*physics.InvCmToEV, rl.UpperG)
		b.Add(linelists.Line{Wavelength: rl.Wavelength, LogGF: rl.LogGF, Species: sp, LowerEnergy: rl.LowerCm * physics.InvCmToEV, LowerG: rl.LowerG})
	}
	s, rep := b.Build()
	if rep.Duplicates > 0 {
		return nil, fmt.Errorf("linelists: demo %s: %d duplicate lines", el.Symbol, rep.Duplicates)
	}
	return s, nil
}

func mustGround(sp linelists.Species) float64 {
	g, known := linelists.GroundWeight(sp)
	if !known {
		panic("linelists: demo: unknown ground weight of " + sp.String())
	}
	return g
}

// RealNote returns the marking comment of line i of a demo store when it
// is one of the real lines, or "".
func RealNote(s *linelists.Store, i int) string {
	sp := s.SpeciesTable[s.Species[i]]
	for _, rl := range realLines {
		if math.Abs(rl.Wavelength-s.Wavelength[i]) < 1e-6 && linelists.MustSpecies(rl.Species) == sp {
			return rl.Note
		}
	}
	return ""
}

type demoLevel struct {
	e   float64
	g   float32
	odd bool // parity opposite to the ground level's
}

// demoLevels invents a level set: the ground level with the weight from
// the element table, then levels of the ground's parity from Gap and of the
// opposite parity from CrossGap, half and half. Of each parity, 15 % of the
// levels are spread evenly over the first eV above its start (low-lying
// terms), the rest with a density rising as (E − start)^1.5 up to Spread
// above the start (at most 85 % of the ionisation energy, at least 1 eV). J is whole
// or half-whole as the number of electrons is even or odd. Energies are
// rounded to 1e-4 eV.
func demoLevels(rng *rand.Rand, sp linelists.Species, st Stage, ie float64) []demoLevel {
	out := []demoLevel{{0, float32(mustGround(sp)), false}}
	half := (int(sp.Z)-int(sp.Charge))%2 == 1
	for len(out) < st.Levels {
		odd := rng.IntN(2) == 1
		start := st.Gap
		if odd {
			start = st.CrossGap
		}
		top := math.Max(math.Min(0.85*ie, start+st.Spread), start+1)
		var e float64
		if rng.Float64() < 0.15 {
			e = start + 0.02 + 0.98*rng.Float64()
		} else {
			e = start + 0.02 + (top-start)*math.Pow(rng.Float64(), 1/2.5)
		}
		e = math.Round(e*1e4) / 1e4
		j := float64(rng.IntN(int(st.JMax) + 1))
		if half {
			j += 0.5
		}
		out = append(out, demoLevel{e, float32(2*j + 1), odd})
	}
	slices.SortFunc(out, func(a, b demoLevel) int { return cmp.Or(cmp.Compare(a.e, b.e), cmp.Compare(a.g, b.g)) })
	// Two levels with the same energy and weight would be one level in the
	// levels file: keep the first.
	return slices.CompactFunc(out, func(a, b demoLevel) bool { return a.e == b.e && a.g == b.g })
}

// demoLines invents lines between the levels by the electric-dipole rules:
// opposite parity, |ΔJ| ≤ 1 and not J = 0 → 0. The lower level is drawn
// uniformly or with weight exp(−E/LowerScale), the upper level uniformly
// among the levels of the other parity that put the line in 3500–25000 Å,
// and log gf from a normal distribution (LogGFMean, LogGFSigma) plus
// log10(5000 Å/λ), clipped to −7…+0.9.
func demoLines(rng *rand.Rand, sp linelists.Species, st Stage, levels []demoLevel) []linelists.Line {
	cum := make([]float64, len(levels))
	sum := 0.0
	for i, l := range levels {
		if st.LowerScale > 0 {
			sum += math.Exp(-l.e / st.LowerScale)
		} else {
			sum++
		}
		cum[i] = sum
	}
	// Indices and energies of the levels of each parity, by energy.
	var idx [2][]int
	var energies [2][]float64
	for i, l := range levels {
		p := 0
		if l.odd {
			p = 1
		}
		idx[p] = append(idx[p], i)
		energies[p] = append(energies[p], l.e)
	}
	// A second line from the same lower level to another level at the same
	// energy would duplicate the first: one line per lower level and upper
	// energy.
	type pair struct {
		lo  int
		eUp float64
	}
	used := map[pair]bool{}
	out := make([]linelists.Line, 0, st.Lines)
	for tries := 0; len(out) < st.Lines && tries < 50*st.Lines; tries++ {
		lo, _ := slices.BinarySearch(cum, rng.Float64()*sum)
		lo = min(lo, len(levels)-1)
		other := 1
		if levels[lo].odd {
			other = 0
		}
		eMin := levels[lo].e + hcEVAngstrom/demoMaxWavelength
		eMax := levels[lo].e + hcEVAngstrom/demoMinWavelength
		a, _ := slices.BinarySearch(energies[other], eMin)
		z, _ := slices.BinarySearch(energies[other], eMax)
		if z <= a {
			continue
		}
		up := idx[other][a+rng.IntN(z-a)]
		gl, gu := levels[lo].g, levels[up].g
		if math.Abs(float64(gu-gl)) > 2 || gl == 1 && gu == 1 || used[pair{lo, levels[up].e}] {
			continue
		}
		used[pair{lo, levels[up].e}] = true
		w := hcEVAngstrom / (levels[up].e - levels[lo].e)
		// For a given dipole matrix element f ∝ ΔE (f = 2mₑΔE|D|²/(3ħ²e²g),
		// common practice): lines far in the infrared are weaker.
		lgf := st.LogGFMean + st.LogGFSigma*rng.NormFloat64() + math.Log10(demoGFWavelength/w)
		lgf = math.Round(math.Max(-7, math.Min(0.9, lgf))*1e3) / 1e3
		out = append(out, linelists.Line{
			Wavelength: math.Round(w*1e4) / 1e4, LogGF: lgf, Species: sp,
			LowerEnergy: levels[lo].e, LowerG: gl,
			HasUpper: true, UpperEnergy: levels[up].e, UpperG: gu,
		})
	}
	return out
}

// arrayLines invents array a of an ion with level set levels: its upper
// levels (energies uniform within ±Spread of Energy, rounded to 1e-4 eV,
// none at the energy of another level) and its lines from the levels of the
// ground's parity below LowerMax, by the electric-dipole rules of
// demoLines, lower and upper level drawn uniformly, wavelengths kept in
// 3500–25000 Å, log gf as in demoLines.
func arrayLines(rng *rand.Rand, sp linelists.Species, st Stage, a Array, levels []demoLevel) ([]demoLevel, []linelists.Line) {
	half := (int(sp.Z)-int(sp.Charge))%2 == 1
	// One level per energy, so that no two lines from one lower level share
	// a wavelength.
	taken := map[float64]bool{}
	for _, l := range levels {
		taken[l.e] = true
	}
	var upper []demoLevel
	for tries := 0; len(upper) < a.Levels && tries < 50*a.Levels; tries++ {
		e := math.Round((a.Energy+a.Spread*(2*rng.Float64()-1))*1e4) / 1e4
		j := float64(rng.IntN(int(st.JMax) + 1))
		if half {
			j += 0.5
		}
		g := float32(2*j + 1)
		if e <= 0 || taken[e] {
			continue
		}
		taken[e] = true
		upper = append(upper, demoLevel{e, g, true})
	}
	var lower []demoLevel
	for _, l := range levels {
		if !l.odd && l.e <= a.LowerMax {
			lower = append(lower, l)
		}
	}
	if len(lower) == 0 || len(upper) == 0 {
		return upper, nil
	}
	type pair struct{ lo, up int }
	used := map[pair]bool{}
	var out []linelists.Line
	for tries := 0; len(out) < a.Lines && tries < 50*a.Lines; tries++ {
		lo, up := rng.IntN(len(lower)), rng.IntN(len(upper))
		l, u := lower[lo], upper[up]
		if math.Abs(float64(u.g-l.g)) > 2 || l.g == 1 && u.g == 1 || used[pair{lo, up}] || u.e <= l.e {
			continue
		}
		w := hcEVAngstrom / (u.e - l.e)
		if w < demoMinWavelength || w > demoMaxWavelength {
			continue
		}
		used[pair{lo, up}] = true
		lgf := st.LogGFMean + a.LogGFShift + st.LogGFSigma*rng.NormFloat64() + math.Log10(demoGFWavelength/w)
		lgf = math.Round(math.Max(-7, math.Min(0.9, lgf))*1e3) / 1e3
		out = append(out, linelists.Line{
			Wavelength: math.Round(w*1e4) / 1e4, LogGF: lgf, Species: sp,
			LowerEnergy: l.e, LowerG: l.g,
			HasUpper: true, UpperEnergy: u.e, UpperG: u.g,
		})
	}
	return upper, out
}

// Comments is the header every demo file starts with.
func Comments(el Element, seed uint64) []string {
	return []string{
		"INVENTED FOR DEMONSTRATION - NOT ATOMIC DATA.",
		"This file was made up by broadline's seeded demo generator (tools/demolines,",
		fmt.Sprintf("seed %d, element %s): random level energies, weights and gf values shaped", seed, el.Symbol),
		"after the qualitative statistics of theoretical line lists (few lines for the",
		"open-d-shell elements, very many weak ones for the lanthanides). It is not",
		"a measurement or calculation of any real atom. Do not use it for science.",
		"The only real transitions are the few lines preceded by a comment that says",
		"\"real line\"; their log gf values are typed from memory and need checking.",
	}
}
