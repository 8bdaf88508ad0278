// Package spectra holds what the analyst measured: the Spectrum type and
// everything that reads, converts, calibrates and prepares it.
//
// Conventions:
//   - Physics is in cgs units. Inside the program wavelengths are vacuum
//     wavelengths in ångström (float64); air wavelengths are converted on input.
//   - Physical constants, the wavelength medium (Metadata.OriginalMedium is
//     a physics.Medium) and the air ↔ vacuum conversion come from the
//     package broadline/physics; none is defined here.
//   - Bad data returns an error that names where it was found; a programming
//     mistake (slices of different lengths passed to a helper) panics with a
//     "spectra: ..." message.
//   - A slice written in place is called dst.
//
// # The Spectrum type
//
// A *Spectrum holds Wavelength (vacuum Å, strictly ascending), Flux (in
// Meta.FluxUnit), Uncertainty (1σ, same unit, or nil) and Mask (nil, or one
// MaskReason per sample). Masked samples are kept and flagged, never
// deleted; the MaskReason bits say why (MaskInvalid, MaskTelluric,
// MaskUser, MaskFile, MaskEdge, MaskOutlier). Metadata records the object,
// date, exposure (s), airmass, epoch (days since explosion), flux unit,
// original wavelength medium, redshift removed, a history of processing
// steps and free key/values (for instance the FITS header).
//
// Spectrum has Len and XY, so it satisfies gonum/plot's plotter.XYer
// without this package importing plot.
//
// Stable API used by other packages (kept stable once committed):
//
//	New(wave, flux, unc []float64, meta Metadata) (*Spectrum, error)
//	(*Spectrum).Len, XY, Masked, SetMask, MaskRange, MaskBands, CountMasked,
//	  Clone, Validate, Range
//	PlanckLambda(λ Å, T K) float64              // B_λ, erg s⁻¹ cm⁻² cm⁻¹ sr⁻¹
//	PlanckLambdaPerAngstrom(λ Å, T K) float64   // B_λ, erg s⁻¹ cm⁻² Å⁻¹ sr⁻¹
//	PlanckNu(ν Hz, T K) float64                 // B_ν, erg s⁻¹ cm⁻² Hz⁻¹ sr⁻¹
//	BlackbodyFlux(λ Å, T K, R cm, D cm) float64 // π B_λ (R/D)², erg s⁻¹ cm⁻² Å⁻¹
//	BlackbodyFluxes(dst, wave []float64, T, R, D float64) []float64
//	WienPeak(T) float64                         // Å
//	ResampleFlux(dst, grid, wave, flux []float64) []float64 // flux-conserving
//	(*Spectrum).Resample(grid []float64) (*Spectrum, error)
//	SmoothFlux(dst, wave, flux []float64, R float64, skip []bool) []float64
//	(*Spectrum).Smooth(R, inputR float64) (*Spectrum, error)
//	LinearGrid(lo, hi, n), LogGrid(lo, hi, n) []float64
//	Band{Lo, Hi float64; Name string}          // vacuum Å
//	DefaultTelluricBands() []Band                // fresh, editable copy
//
// Reading, calibrating and preparing (see docs/spectra.md for formats and
// methods):
//
//	Read, ReadFile, ReadText, ReadFITS (io.Reader + ReadOptions) → *Spectrum
//	  (gzip/bzip2 recognised by content); Meta.Read is the *ReadReport of
//	  what was used and assumed
//	ParseFluxUnitScale, ParseWaveScale: the unit grammar (unitparse.go)
//	*ParseError{File, Line, Column, HDU, Offset, Err}; sentinels ErrSyntax,
//	  ErrColumns, ErrOrder, ErrNoData, ErrUnsupported, ErrMalformed,
//	  ErrTooLarge, ErrAmbiguous
//	(*Spectrum).ConvertFlux, ToRestFrame, Deredden, Extinction (CCM89, F99),
//	  MaskTelluric (air wavelengths are converted on reading with
//	  physics.AirToVacuumAll)
//	FitBlackbody → *BlackbodyFit (T, scale, radius, velocity), Normalize
//	FindFeatures → []Feature (wavelength, depth, width, EW, significance)
//
// Smoothing to a resolving power R convolves with a Gaussian of FWHM λ/R
// (constant in ln λ). Resampling treats each sample as constant over its
// bin (edges half-way between samples) and conserves the integrated flux.
package spectra
