package fit

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"broadline/linelists"
	"broadline/opacity"
	"broadline/opacity/synth"
	"broadline/physics"
	"broadline/spectra"
)

// smallStore returns a small line store for injection–recovery tests: the
// Ca II triplet and the Sr II near-infrared lines with their ground-state
// resonance lines (vacuum wavelengths and log gf from REFERENCES.md, log gf
// from memory; lower-level energies of the 3d/4d levels from NIST, from
// memory), and nNd invented Nd II lines (seeded; INVENTED atomic data)
// spread over 7000–12500 Å with low-lying lower levels.
func smallStore(t testing.TB, nNd int) *linelists.Store {
	t.Helper()
	b := linelists.NewBuilder()
	ca := linelists.MustSpecies("Ca II")
	sr := linelists.MustSpecies("Sr II")
	nd := linelists.MustSpecies("Nd II")
	add := func(sp linelists.Species, l, lgf, e float64, g float32) {
		b.Add(linelists.Line{Wavelength: l, LogGF: lgf, Species: sp, LowerEnergy: e, LowerG: g})
	}
	add(ca, 3934.78, 0.135, 0, 2)
	add(ca, 8500.36, -1.318, 1.692, 4)
	add(ca, 8544.44, -0.360, 1.700, 6)
	add(ca, 8664.52, -0.622, 1.692, 4)
	add(sr, 4078.86, 0.151, 0, 2)
	add(sr, 10039.40, -1.31, 1.805, 4)
	add(sr, 10330.14, -0.35, 1.839, 6)
	add(sr, 10917.86, -0.64, 1.805, 4)
	add(nd, 4300, -0.5, 0, 8)
	rng := rand.New(rand.NewPCG(7, 11))
	for range nNd {
		l := 7000 * math.Exp(rng.Float64()*math.Log(12500.0/7000))
		add(nd, l, -2.5+2*rng.Float64(), 1.2*rng.Float64(), float32(2*rng.IntN(6)+2))
	}
	st, _ := b.Build()
	return st
}

// injection is an invented event for injection–recovery tests: its true
// composition, epochs and the noisy spectra the model makes of them.
type injection struct {
	model  *synth.Model
	comp   opacity.Composition
	epochs []Epoch
	truth  []synth.Ejecta
}

// testSettings are cheap synthesis settings for the tests.
var testSettings = synth.Settings{Nodes: 8, Options: synth.Options{CoreRays: 8, EnvelopeRays: 12}}

const testDistance = 40 * physics.Megaparsec

// testEjecta returns invented ejecta at days with photosphere beta and
// temperature T (not the demo's parameters).
func testEjecta(days, beta, T float64) synth.Ejecta {
	return synth.Ejecta{Time: days * physics.Day, Mass: 0.03 * physics.SolarMass, BetaIn: 0.05, BetaPh: beta,
		BetaMax: 0.32, DensityIndex: 3, Temperature: T}
}

// makeInjection synthesises composition comp at the given ejecta, observed
// at R = 800 with 2 pixels per resolution element over 7700–11600 Å, with
// Gaussian noise of σ = continuum/snr (seeded), with testSettings or the
// settings given.
func makeInjection(t testing.TB, m *synth.Model, comp string, ejs []synth.Ejecta, snr float64, seed uint64, settings ...synth.Settings) *injection {
	set := testSettings
	if len(settings) > 0 {
		set = settings[0]
	}
	t.Helper()
	c, err := opacity.ParseComposition(comp)
	if err != nil {
		t.Fatal(err)
	}
	inj := &injection{model: m, comp: c, truth: ejs}
	rng := rand.New(rand.NewPCG(seed, 1))
	const R = 800
	var wave []float64
	for l := 7700.0; l < 11600; l *= 1 + 1/(2.0*R) {
		wave = append(wave, l)
	}
	for i, ej := range ejs {
		res, err := m.Spectrum(context.Background(), c, ej, set)
		if err != nil {
			t.Fatal(err)
		}
		res.Flux = res.AtDistance(testDistance)
		flux, _, err := res.Observe(R, wave)
		if err != nil {
			t.Fatal(err)
		}
		cont := spectra.BlackbodyFluxes(nil, wave, ej.Temperature, ej.PhotosphereRadius(), testDistance)
		y := make([]float64, len(wave))
		sig := make([]float64, len(wave))
		for k := range wave {
			sig[k] = cont[k] / snr
			y[k] = flux[k] + sig[k]*rng.NormFloat64()
		}
		obs, err := spectra.New(append([]float64(nil), wave...), y, sig, spectra.Metadata{Source: "invented injection"})
		if err != nil {
			t.Fatal(err)
		}
		inj.epochs = append(inj.epochs, Epoch{Observed: obs, ResolvingPower: R, DistanceCm: testDistance, Ejecta: ej})
		_ = i
	}
	return inj
}

func errorsIsCanceled(err error) bool { return errors.Is(err, context.Canceled) }
