package linelists

import (
	"fmt"
	"strconv"
	"strings"
)

// Species is an element in one ion stage: Charge 0 is the neutral atom
// (spectroscopic stage I), Charge 1 the singly ionised ion (stage II), ...
type Species struct {
	Z      uint8 // atomic number, 1–100
	Charge uint8 // ion charge; the spectroscopic stage is Charge+1
}

// Stage returns the spectroscopic stage number (1 for a neutral atom).
func (s Species) Stage() int { return int(s.Charge) + 1 }

// String returns the canonical spectroscopic notation, e.g. "Nd II".
func (s Species) String() string {
	e, err := ElementByZ(int(s.Z))
	if err != nil {
		return fmt.Sprintf("Z%d %s", s.Z, Roman(s.Stage()))
	}
	return e.Symbol + " " + Roman(s.Stage())
}

// Roman returns n (1–399) in Roman numerals, as used for ion stages (a
// bare fermium nucleus is stage CI); other n are printed as "(n)".
func Roman(n int) string {
	if n <= 0 || n >= 400 {
		return fmt.Sprintf("(%d)", n)
	}
	hundreds := []string{"", "C", "CC", "CCC"}
	tens := []string{"", "X", "XX", "XXX", "XL", "L", "LX", "LXX", "LXXX", "XC"}
	ones := []string{"", "I", "II", "III", "IV", "V", "VI", "VII", "VIII", "IX"}
	return hundreds[n/100] + tens[n/10%10] + ones[n%10]
}

// speciesWant is the "what was expected" part of every species error.
const speciesWant = `want an element symbol and an ion stage, e.g. "Nd II", "Nd_II", "NdII", "Nd+" or "Nd 2+"`

// ParseSpecies reads a species in any of the accepted notations and returns
// it; print it with String for the canonical form. Accepted, case-insensitive:
//
//	Nd II   Nd_II   NdII   nd ii   "Nd II"   (spectroscopic stage, Roman)
//	Nd+     Nd++    Nd1+   Nd 2+   Nd+2      (ion charge; a bare "Nd" is refused)
//
// Without a separator, a symbol whose second letter could also start the
// numeral is split by the case of its second letter: upper case starts the
// numeral ("NII" is N II, "SIII" is S III, "FEII" falls back to Fe II),
// lower case continues the symbol ("NiII" is Ni II, "niii" is Ni II). The charge may be at most Z (a bare
// nucleus). Errors wrap ErrSpecies and say what was expected.
func ParseSpecies(s string) (Species, error) {
	in := s
	s = strings.TrimSpace(s)
	if len(s) >= 2 && (s[0] == '"' && s[len(s)-1] == '"' || s[0] == '\'' && s[len(s)-1] == '\'') {
		s = strings.TrimSpace(s[1 : len(s)-1])
	}
	if s == "" {
		return Species{}, fmt.Errorf("%w: empty string: %s", ErrSpecies, speciesWant)
	}
	if len(s) > 16 {
		return Species{}, fmt.Errorf("%w: %.20q… is too long: %s", ErrSpecies, in, speciesWant)
	}
	// Leading letters are the symbol plus, possibly, a Roman numeral.
	i := 0
	for i < len(s) && isLetter(s[i]) {
		i++
	}
	letters, rest := s[:i], strings.TrimLeft(s[i:], " \t_")
	if letters == "" {
		return Species{}, fmt.Errorf("%w: %q does not start with an element symbol: %s", ErrSpecies, in, speciesWant)
	}
	if rest == "" {
		// Symbol and numeral without a separator: "NdII".
		return splitSymbolRoman(in, letters)
	}
	if isLetter(rest[0]) {
		// "Nd II", "Nd_II": the part after the separator must be a numeral.
		sym := letters
		e, err := ElementBySymbol(sym)
		if err != nil {
			return Species{}, fmt.Errorf("%w: %q: unknown element symbol %q: %s", ErrSpecies, in, sym, speciesWant)
		}
		stage, ok := parseRoman(rest)
		if !ok {
			return Species{}, fmt.Errorf("%w: %q: %q is not a Roman numeral ion stage: %s", ErrSpecies, in, rest, speciesWant)
		}
		return makeSpecies(in, e, stage-1)
	}
	e, err := ElementBySymbol(letters)
	if err != nil {
		return Species{}, fmt.Errorf("%w: %q: unknown element symbol %q: %s", ErrSpecies, in, letters, speciesWant)
	}
	charge, ok := parseCharge(rest)
	if !ok {
		return Species{}, fmt.Errorf("%w: %q: %q is not an ion stage or charge: %s", ErrSpecies, in, rest, speciesWant)
	}
	return makeSpecies(in, e, charge)
}

// MustSpecies is ParseSpecies for constants in code; it panics on error.
func MustSpecies(s string) Species {
	sp, err := ParseSpecies(s)
	if err != nil {
		panic("linelists: " + err.Error())
	}
	return sp
}

func makeSpecies(in string, e *Element, charge int) (Species, error) {
	if charge < 0 || charge > e.Z {
		return Species{}, fmt.Errorf("%w: %q: %s has stages I to %s (charge 0 to %d): %s",
			ErrSpecies, in, e.Symbol, Roman(e.Z+1), e.Z, speciesWant)
	}
	return Species{Z: uint8(e.Z), Charge: uint8(charge)}, nil
}

// splitSymbolRoman splits "NdII"-style input into a symbol and a numeral.
func splitSymbolRoman(in, letters string) (Species, error) {
	// The letter case of the second letter decides which split to try
	// first: upper case starts the numeral ("NII", "SIII", "FEII" falls
	// back), lower case continues the symbol ("NiII", "niii").
	order := []int{2, 1}
	if len(letters) >= 2 && isUpper(letters[1]) {
		order = []int{1, 2}
	}
	for _, n := range order {
		if n >= len(letters) {
			continue
		}
		e, err := ElementBySymbol(letters[:n])
		if err != nil {
			continue
		}
		if stage, ok := parseRoman(letters[n:]); ok {
			return makeSpecies(in, e, stage-1)
		}
	}
	if _, err := ElementBySymbol(letters); err == nil {
		return Species{}, fmt.Errorf("%w: %q has no ion stage: %s", ErrSpecies, in, speciesWant)
	}
	return Species{}, fmt.Errorf("%w: %q is not an element symbol followed by an ion stage: %s", ErrSpecies, in, speciesWant)
}

// parseRoman reads an ion stage I–CI (the highest stage of Z = 100), in
// canonical form, any case.
func parseRoman(s string) (int, bool) {
	if len(s) == 0 || len(s) > 9 {
		return 0, false
	}
	u := strings.ToUpper(s)
	for n := 1; n <= 101; n++ {
		if Roman(n) == u {
			return n, true
		}
	}
	return 0, false
}

// parseCharge reads "+", "++", "1+", "2+", "+2" (spaces before were trimmed).
func parseCharge(s string) (int, bool) {
	s = strings.TrimSpace(s)
	if s == "" {
		return 0, false
	}
	if strings.Trim(s, "+") == "" {
		return len(s), true
	}
	var digits string
	switch {
	case strings.HasSuffix(s, "+"):
		digits = strings.TrimSpace(s[:len(s)-1])
	case strings.HasPrefix(s, "+"):
		digits = strings.TrimSpace(s[1:])
	default:
		return 0, false // a bare number is ambiguous (stage or charge?)
	}
	if digits == "" || len(digits) > 3 {
		return 0, false
	}
	for i := 0; i < len(digits); i++ {
		if digits[i] < '0' || digits[i] > '9' {
			return 0, false
		}
	}
	n, err := strconv.Atoi(digits)
	return n, err == nil
}

func isLetter(c byte) bool { return 'a' <= c && c <= 'z' || 'A' <= c && c <= 'Z' }
func isUpper(c byte) bool  { return 'A' <= c && c <= 'Z' }
