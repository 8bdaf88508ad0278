package spectra

import (
	"fmt"
	"strings"

	"broadline/physics"
)

// ReadOptions are the choices a user can make when reading a spectrum: a
// plain value that a command line, a dataset file or a form fills. The
// zero value reads with everything taken from the file, falling back to Å,
// vacuum and an arbitrary flux unit; every fallback is reported in the
// spectrum's ReadReport (Meta.Read).
type ReadOptions struct {
	// Name is the file name used in error messages and Meta.Source.
	Name string
	// WaveUnit overrides the wavelength unit ("A", "nm", "um", "m", or any
	// length of the unit grammar; "log(Angstrom)" for log10 values); empty:
	// from the file (header row, CUNIT1, TUNITn), else Å.
	WaveUnit string
	// FluxUnit overrides the flux unit (see ParseFluxUnitScale; a scaled
	// unit such as "1e-17 erg/s/cm2/A" scales the values); empty: from the
	// file (header row, BUNIT, TUNITn), else arbitrary.
	FluxUnit string
	// Medium overrides the wavelength medium, "vacuum" or "air"; empty: from
	// the file (FITS CTYPE1 WAVE/AWAV, a column named for air, a
	// "medium = air" comment), else vacuum.
	Medium string
	// WaveColumn, FluxColumn, UncColumn and MaskColumn choose columns by
	// name (case-insensitive) or by 1-based number; in a multi-band FITS
	// image they choose bands (rows) by number or BANDIDn label. Empty:
	// found by name. UncColumn or MaskColumn "none" ignores any such
	// column.
	WaveColumn, FluxColumn, UncColumn, MaskColumn string
	// HDU chooses the FITS header-data unit (0 = primary) when HDUSet is
	// true; otherwise the reader takes the first HDU holding a spectrum.
	HDU    int
	HDUSet bool
	// Band chooses the flux row (1-based) of a 2-D FITS image whose rows
	// are bands (flux, sky, uncertainty, wavelength); 0: the band labelled
	// as the spectrum by BANDIDn.
	Band int
	// Row chooses one row (1-based) of a FITS table whose rows hold whole
	// arrays (orders, segments); 0: a single row is read, several rows are
	// merged when they follow each other in wavelength, else refused.
	Row int
	// MergeRows merges all rows of such a table into one spectrum sorted
	// by wavelength, even where segments overlap.
	MergeRows bool
	// MaskGood says the file's mask marks good samples: 1 (or T) = good,
	// anything else is flagged. False: non-zero = bad, unless the column's
	// name says "good" (GOOD, GOODPIX, VALID, USE).
	MaskGood bool
	// IgnoreMask ignores the file's mask and quality columns and
	// extensions (nothing is flagged MaskFile, except null values).
	IgnoreMask bool
	// Days is the time since explosion in days (observer frame); > 0
	// overrides the file's epoch.
	Days float64
	// ExplosionMJD, when > 0, turns the file's observation MJD (a text
	// "mjd" comment, FITS MJD-OBS, or an epoch that looks like an MJD) into
	// days since explosion.
	ExplosionMJD float64
	// MaxBytes bounds how much a FITS reader reads from its input and how
	// much any reader decompresses (default 1 GiB); a larger input is
	// ErrTooLarge.
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

func (o *ReadOptions) maxBytes() int64 {
	if o.MaxBytes > 0 {
		return o.MaxBytes
	}
	return defaultMaxFITS
}
