package linelists

import (
	"fmt"

	"broadline/physics"
)

// Air is physics.Air, the name the app package used before the medium
// moved to broadline/physics (a FileReport's or an option's Medium is a
// physics.Medium).
//
// Deprecated: transitional, removed once app uses physics.
const Air = physics.Air

// ParseMedium is physics.ParseMedium with the error also wrapping ErrHeader,
// as linelists.ParseMedium did.
//
// Deprecated: transitional, removed once app uses physics.
func ParseMedium(s string) (physics.Medium, error) {
	m, err := physics.ParseMedium(s)
	if err != nil {
		return m, fmt.Errorf("%w: %w", ErrHeader, err)
	}
	return m, nil
}
