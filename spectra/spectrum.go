package spectra

import (
	"fmt"
	"math"
	"sort"

	"broadline/physics"
)

// Spectrum is one measured (or synthetic) spectrum.
//
// Wavelength holds vacuum wavelengths in ångström, strictly ascending. Flux
// is in the unit named by Meta.FluxUnit. Uncertainty is the 1σ uncertainty of
// each flux value in the same unit, or nil when the file gave none. Mask is
// nil (nothing masked) or has one entry per sample; a non-zero entry marks
// the sample as excluded from fits and records why (see MaskReason). Masked
// samples are kept, never deleted.
//
// Spectrum satisfies gonum/plot's plotter.XYer interface (Len and XY)
// without importing plot: XY returns (wavelength in Å, flux).
type Spectrum struct {
	Wavelength  []float64
	Flux        []float64
	Uncertainty []float64
	Mask        []MaskReason
	Meta        Metadata
}

// MaskReason is a set of bits saying why a sample is masked. The zero value
// means the sample is used.
type MaskReason uint8

// Reasons for masking a sample. They combine: a telluric sample with a NaN
// flux carries MaskTelluric|MaskInvalid.
const (
	// MaskInvalid marks a flux or uncertainty that is NaN, infinite, or an
	// uncertainty that is not positive.
	MaskInvalid MaskReason = 1 << iota
	// MaskTelluric marks a sample inside a telluric absorption band.
	MaskTelluric
	// MaskUser marks a sample the analyst excluded by hand.
	MaskUser
	// MaskFile marks a sample flagged as bad by the file itself (a mask or
	// quality column).
	MaskFile
	// MaskEdge marks a resampled sample not fully covered by the input.
	MaskEdge
	// MaskOutlier marks a sample rejected as an outlier by a robust fit.
	MaskOutlier
)

var maskNames = []struct {
	bit  MaskReason
	name string
}{
	{MaskInvalid, "invalid"},
	{MaskTelluric, "telluric"},
	{MaskUser, "user"},
	{MaskFile, "file"},
	{MaskEdge, "edge"},
	{MaskOutlier, "outlier"},
}

// String lists the reasons separated by "+", or "" for the zero value.
func (m MaskReason) String() string {
	s := ""
	for _, n := range maskNames {
		if m&n.bit != 0 {
			if s != "" {
				s += "+"
			}
			s += n.name
		}
	}
	if rest := m &^ (MaskInvalid | MaskTelluric | MaskUser | MaskFile | MaskEdge | MaskOutlier); rest != 0 {
		if s != "" {
			s += "+"
		}
		s += fmt.Sprintf("0x%02x", uint8(rest))
	}
	return s
}

// Metadata describes a spectrum. Zero values mean "unknown".
type Metadata struct {
	// Source names where the spectrum came from (a file name, "synthetic").
	Source string `json:"source,omitempty"`
	// Object is the target's name as given in the file.
	Object string `json:"object,omitempty"`
	// Date is the observation date as given in the file (ISO 8601 usually).
	Date string `json:"date,omitempty"`
	// Exposure is the exposure time in s (0: unknown).
	Exposure float64 `json:"exposure_s,omitempty"`
	// Airmass is the airmass (0: unknown; a real airmass is ≥ 1).
	Airmass float64 `json:"airmass,omitempty"`
	// Epoch is the time since explosion in days, in the observer's frame
	// (0: unknown).
	Epoch float64 `json:"epoch_days,omitempty"`
	// FluxUnit is the unit of Flux and Uncertainty.
	FluxUnit FluxUnit `json:"flux_unit"`
	// OriginalMedium is the medium of the wavelengths in the file. The
	// Wavelength slice is always vacuum; this only records what was converted.
	OriginalMedium physics.Medium `json:"original_medium"`
	// Redshift is the redshift already removed from the wavelengths (0 if
	// the spectrum is still in the observer's frame).
	Redshift float64 `json:"redshift,omitempty"`
	// History lists, in order, the steps applied since reading (one short
	// line each), for provenance.
	History []string `json:"history,omitempty"`
	// Extra holds free key/value pairs, for instance every FITS header card.
	Extra map[string]string `json:"extra,omitempty"`
	// Read is what the reader used and assumed (nil for a spectrum not
	// read from a file).
	Read *ReadReport `json:"read,omitempty"`
}

// New returns a spectrum built from the given slices, which it keeps (does
// not copy). unc may be nil. Wavelengths must be vacuum Å and strictly
// monotonic; a descending spectrum is reversed in place. Non-finite or
// non-positive wavelengths are an error (a sample cannot be placed); a
// non-finite flux, or a non-finite or non-positive uncertainty, is kept
// and masked with MaskInvalid.
func New(wave, flux, unc []float64, meta Metadata) (*Spectrum, error) {
	s := &Spectrum{Wavelength: wave, Flux: flux, Uncertainty: unc, Meta: meta}
	if len(flux) != len(wave) {
		return nil, fmt.Errorf("spectra: %d wavelengths but %d fluxes", len(wave), len(flux))
	}
	if unc != nil && len(unc) != len(wave) {
		return nil, fmt.Errorf("spectra: %d wavelengths but %d uncertainties", len(wave), len(unc))
	}
	if len(wave) >= 2 && wave[0] > wave[len(wave)-1] {
		s.reverse()
	}
	if err := s.checkWavelengths(); err != nil {
		return nil, err
	}
	s.MaskInvalid()
	return s, nil
}

func (s *Spectrum) reverse() {
	rev := func(x []float64) {
		for i, j := 0, len(x)-1; i < j; i, j = i+1, j-1 {
			x[i], x[j] = x[j], x[i]
		}
	}
	rev(s.Wavelength)
	rev(s.Flux)
	if s.Uncertainty != nil {
		rev(s.Uncertainty)
	}
	for i, j := 0, len(s.Mask)-1; i < j; i, j = i+1, j-1 {
		s.Mask[i], s.Mask[j] = s.Mask[j], s.Mask[i]
	}
}

func (s *Spectrum) checkWavelengths() error {
	for i, w := range s.Wavelength {
		if math.IsNaN(w) || math.IsInf(w, 0) || w <= 0 {
			return fmt.Errorf("spectra: wavelength %d is %v, want a finite positive value", i, w)
		}
		if i > 0 && w <= s.Wavelength[i-1] {
			return fmt.Errorf("spectra: wavelengths not strictly monotonic at sample %d (%v after %v)", i, w, s.Wavelength[i-1])
		}
	}
	return nil
}

// Validate checks the invariants: matching lengths, finite positive strictly
// ascending wavelengths. It does not check flux values (those are masked).
func (s *Spectrum) Validate() error {
	n := len(s.Wavelength)
	if len(s.Flux) != n {
		return fmt.Errorf("spectra: %d wavelengths but %d fluxes", n, len(s.Flux))
	}
	if s.Uncertainty != nil && len(s.Uncertainty) != n {
		return fmt.Errorf("spectra: %d wavelengths but %d uncertainties", n, len(s.Uncertainty))
	}
	if s.Mask != nil && len(s.Mask) != n {
		return fmt.Errorf("spectra: %d wavelengths but %d mask entries", n, len(s.Mask))
	}
	return s.checkWavelengths()
}

// MaskInvalid flags (with MaskInvalid) every sample whose flux is not finite
// or whose uncertainty is not finite and positive, and returns how many
// samples it flagged.
func (s *Spectrum) MaskInvalid() int {
	n := 0
	for i, f := range s.Flux {
		bad := math.IsNaN(f) || math.IsInf(f, 0)
		if s.Uncertainty != nil {
			u := s.Uncertainty[i]
			bad = bad || math.IsNaN(u) || math.IsInf(u, 0) || u <= 0
		}
		if bad {
			s.SetMask(i, MaskInvalid)
			n++
		}
	}
	return n
}

// Len returns the number of samples.
func (s *Spectrum) Len() int { return len(s.Wavelength) }

// XY returns the wavelength (vacuum Å) and flux of sample i.
func (s *Spectrum) XY(i int) (x, y float64) { return s.Wavelength[i], s.Flux[i] }

// Masked reports whether sample i is masked for any reason.
func (s *Spectrum) Masked(i int) bool { return s.Mask != nil && s.Mask[i] != 0 }

// SetMask adds the reasons r to sample i, allocating the mask if needed.
func (s *Spectrum) SetMask(i int, r MaskReason) {
	if s.Mask == nil {
		if r == 0 {
			return
		}
		s.Mask = make([]MaskReason, len(s.Wavelength))
	}
	s.Mask[i] |= r
}

// ClearMask removes the reasons r from every sample.
func (s *Spectrum) ClearMask(r MaskReason) {
	for i := range s.Mask {
		s.Mask[i] &^= r
	}
}

// MaskRange adds the reasons r to every sample with lo ≤ λ ≤ hi (vacuum Å)
// and returns how many samples it touched.
func (s *Spectrum) MaskRange(lo, hi float64, r MaskReason) int {
	i := sort.SearchFloat64s(s.Wavelength, lo)
	n := 0
	for ; i < len(s.Wavelength) && s.Wavelength[i] <= hi; i++ {
		s.SetMask(i, r)
		n++
	}
	return n
}

// CountMasked returns the number of samples masked for any of the reasons
// in r (pass ^MaskReason(0) for "any reason").
func (s *Spectrum) CountMasked(r MaskReason) int {
	n := 0
	for _, m := range s.Mask {
		if m&r != 0 {
			n++
		}
	}
	return n
}

// HasUncertainty reports whether the spectrum carries uncertainties.
func (s *Spectrum) HasUncertainty() bool { return s.Uncertainty != nil }

// Clone returns a deep copy.
func (s *Spectrum) Clone() *Spectrum {
	c := &Spectrum{
		Wavelength: append([]float64(nil), s.Wavelength...),
		Flux:       append([]float64(nil), s.Flux...),
		Meta:       s.Meta,
	}
	if s.Uncertainty != nil {
		c.Uncertainty = append([]float64(nil), s.Uncertainty...)
	}
	if s.Mask != nil {
		c.Mask = append([]MaskReason(nil), s.Mask...)
	}
	c.Meta.History = append([]string(nil), s.Meta.History...)
	c.Meta.Read = s.Meta.Read.Clone()
	if s.Meta.Extra != nil {
		c.Meta.Extra = make(map[string]string, len(s.Meta.Extra))
		for k, v := range s.Meta.Extra {
			c.Meta.Extra[k] = v
		}
	}
	return c
}

// addHistory appends one provenance line.
func (s *Spectrum) addHistory(format string, args ...any) {
	s.Meta.History = append(s.Meta.History, fmt.Sprintf(format, args...))
}

// Range returns the first and last wavelength (vacuum Å); (0, 0) when empty.
func (s *Spectrum) Range() (lo, hi float64) {
	if len(s.Wavelength) == 0 {
		return 0, 0
	}
	return s.Wavelength[0], s.Wavelength[len(s.Wavelength)-1]
}
