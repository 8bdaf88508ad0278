package physics

import (
	"encoding/json"
	"errors"
	"testing"
)

// TestParseMedium: everything the two former parsers (the line-list header
// "# medium:" and the spectrum readers' option) accepted still parses, and
// anything else is an error wrapping ErrMedium.
func TestParseMedium(t *testing.T) {
	for in, want := range map[string]Medium{
		"vacuum": Vacuum, "VACUUM": Vacuum, " Vacuum ": Vacuum, "vac": Vacuum, "Vac": Vacuum,
		"air": Air, "AIR": Air, "\tair\n": Air,
	} {
		got, err := ParseMedium(in)
		if err != nil || got != want {
			t.Errorf("ParseMedium(%q) = %v, %v; want %v", in, got, err, want)
		}
	}
	for _, in := range []string{"", " ", "vacuo", "airs", "wave", "awav", "1"} {
		if m, err := ParseMedium(in); !errors.Is(err, ErrMedium) || m != MediumDefault {
			t.Errorf("ParseMedium(%q) = %v, %v; want MediumDefault and ErrMedium", in, m, err)
		}
	}
}

func TestMediumString(t *testing.T) {
	for m, want := range map[Medium]string{Vacuum: "vacuum", Air: "air", MediumDefault: "vacuum (default)", 7: "Medium(7)"} {
		if got := m.String(); got != want {
			t.Errorf("Medium(%d).String() = %q, want %q", uint8(m), got, want)
		}
	}
	if MediumDefault != 0 {
		t.Error("the zero Medium must mean \"not said\"")
	}
	if !Air.IsAir() || Vacuum.IsAir() || MediumDefault.IsAir() {
		t.Error("IsAir")
	}
}

// TestMediumJSON: media are written by name, read back, and the default is
// written as the vacuum it stands for.
func TestMediumJSON(t *testing.T) {
	type rec struct {
		M Medium `json:"m"`
	}
	for m, want := range map[Medium]string{Vacuum: `{"m":"vacuum"}`, Air: `{"m":"air"}`, MediumDefault: `{"m":"vacuum"}`} {
		raw, err := json.Marshal(rec{m})
		if err != nil || string(raw) != want {
			t.Errorf("Marshal(%v) = %s, %v; want %s", m, raw, err, want)
			continue
		}
		var back rec
		if err := json.Unmarshal(raw, &back); err != nil {
			t.Fatal(err)
		}
		if m != MediumDefault && back.M != m || m == MediumDefault && back.M != Vacuum {
			t.Errorf("%v read back as %v", m, back.M)
		}
	}
	if _, err := json.Marshal(rec{9}); err == nil {
		t.Error("Medium(9) was written")
	}
	var r rec
	for in, want := range map[string]Medium{`{"m":"AIR"}`: Air, `{"m":"vac"}`: Vacuum, `{"m":""}`: MediumDefault} {
		r = rec{M: 5}
		if err := json.Unmarshal([]byte(in), &r); err != nil || r.M != want {
			t.Errorf("Unmarshal(%s) = %v, %v; want %v", in, r.M, err, want)
		}
	}
	if err := json.Unmarshal([]byte(`{"m":"water"}`), &r); !errors.Is(err, ErrMedium) {
		t.Errorf("Unmarshal of an unknown medium: %v", err)
	}
}
