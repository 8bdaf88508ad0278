package linelists

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"
)

func TestOverrides(t *testing.T) {
	in := "# my corrections\nspecies, ionization_eV, ground_g\nNd II, 10.80, -\nEu I, -, 7\n\"Fe III\", 30.70, 9\n"
	o, err := ReadOverrides(strings.NewReader(in), "o.txt")
	if err != nil {
		t.Fatal(err)
	}
	nd, _ := o.Element(60)
	if nd.Ionization[1] != 10.80 || nd.Ionization[0] != 5.52475 || nd.GroundG[1] != 8 {
		t.Errorf("Nd with overrides: %v %v", nd.Ionization, nd.GroundG)
	}
	orig, _ := ElementByZ(60)
	if orig.Ionization[1] != 10.783 {
		t.Error("the package table was modified")
	}
	if g, known := o.GroundWeight(MustSpecies("Eu I")); !known || g != 7 {
		t.Errorf("Eu I ground weight %v", g)
	}
	if g, _ := o.GroundWeight(MustSpecies("Eu II")); g != 9 {
		t.Errorf("Eu II ground weight %v, want the table's 9", g)
	}
	var none *Overrides
	if e, err := none.Element(26); err != nil || e.Ionization[0] != 7.9024681 {
		t.Error("nil overrides should give the table")
	}
	// The store's ground-weight fallback uses them.
	s := &Store{Overrides: o}
	if u, complete := s.PartitionFunction(MustSpecies("Eu I"), 5000); u != 7 || complete {
		t.Errorf("U(Eu I) = %v %v, want the overridden 7, incomplete", u, complete)
	}
	// Through Load.
	src := writeTemp(t, "l.txt", sample)
	op := filepath.Join(filepath.Dir(src), "o.txt")
	writeFile(t, op, in)
	st, _, err := Load([]string{src}, Options{Overrides: op, Cache: CacheOff})
	if err != nil {
		t.Fatal(err)
	}
	if e, _ := st.Element(26); e.Ionization[2] != 30.70 {
		t.Errorf("Load ignored the overrides: %v", e.Ionization)
	}
}

func TestOverridesErrors(t *testing.T) {
	for _, tc := range []struct {
		in        string
		line, col int
		sentinel  error
	}{
		{"species colour\n", 1, 2, ErrHeader},
		{"species\n", 1, 0, ErrHeader},
		{"species ionization_eV\nNd_II -3\n", 2, 2, ErrRange},
		{"species ionization_eV\nNd_V 40\n", 2, 1, ErrRange},
		{"species ionization_eV\nH_II 1\n", 2, 1, ErrRange},
		{"species ground_g\nNd_II 2.5\n", 2, 2, ErrRange},
		{"species ground_g\nNd_II\n", 2, 0, ErrFieldCount},
		{"species ground_g\nQq_II 3\n", 2, 1, ErrSpecies},
		{"# nothing\n", 1, 0, ErrHeader},
	} {
		_, err := ReadOverrides(strings.NewReader(tc.in), "o")
		var pe *ParseError
		if !errors.As(err, &pe) || pe.Line != tc.line || pe.Column != tc.col || !errors.Is(err, tc.sentinel) {
			t.Errorf("%q: %v, want line %d column %d %v", tc.in, err, tc.line, tc.col, tc.sentinel)
		}
	}
}
