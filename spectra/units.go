package spectra

import (
	"fmt"
	"math"
	"strings"
)

// FluxUnit is the unit of a spectrum's flux (and uncertainty) values.
type FluxUnit uint8

// Flux units. Per-wavelength densities use ångström in the denominator, the
// usual choice for optical/near-infrared spectra.
const (
	// FluxUnknown is a flux in an unknown or arbitrary unit (counts,
	// relative flux). It cannot be converted to another unit.
	FluxUnknown FluxUnit = iota
	// FluxPerAngstrom is F_λ in erg s⁻¹ cm⁻² Å⁻¹.
	FluxPerAngstrom
	// FluxPerHz is F_ν in erg s⁻¹ cm⁻² Hz⁻¹.
	FluxPerHz
	// FluxJansky is F_ν in Jy (1e-23 erg s⁻¹ cm⁻² Hz⁻¹).
	FluxJansky
	// FluxMilliJansky is F_ν in mJy.
	FluxMilliJansky
	// FluxNormalized is a dimensionless flux divided by a continuum.
	FluxNormalized
)

var fluxUnitNames = [...]string{
	FluxUnknown:     "arbitrary",
	FluxPerAngstrom: "erg/s/cm2/A",
	FluxPerHz:       "erg/s/cm2/Hz",
	FluxJansky:      "Jy",
	FluxMilliJansky: "mJy",
	FluxNormalized:  "normalized",
}

// String returns the unit's canonical short name, as accepted by
// ParseFluxUnit.
func (u FluxUnit) String() string {
	if int(u) < len(fluxUnitNames) {
		return fluxUnitNames[u]
	}
	return fmt.Sprintf("FluxUnit(%d)", uint8(u))
}

// MarshalText writes the canonical name (so JSON sessions are readable).
func (u FluxUnit) MarshalText() ([]byte, error) { return []byte(u.String()), nil }

// UnmarshalText reads any spelling ParseFluxUnit accepts.
func (u *FluxUnit) UnmarshalText(b []byte) error {
	v, err := ParseFluxUnit(string(b))
	if err != nil {
		return err
	}
	*u = v
	return nil
}

// PerFrequency reports whether u is a flux density per unit frequency.
func (u FluxUnit) PerFrequency() bool {
	return u == FluxPerHz || u == FluxJansky || u == FluxMilliJansky
}

// ParseFluxUnit recognises a flux unit that needs no scaling of the
// values: "erg/s/cm2/A", "erg s-1 cm-2 Angstrom-1", "Angstrom-1 cm-2 erg
// s-1", "flam"; "erg/s/cm2/Hz", "fnu"; "Jy"; "mJy"; "normalized";
// "arbitrary", "counts", "adu", "" (FluxUnknown). It reads any spelling of
// the unit grammar (see ParseFluxUnitScale); a unit that is a multiple of
// one of these ("1e-17 erg/s/cm2/A", "W/m2/um") is an error here, since the
// values would have to be scaled: the readers use ParseFluxUnitScale and
// scale them.
func ParseFluxUnit(s string) (FluxUnit, error) {
	u, f, err := ParseFluxUnitScale(s)
	if err != nil {
		return FluxUnknown, fmt.Errorf("%w (want erg/s/cm2/A, erg/s/cm2/Hz, Jy, mJy, normalized or arbitrary)", err)
	}
	if math.Abs(f-1) > 1e-12 {
		return FluxUnknown, fmt.Errorf("spectra: flux unit %q is %g × %v: the values need scaling (the readers do it; here give %v)", s, f, u, u)
	}
	return u, nil
}

// WaveUnit is a wavelength unit.
type WaveUnit uint8

// Wavelength units.
const (
	// Angstrom unit (1e-8 cm); the internal unit.
	UnitAngstrom WaveUnit = iota
	// Nanometre unit (10 Å).
	UnitNanometre
	// Micron unit (1e4 Å).
	UnitMicron
	// Metre unit (1e10 Å), as FITS CUNIT1 = 'm' may say.
	UnitMetre
)

// Factor returns the number of ångström in one u.
func (u WaveUnit) Factor() float64 {
	switch u {
	case UnitNanometre:
		return 10
	case UnitMicron:
		return 1e4
	case UnitMetre:
		return 1e10
	}
	return 1
}

// String returns "A", "nm", "um" or "m".
func (u WaveUnit) String() string {
	switch u {
	case UnitNanometre:
		return "nm"
	case UnitMicron:
		return "um"
	case UnitMetre:
		return "m"
	}
	return "A"
}

// ParseWaveUnit recognises "A", "Å", "Angstrom", "AA", "nm", "um", "µm",
// "micron", "m" (case-insensitive, surrounding brackets ignored).
func ParseWaveUnit(s string) (WaveUnit, error) {
	k := strings.ToLower(strings.Trim(strings.TrimSpace(s), "()[]"))
	switch k {
	case "a", "å", "aa", "angstrom", "angstroms", "ang", "0.1nm":
		return UnitAngstrom, nil
	case "nm", "nanometer", "nanometre", "nanometers", "nanometres":
		return UnitNanometre, nil
	case "um", "µm", "μm", "micron", "microns", "micrometer", "micrometre":
		return UnitMicron, nil
	case "m", "meter", "metre":
		return UnitMetre, nil
	}
	return UnitAngstrom, fmt.Errorf("spectra: unknown wavelength unit %q (want A, nm, um or m)", s)
}
