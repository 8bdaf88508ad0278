package figure

import (
	"broadline/app/core"
	"image/color"
	"math"
	"testing"
)

// TestFigure renders the demo's first epoch with a model overlay and checks
// that both palette colours reach the image and that a removed range stays a
// gap (the line is broken into segments).
func TestFigure(t *testing.T) {
	b := demoBench(t)
	obs := b.Observed[0]
	ov := &core.Overlay{Wavelength: obs.Wavelength, Flux: obs.Flux}
	p, err := Spectrum(obs, ov, "test", core.UnitOf(""))
	if err != nil {
		t.Fatal(err)
	}
	img := Render(p, 800, 400)
	if b := img.Bounds(); b.Dx() != 800 || b.Dy() != 400 {
		t.Fatalf("image %v, want 800×400", b)
	}
	counts := map[color.NRGBA]int{}
	for y := 0; y < 400; y++ {
		for x := 0; x < 800; x++ {
			r, g, b, _ := img.At(x, y).RGBA()
			counts[color.NRGBA{uint8(r >> 8), uint8(g >> 8), uint8(b >> 8), 255}]++
		}
	}
	if counts[Palette.Model] < 100 {
		t.Errorf("model colour on %d pixels only", counts[Palette.Model])
	}
	// The demo removes two opaque water bands: the observed spectrum must
	// be drawn in three pieces, not joined across the gaps.
	if n := len(Segments(obs.Wavelength, obs.Flux, core.UnitOf(""))); n != 3 {
		t.Errorf("demo spectrum drawn in %d segments, want 3", n)
	}
	// A NaN breaks a line too.
	if n := len(Segments([]float64{1, 2, 3, 4, 5}, []float64{1, 1, math.NaN(), 1, 1}, core.UnitOf(""))); n != 2 {
		t.Errorf("NaN split into %d segments, want 2", n)
	}
	if _, err := Spectrum(obs, nil, "no flux", core.UnitOf("")); err != nil {
		t.Errorf("figure without overlay: %v", err)
	}
}

// demoBench loads the built-in demo.
func demoBench(t testing.TB) *core.Bench {
	t.Helper()
	b, err := core.Demo()
	if err != nil {
		t.Fatal(err)
	}
	return b
}
