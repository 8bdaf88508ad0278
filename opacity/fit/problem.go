package fit

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strings"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/opacity/synth"
	"broadline/physics"
	"broadline/spectra"
)

// ErrProblem is the cause of every error about an inference problem's
// inputs (no free parameter, bad bounds, unknown element, missing epochs,
// NaN).
var ErrProblem = errors.New("bad fit problem")

// Default bounds of the free parameters.
const (
	// DefaultMassFractionLower and DefaultMassFractionUpper bound a free
	// mass fraction (log-uniform prior between them).
	DefaultMassFractionLower = 1e-6
	DefaultMassFractionUpper = 1.0
	// DefaultTemperatureLower and DefaultTemperatureUpper bound a free
	// photosphere temperature, K (the workbench's slider range).
	DefaultTemperatureLower = 1500.0
	DefaultTemperatureUpper = 15000.0
	// MaxCorrectionOrder is the highest order of the multiplicative
	// continuum correction.
	MaxCorrectionOrder = 3
)

// ScaleMode says whether an epoch's model flux is multiplied by a free
// factor.
type ScaleMode int

const (
	// ScaleFree multiplies each epoch's model by its own best factor (and,
	// with a correction order > 0, a smooth polynomial in ln λ), found by
	// linear least squares at every evaluation: the scale never needs a
	// search or sampling.
	ScaleFree ScaleMode = iota
	// ScaleFixed compares the model at the given distance as it is.
	ScaleFixed
)

// String names the mode as the results write it: "free" or "fixed".
func (s ScaleMode) String() string {
	if s == ScaleFixed {
		return "fixed"
	}
	return "free"
}

// FreeElement is an element whose mass fraction is fitted, within
// [Lower, Upper] (mass fractions; 0 means the defaults 1e-6 and 1). The
// prior is uniform in log₁₀ X between the bounds.
type FreeElement struct {
	Z            int
	Lower, Upper float64
}

// Bounds is a closed range [Lower, Upper] of a parameter; the zero value
// means the default range.
type Bounds struct {
	Lower, Upper float64
}

// Epoch is one observed spectrum with its own ejecta (time since
// explosion, photosphere velocity and temperature; the velocity and
// temperature are the start of a fit or the fixed values), resolving power
// and distance.
type Epoch struct {
	// Name labels the epoch in messages (e.g. the file name); empty means
	// "epoch N".
	Name string
	// Number is the epoch's number in parameter names, reports and
	// messages, e.g. its place in the user's dataset (0: its place in
	// Problem.Epochs, from 1).
	Number int
	// Observed is the calibrated spectrum, with uncertainties; masked
	// samples are left out.
	Observed *spectra.Spectrum
	// ResolvingPower R smooths the model (0: not smoothed).
	ResolvingPower float64
	// DistanceCm puts the model at the observer: flux · (R_ph/d)².
	DistanceCm float64
	// Ejecta are the base parameters of this epoch.
	Ejecta synth.Ejecta
	// Velocity and Temperature bound the photosphere velocity (v/c) and
	// temperature (K) when they are fitted. The zero value means: velocity
	// from max(BetaIn + 0.005, 0.02) to BetaMax − 0.02; temperature from
	// DefaultTemperatureLower to DefaultTemperatureUpper.
	Velocity, Temperature Bounds
}

// Problem is an inference problem: one composition shared by all epochs,
// some of whose mass fractions are free, optionally each epoch's
// photosphere velocity and temperature, and each epoch's flux scale and
// continuum correction, solved analytically.
//
// Normalisation. A free element's parameter is its mass fraction X itself.
// The elements that are not free keep their ratios to each other (as in
// Composition) and fill the rest of the mass, 1 − Σ X_free: freeing one
// element and raising it lowers all fixed ones in proportion. So at least
// one element of Composition must stay fixed, and parameter sets with
// Σ X_free ≥ 1 lie outside the prior. A free element absent from
// Composition is added.
type Problem struct {
	// Model synthesises the spectra; its wavelength range must cover the
	// observed spectra (samples outside it are left out, and counted in a
	// warning).
	Model *synth.Model
	// Composition is the base composition: the fixed elements' ratios and
	// the start of the free ones.
	Composition opacity.Composition
	Free        []FreeElement
	// FitVelocity and FitTemperature free each epoch's photosphere
	// velocity and temperature.
	FitVelocity, FitTemperature bool
	Epochs                      []Epoch
	// Scale chooses a fixed or free flux scale; CorrectionOrder (0–3, only
	// with ScaleFree) adds a multiplicative correction
	// Σ_k c_k P_k(x), x ∈ [−1, 1] linear in ln λ over each epoch's
	// compared samples, P_k the Legendre polynomials; order 0 is the scale
	// alone.
	Scale           ScaleMode
	CorrectionOrder int
	// Settings are the synthesis settings (preview, rays, nodes, workers).
	Settings synth.Settings
	// MaxEvaluations bounds the optimiser (default 150 per parameter, at
	// least 300).
	MaxEvaluations int
}

// ParameterKind says what a parameter is.
type ParameterKind string

// The kinds of parameter.
const (
	KindLogMassFraction ParameterKind = "log10_mass_fraction"
	KindVelocity        ParameterKind = "photosphere_velocity_c"
	KindTemperature     ParameterKind = "temperature_k"
)

// Parameter describes one coordinate of the parameter vector: the free
// elements' log₁₀ X first (in the order of Problem.Free), then per epoch
// its photosphere velocity (v/c) and temperature (K) when fitted.
type Parameter struct {
	// Name is a plain key for CSV columns and JSON: "log10_X_Sr",
	// "v_ph_c_1", "T_ph_K_2" (epochs counted from 1).
	Name string `json:"name"`
	// Label is the name for figures: "log₁₀ X(Sr)", "v_ph,1 / c".
	Label string        `json:"label"`
	Kind  ParameterKind `json:"kind"`
	// Element is the symbol of a free element's parameter; Epoch the
	// epoch (from 1) of a velocity or temperature, 0 for shared ones.
	Element string `json:"element,omitempty"`
	Z       int    `json:"z,omitempty"`
	Epoch   int    `json:"epoch,omitempty"`
	// Lower and Upper bound the parameter in its coordinate (log₁₀ X, v/c
	// or K); the prior is uniform between them.
	Lower float64 `json:"lower"`
	Upper float64 `json:"upper"`
}

// Physical converts a value of the parameter's coordinate to the quantity
// it stands for: 10^x for a log mass fraction, x otherwise.
func (p Parameter) Physical(x float64) float64 {
	if p.Kind == KindLogMassFraction {
		return math.Pow(10, x)
	}
	return x
}

// epochData is an epoch prepared for evaluation.
type epochData struct {
	ej       synth.Ejecta
	grid     []float64 // observed wavelengths inside the model's range
	use      []int     // indices into grid of the compared samples
	y, sigma []float64 // their flux and uncertainty
	basis    [][]float64
	R, d     float64
	vIdx     int // parameter index of the velocity, −1 if fixed
	tIdx     int
}

// compiled is a validated problem ready for evaluation.
type compiled struct {
	p        *Problem
	params   []Parameter
	start    []float64
	freeZ    []int
	fixedZ   []int
	fixedW   []float64 // ratios of the fixed elements, summing to 1
	epochs   []epochData
	warnings []string
	nLinear  int
}

// Parameters returns the parameter vector's layout (after checking the
// problem).
func (p *Problem) Parameters() ([]Parameter, error) {
	c, err := p.compile()
	if err != nil {
		return nil, err
	}
	return c.params, nil
}

// Start returns the starting parameter vector: the base composition's
// fractions (the geometric middle of the bounds for an element absent from
// it, or one outside them) and the epochs' velocities and temperatures,
// moved inside the bounds.
func (p *Problem) Start() ([]float64, error) {
	c, err := p.compile()
	if err != nil {
		return nil, err
	}
	return slices.Clone(c.start), nil
}

func (p *Problem) errorf(format string, args ...any) error {
	return fmt.Errorf("fit: %w: %s", ErrProblem, fmt.Sprintf(format, args...))
}

func bad(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }

// compile checks the problem and prepares its epochs.
func (p *Problem) compile() (*compiled, error) {
	switch {
	case p == nil:
		return nil, fmt.Errorf("fit: %w: no problem", ErrProblem)
	case p.Model == nil:
		return nil, p.errorf("no synthesis model")
	case len(p.Epochs) == 0:
		return nil, p.errorf("no epochs to fit")
	case len(p.Epochs) > 1000:
		return nil, p.errorf("%d epochs (at most 1000)", len(p.Epochs))
	case p.Scale != ScaleFree && p.Scale != ScaleFixed:
		return nil, p.errorf("unknown scale mode %d", p.Scale)
	case p.CorrectionOrder < 0 || p.CorrectionOrder > MaxCorrectionOrder:
		return nil, p.errorf("continuum correction order %d (want 0–%d)", p.CorrectionOrder, MaxCorrectionOrder)
	case p.Scale == ScaleFixed && p.CorrectionOrder > 0:
		return nil, p.errorf("a continuum correction of order %d needs a free scale", p.CorrectionOrder)
	case p.MaxEvaluations < 0 || p.MaxEvaluations > 1e7:
		return nil, p.errorf("%d evaluations (want 0–1e7)", p.MaxEvaluations)
	case len(p.Composition.Z) != len(p.Composition.MassFraction):
		return nil, p.errorf("composition has %d elements but %d fractions", len(p.Composition.Z), len(p.Composition.MassFraction))
	}
	if len(p.Free) == 0 && !p.FitVelocity && !p.FitTemperature {
		return nil, p.errorf("no free parameter: free at least one element, the velocity or the temperature")
	}
	c := &compiled{p: p}
	hasLines := map[int]bool{}
	for _, sp := range p.Model.Store().SpeciesTable {
		hasLines[int(sp.Z)] = true
	}
	free := map[int]bool{}
	for i, f := range p.Free {
		el, err := linelists.ElementByZ(f.Z)
		if err != nil {
			return nil, p.errorf("free element %d: %v", i+1, err)
		}
		if free[f.Z] {
			return nil, p.errorf("%s is freed twice", el.Symbol)
		}
		free[f.Z] = true
		lo, hi := f.Lower, f.Upper
		if lo == 0 {
			lo = DefaultMassFractionLower
		}
		if hi == 0 {
			hi = DefaultMassFractionUpper
		}
		if bad(lo) || bad(hi) || !(lo > 0) || !(hi <= 1) || !(lo < hi) {
			return nil, p.errorf("bounds %g–%g of %s's mass fraction must satisfy 0 < lower < upper ≤ 1", lo, hi, el.Symbol)
		}
		par := Parameter{Name: "log10_X_" + el.Symbol, Label: "log₁₀ X(" + el.Symbol + ")", Kind: KindLogMassFraction,
			Element: el.Symbol, Z: f.Z, Lower: math.Log10(lo), Upper: math.Log10(hi)}
		c.params = append(c.params, par)
		x0 := p.Composition.Fraction(f.Z)
		s := math.Log10(x0)
		if !(x0 > lo && x0 < hi) {
			s = (par.Lower + par.Upper) / 2
		}
		c.start = append(c.start, s)
		c.freeZ = append(c.freeZ, f.Z)
		if !hasLines[f.Z] {
			c.warnings = append(c.warnings, fmt.Sprintf("%s is free but has no lines in the line lists: only its electrons act, so its fraction is barely constrained", el.Symbol))
		}
	}
	sum := 0.0
	for i, z := range p.Composition.Z {
		x := p.Composition.MassFraction[i]
		if bad(x) || x < 0 {
			return nil, p.errorf("composition: mass fraction %g of Z = %d", x, z)
		}
		if !free[z] && x > 0 {
			c.fixedZ = append(c.fixedZ, z)
			c.fixedW = append(c.fixedW, x)
			sum += x
		}
	}
	if len(c.freeZ) > 0 && !(sum > 0) {
		return nil, p.errorf("every element of the composition is free: at least one must stay fixed to take up the rest of the mass")
	}
	if len(c.freeZ) == 0 && len(p.Composition.Z) == 0 {
		return nil, p.errorf("empty composition")
	}
	for i := range c.fixedW {
		c.fixedW[i] /= sum
	}
	g := p.Model.Grid()
	mlo, mhi := g.Start, g.Wavelength(g.N-1)
	for e, ep := range p.Epochs {
		name := ep.Name
		if name == "" {
			name = fmt.Sprintf("epoch %d", p.Epochs[e].number(e))
		}
		ed, warn, err := p.prepareEpoch(c, e, ep, mlo, mhi)
		if err != nil {
			return nil, p.errorf("%s: %v", name, err)
		}
		if warn != "" {
			c.warnings = append(c.warnings, name+": "+warn)
		}
		c.epochs = append(c.epochs, ed)
	}
	c.nLinear = p.CorrectionOrder + 1
	if p.Scale == ScaleFixed {
		c.nLinear = 0
	}
	return c, nil
}

// prepareEpoch checks epoch e and appends its velocity and temperature
// parameters to c.
func (p *Problem) prepareEpoch(c *compiled, e int, ep Epoch, mlo, mhi float64) (epochData, string, error) {
	obs := ep.Observed
	ed := epochData{ej: ep.Ejecta, R: ep.ResolvingPower, d: ep.DistanceCm, vIdx: -1, tIdx: -1}
	switch {
	case obs == nil:
		return ed, "", fmt.Errorf("no observed spectrum")
	case len(obs.Flux) != len(obs.Wavelength) || (obs.Uncertainty != nil && len(obs.Uncertainty) != len(obs.Wavelength)) ||
		(obs.Mask != nil && len(obs.Mask) != len(obs.Wavelength)):
		return ed, "", fmt.Errorf("observed spectrum's columns have different lengths")
	case obs.Uncertainty == nil:
		return ed, "", fmt.Errorf("the observed spectrum has no uncertainties: χ² needs them")
	case bad(ep.ResolvingPower) || ep.ResolvingPower < 0:
		return ed, "", fmt.Errorf("resolving power %g (want ≥ 0, finite)", ep.ResolvingPower)
	case bad(ep.DistanceCm) || !(ep.DistanceCm > 0):
		return ed, "", fmt.Errorf("distance %g cm (want > 0, finite)", ep.DistanceCm)
	}
	if err := ep.Ejecta.Validate(); err != nil {
		return ed, "", err
	}
	outside := 0
	for i, w := range obs.Wavelength {
		if bad(w) {
			return ed, "", fmt.Errorf("sample %d has wavelength %g", i+1, w)
		}
		if i > 0 && !(w > obs.Wavelength[i-1]) {
			return ed, "", fmt.Errorf("wavelengths not ascending at sample %d (%g Å)", i+1, w)
		}
		if w < mlo || w > mhi {
			outside++
			continue
		}
		k := len(ed.grid)
		ed.grid = append(ed.grid, w)
		if obs.Masked(i) || !(obs.Uncertainty[i] > 0) {
			continue
		}
		if bad(obs.Flux[i]) || bad(obs.Uncertainty[i]) {
			return ed, "", fmt.Errorf("sample %d at %.6g Å has flux %g ± %g and is not masked (mask it, e.g. spectra.MaskInvalid)",
				i+1, w, obs.Flux[i], obs.Uncertainty[i])
		}
		ed.use = append(ed.use, k)
		ed.y = append(ed.y, obs.Flux[i])
		ed.sigma = append(ed.sigma, obs.Uncertainty[i])
	}
	nLin := p.CorrectionOrder + 1
	if len(ed.use) <= nLin {
		return ed, "", fmt.Errorf("%d compared samples inside the model's range %.5g–%.5g Å (unmasked, σ > 0); need more than %d",
			len(ed.use), mlo, mhi, nLin)
	}
	used := make([]float64, len(ed.use))
	for k, i := range ed.use {
		used[k] = ed.grid[i]
	}
	ed.basis = legendreBasis(used, p.CorrectionOrder)
	warn := ""
	if outside > 0 {
		warn = fmt.Sprintf("%d samples outside the model's range %.5g–%.5g Å are not compared", outside, mlo, mhi)
	}
	if p.FitVelocity {
		b := ep.Velocity
		if b == (Bounds{}) {
			b = Bounds{math.Max(ep.Ejecta.BetaIn+0.005, 0.02), ep.Ejecta.BetaMax - 0.02}
		}
		if bad(b.Lower) || bad(b.Upper) || !(b.Lower < b.Upper) || !(b.Lower > ep.Ejecta.BetaIn) || !(b.Upper < ep.Ejecta.BetaMax) {
			return ed, "", fmt.Errorf("velocity bounds %g–%g c must satisfy inner %g c < lower < upper < outer %g c",
				b.Lower, b.Upper, ep.Ejecta.BetaIn, ep.Ejecta.BetaMax)
		}
		ed.vIdx = len(c.params)
		n := ep.number(e)
		c.params = append(c.params, Parameter{Name: fmt.Sprintf("v_ph_c_%d", n), Label: fmt.Sprintf("v_ph,%d / c", n),
			Kind: KindVelocity, Epoch: n, Lower: b.Lower, Upper: b.Upper})
		c.start = append(c.start, inside(ep.Ejecta.BetaPh, b))
	}
	if p.FitTemperature {
		b := ep.Temperature
		if b == (Bounds{}) {
			b = Bounds{DefaultTemperatureLower, DefaultTemperatureUpper}
		}
		if bad(b.Lower) || bad(b.Upper) || !(b.Lower > 0) || !(b.Lower < b.Upper) {
			return ed, "", fmt.Errorf("temperature bounds %g–%g K must satisfy 0 < lower < upper", b.Lower, b.Upper)
		}
		ed.tIdx = len(c.params)
		n := ep.number(e)
		c.params = append(c.params, Parameter{Name: fmt.Sprintf("T_ph_K_%d", n), Label: fmt.Sprintf("T_ph,%d / K", n),
			Kind: KindTemperature, Epoch: n, Lower: b.Lower, Upper: b.Upper})
		c.start = append(c.start, inside(ep.Ejecta.Temperature, b))
	}
	return ed, warn, nil
}

// inside returns x, or the middle of b when x lies outside it.
func inside(x float64, b Bounds) float64 {
	if x > b.Lower && x < b.Upper {
		return x
	}
	return (b.Lower + b.Upper) / 2
}

// errOutside marks a parameter vector outside the prior's support.
var errOutside = errors.New("outside the prior")

// composition returns the composition at parameter vector x.
func (c *compiled) composition(x []float64) (opacity.Composition, error) {
	n := len(c.freeZ)
	z := make([]int, 0, n+len(c.fixedZ))
	w := make([]float64, 0, n+len(c.fixedZ))
	s := 0.0
	for i, zi := range c.freeZ {
		v := math.Pow(10, x[i])
		s += v
		z, w = append(z, zi), append(w, v)
	}
	if n > 0 && !(s < 1) {
		return opacity.Composition{}, errOutside
	}
	if n == 0 {
		return c.p.Composition, nil
	}
	for i, zi := range c.fixedZ {
		z, w = append(z, zi), append(w, c.fixedW[i]*(1-s))
	}
	return opacity.NewComposition(z, w)
}

// inBounds reports whether x lies within every parameter's bounds.
func (c *compiled) inBounds(x []float64) bool {
	for i, p := range c.params {
		if !(x[i] >= p.Lower && x[i] <= p.Upper) {
			return false
		}
	}
	return true
}

// epochEval is the comparison of one epoch's model with its spectrum.
type epochEval struct {
	chi2   float64
	n      int
	coef   []float64 // scale and correction coefficients (nil: fixed scale)
	logDet float64   // ln det of the linear normal matrix (0: fixed scale)
	// degenerate: the model has no flux on the compared samples, so no
	// scale is defined (χ² is Σ (y/σ)²; the sampler gives it zero density).
	degenerate bool
	model      []float64 // model flux on ed.grid, corrected (only when kept)
	ej         synth.Ejecta
	warn       []string
}

// evaluate computes every epoch's χ² at x. keep keeps the corrected model
// fluxes; workers overrides the synthesis workers when > 0.
func (c *compiled) evaluate(ctx context.Context, x []float64, keep bool, workers int) ([]epochEval, error) {
	if !c.inBounds(x) {
		return nil, errOutside
	}
	comp, err := c.composition(x)
	if err != nil {
		return nil, err
	}
	set := c.p.Settings
	if workers > 0 {
		set.Workers = workers
	}
	out := make([]epochEval, len(c.epochs))
	for e := range c.epochs {
		ed := &c.epochs[e]
		ej := ed.ej
		if ed.vIdx >= 0 {
			ej.BetaPh = outerSafe(x[ed.vIdx], ej.BetaMax, set.Nodes)
		}
		if ed.tIdx >= 0 {
			ej.Temperature = x[ed.tIdx]
		}
		res, err := c.p.Model.Spectrum(ctx, comp, ej, set)
		if err != nil {
			return nil, fmt.Errorf("fit: epoch %d: %w", c.p.Epochs[e].number(e), err)
		}
		res.Flux = res.AtDistance(ed.d)
		flux, _, err := res.Observe(ed.R, ed.grid)
		if err != nil {
			return nil, fmt.Errorf("fit: epoch %d: %w", c.p.Epochs[e].number(e), err)
		}
		m := make([]float64, len(ed.use))
		for k, i := range ed.use {
			m[k] = flux[i]
		}
		ev := epochEval{n: len(m), ej: ej, warn: res.Warnings}
		if c.nLinear == 0 {
			ev.chi2 = chi2Fixed(ed.y, ed.sigma, m)
		} else {
			ls, err := linearFit(ed.y, ed.sigma, m, ed.basis)
			switch {
			case errors.Is(err, errDegenerate):
				// No flux to scale: any scale gives χ² = Σ (y/σ)².
				ev.degenerate = true
				ev.chi2 = chi2Fixed(ed.y, ed.sigma, make([]float64, len(m)))
				ev.coef = make([]float64, c.nLinear)
			case err != nil:
				return nil, fmt.Errorf("fit: epoch %d: %w", c.p.Epochs[e].number(e), err)
			default:
				ev.chi2, ev.coef, ev.logDet = ls.chi2, ls.coef, ls.logDet
			}
		}
		if keep {
			ev.model = correctedModel(flux, ed, ev.coef)
		}
		out[e] = ev
	}
	return out, nil
}

// correctedModel applies the correction coef to the model flux on the whole
// grid of ed (the polynomial extended over the grid's ends).
func correctedModel(flux []float64, ed *epochData, coef []float64) []float64 {
	out := slices.Clone(flux)
	if coef == nil {
		return out
	}
	lo, hi := ed.grid[ed.use[0]], ed.grid[ed.use[len(ed.use)-1]]
	for i, w := range ed.grid {
		out[i] *= polyCorrection(legendreX(w, lo, hi), coef)
	}
	return out
}

// EpochFit is one epoch of an evaluation: its photosphere, linear
// coefficients and χ².
type EpochFit struct {
	Epoch                 int     `json:"epoch"`
	Days                  float64 `json:"days"`
	PhotosphereVelocityC  float64 `json:"photosphere_velocity_c"`
	PhotosphereVelocityKm float64 `json:"photosphere_velocity_km_s"`
	TemperatureK          float64 `json:"temperature_k"`
	// FluxScale is the factor the model at the distance is multiplied by
	// (1 for a fixed scale); Correction the Legendre coefficients
	// c_0 … c_n of the multiplicative correction (c_0 = FluxScale).
	FluxScale  float64   `json:"flux_scale"`
	Correction []float64 `json:"correction_coefficients,omitempty"`
	Chi2       float64   `json:"chi2"`
	N          int       `json:"samples"`
	Chi2N      float64   `json:"chi2_per_sample"`
}

// Evaluation is the problem evaluated at one parameter vector.
type Evaluation struct {
	Parameters []float64  `json:"parameters"`
	Epochs     []EpochFit `json:"epochs"`
	Chi2       float64    `json:"chi2"`
	N          int        `json:"samples"`
	Chi2N      float64    `json:"chi2_per_sample"`
	// Composition is the full composition, as ParseComposition reads it.
	Composition string `json:"composition"`
	// Overlays are the corrected models on each epoch's observed
	// wavelengths (inside the model's range), for figures.
	Overlays []*Overlay `json:"-"`
	Warnings []string   `json:"warnings,omitempty"`
}

// Evaluate synthesises every epoch at parameter vector x (in the layout of
// Parameters) and compares it with its spectrum, with the best scale and
// correction.
func (p *Problem) Evaluate(ctx context.Context, x []float64) (*Evaluation, error) {
	c, err := p.compile()
	if err != nil {
		return nil, err
	}
	return c.evaluation(ctx, x)
}

func (c *compiled) evaluation(ctx context.Context, x []float64) (*Evaluation, error) {
	if len(x) != len(c.params) {
		return nil, fmt.Errorf("fit: %w: %d parameters given, the problem has %d", ErrProblem, len(x), len(c.params))
	}
	for i, v := range x {
		if bad(v) {
			return nil, fmt.Errorf("fit: %w: parameter %s is %g", ErrProblem, c.params[i].Name, v)
		}
	}
	evs, err := c.evaluate(ctx, x, true, 0)
	if errors.Is(err, errOutside) {
		return nil, fmt.Errorf("fit: %w: parameters %v lie outside the bounds (or the free fractions sum to ≥ 1)", ErrProblem, x)
	}
	if err != nil {
		return nil, err
	}
	comp, _ := c.composition(x)
	out := &Evaluation{Parameters: slices.Clone(x), Composition: comp.String(), Warnings: slices.Clone(c.warnings)}
	seen := map[string]bool{}
	for e, ev := range evs {
		f := EpochFit{Epoch: c.p.Epochs[e].number(e), Days: ev.ej.Time / physics.Day, PhotosphereVelocityC: ev.ej.BetaPh,
			PhotosphereVelocityKm: ev.ej.BetaPh * physics.SpeedOfLightKmS, TemperatureK: ev.ej.Temperature,
			FluxScale: 1, Chi2: ev.chi2, N: ev.n, Chi2N: ev.chi2 / float64(ev.n)}
		if ev.coef != nil {
			f.FluxScale, f.Correction = ev.coef[0], slices.Clone(ev.coef)
		}
		out.Epochs = append(out.Epochs, f)
		out.Chi2 += ev.chi2
		out.N += ev.n
		out.Overlays = append(out.Overlays, &Overlay{Wavelength: c.epochs[e].grid, Flux: ev.model,
			Preview: c.p.Settings.Preview, Chi2: ev.chi2, N: ev.n, Warnings: ev.warn})
		for _, w := range ev.warn {
			if !seen[w] {
				seen[w] = true
				out.Warnings = append(out.Warnings, w)
			}
		}
	}
	out.Chi2N = out.Chi2 / float64(out.N)
	return out, nil
}

// workersFor returns n if positive, else GOMAXPROCS.
func workersFor(n int) int {
	if n > 0 {
		return n
	}
	return runtime.GOMAXPROCS(0)
}

// describeFree lists the free parameters' names, for messages.
func describeFree(ps []Parameter) string {
	names := make([]string, len(ps))
	for i, p := range ps {
		names[i] = p.Name
	}
	return strings.Join(names, ", ")
}

// outerSafe returns the photosphere velocity ph, moved down by a few ulps
// where needed so that the synthesis's outermost velocity node (of nodes,
// ≤ 0 meaning synth.DefaultNodes), computed as synth.Envelope.Node does,
// ph + (max − ph)·(n−1)/(n−1), does not round above max: there the density
// law is zero and the plasma solve fails.
func outerSafe(ph, vmax float64, nodes int) float64 {
	if nodes <= 0 {
		nodes = synth.DefaultNodes
	}
	k := float64(nodes - 1)
	for range 16 {
		if ph+(vmax-ph)*k/k <= vmax {
			return ph
		}
		ph = math.Nextafter(ph, 0)
	}
	return ph
}

// number is the epoch's number for names and messages; e is its index in
// Problem.Epochs.
func (ep *Epoch) number(e int) int {
	if ep.Number > 0 {
		return ep.Number
	}
	return e + 1
}
