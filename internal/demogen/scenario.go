package demogen

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"io/fs"
	"math"
	"path"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/opacity/synth"
	"broadline/physics"
	"broadline/spectra"
)

// Scenario records the parameters from which a set of synthetic spectra of
// one event was made: the truth of a demo or of an injection–recovery test.
// It is read from and written to JSON. Velocities are fractions of c.
type Scenario struct {
	// Label says what the scenario is; for the built-in demo it states that
	// the event and its data are invented.
	Label string `json:"label"`
	// Object is the (invented) name of the event.
	Object string `json:"object"`
	// DistanceMpc is the distance in Mpc at which fluxes are given.
	DistanceMpc float64 `json:"distance_mpc"`
	// LineFiles and LevelFiles name the line lists and levels files, relative
	// to the scenario file's directory.
	LineFiles  []string `json:"line_files"`
	LevelFiles []string `json:"level_files,omitempty"`
	// MassFractions is the composition as opacity.ParseComposition reads it:
	// of the whole ejecta, or, with InnerMassFractions, of the ejecta
	// outside the inner zone.
	MassFractions string `json:"mass_fractions"`
	// InnerMassFractions, when not empty, is the composition of the inner
	// zone, from the centre up to ZoneBoundary (v/c): stratified ejecta.
	InnerMassFractions string  `json:"inner_mass_fractions,omitempty"`
	ZoneBoundary       float64 `json:"zone_boundary_c,omitempty"`
	EjectaMassSolar    float64 `json:"ejecta_mass_msun"`
	InnerVelocity      float64 `json:"inner_velocity_c"`
	OuterVelocity      float64 `json:"outer_velocity_c"`
	DensityIndex       float64 `json:"density_index"`
	Diluted            bool    `json:"diluted_temperature"`
	// ModelFromUm and ModelToUm are the model's vacuum wavelength range.
	ModelFromUm float64 `json:"model_from_um"`
	ModelToUm   float64 `json:"model_to_um"`
	// Instrument describes how the spectra were "observed".
	Instrument Instrument `json:"instrument"`
	// Seed seeds the noise.
	Seed   uint64  `json:"seed"`
	Epochs []Epoch `json:"epochs"`
}

// Instrument describes the invented spectrograph of a scenario.
type Instrument struct {
	Description    string  `json:"description"`
	ResolvingPower float64 `json:"resolving_power"`
	// Pixels are spaced evenly in ln λ, PixelsPerResolution per λ/R, from
	// FromUm to ToUm (vacuum).
	FromUm              float64 `json:"from_um"`
	ToUm                float64 `json:"to_um"`
	PixelsPerResolution float64 `json:"pixels_per_resolution"`
	// Removed are wavelength ranges (µm) cut from the spectra, as a
	// reduction removes the opaque telluric bands; Flagged are ranges kept
	// but marked bad in the mask column, with NoiseFactor times the noise.
	Removed     [][2]float64 `json:"removed_um"`
	Flagged     [][2]float64 `json:"flagged_um"`
	NoiseFactor float64      `json:"flagged_noise_factor"`
}

// Epoch is one spectrum of a scenario.
type Epoch struct {
	File                string  `json:"file"`
	Days                float64 `json:"days"`
	PhotosphereVelocity float64 `json:"photosphere_velocity_c"`
	Temperature         float64 `json:"temperature_k"`
	// SNR is the signal-to-noise ratio per pixel at the continuum's median.
	SNR float64 `json:"snr"`
}

// maxPixels bounds the pixels of a scenario's instrument.
const maxPixels = 1 << 22

// ReadScenario decodes and checks a scenario.
func ReadScenario(r io.Reader) (*Scenario, error) {
	var s Scenario
	dec := json.NewDecoder(io.LimitReader(r, 1<<20))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&s); err != nil {
		return nil, fmt.Errorf("synth: scenario: %w", err)
	}
	if err := s.Validate(); err != nil {
		return nil, err
	}
	return &s, nil
}

// Validate checks that every epoch gives valid ejecta and the composition
// parses.
func (s *Scenario) Validate() error {
	if _, err := opacity.ParseComposition(s.MassFractions); err != nil {
		return fmt.Errorf("synth: scenario: %w", err)
	}
	if (s.InnerMassFractions == "") != (s.ZoneBoundary == 0) {
		return fmt.Errorf("synth: scenario: inner_mass_fractions and zone_boundary_c go together")
	}
	if s.InnerMassFractions != "" {
		if _, err := opacity.ParseComposition(s.InnerMassFractions); err != nil {
			return fmt.Errorf("synth: scenario: inner_mass_fractions: %w", err)
		}
		if !(s.ZoneBoundary > 0 && s.ZoneBoundary < 1) {
			return fmt.Errorf("synth: scenario: zone_boundary_c %g must lie between 0 and 1", s.ZoneBoundary)
		}
	}
	if len(s.LineFiles) == 0 || len(s.Epochs) == 0 {
		return fmt.Errorf("synth: scenario: needs line files and at least one epoch")
	}
	if !(s.DistanceMpc > 0) || !(s.ModelFromUm > 0) || !(s.ModelToUm > s.ModelFromUm) {
		return fmt.Errorf("synth: scenario: distance and model range must be positive")
	}
	if len(s.Epochs) > 1000 || len(s.LineFiles)+len(s.LevelFiles) > 10000 {
		return fmt.Errorf("synth: scenario: %d epochs and %d files is more than a scenario holds", len(s.Epochs), len(s.LineFiles)+len(s.LevelFiles))
	}
	if s.ModelToUm/s.ModelFromUm > 1000 || math.IsInf(s.ModelToUm, 0) {
		return fmt.Errorf("synth: scenario: model range %g–%g µm spans more than a factor 1000", s.ModelFromUm, s.ModelToUm)
	}
	in := s.Instrument
	if !(in.ResolvingPower <= 1e6) || !(in.PixelsPerResolution <= 100) || !(in.NoiseFactor >= 0) {
		return fmt.Errorf("synth: scenario: instrument R %g, %g pixels per resolution element, noise factor %g out of range",
			in.ResolvingPower, in.PixelsPerResolution, in.NoiseFactor)
	}
	if !(in.ResolvingPower > 0) || !(in.PixelsPerResolution > 0) || !(in.FromUm >= s.ModelFromUm) || !(in.ToUm <= s.ModelToUm) || !(in.ToUm > in.FromUm) {
		return fmt.Errorf("synth: scenario: instrument range %g–%g µm must lie inside the model's %g–%g µm, with R and sampling > 0",
			in.FromUm, in.ToUm, s.ModelFromUm, s.ModelToUm)
	}
	if n := math.Log(in.ToUm/in.FromUm) * in.ResolvingPower * in.PixelsPerResolution; n > maxPixels {
		return fmt.Errorf("synth: scenario: the instrument would have %.3g pixels (at most %d)", n, maxPixels)
	}
	for i, e := range s.Epochs {
		if err := s.Ejecta(i).Validate(); err != nil {
			return fmt.Errorf("synth: scenario epoch %d: %w", i+1, err)
		}
		if !(e.SNR > 0) || math.IsInf(e.SNR, 0) || e.File == "" {
			return fmt.Errorf("synth: scenario epoch %d: needs a file name and SNR > 0", i+1)
		}
	}
	return nil
}

// Composition returns the scenario's composition.
func (s *Scenario) Composition() opacity.Composition {
	c, _ := opacity.ParseComposition(s.MassFractions)
	return c
}

// Ejecta returns the ejecta of epoch i, with the inner zone if the
// scenario has one.
func (s *Scenario) Ejecta(i int) synth.Ejecta {
	e := s.Epochs[i]
	ej := synth.Ejecta{
		Time: e.Days * physics.Day, Mass: s.EjectaMassSolar * physics.SolarMass,
		BetaIn: s.InnerVelocity, BetaPh: e.PhotosphereVelocity, BetaMax: s.OuterVelocity,
		DensityIndex: s.DensityIndex, Temperature: e.Temperature, Diluted: s.Diluted,
	}
	if s.InnerMassFractions != "" {
		c, _ := opacity.ParseComposition(s.InnerMassFractions) // checked by Validate
		ej.Zones = []synth.Zone{{Inner: 0, Outer: s.ZoneBoundary, Composition: c}}
	}
	return ej
}

// Pixels returns the instrument's pixel wavelengths in Å, before any range
// is removed.
func (in Instrument) Pixels() []float64 {
	step := 1 / (in.ResolvingPower * in.PixelsPerResolution)
	n := int(math.Floor(math.Log(in.ToUm/in.FromUm)/step)) + 1
	w := make([]float64, n)
	for i := range w {
		w[i] = in.FromUm * 1e4 * math.Exp(float64(i)*step)
	}
	return w
}

// LoadStore reads the scenario's line lists and levels files from fsys; their
// names are relative to dir, the directory of the scenario file (slash
// separated, as io/fs wants: an embedded file system or os.DirFS both work).
// The report says what reading found (duplicates, ground levels added,
// warnings), for the caller to show.
func (s *Scenario) LoadStore(fsys fs.FS, dir string) (*linelists.Store, linelists.Report, error) {
	b := linelists.NewBuilder()
	read := func(name string, f func(r io.Reader) error) error {
		p := path.Join(dir, name)
		r, err := fsys.Open(p)
		if err != nil {
			return fmt.Errorf("synth: scenario: %w", err)
		}
		defer r.Close()
		return f(r)
	}
	for _, name := range s.LineFiles {
		if err := read(name, func(r io.Reader) error {
			_, err := b.Read(r, linelists.ReadOptions{Name: name})
			return err
		}); err != nil {
			return nil, linelists.Report{}, err
		}
	}
	for _, name := range s.LevelFiles {
		if err := read(name, func(r io.Reader) error {
			_, err := b.ReadLevels(r, linelists.LevelsOptions{Name: name})
			return err
		}); err != nil {
			return nil, linelists.Report{}, err
		}
	}
	st, rep := b.Build()
	return st, rep, nil
}

// NewModel returns a model of st over the scenario's wavelength range.
func (s *Scenario) NewModel(st *linelists.Store) (*synth.Model, error) {
	return synth.NewModel(st, s.ModelFromUm*1e4, s.ModelToUm*1e4, 0)
}

// Truth returns epoch i's noiseless spectrum as the scenario's instrument
// records it: the pixel wavelengths (Å, before any range is removed), the
// model flux at the scenario's distance (erg s⁻¹ cm⁻² Å⁻¹) smoothed to the
// instrument's resolving power, and the bare blackbody continuum. A betaPh > 0
// replaces the recorded photosphere velocity (for recovery tests and sweeps).
func (s *Scenario) Truth(ctx context.Context, m *synth.Model, i int, betaPh float64, workers int) (wave, flux, cont []float64, err error) {
	ej := s.Ejecta(i)
	if betaPh > 0 {
		ej.BetaPh = betaPh
	}
	res, err := m.Spectrum(ctx, s.Composition(), ej, synth.Settings{Workers: workers})
	if err != nil {
		return nil, nil, nil, err
	}
	d := s.DistanceMpc * physics.Megaparsec
	res.Flux = res.AtDistance(d)
	wave = s.Instrument.Pixels()
	flux, _, err = res.Observe(s.Instrument.ResolvingPower, wave)
	if err != nil {
		return nil, nil, nil, err
	}
	cont = spectra.BlackbodyFluxes(nil, wave, ej.Temperature, ej.PhotosphereRadius(), d)
	return wave, flux, cont, nil
}
