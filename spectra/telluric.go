package spectra

// Band is a wavelength interval in vacuum Å, Lo ≤ λ ≤ Hi, with a label.
type Band struct {
	Lo, Hi float64
	Name   string
}

// DefaultTelluricBands returns a fresh copy of the default telluric
// absorption bands, which callers may edit. The band edges are common
// practice for ground-based optical/near-infrared spectra (the usual O₂,
// H₂O and CO₂ bands, as listed in the project's REFERENCES.md), not taken
// from an atmospheric model; they are given in µm as vacuum wavelengths.
// The last band covers the thermal-infrared end beyond 2.45 µm, open-ended
// at 10 µm.
func DefaultTelluricBands() []Band {
	return []Band{
		{Lo: 6860, Hi: 6900, Name: "O2 B band"},
		{Lo: 7590, Hi: 7700, Name: "O2 A band"},
		{Lo: 9300, Hi: 9700, Name: "H2O"},
		{Lo: 11100, Hi: 11600, Name: "H2O"},
		{Lo: 13500, Hi: 14500, Name: "H2O (deep)"},
		{Lo: 18000, Hi: 19500, Name: "H2O (deep)"},
		{Lo: 20000, Hi: 20700, Name: "CO2"},
		{Lo: 24500, Hi: 100000, Name: "thermal infrared"},
	}
}

// MaskBands flags with reason r every sample inside any of the bands and
// returns how many samples were newly flagged with r (a sample already
// carrying r is not counted again). Nothing is deleted.
func (s *Spectrum) MaskBands(bands []Band, r MaskReason) int {
	n := 0
	for _, b := range bands {
		lo, hi := b.Lo, b.Hi
		if lo > hi {
			lo, hi = hi, lo
		}
		for i := lowerBound(s.Wavelength, lo); i < len(s.Wavelength) && s.Wavelength[i] <= hi; i++ {
			if s.Mask == nil || s.Mask[i]&r == 0 {
				n++
			}
			s.SetMask(i, r)
		}
	}
	return n
}

// MaskTelluric flags the default telluric bands with MaskTelluric and
// returns the number of samples newly flagged.
func (s *Spectrum) MaskTelluric() int {
	n := s.MaskBands(DefaultTelluricBands(), MaskTelluric)
	s.addHistory("masked %d samples in the default telluric bands", n)
	return n
}

// lowerBound returns the first index i with x[i] ≥ v (len(x) if none).
func lowerBound(x []float64, v float64) int {
	lo, hi := 0, len(x)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if x[m] < v {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}
