package linelists

import (
	"errors"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"broadline/physics"
)

func TestReadLevels(t *testing.T) {
	// The Ca II levels of REFERENCES.md, in cm⁻¹ with J.
	in := "# Ca II levels (NIST, via REFERENCES.md)\n" +
		"energy_cm-1, j\n0, 0.5\n13650.19, 1.5\n13710.88, 2.5\n25191.51, 0.5\n25414.40, 1.5\n"
	b := NewBuilder()
	rep, err := b.ReadLevels(strings.NewReader(in), LevelsOptions{Name: "ca.txt", Species: MustSpecies("Ca II")})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Rows != 5 || len(rep.Species) != 1 {
		t.Errorf("report %+v", rep)
	}
	// A line list naming one of the levels slightly differently (0.5 cm⁻¹
	// off, as another table might) and one level the file lacks.
	lines := "wavelength_A species log_gf lower_energy_cm-1 lower_j\n" +
		"8500.36 Ca_II -1.318 13650.69 1.5\n" +
		"9000.00 Ca_II -2 30000 0.5\n"
	if _, err := b.Read(strings.NewReader(lines), ReadOptions{}); err != nil {
		t.Fatal(err)
	}
	s, brep := b.Build()
	if brep.LevelsMatched != 1 || len(brep.Warnings) != 1 || !strings.Contains(brep.Warnings[0], "1 lower levels") {
		t.Errorf("matched %d, warnings %v", brep.LevelsMatched, brep.Warnings)
	}
	if len(s.Levels.Energy) != 6 {
		t.Errorf("%d levels, want the file's 5 plus 1 unmatched", len(s.Levels.Energy))
	}
	if e := s.Levels.Energy[s.Lower[0]]; !scalar.EqualWithinAbs(e/physics.InvCmToEV, 13650.19, 1e-6) {
		t.Errorf("the 8500 line's lower level is at %v cm⁻¹, want the file's 13650.19", e/physics.InvCmToEV)
	}
	if s.LevelSourceOf(MustSpecies("Ca II")) != FileLevels {
		t.Error("level source is not the file")
	}
	// U(5000 K) over the five file levels is REFERENCES.md's 2.199 [calc];
	// the extra level at 30000 cm⁻¹ (g 2) adds 2 exp(−8.63) = 3.6e-4.
	if u, _ := s.PartitionFunction(MustSpecies("Ca II"), 5000); !scalar.EqualWithinAbs(u, 2.199+3.6e-4, 1e-3) {
		t.Errorf("U = %v", u)
	}
}

func TestReadLevelsErrors(t *testing.T) {
	for _, tc := range []struct {
		in        string
		line, col int
		sentinel  error
	}{
		{"species energy_eV\n", 1, 0, ErrHeader},
		{"species energy_eV g colour\n", 1, 4, ErrHeader},
		{"species energy_eV g\nNd_II -1 8\n", 2, 2, ErrRange},
		{"species energy_eV g\nNd_II 1 0\n", 2, 3, ErrRange},
		{"species energy_eV j\nNd_II 1 0.7\n", 2, 3, ErrRange},
		{"species energy_eV g\nQq_II 1 2\n", 2, 1, ErrSpecies},
		// Above Nd II's ionisation energy (10.783 eV, NIST ASD) plus 1 eV.
		{"species energy_eV g\nNd_II 11.9 8\n", 2, 2, ErrRange},
		{"species energy_cm-1 g\nNd_II 1e7 8\n", 2, 2, ErrRange},
		{"species energy_eV g\nNd_II 1 101\n", 2, 3, ErrRange},
		{"species energy_eV j\nNd_II 1 50\n", 2, 3, ErrRange},
		{"species energy_eV g\nNd_II 1\n", 2, 0, ErrFieldCount},
		{"", 0, 0, ErrHeader},
	} {
		b := NewBuilder()
		_, err := b.ReadLevels(strings.NewReader(tc.in), LevelsOptions{Name: "l"})
		var pe *ParseError
		if !errors.As(err, &pe) || pe.Line != tc.line || pe.Column != tc.col || !errors.Is(err, tc.sentinel) {
			t.Errorf("%q: %v, want line %d column %d %v", tc.in, err, tc.line, tc.col, tc.sentinel)
		}
		if len(b.lvE) != 0 {
			t.Errorf("%q: failed read added levels", tc.in)
		}
	}
}
