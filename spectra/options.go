package spectra

import (
	"fmt"
	"strings"

	"broadline/physics"
)

// ReadOptions are the choices a user can make when reading a spectrum. The
// zero value reads with everything taken from the file, falling back to Å,
// vacuum and an arbitrary flux unit.
type ReadOptions struct {
	// Name is the file name used in error messages and Meta.Source.
	Name string
	// WaveUnit overrides the wavelength unit ("A", "nm", "um", "m"); empty:
	// from the file (header row, CUNIT1, TUNITn), else Å.
	WaveUnit string
	// FluxUnit overrides the flux unit (see ParseFluxUnit); empty: from the
	// file (header row, BUNIT, TUNITn), else arbitrary.
	FluxUnit string
	// Medium overrides the wavelength medium, "vacuum" or "air"; empty: from
	// the file (FITS CTYPE1 WAVE/AWAV, a column named for air, a
	// "medium = air" comment), else vacuum.
	Medium string
	// WaveColumn, FluxColumn and UncColumn choose columns by name
	// (case-insensitive) or by 1-based number. Empty: found by name.
	// UncColumn "none" ignores any uncertainty column.
	WaveColumn, FluxColumn, UncColumn string
	// HDU chooses the FITS header-data unit (0 = primary) when HDUSet is
	// true; otherwise the reader takes the first HDU holding a 1-D spectrum.
	HDU    int
	HDUSet bool
	// MaxBytes bounds how much a FITS reader reads from its input
	// (default 1 GiB); a larger input is ErrTooLarge.
	MaxBytes int64
}

func (o *ReadOptions) medium() (m physics.Medium, set bool, err error) {
	if strings.TrimSpace(o.Medium) == "" {
		return physics.Vacuum, false, nil
	}
	if m, err = physics.ParseMedium(o.Medium); err != nil {
		return physics.Vacuum, false, fmt.Errorf("spectra: %w", err)
	}
	return m, true, nil
}
