package physics

import (
	"errors"
	"fmt"
	"strings"
)

// Medium is the medium in which wavelengths were measured. Inside the
// program wavelengths are always vacuum; a Medium records what a file or
// the user said, so that air wavelengths are converted (AirToVacuum) on
// input.
type Medium uint8

// Media. The zero value, MediumDefault, means "not said": it stands for
// vacuum, unless a file or an option says otherwise.
const (
	// MediumDefault is the medium when nothing said one: vacuum.
	MediumDefault Medium = iota
	// Vacuum wavelengths (the program's internal convention).
	Vacuum
	// Air wavelengths (standard air; converted with AirToVacuum).
	Air
)

// ErrMedium is the cause of errors about a medium name that is neither
// vacuum nor air.
var ErrMedium = errors.New("unknown wavelength medium")

// String returns "vacuum", "air", or "vacuum (default)" for MediumDefault.
func (m Medium) String() string {
	switch m {
	case Vacuum:
		return "vacuum"
	case Air:
		return "air"
	case MediumDefault:
		return "vacuum (default)"
	}
	return fmt.Sprintf("Medium(%d)", uint8(m))
}

// IsAir reports whether wavelengths in m must be converted to vacuum.
func (m Medium) IsAir() bool { return m == Air }

// ParseMedium reads "vacuum" (or "vac") or "air", in any case and with
// surrounding spaces. Anything else, the empty string included, is an error
// wrapping ErrMedium.
func ParseMedium(s string) (Medium, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "vacuum", "vac":
		return Vacuum, nil
	case "air":
		return Air, nil
	}
	return MediumDefault, fmt.Errorf("%w %q (want vacuum or air)", ErrMedium, s)
}

// MarshalText writes "vacuum" or "air"; MediumDefault is written as
// "vacuum", the medium it stands for.
func (m Medium) MarshalText() ([]byte, error) {
	switch m {
	case MediumDefault, Vacuum:
		return []byte("vacuum"), nil
	case Air:
		return []byte("air"), nil
	}
	return nil, fmt.Errorf("physics: cannot write %v: %w", m, ErrMedium)
}

// UnmarshalText reads what ParseMedium reads; empty text is MediumDefault.
func (m *Medium) UnmarshalText(b []byte) error {
	if strings.TrimSpace(string(b)) == "" {
		*m = MediumDefault
		return nil
	}
	v, err := ParseMedium(string(b))
	if err != nil {
		return fmt.Errorf("physics: %w", err)
	}
	*m = v
	return nil
}
