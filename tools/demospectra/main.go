// Command demospectra writes the invented spectra of broadline's built-in
// demo: a fictional merger counterpart, "DEMO-1 (invented)", at an invented
// distance, observed at three invented epochs by an invented ground-based
// near-infrared spectrograph. Each spectrum is made by the model of package
// opacity/synth from the invented line lists in app/demo/lines, given a
// blackbody continuum at the distance, smoothed to a coarse resolving power,
// sampled on the instrument's pixels, given seeded Gaussian noise, and cut or
// flagged at the telluric bands. The parameters, the truth of the demo, are
// written to scenario.json beside the spectra; nothing here is an
// observation.
//
//	go run ./tools/demospectra [-out app/demo/spectra] [-lines app/demo/lines]
//
// The output depends only on the parameters in this file (including the
// seed), so running it again reproduces the committed files.
package main

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"

	"broadline/internal/demogen"
	"broadline/linelists"
	"broadline/opacity/synth"
	"broadline/spectra"
)

// demoScenario is the recorded truth of the demo. The line files are named
// relative to the scenario file (app/demo/spectra/).
func demoScenario() *demogen.Scenario {
	els := []string{"ca", "sr", "y", "zr", "ce", "nd", "sm", "eu"}
	var lines, levels []string
	for _, e := range els {
		lines = append(lines, "../lines/demo_"+e+".txt.gz")
		if e != "ca" {
			levels = append(levels, "../lines/demo_"+e+"_levels.txt.gz")
		}
	}
	return &demogen.Scenario{
		Label: "INVENTED DEMONSTRATION DATA: a fictional event, an invented distance, invented epochs, " +
			"invented line lists and an invented spectrograph. Not an observation; do not use for science. " +
			"The ejecta have two invented zones: outside 0.16 c a lanthanide-poor (blue) mix, Sr 3 %, Y and Zr " +
			"below it, lanthanides 1.5e-4 in all, a little Ca; inside 0.16 c a lanthanide-rich (red) mix, " +
			"lanthanides 2.4 % (Nd 2 %), Sr 1.5 %. The first two epochs see only the outer zone; by the third the " +
			"photosphere has receded into the inner one, whose Nd II lines make the near-infrared bumps. " +
			"Se, Br, Kr, Rb, Te and Xe (80 % of the outer mass) have no demo line list; their low ions have " +
			"(nearly) closed p shells and few lines from levels populated at a few thousand K, so leaving them out " +
			"is a fair demo approximation. Mo, Ru and Pd (16 %) also have no demo list, though their real ions " +
			"have lines like Zr's: the demo's opacity is incomplete there, as real atomic data are.",
		Object:      "DEMO-1 (invented)",
		DistanceMpc: 62,
		LineFiles:   lines,
		LevelFiles:  levels,
		MassFractions: "Ca=0.002,Sr=0.03,Y=0.002,Zr=0.008,Ce=4e-5,Nd=7e-5,Sm=2.5e-5,Eu=1.5e-5," +
			"Se=0.25,Br=0.04,Kr=0.25,Rb=0.05,Mo=0.05,Ru=0.06,Pd=0.05,Te=0.13,Xe=0.07785",
		InnerMassFractions: "Ca=0.0005,Sr=0.015,Y=0.002,Zr=0.006,Ce=0.002,Nd=0.02,Sm=0.0015,Eu=0.0005," +
			"Se=0.12,Br=0.02,Kr=0.12,Rb=0.025,Mo=0.05,Ru=0.08,Pd=0.07,Te=0.2,Xe=0.2675",
		ZoneBoundary:    0.16,
		EjectaMassSolar: 0.025,
		InnerVelocity:   0.05,
		OuterVelocity:   0.35,
		DensityIndex:    3,
		ModelFromUm:     0.36,
		ModelToUm:       2.5,
		Instrument: demogen.Instrument{
			Description: "invented ground-based optical/near-infrared spectrograph, R = 500, 2 pixels per resolution element; " +
				"the opaque water bands removed, the other telluric bands flagged (band edges: common practice)",
			ResolvingPower:      500,
			FromUm:              0.40,
			ToUm:                2.40,
			PixelsPerResolution: 2,
			Removed:             [][2]float64{{1.35, 1.45}, {1.80, 1.95}},
			Flagged:             [][2]float64{{0.686, 0.690}, {0.759, 0.770}, {0.93, 0.97}, {1.11, 1.16}, {2.00, 2.07}},
			NoiseFactor:         3,
		},
		Seed: 20261202,
		Epochs: []demogen.Epoch{
			{File: "demo_epoch1.txt", Days: 1.5, PhotosphereVelocity: 0.24, Temperature: 5000, SNR: 40},
			{File: "demo_epoch2.txt", Days: 3.5, PhotosphereVelocity: 0.17, Temperature: 3700, SNR: 25},
			{File: "demo_epoch3.txt", Days: 7.5, PhotosphereVelocity: 0.11, Temperature: 2700, SNR: 12},
		},
	}
}

func main() {
	out := flag.String("out", "app/demo/spectra", "output directory (the scenario's line files are relative to it)")
	flag.Parse()
	if err := run(*out); err != nil {
		fmt.Fprintln(os.Stderr, "demospectra:", err)
		os.Exit(1)
	}
}

func run(dir string) error {
	sc := demoScenario()
	if err := sc.Validate(); err != nil {
		return err
	}
	st, rep, err := LoadStore(dir, sc)
	if err != nil {
		return err
	}
	for _, w := range rep.Warnings {
		fmt.Fprintln(os.Stderr, "demospectra: warning:", w)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for i := range sc.Epochs {
		s, err := Observe(context.Background(), sc, st, i)
		if err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(dir, sc.Epochs[i].File), Format(sc, i, s), 0o644); err != nil {
			return err
		}
	}
	js, err := json.MarshalIndent(sc, "", "  ")
	if err != nil {
		return err
	}
	return os.WriteFile(filepath.Join(dir, "scenario.json"), append(js, '\n'), 0o644)
}

// LoadStore reads the scenario's line lists and levels files, named
// relative to dir.
func LoadStore(dir string, sc *demogen.Scenario) (*linelists.Store, linelists.Report, error) {
	// io/fs paths cannot climb with "..", so open the parent and name the
	// scenario's directory inside it.
	return sc.LoadStore(os.DirFS(filepath.Join(dir, "..")), filepath.Base(filepath.Clean(dir)))
}

// Noiseless is sc.Truth with all cores.
func Noiseless(ctx context.Context, sc *demogen.Scenario, m *synth.Model, i int, betaPh float64) (wave, flux, cont []float64, err error) {
	return sc.Truth(ctx, m, i, betaPh, runtime.GOMAXPROCS(0))
}

// NewModel returns the model over the scenario's range.
func NewModel(sc *demogen.Scenario, st *linelists.Store) (*synth.Model, error) {
	return sc.NewModel(st)
}

// Observe returns epoch i as the invented instrument records it: the pixels
// left after the removed ranges, flux with noise, its uncertainty, and the
// mask (1 inside flagged telluric bands).
func Observe(ctx context.Context, sc *demogen.Scenario, st *linelists.Store, i int) (*spectra.Spectrum, error) {
	m, err := NewModel(sc, st)
	if err != nil {
		return nil, err
	}
	wave, flux, cont, err := Noiseless(ctx, sc, m, i, 0)
	if err != nil {
		return nil, err
	}
	in := sc.Instrument
	med := slices.Clone(cont)
	slices.Sort(med)
	s0 := med[len(med)/2]
	rng := rand.New(rand.NewPCG(sc.Seed, uint64(i)))
	inside := func(l float64, bands [][2]float64) bool {
		for _, b := range bands {
			if l >= b[0]*1e4 && l <= b[1]*1e4 {
				return true
			}
		}
		return false
	}
	var w, f, u []float64
	var mask []spectra.MaskReason
	for k, l := range wave {
		// Photon noise scaled to SNR at the continuum's median, with a floor
		// of a fifth of that level (read noise and sky, common practice).
		sigma := s0 / sc.Epochs[i].SNR * math.Sqrt(math.Max(flux[k], 0.04*s0)/s0)
		var mk spectra.MaskReason
		if inside(l, in.Flagged) {
			sigma *= in.NoiseFactor
			mk = spectra.MaskFile
		}
		noisy := flux[k] + sigma*rng.NormFloat64()
		if inside(l, in.Removed) {
			continue
		}
		w, f, u, mask = append(w, l), append(f, noisy), append(u, sigma), append(mask, mk)
	}
	s, err := spectra.New(w, f, u, spectra.Metadata{Object: sc.Object, Epoch: sc.Epochs[i].Days, FluxUnit: spectra.FluxPerAngstrom})
	if err != nil {
		return nil, err
	}
	s.Mask = mask
	return s, nil
}

// Format writes s in the plain-text format spectra.ReadText reads, with a
// header that says the data are invented.
func Format(sc *demogen.Scenario, i int, s *spectra.Spectrum) []byte {
	var b bytes.Buffer
	e := sc.Epochs[i]
	fmt.Fprintf(&b, "# INVENTED DEMONSTRATION DATA - NOT AN OBSERVATION.\n")
	fmt.Fprintf(&b, "# A synthetic spectrum of a fictional event, made by broadline's tools/demospectra\n")
	fmt.Fprintf(&b, "# with the model of opacity/synth from the invented line lists in app/demo/lines,\n")
	fmt.Fprintf(&b, "# plus seeded noise. The true parameters are in scenario.json. Not for science.\n")
	fmt.Fprintf(&b, "# object = %s\n", sc.Object)
	fmt.Fprintf(&b, "# epoch = %g\n", e.Days)
	fmt.Fprintf(&b, "# flux_unit = erg/s/cm2/A\n")
	fmt.Fprintf(&b, "# medium = vacuum\n")
	fmt.Fprintf(&b, "# instrument = %s\n", sc.Instrument.Description)
	fmt.Fprintf(&b, "# mask: 1 = inside a flagged telluric band; the opaque bands %v um are removed\n", sc.Instrument.Removed)
	b.WriteString("wavelength_um flux flux_err mask\n")
	for k, l := range s.Wavelength {
		b.WriteString(strconv.FormatFloat(l*1e-4, 'f', 6, 64))
		b.WriteByte(' ')
		b.WriteString(strconv.FormatFloat(s.Flux[k], 'e', 4, 64))
		b.WriteByte(' ')
		b.WriteString(strconv.FormatFloat(s.Uncertainty[k], 'e', 3, 64))
		if s.Mask[k] != 0 {
			b.WriteString(" 1\n")
		} else {
			b.WriteString(" 0\n")
		}
	}
	return b.Bytes()
}
