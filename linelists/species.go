package linelists

import "fmt"

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

// Roman returns n (1–39) in Roman numerals, as used for ion stages.
func Roman(n int) string {
	if n <= 0 || n >= 40 {
		return fmt.Sprintf("(%d)", n)
	}
	tens := []string{"", "X", "XX", "XXX"}
	ones := []string{"", "I", "II", "III", "IV", "V", "VI", "VII", "VIII", "IX"}
	return tens[n/10] + ones[n%10]
}
