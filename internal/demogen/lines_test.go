package demogen

import (
	"broadline/linelists"
	"bytes"
	"cmp"
	"compress/gzip"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/stat"
)

const demoDir = "../../app/demo/lines"

// TestDemoFilesCurrent checks that the committed demo files are what the
// generator makes now (run "go run ./tools/demolines" after changing it),
// that each says it is invented, and that they read back.
func TestDemoFilesCurrent(t *testing.T) {
	if testing.Short() {
		t.Skip("reads the demo files")
	}
	count := map[string]int{}
	var zr, nd *linelists.Store
	for _, el := range Plan() {
		s, err := Lines(el, 1)
		if err != nil {
			t.Fatal(err)
		}
		count[el.Symbol] = s.Len()
		switch el.Symbol {
		case "Zr":
			zr = s
		case "Nd":
			nd = s
		}
		var want bytes.Buffer
		if err := linelists.Write(&want, s, linelists.WriteOptions{Comments: Comments(el, 1), Note: func(i int) string { return RealNote(s, i) }}); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(demoDir, el.File+".txt.gz")
		got := gunzip(t, path)
		// The committed file has extra "# key: value" lines; compare the
		// data rows.
		if a, b := dataRows(got), dataRows(want.Bytes()); a != b {
			t.Errorf("%s differs from the generator's output; run go run ./tools/demolines", path)
		}
		if !bytes.Contains(got[:400], []byte("INVENTED FOR DEMONSTRATION - NOT ATOMIC DATA")) {
			t.Errorf("%s: header does not say it is invented", path)
		}
		lv := gunzip(t, filepath.Join(demoDir, el.File+"_levels.txt.gz"))
		if !bytes.HasPrefix(lv, []byte("# INVENTED FOR DEMONSTRATION - NOT ATOMIC DATA")) {
			t.Errorf("%s levels: header does not say it is invented", el.File)
		}
		if s.Len() > 20000 {
			continue // reading back the big ones adds nothing but time
		}
		b := linelists.NewBuilder()
		if _, err := b.Read(bytes.NewReader(got), linelists.ReadOptions{Name: path}); err != nil {
			t.Fatal(err)
		}
		if _, err := b.ReadLevels(bytes.NewReader(lv), linelists.LevelsOptions{Name: el.File + "_levels"}); err != nil {
			t.Fatal(err)
		}
		r, rep := b.Build()
		if err := r.Check(); err != nil {
			t.Fatalf("%s read back: %v", el.File, err)
		}
		if r.Len() != s.Len() || len(r.Levels.Energy) != len(s.Levels.Energy) || len(rep.Warnings) != 0 {
			t.Errorf("%s read back: %d lines %d levels (%v), generated %d and %d", el.File, r.Len(), len(r.Levels.Energy), rep.Warnings, s.Len(), len(s.Levels.Energy))
		}
		for _, sp := range r.SpeciesTable {
			if r.LevelSourceOf(sp) != linelists.FileLevels {
				t.Errorf("%v: levels not from the levels file", sp)
			}
		}
	}
	checkComplexity(t, count, zr, nd)
}

func gunzip(t *testing.T, path string) []byte {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	zr, err := gzip.NewReader(f)
	if err != nil {
		t.Fatal(err)
	}
	b, err := io.ReadAll(zr)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func dataRows(b []byte) string {
	var out strings.Builder
	for _, l := range strings.Split(string(b), "\n") {
		if !strings.HasPrefix(l, "# ") || strings.HasPrefix(l, "# real line") {
			out.WriteString(l + "\n")
		}
	}
	return out.String()
}

// TestDemoStatistics checks the generator does what its comment says: the
// same seed gives the same lines, wavelengths stay in 3500–25000 Å, each
// wavelength is hc/ΔE of its levels with |ΔJ| ≤ 1, and log gf minus the
// documented log10(5000 Å/λ) trend has the plan's mean and σ.
func TestDemoStatistics(t *testing.T) {
	el := Plan()[5] // Nd
	if el.Symbol != "Nd" {
		t.Fatalf("plan order changed: %v", el.Symbol)
	}
	a, err := Lines(el, 7)
	if err != nil {
		t.Fatal(err)
	}
	// Determinism on the smallest lanthanide, to save time.
	eu := Plan()[7]
	e1, err1 := Lines(eu, 7)
	e2, err2 := Lines(eu, 7)
	e3, err3 := Lines(eu, 8)
	if err := cmp.Or(err1, err2, err3); err != nil {
		t.Fatal(err)
	}
	if e1.Len() != e2.Len() || e1.Wavelength[100] != e2.Wavelength[100] || e1.LogGF[999] != e2.LogGF[999] {
		t.Error("same seed, different lists")
	}
	if e1.Wavelength[100] == e3.Wavelength[100] {
		t.Error("different seeds, same list")
	}
	// The lines of the transition arrays have their own mean (checked in
	// TestDemoArrays): leave them out here.
	var lgf []float64
	for i := range a.Len() {
		if w := a.Wavelength[i]; w < 3500 || w > 25000 {
			t.Fatalf("line %d at %v Å", i, w)
		}
		if arrayOf(el, a, i) < 0 {
			lgf = append(lgf, float64(a.LogGF[i])-math.Log10(demoGFWavelength/a.Wavelength[i]))
		}
	}
	mean, sd := stat.MeanStdDev(lgf, nil)
	// The clipping at −7 and +0.9 shifts the moments a little.
	wantMean, wantSD := el.Stages[0].LogGFMean, el.Stages[0].LogGFSigma
	if !scalar.EqualWithinAbs(mean, wantMean, 0.05) || !scalar.EqualWithinAbs(sd, wantSD, 0.05) {
		t.Errorf("log gf mean %v sd %v, want ≈ %v and ≈ %v", mean, sd, wantMean, wantSD)
	}
	// Each line's lower level is below an upper level at E_low + hc/λ:
	// check a sample against the level table.
	for i := 0; i < a.Len(); i += 997 {
		eUp := a.Levels.Energy[a.Lower[i]] + hcEVAngstrom/a.Wavelength[i]
		// Electric-dipole rule: some level there has |g_up − g_low| ≤ 2.
		found := false
		gl := a.Levels.G[a.Lower[i]]
		for l, e := range a.Levels.Energy {
			if a.Levels.Species[l] == a.Species[i] && math.Abs(e-eUp) < 1e-4 && math.Abs(float64(a.Levels.G[l]-gl)) <= 2 {
				found = true
				break
			}
		}
		if !found {
			t.Errorf("line %d: no upper level at %.4f eV with |ΔJ| ≤ 1", i, eUp)
		}
	}
	if u, complete := a.PartitionFunction(linelists.MustSpecies("Nd II"), 5000); !complete || u < 8 {
		t.Errorf("Nd II demo U = %v complete %v", u, complete)
	}
}

// TestDemoRealLines checks that the real lines carry the REFERENCES.md
// values and are marked where they are written.
func TestDemoRealLines(t *testing.T) {
	for _, rl := range RealLines() {
		// λ = 1/(E_up − E_low) in vacuum, from the REFERENCES.md levels;
		// wavelengths there are given to 0.01 Å and levels to 0.01 cm⁻¹
		// (0.012 Å at 1.1 µm), hence 0.02 Å.
		if w := 1e8 / (rl.UpperCm - rl.LowerCm); !scalar.EqualWithinAbs(w, rl.Wavelength, 0.02) {
			t.Errorf("%s %v: levels give %.3f Å", rl.Species, rl.Wavelength, w)
		}
	}
	s, err := Lines(Plan()[0], 1) // Ca
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	linelists.Write(&buf, s, linelists.WriteOptions{Note: func(i int) string { return RealNote(s, i) }})
	if n := strings.Count(buf.String(), "# real line"); n != 5 {
		t.Errorf("%d real-line marks in the Ca file, want 5", n)
	}
}

// checkComplexity checks the contrast the plan is built for (its sources
// are the qualitative statistics of published theoretical lists, from
// memory): every open-f-shell element (Ce, Nd, Sm, Eu) has at least 30 times
// the lines of every open-d-shell element (Sr, Y, Zr), and the strong lines
// from the lowest levels of Zr (lower level below 0.5 eV, log gf > −1) lie in
// the blue, while Nd has such lines well into the near-infrared. It runs
// inside TestDemoFilesCurrent, which generates every element anyway.
func checkComplexity(t *testing.T, count map[string]int, zr, nd *linelists.Store) {
	t.Helper()
	if zr == nil || nd == nil {
		t.Fatal("plan lacks Zr or Nd")
	}
	for _, f := range []string{"Ce", "Nd", "Sm", "Eu"} {
		for _, d := range []string{"Sr", "Y", "Zr"} {
			if count[f] < 30*count[d] {
				t.Errorf("%s has %d lines, %s %d: want a factor ≥ 30", f, count[f], d, count[d])
			}
		}
	}
	// Longest wavelength of a strong line from a level below 0.5 eV.
	reddest := func(s *linelists.Store) float64 {
		w := 0.0
		for i := range s.Len() {
			if s.Levels.Energy[s.Lower[i]] < 0.5 && s.LogGF[i] > -1 {
				w = max(w, s.Wavelength[i])
			}
		}
		return w
	}
	// Zr: opposite parity from 1.8 eV (Zr I) and 3.0 eV (Zr II), so such
	// lines need ΔE ≥ 1.3 eV, λ ≤ 9500 Å; Nd I's opposite parity starts at
	// 1.0 eV, within 0.62 eV (2 µm) of its levels near 0.4–0.5 eV.
	t.Logf("reddest strong low-level line: Zr %.0f Å, Nd %.0f Å; lines %v", reddest(zr), reddest(nd), count)
	if w := reddest(zr); w == 0 || w > hcEVAngstrom/1.3 {
		t.Errorf("Zr: strong low-level lines reach %.0f Å, want some, all below %.0f Å", w, hcEVAngstrom/1.3)
	}
	if w := reddest(nd); w < 20000 {
		t.Errorf("Nd: strong low-level lines reach only %.0f Å, want beyond 2 µm", w)
	}
}

// arrayOf returns the index of the transition array of el that line i of
// store s belongs to (lower level below the array's LowerMax, upper level
// within its band), or −1; it counts the arrays of all stages in order.
func arrayOf(el Element, s *linelists.Store, i int) int {
	sp := s.SpeciesTable[s.Species[i]]
	k := 0
	for _, st := range el.Stages {
		for _, a := range st.Arrays {
			if st.Charge == sp.Charge {
				lo := s.Levels.Energy[s.Lower[i]]
				up := lo + hcEVAngstrom/s.Wavelength[i]
				if lo <= a.LowerMax+1e-9 && math.Abs(up-a.Energy) <= a.Spread+1e-3 {
					return k
				}
			}
			k++
		}
	}
	return -1
}

// TestDemoArrays checks the near-infrared transition arrays of the demo's
// Nd II (see Array): each has most of the lines the plan asks for (the
// dipole rules and the few lower levels allow fewer), they fall within
// hc/(Energy + Spread) … hc/(Energy − Spread − LowerMax), their log gf
// minus the log10(5000 Å/λ) trend has the stage's mean plus LogGFShift and
// the stage's σ, and the lines of the arrays make up the bulk of the Nd II
// lines from levels below 0.1 eV beyond 1 µm.
func TestDemoArrays(t *testing.T) {
	el := Plan()[5]
	if el.Symbol != "Nd" {
		t.Fatalf("plan order changed: %v", el.Symbol)
	}
	s, err := Lines(el, 1)
	if err != nil {
		t.Fatal(err)
	}
	var arrays []Array
	var stage Stage
	for _, st := range el.Stages {
		if len(st.Arrays) > 0 {
			arrays, stage = append(arrays, st.Arrays...), st
		}
	}
	if len(arrays) < 2 {
		t.Fatalf("Nd has %d near-infrared arrays, want ≥ 2", len(arrays))
	}
	lgf := make([][]float64, len(arrays))
	lowIR, inArrays := 0, 0
	for i := range s.Len() {
		k := arrayOf(el, s, i)
		w := s.Wavelength[i]
		if s.SpeciesTable[s.Species[i]].Charge == stage.Charge && s.Levels.Energy[s.Lower[i]] <= 0.1 && w > 10000 {
			lowIR++
			if k >= 0 {
				inArrays++
			}
		}
		if k < 0 {
			continue
		}
		a := arrays[k]
		if w < hcEVAngstrom/(a.Energy+a.Spread)-1 || w > hcEVAngstrom/(a.Energy-a.Spread-a.LowerMax)+1 {
			t.Fatalf("array %d line at %.1f Å outside its band", k, w)
		}
		lgf[k] = append(lgf[k], float64(s.LogGF[i])-math.Log10(demoGFWavelength/w))
	}
	for k, a := range arrays {
		if n := len(lgf[k]); n < a.Lines/2 {
			t.Errorf("array %d: %d lines, plan %d", k, n, a.Lines)
		}
		// The clipping at log gf = −7 takes ~15 % of the lower tail here,
		// so compare the median and the interquartile range (σ = IQR/1.349
		// for a normal distribution), which it leaves alone.
		slices.Sort(lgf[k])
		med := stat.Quantile(0.5, stat.Empirical, lgf[k], nil)
		sd := (stat.Quantile(0.75, stat.Empirical, lgf[k], nil) - stat.Quantile(0.25, stat.Empirical, lgf[k], nil)) / 1.349
		if !scalar.EqualWithinAbs(med, stage.LogGFMean+a.LogGFShift, 0.15) || !scalar.EqualWithinAbs(sd, stage.LogGFSigma, 0.15) {
			t.Errorf("array %d: log gf median %.3f σ %.3f, want ≈ %.3f and ≈ %.3f", k, med, sd, stage.LogGFMean+a.LogGFShift, stage.LogGFSigma)
		}
	}
	t.Logf("Nd II lines from below 0.1 eV beyond 1 µm: %d, of them in the arrays %d", lowIR, inArrays)
	if inArrays < lowIR*3/4 {
		t.Errorf("only %d of %d low-level near-infrared Nd II lines are in the arrays", inArrays, lowIR)
	}
}
