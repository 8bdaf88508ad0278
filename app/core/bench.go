package core

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"slices"
	"strings"
	"sync"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/opacity/fit"
	"broadline/opacity/synth"
	"broadline/physics"
	"broadline/spectra"
)

// Bench is the workbench's computing side, without any widget: a dataset,
// its observed spectra, its line store and the synthesis model built from
// it. Every computation the workbench and the headless commands make from
// a Model goes through it. Its methods may be called from several
// goroutines.
type Bench struct {
	// Name identifies the dataset in saved sessions: DemoName, or the
	// absolute path of a dataset file.
	Name     string
	Data     *Dataset
	Observed []*spectra.Spectrum // one per epoch, in the dataset's order
	Store    *linelists.Store
	// LoadWarnings are what reading the spectra and the line lists
	// reported; every computation's warnings repeat them.
	LoadWarnings []string

	once  sync.Once
	model *synth.Model
	err   error

	fitOnce  sync.Once
	fitModel *synth.Model
	fitErr   error
}

func newBench(name string, d *Dataset, obs []*spectra.Spectrum, st *linelists.Store, warnings []string) *Bench {
	return &Bench{Name: name, Data: d, Observed: obs, Store: st, LoadWarnings: warnings}
}

// NewBench returns a bench for dataset d with its observed spectra (one
// per epoch) and line store, named name in sessions. It checks d.
func NewBench(name string, d *Dataset, obs []*spectra.Spectrum, st *linelists.Store, warnings []string) (*Bench, error) {
	if err := d.Check(); err != nil {
		return nil, err
	}
	if len(obs) != len(d.Epochs) {
		return nil, fmt.Errorf("%d spectra for %d epochs", len(obs), len(d.Epochs))
	}
	return newBench(name, d, obs, st, warnings), nil
}

// FitModel returns the synthesis model the fits use, built on first use:
// over the dataset's range like SynthModel, on a grid of a third of the
// spectra's resolution element (synth.StepFor) — much cheaper at low
// resolving power, and as fine as SynthModel's at R ≥ 1500.
func (b *Bench) FitModel() (*synth.Model, error) {
	step := synth.StepFor(b.Data.ResolvingPower)
	if step == synth.DefaultStep {
		return b.SynthModel()
	}
	b.fitOnce.Do(func() {
		b.fitModel, b.fitErr = synth.NewModel(b.Store, b.Data.ModelFromUm*1e4, b.Data.ModelToUm*1e4, step)
	})
	return b.fitModel, b.fitErr
}

// SynthModel returns the synthesis model over the dataset's wavelength
// range, built on first use.
func (b *Bench) SynthModel() (*synth.Model, error) {
	b.once.Do(func() {
		b.model, b.err = synth.NewModel(b.Store, b.Data.ModelFromUm*1e4, b.Data.ModelToUm*1e4, 0)
	})
	return b.model, b.err
}

// Overlay is a model on the observed spectrum's samples with its χ² (see
// fit.Overlay).
type Overlay = fit.Overlay

// Compute synthesises model m and compares it with its epoch's observed
// spectrum: the one place where a model is synthesised, put at the
// dataset's distance, smoothed to its resolving power and compared.
// without, when > 0, removes the lines of that element (a knock-out; the
// plasma keeps the element).
func (b *Bench) Compute(ctx context.Context, m Model, without int) (*Overlay, error) {
	return b.ComputeAt(ctx, m, without, 0)
}

// ComputeAt is Compute with the model's time since explosion set to days
// instead of the epoch's (days ≤ 0: the epoch's), still compared with the
// epoch's spectrum: for grids over the age.
func (b *Bench) ComputeAt(ctx context.Context, m Model, without int, days float64) (*Overlay, error) {
	ov, _, err := b.ComputeSpectrum(ctx, m, without, days, nil)
	return ov, err
}

// ComputeSpectrum is ComputeAt that also returns, from the same synthesis,
// the model flux at the vacuum wavelengths wave (Å, increasing; none when
// wave is nil), put at the dataset's distance and smoothed to its resolving
// power as the overlay is: for grids that keep the model spectra.
func (b *Bench) ComputeSpectrum(ctx context.Context, m Model, without int, days float64, wave []float64) (*Overlay, []float64, error) {
	if err := m.Validate(b.Data); err != nil {
		return nil, nil, err
	}
	sm, err := b.SynthModel()
	if err != nil {
		return nil, nil, err
	}
	comp, err := m.MassFractions.Mix()
	if err != nil {
		return nil, nil, err
	}
	set := synth.Settings{Preview: m.Preview, Workers: runtime.GOMAXPROCS(0)}
	if without > 0 {
		set.Without = []int{without}
	}
	ej := b.Data.Ejecta(m)
	if days > 0 {
		ej.Time = days * physics.Day
	}
	ov, res, err := fit.CompareModelSpectrum(ctx, sm, comp, ej, set, b.Data.DistanceMpc*physics.Megaparsec, b.Observed[m.Epoch], b.Data.ResolvingPower)
	if err != nil {
		return nil, nil, err
	}
	ov.Warnings = append(slices.Clone(b.LoadWarnings), ov.Warnings...)
	var flux []float64
	if wave != nil {
		if flux, _, err = res.Observe(b.Data.ResolvingPower, wave); err != nil {
			return nil, nil, err
		}
	}
	return ov, flux, nil
}

// Param is a parameter of the photosphere a sweep varies.
type Param int

const (
	Velocity    Param = iota // v_ph / c
	Temperature              // T_ph in K
)

// Describe returns v as the workbench shows the parameter: "0.240 c" or
// "5000 K".
func (p Param) Describe(v float64) string {
	if p == Temperature {
		return fmt.Sprintf("%.0f K", v)
	}
	return fmt.Sprintf("%.3f c", v)
}

// Round rounds v to the precision Describe shows (1 K, 0.001 c), so that a
// value used from a message is the value the message gave.
func (p Param) Round(v float64) float64 {
	if p == Temperature {
		return math.Round(v)
	}
	return math.Round(v*1000) / 1000
}

// Name is the parameter's name in messages and figures.
func (p Param) Name() string {
	if p == Temperature {
		return "T_ph"
	}
	return "v_ph"
}

// Sweep is a fit.Profile of one parameter of a model.
type Sweep struct {
	fit.Profile
	Param Param
	// At is the model the sweep varied (its value of Param is the first
	// one tried): a result belongs to it.
	At Model
}

// With returns model m with the swept parameter set to v.
func (s *Sweep) With(m Model, v float64) Model {
	if s.Param == Temperature {
		m.Temperature = v
	} else {
		m.PhotosphereVelocity = v
	}
	return m
}

// Matches reports whether m differs from the swept model only in the
// swept parameter, so that the sweep's best value applies to it.
func (s *Sweep) Matches(m Model) bool { return s.With(m, 0) == s.With(s.At, 0) }

// Sweep synthesises model m at steps values of parameter p evenly spaced
// from lo to hi (within the workbench's ranges), everything else as m has
// it, and compares each with the observed spectrum (fit.Sweep: grid, then
// golden-section refinement). progress, when not nil, is called after each
// synthesis. The work stops when ctx is done (an error wrapping ctx.Err()).
func (b *Bench) Sweep(ctx context.Context, m Model, p Param, lo, hi float64, steps int, progress func(done, total int)) (*Sweep, error) {
	switch p {
	case Velocity:
		if top := MaxVelocity(b.Data); lo < MinVelocity || hi > top {
			return nil, fmt.Errorf("velocity sweep: range %g–%g c must lie within %g–%g c (%g c below the outer velocity)", lo, hi, MinVelocity, top, VelocityGap)
		}
	case Temperature:
		if lo < MinTemperature || hi > MaxTemperature {
			return nil, fmt.Errorf("temperature sweep: range %g–%g K must lie within %g–%g K", lo, hi, MinTemperature, MaxTemperature)
		}
	default:
		return nil, fmt.Errorf("sweep: unknown parameter %d", p)
	}
	sw := &Sweep{Param: p, At: m}
	if err := sw.With(m, lo).Validate(b.Data); err != nil {
		return nil, err
	}
	prof, err := fit.Sweep(ctx, lo, hi, steps, func(ctx context.Context, x float64) (float64, error) {
		ov, err := b.Compute(ctx, sw.With(m, x), 0)
		if err != nil {
			return 0, err
		}
		if ov.N == 0 {
			return 0, fmt.Errorf("no unmasked samples with uncertainties to compare")
		}
		return ov.Reduced(), nil
	}, progress)
	if err != nil {
		return nil, err
	}
	sw.Profile = *prof
	return sw, nil
}

// IdentifyLines is how many of the strongest lines an identification
// lists per feature.
const IdentifyLines = 4

// Features finds the absorption features of epoch i's observed spectrum as
// the workbench lists them (smoothed to R = 150, significance ≥ 5).
func (b *Bench) Features(i int) ([]spectra.Feature, error) {
	return spectra.FindFeatures(b.Observed[i], spectra.FeatureOptions{ResolvingPower: 150, MinSignificance: 5})
}

// Identify attributes each feature to model m's elements and lines (see
// fit.AttributeFeatures). progress, when not nil, is called after each
// feature. A feature outside the model's range gets nil.
func (b *Bench) Identify(ctx context.Context, m Model, feats []spectra.Feature, progress func(done, total int)) ([]*synth.Attribution, error) {
	if err := m.Validate(b.Data); err != nil {
		return nil, err
	}
	sm, err := b.SynthModel()
	if err != nil {
		return nil, err
	}
	comp, err := m.MassFractions.Mix()
	if err != nil {
		return nil, err
	}
	return fit.AttributeFeatures(ctx, sm, comp, b.Data.Ejecta(m), synth.Settings{Workers: runtime.GOMAXPROCS(0)},
		feats, b.Data.ModelFromUm*1e4, b.Data.ModelToUm*1e4, IdentifyLines, progress)
}

// Comparison is the computed models of candidates at one epoch.
type Comparison struct {
	Epoch      int
	Candidates []Candidate
	Models     []*Overlay
}

// Compare synthesises every candidate kept for epoch (in the order kept),
// calling progress after each. It stops when ctx is done.
func (b *Bench) Compare(ctx context.Context, cands []Candidate, epoch int, progress func(done, total int)) (*Comparison, error) {
	cmp := &Comparison{Epoch: epoch}
	for _, c := range cands {
		if c.Epoch == epoch {
			cmp.Candidates = append(cmp.Candidates, c)
		}
	}
	if len(cmp.Candidates) == 0 {
		return nil, fmt.Errorf("no candidates kept for this epoch: keep the current model as a candidate first")
	}
	for i, c := range cmp.Candidates {
		ov, err := b.Compute(ctx, c.Model, 0)
		if err != nil {
			return nil, fmt.Errorf("candidate %s: %w", c.Label, err)
		}
		cmp.Models = append(cmp.Models, ov)
		if progress != nil {
			progress(i+1, len(cmp.Candidates))
		}
	}
	return cmp, nil
}

// KnockOutChoices lists the elements that have lines in the store, by Z,
// for a knock-out: their symbols and Z.
func (b *Bench) KnockOutChoices() (symbols []string, zs []int) {
	seen := map[int]bool{}
	for _, sp := range b.Store.SpeciesTable {
		if z := int(sp.Z); !seen[z] {
			seen[z] = true
			zs = append(zs, z)
		}
	}
	slices.Sort(zs)
	out := zs[:0]
	for _, z := range zs {
		e, err := linelists.ElementByZ(z)
		if err != nil {
			continue
		}
		symbols = append(symbols, e.Symbol)
		out = append(out, z)
	}
	return symbols, out
}

// Lineless lists the elements of model m's mixes (both zones) that have no
// lines in the store, by Z: the model only counts their electrons, so any
// absorption they would make is missing from it.
func (b *Bench) Lineless(m Model) []string {
	var mixes []opacity.Composition
	for _, c := range []Composition{m.MassFractions, m.InnerMassFractions} {
		if mix, err := c.Mix(); err == nil {
			mixes = append(mixes, mix)
		}
	}
	return LinelessIn(b.Store, mixes...)
}

// LinelessIn lists the elements of the mixes without lines in st, by Z.
func LinelessIn(st *linelists.Store, mixes ...opacity.Composition) []string {
	has := map[int]bool{}
	for _, sp := range st.SpeciesTable {
		has[int(sp.Z)] = true
	}
	seen := map[int]bool{}
	var zs []int
	for _, mix := range mixes {
		for _, z := range mix.Z {
			if !has[z] && !seen[z] {
				seen[z] = true
				zs = append(zs, z)
			}
		}
	}
	slices.Sort(zs)
	var out []string
	for _, z := range zs {
		out = append(out, ElementSymbol(z))
	}
	return out
}

// LinelessText is the workbench's and the commands' label for elements
// without lines (see Bench.Lineless): "" when there are none.
func LinelessText(symbols []string) string {
	if len(symbols) == 0 {
		return ""
	}
	return "No lines in the line lists (they only supply electrons; their absorption is missing from the model): " +
		strings.Join(symbols, ", ")
}
