package figure

import (
	"bytes"
	"flag"
	"image"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"testing"

	"broadline/app/core"
	"broadline/opacity/fit"
)

var update = flag.Bool("update", false, "rewrite the golden images in testdata/ from this build")

// golden compares img with testdata/NAME.png: the same size, and at most
// 0.2 % of the pixels differing by more than 24 levels in a channel
// (anti-aliasing may move with the rasteriser). With -update it writes
// the file instead; look at it before committing.
func golden(t *testing.T, name string, img image.Image) {
	t.Helper()
	path := filepath.Join("testdata", name+".png")
	if *update {
		var buf bytes.Buffer
		if err := png.Encode(&buf, img); err != nil {
			t.Fatal(err)
		}
		if err := os.MkdirAll("testdata", 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatalf("%v (run go test ./app/figure -run Golden -update to make it)", err)
	}
	defer f.Close()
	want, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	if want.Bounds() != img.Bounds() {
		t.Fatalf("%s: size %v, golden %v", name, img.Bounds(), want.Bounds())
	}
	bad := 0
	r := img.Bounds()
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			r1, g1, b1, _ := img.At(x, y).RGBA()
			r2, g2, b2, _ := want.At(x, y).RGBA()
			d := max(absDiff(r1, r2), absDiff(g1, g2), absDiff(b1, b2)) >> 8
			if d > 24 {
				bad++
			}
		}
	}
	if frac := float64(bad) / float64(r.Dx()*r.Dy()); frac > 0.002 {
		out := filepath.Join(t.TempDir(), name+".png")
		var buf bytes.Buffer
		png.Encode(&buf, img)
		os.WriteFile(out, buf.Bytes(), 0o644)
		t.Errorf("%s: %.2f %% of the pixels differ from the golden image; this build's image is %s", name, 100*frac, out)
	}
}

func absDiff(a, b uint32) uint32 {
	if a > b {
		return a - b
	}
	return b - a
}

// TestGoldenSpectrum: the demo's first epoch with a smooth stand-in model
// (a 5 % sinusoidal ripple on the observed flux: no synthesis, so the
// image depends on the drawing alone), its masked bands and gaps, drawn as
// the workbench draws it.
func TestGoldenSpectrum(t *testing.T) {
	b := demoBench(t)
	obs := b.Observed[0]
	ov := &core.Overlay{Wavelength: obs.Wavelength, Flux: make([]float64, obs.Len())}
	for i, w := range obs.Wavelength {
		ov.Flux[i] = obs.Flux[i] * (1 + 0.05*math.Sin(w/400))
	}
	p, err := Spectrum(obs, ov, "golden: demo epoch 1 with a stand-in model", core.UnitOf(""))
	if err != nil {
		t.Fatal(err)
	}
	golden(t, "spectrum", Render(p, 900, 450))
}

// TestGoldenSweep: a χ²/N curve with its marked minimum.
func TestGoldenSweep(t *testing.T) {
	sw := &core.Sweep{Param: core.Velocity}
	for i := range 9 {
		v := 0.16 + 0.02*float64(i)
		sw.Values = append(sw.Values, v)
		sw.Chi2N = append(sw.Chi2N, 1+400*(v-0.24)*(v-0.24))
	}
	sw.Profile.Best, sw.Profile.BestChi2N = 0.24, 1
	var _ fit.Profile = sw.Profile
	p, err := Sweep(sw)
	if err != nil {
		t.Fatal(err)
	}
	golden(t, "sweep", Render(p, 640, 380))
}
