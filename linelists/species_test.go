package linelists

import (
	"errors"
	"strings"
	"testing"
)

func TestParseSpecies(t *testing.T) {
	nd2 := Species{Z: 60, Charge: 1}
	for _, tc := range []struct {
		in   string
		want Species
	}{
		{"Nd II", nd2}, {"Nd_II", nd2}, {"NdII", nd2}, {"Nd+", nd2}, {"Nd1+", nd2},
		{"nd ii", nd2}, {`"Nd II"`, nd2}, {"  Nd  II ", nd2}, {"ND II", nd2}, {"Nd +1", nd2},
		{"Nd 2+", Species{60, 2}}, {"Nd++", Species{60, 2}}, {"Nd+2", Species{60, 2}},
		{"Nd I", Species{60, 0}}, {"Fe XXVI", Species{26, 25}}, {"Fe 25+", Species{26, 25}},
		{"NII", Species{7, 1}}, {"NiII", Species{28, 1}}, {"niii", Species{28, 1}},
		{"SIII", Species{16, 2}}, {"SiIII", Species{14, 2}}, {"FEII", Species{26, 1}},
		{"H II", Species{1, 1}}, {"IV", Species{53, 4}}, {"VII", Species{23, 1}},
		{"Sr_II", Species{38, 1}}, {"U III", Species{92, 2}}, {"Fm I", Species{100, 0}},
		{"Nd XLIX", Species{60, 48}}, {"Fm CI", Species{100, 100}}, {"Fm 99+", Species{100, 99}},
	} {
		got, err := ParseSpecies(tc.in)
		if err != nil {
			t.Errorf("ParseSpecies(%q): %v", tc.in, err)
			continue
		}
		if got != tc.want {
			t.Errorf("ParseSpecies(%q) = %v, want %v", tc.in, got, tc.want)
		}
		// The canonical form reads back to the same species.
		back, err := ParseSpecies(got.String())
		if err != nil || back != got {
			t.Errorf("round trip of %v: %v, %v", got, back, err)
		}
	}
	if s := nd2.String(); s != "Nd II" {
		t.Errorf("String() = %q, want \"Nd II\"", s)
	}
	for n, want := range map[int]string{4: "IV", 9: "IX", 14: "XIV", 40: "XL", 49: "XLIX", 90: "XC", 101: "CI", 399: "CCCXCIX", 0: "(0)"} {
		if got := Roman(n); got != want {
			t.Errorf("Roman(%d) = %q, want %q", n, got, want)
		}
	}
}

func TestParseSpeciesErrors(t *testing.T) {
	for _, tc := range []struct{ in, has string }{
		{"", "empty"},
		{"Nd", "no ion stage"},
		{"Nd 2", "not an ion stage or charge"},
		{"Xx II", `unknown element symbol "Xx"`},
		{"Nd IIII", "not a Roman numeral"},
		{"H III", "stages I to II"},
		{"12 II", "does not start with an element symbol"},
		{"Nd 1000+", "not an ion stage"},
		{"Nd II extra", "not a Roman numeral"},
		{strings.Repeat("Nd", 20), "too long"},
	} {
		_, err := ParseSpecies(tc.in)
		if err == nil {
			t.Errorf("ParseSpecies(%q): no error", tc.in)
			continue
		}
		if !errors.Is(err, ErrSpecies) {
			t.Errorf("ParseSpecies(%q): error %v does not wrap ErrSpecies", tc.in, err)
		}
		if !strings.Contains(err.Error(), tc.has) || !strings.Contains(err.Error(), `"Nd II"`) {
			t.Errorf("ParseSpecies(%q): error %q lacks %q or the expected form", tc.in, err, tc.has)
		}
	}
}

func FuzzParseSpecies(f *testing.F) {
	for _, s := range []string{"Nd II", "Nd_II", "NdII", "Nd+", "Nd1+", "nd ii", "Nd 2+", `"Nd II"`, "Fe XXVI", "x", "++", "Nd +"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		sp, err := ParseSpecies(s)
		if err != nil {
			if !errors.Is(err, ErrSpecies) {
				t.Fatalf("error %v does not wrap ErrSpecies", err)
			}
			return
		}
		if sp.Z < 1 || sp.Z > 100 || sp.Charge > sp.Z {
			t.Fatalf("ParseSpecies(%q) = %+v out of range", s, sp)
		}
		back, err := ParseSpecies(sp.String())
		if err != nil || back != sp {
			t.Fatalf("round trip %q → %v → %v, %v", s, sp, back, err)
		}
	})
}
