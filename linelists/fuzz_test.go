package linelists

import (
	"bytes"
	"compress/gzip"
	"errors"
	"math"
	"testing"
)

// FuzzRead feeds arbitrary bytes to the reader of our format and to the
// import path: no input may panic, an error must be a *ParseError, and a
// store that comes back must keep its invariants. The seed corpus is in
// testdata/fuzz/FuzzRead.
func FuzzRead(f *testing.F) {
	f.Add([]byte(sample), false)
	f.Add([]byte("wavelength_nm, species, gf, lower_energy_eV, lower_g\n500.0, Nd II, 0.1, 0.5, 8\n"), false)
	f.Add([]byte("5000 -1 0 2.5\n6000 -2 1 3\n"), true)
	f.Add([]byte("wavelength_A species log_gf lower_energy_eV lower_g\n5000.0 Nd_II 1e308 0.0 8\n"), false)
	f.Add([]byte("10 3 90000 49.5\n1e7 -15 0 0\n"), true)
	var gz bytes.Buffer
	zw := gzip.NewWriter(&gz)
	zw.Write([]byte(sample))
	zw.Close()
	f.Add(gz.Bytes(), false)
	cols, err := ParseColumnMap("wavelength=1:A,log_gf=2,lower_energy=3:cm-1,lower_j=4")
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, data []byte, imp bool) {
		opts := ReadOptions{Name: "fuzz"}
		if imp {
			opts.Import = &Import{Columns: cols, Species: Species{Z: 60, Charge: 1}}
		}
		s, _, err := Read(bytes.NewReader(data), opts)
		opts.Workers = 2
		s2, _, err2 := Read(bytes.NewReader(data), opts)
		if (err == nil) != (err2 == nil) || err != nil && err.Error() != err2.Error() {
			t.Fatalf("serial and parallel parses disagree: %v / %v", err, err2)
		}
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %T is not a *ParseError: %v", err, err)
			}
			return
		}
		checkStore(t, s)
		if s.Len() != s2.Len() {
			t.Fatalf("serial %d lines, parallel %d", s.Len(), s2.Len())
		}
	})
}

// checkStore asserts the invariants every Store from this package's
// readers keeps, the physical ranges of ranges.go included.
func checkStore(t *testing.T, s *Store) {
	t.Helper()
	n := s.Len()
	if len(s.LogGF) != n || len(s.Species) != n || len(s.Lower) != n {
		t.Fatal("per-line slices differ in length")
	}
	for i := 0; i < n; i++ {
		w := s.Wavelength[i]
		if !(w > 0) || math.IsInf(w, 0) {
			t.Fatalf("line %d: wavelength %v", i, w)
		}
		// Air→vacuum lengthens a wavelength by less than 0.03 % (Morton 2000).
		if w < minWavelengthA || w > maxWavelengthA*1.0003 {
			t.Fatalf("line %d: wavelength %v Å outside %v–%v Å", i, w, minWavelengthA, maxWavelengthA)
		}
		if lg := s.LogGF[i]; !(lg >= minLogGF && lg <= maxLogGF) {
			t.Fatalf("line %d: log gf %v outside %v…%v", i, lg, minLogGF, maxLogGF)
		}
		if i > 0 && w < s.Wavelength[i-1] {
			t.Fatalf("not sorted at %d", i)
		}
		if int(s.Species[i]) >= len(s.SpeciesTable) || int(s.Lower[i]) >= len(s.Levels.Energy) {
			t.Fatalf("line %d: index out of range", i)
		}
		if s.Levels.Species[s.Lower[i]] != s.Species[i] {
			t.Fatalf("line %d: lower level of another species", i)
		}
		sp := s.SpeciesTable[s.Species[i]]
		if lim, _ := lowerEnergyLimit(sp); s.Levels.Energy[s.Lower[i]] > lim {
			t.Fatalf("line %d: lower level %v eV above %v's limit %v eV", i, s.Levels.Energy[s.Lower[i]], sp, lim)
		}
	}
	for i, e := range s.Levels.Energy {
		sp := s.SpeciesTable[s.Levels.Species[i]]
		if !(e >= 0) || e > upperEnergyLimit(sp) {
			t.Fatalf("level %d of %v: energy %v eV", i, sp, e)
		}
		if g := s.Levels.G[i]; !(g >= 0 && g <= maxReadG) || g != float32(math.Round(float64(g))) {
			t.Fatalf("level %d of %v: weight %v", i, sp, g)
		}
	}
}

// FuzzReadLevels: no input may panic; errors are *ParseError; a failed
// read adds nothing; levels that are read are valid.
func FuzzReadLevels(f *testing.F) {
	f.Add([]byte("species energy_cm-1 j\nCa_II 0 0.5\nCa_II 13650.19 1.5\n"))
	f.Add([]byte("energy_eV, g\n0, 2\n1.7, 4\n"))
	f.Add([]byte("species energy_eV g\nNd_II 1e999 8\n"))
	f.Add([]byte("species energy_eV g\nNd_II 11.9 8\nNd_V 99 101\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		b := NewBuilder()
		_, err := b.ReadLevels(bytes.NewReader(data), LevelsOptions{Name: "fuzz"})
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %T is not a *ParseError: %v", err, err)
			}
			if len(b.lvE) != 0 {
				t.Fatal("failed read added levels")
			}
			return
		}
		s, _ := b.Build()
		checkStore(t, s)
	})
}

// FuzzReadOverrides: no input may panic; errors are *ParseError.
func FuzzReadOverrides(f *testing.F) {
	f.Add([]byte("species, ionization_eV, ground_g\nNd II, 10.80, -\nEu I, -, 7\n"))
	f.Add([]byte("species ground_g\nFe_II 10\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		o, err := ReadOverrides(bytes.NewReader(data), "fuzz")
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %T is not a *ParseError: %v", err, err)
			}
			return
		}
		for sp, v := range o.Ionization {
			if !(v > 0) || sp.Charge > 3 {
				t.Fatalf("accepted %v = %v", sp, v)
			}
		}
	})
}
