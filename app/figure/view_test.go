package figure

import (
	"image"
	"math"
	"testing"

	"broadline/app/core"
	"broadline/opacity/fit"
	"broadline/opacity/synth"
	"broadline/physics"
	"broadline/spectra"
)

// stepScene is an invented spectrum for the geometry tests: flat observed
// flux 1 ± 0.1 on 5000–10000 Å every 5 Å, and a model of 0.5 below 7000 Å
// and 0.8 from there, so that the model draws one horizontal line each
// side of a step at 7000 Å.
func stepScene() *Scene {
	var w, f, s, m []float64
	for x := 5000.0; x <= 10000; x += 5 {
		w = append(w, x)
		f = append(f, 1)
		s = append(s, 0.1)
		if x < 7000 {
			m = append(m, 0.5)
		} else {
			m = append(m, 0.8)
		}
	}
	obs := &spectra.Spectrum{Wavelength: w, Flux: f, Uncertainty: s}
	return &Scene{Observed: obs, Model: &core.Overlay{Wavelength: w, Flux: m}, Title: "invented step"}
}

// isModel reports whether some pixel within 1 px of (x, y) has the model's
// colour (anti-aliasing spreads a line over neighbouring pixels).
func isModel(img image.Image, x, y float64) bool {
	for dy := -1; dy <= 1; dy++ {
		for dx := -1; dx <= 1; dx++ {
			r, g, b, _ := img.At(int(math.Floor(x))+dx, int(math.Floor(y))+dy).RGBA()
			if d := max(absDiff(r>>8, uint32(Palette.Model.R)), absDiff(g>>8, uint32(Palette.Model.G)), absDiff(b>>8, uint32(Palette.Model.B))); d < 40 {
				return true
			}
		}
	}
	return false
}

// TestPixelMapping: the Frame's mapping, taken from the plot's own
// transforms, puts data points where the rasteriser drew them: the
// model's horizontal lines at flux 0.5 and 0.8 and its step at 7000 Å
// land on model-coloured pixels, 6 px off them does not, the mapping
// inverts exactly, and the same holds on the velocity axis (reversed) and
// with the residual panel (whose data area lines up with the spectrum's).
func TestPixelMapping(t *testing.T) {
	um := core.UnitOf("um")
	for _, d := range []Display{
		{Axis: XAxis{Unit: um}},
		{Axis: XAxis{Unit: um, Rest: 8000}},
		{Axis: XAxis{Unit: core.UnitOf("A")}, Residuals: true, View: View{XMin: 6000, XMax: 9000}},
	} {
		sc := stepScene()
		f, err := sc.Figure(d)
		if err != nil {
			t.Fatal(err)
		}
		img, fr := f.RenderPlot(900, 500, d.Axis)
		ax := d.Axis
		for _, q := range [][2]float64{{6500, 0.5}, {8500, 0.8}, {6997.5, 0.65}} {
			px, py := fr.Main.ToPixel(ax.Of(q[0]), q[1])
			if !fr.Main.Contains(px, py) || !isModel(img, px, py) {
				t.Errorf("%+v: (%g Å, %g) at pixel (%.1f, %.1f): not on the model's line", d.Axis, q[0], q[1], px, py)
			}
			if q[1] != 0.65 && (isModel(img, px, py-6) || isModel(img, px, py+6)) {
				t.Errorf("%+v: model colour 6 px away from (%g Å, %g)", d.Axis, q[0], q[1])
			}
			x, y := fr.Main.ToData(px, py)
			if math.Abs(ax.Wavelength(x)-q[0]) > 1e-9*q[0] || math.Abs(y-q[1]) > 1e-12 {
				t.Errorf("round trip of (%g, %g): (%g, %g)", q[0], q[1], ax.Wavelength(x), y)
			}
		}
		// The ends of the x axis are the data area's edges: blue on the left.
		lo, _ := fr.Main.ToPixel(f.Plot.X.Min, 0)
		hi, _ := fr.Main.ToPixel(f.Plot.X.Max, 0)
		left, right := lo, hi
		if ax.Velocity() {
			left, right = hi, lo
		}
		if math.Abs(left-fr.Main.Left) > 1e-6 || math.Abs(right-fr.Main.Right) > 1e-6 {
			t.Errorf("%+v: x axis ends at pixels %.2f, %.2f; data area %.2f–%.2f", d.Axis, left, right, fr.Main.Left, fr.Main.Right)
		}
		if d.Residuals {
			if !fr.Residual.Shown || math.Abs(fr.Residual.Left-fr.Main.Left) > 0.5 || math.Abs(fr.Residual.Right-fr.Main.Right) > 0.5 || fr.Residual.Top < fr.Main.Bottom {
				t.Errorf("residual panel %+v does not line up under the spectrum %+v", fr.Residual, fr.Main)
			}
			// The model is 0.5 below the observed 1 with σ = 0.1 there:
			// residual 5, drawn at that height in the residual panel.
			x, y := fr.Residual.ToPixel(ax.Of(6500), 5)
			r, g, b, _ := img.At(int(x), int(y)).RGBA()
			if r>>8 > 90 || g>>8 > 90 || b>>8 > 90 {
				t.Errorf("residual 5 at 6500 Å: pixel (%.0f, %.0f) not dark", x, y)
			}
		} else if fr.Residual.Shown {
			t.Error("residual panel without Residuals")
		}
	}
}

// TestViewClipping: a wavelength range sets the x axis (in the axis unit),
// the automatic flux range fits only what lies inside it (15 % headroom
// over the highest value there, as the whole figure has), a fixed range is
// kept, nothing is drawn outside the data area, and a range with no data
// is an error.
func TestViewClipping(t *testing.T) {
	um := core.UnitOf("um")
	sc := stepScene()
	// Raise the observed flux to 3 beyond 9000 Å: outside the view below.
	for i, w := range sc.Observed.Wavelength {
		if w > 9000 {
			sc.Observed.Flux[i] = 3
		}
	}
	d := Display{Axis: XAxis{Unit: um}, View: View{XMin: 6000, XMax: 8000, Auto: true}}
	f, err := sc.Figure(d)
	if err != nil {
		t.Fatal(err)
	}
	if f.Plot.X.Min != 0.6 || f.Plot.X.Max != 0.8 {
		t.Errorf("x range %g–%g µm, want 0.6–0.8", f.Plot.X.Min, f.Plot.X.Max)
	}
	if f.Plot.Y.Min != 0 || math.Abs(f.Plot.Y.Max-1.15) > 1e-12 {
		t.Errorf("auto flux range %g–%g, want 0–1.15 (the flux 3 beyond 9000 Å is out of view)", f.Plot.Y.Min, f.Plot.Y.Max)
	}
	whole, err := sc.Figure(Display{Axis: XAxis{Unit: um}})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(whole.Plot.Y.Max-3.45) > 1e-12 {
		t.Errorf("whole figure's flux range up to %g, want 3.45", whole.Plot.Y.Max)
	}
	img, fr := f.RenderPlot(900, 500, d.Axis)
	if v := fr.View(); math.Abs(v.XMin-6000) > 1e-6 || math.Abs(v.XMax-8000) > 1e-6 || v.YMax != f.Plot.Y.Max {
		t.Errorf("frame's view %+v", v)
	}
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			m := fr.Main
			if fx, fy := float64(x), float64(y); fx >= m.Left-2 && fx <= m.Right+2 && fy >= m.Top-2 && fy <= m.Bottom+2 {
				continue
			}
			if r, g, bb, _ := img.At(x, y).RGBA(); r>>8 == uint32(Palette.Model.R) && g>>8 == uint32(Palette.Model.G) && bb>>8 == uint32(Palette.Model.B) {
				t.Fatalf("model colour at (%d, %d), outside the data area %+v", x, y, fr.Main)
			}
		}
	}
	fixed, err := sc.Figure(Display{Axis: XAxis{Unit: um}, View: View{XMin: 6000, XMax: 8000, YMin: 0.4, YMax: 0.9}})
	if err != nil {
		t.Fatal(err)
	}
	if fixed.Plot.Y.Min != 0.4 || fixed.Plot.Y.Max != 0.9 {
		t.Errorf("fixed flux range %g–%g, want 0.4–0.9", fixed.Plot.Y.Min, fixed.Plot.Y.Max)
	}
	if _, err := sc.Figure(Display{Axis: XAxis{Unit: um}, View: View{XMin: 20000, XMax: 21000}}); err == nil {
		t.Error("a view with no data accepted")
	}
}

// TestVelocityAxis: v = c(λ_rest − λ)/λ_rest (first-order Doppler), so a
// line at rest 10000 Å seen at 9000 Å moves at 0.1 c, 29979.2458 km/s
// (c from physics, CODATA); the axis inverts it, runs from the red end's
// velocity to the blue end's, and is labelled with the rest line.
func TestVelocityAxis(t *testing.T) {
	ax := XAxis{Unit: core.UnitOf("um"), Rest: 10000}
	if v := ax.Of(9000); math.Abs(v-0.1*physics.SpeedOfLightKmS) > 1e-9 || math.Abs(v-29979.2458) > 1e-3 {
		t.Errorf("9000 Å from 10000 Å: %g km/s, want 0.1 c = 29979.2458 km/s", v)
	}
	if v := ax.Of(11000); math.Abs(v+29979.2458) > 1e-3 {
		t.Errorf("11000 Å (redshift): %g km/s, want −29979.2458", v)
	}
	for _, lam := range []float64{5000, 9000, 10000, 24000} {
		if back := ax.Wavelength(ax.Of(lam)); math.Abs(back-lam) > 1e-9*lam {
			t.Errorf("%g Å → %g km/s → %g Å", lam, ax.Of(lam), back)
		}
	}
	f, err := stepScene().Figure(Display{Axis: ax})
	if err != nil {
		t.Fatal(err)
	}
	// The invented spectrum spans 5000–10000 Å: velocities 0 … 0.5 c.
	if f.Plot.X.Min > 1e-9 || math.Abs(f.Plot.X.Max-0.5*physics.SpeedOfLightKmS) > 1e-6 {
		t.Errorf("velocity range %g–%g km/s, want 0–%g", f.Plot.X.Min, f.Plot.X.Max, 0.5*physics.SpeedOfLightKmS)
	}
	if f.Plot.X.Label.Text != "velocity relative to 1.0000 µm (10³ km/s, blueshift positive)" {
		t.Errorf("label %q", f.Plot.X.Label.Text)
	}
}

// TestResiduals: (observed − model)/σ at each overlay sample; masked
// samples and those without an uncertainty are NaN; and on an overlay made
// by fit.Compare the squares of the finite residuals add up to its χ² over
// its N samples (the same samples, the same definition).
func TestResiduals(t *testing.T) {
	sc := stepScene()
	obs := sc.Observed
	obs.SetMask(10, spectra.MaskTelluric)
	obs.Uncertainty[20] = 0
	r := Residuals(obs, sc.Model)
	for i, w := range sc.Model.Wavelength {
		want := (1 - sc.Model.Flux[i]) / 0.1
		switch {
		case i == 10 || i == 20:
			if !math.IsNaN(r[i]) {
				t.Errorf("sample %d (masked or σ = 0): residual %g, want NaN", i, r[i])
			}
		case math.Abs(r[i]-want) > 1e-12:
			t.Errorf("%g Å: residual %g, want %g", w, r[i], want)
		}
	}
	// A model on a grid of its own, compared by fit.Compare (no smoothing):
	// the overlay covers part of the observed samples.
	res := &synth.Result{}
	for x := 6000.0; x <= 9000; x += 2.5 {
		res.Wavelength = append(res.Wavelength, x)
		res.Flux = append(res.Flux, 0.9+0.1*math.Sin(x/300))
		res.Normalized = append(res.Normalized, 1)
	}
	ov, err := fit.Compare(obs, res, 0)
	if err != nil {
		t.Fatal(err)
	}
	r = Residuals(obs, ov)
	sum, n := 0.0, 0
	for _, x := range r {
		if !math.IsNaN(x) {
			sum += x * x
			n++
		}
	}
	if n != ov.N || math.Abs(sum-ov.Chi2) > 1e-9*ov.Chi2 {
		t.Errorf("Σ r² = %g over %d samples; fit.Compare: χ² = %g over %d", sum, n, ov.Chi2, ov.N)
	}
	f, err := sc.Figure(Display{Axis: XAxis{Unit: core.UnitOf("A")}, Residuals: true})
	if err != nil {
		t.Fatal(err)
	}
	if f.Residual == nil || f.Residual.Y.Max < 5.5-1e-9 || f.Residual.Y.Min != -f.Residual.Y.Max {
		t.Errorf("residual panel range %+v, want symmetric and above the largest residual 5", f.Residual.Y)
	}
}

// TestTickPositions: a line of rest 10000 Å acting at the photosphere's
// 0.1 c sits at 10000 (1 − 0.1) = 9000 Å with the first-order Doppler
// relation the synthesis uses (synth.LineContribution.Acting): the tick is
// drawn at 0.9 µm on a wavelength axis and at +0.1 c relative to the line
// on its velocity axis, at the bottom of the data area; ticks outside the
// shown range are left out.
func TestTickPositions(t *testing.T) {
	acting := 10000 * (1 - 0.1) // as synth.Model.StrongestLines computes it
	sc := stepScene()
	sc.Ticks = []LineTicks{{Label: "Xx II", Acting: []float64{acting, 12000}}}
	for _, ax := range []XAxis{{Unit: core.UnitOf("um")}, {Unit: core.UnitOf("um"), Rest: 10000}} {
		f, err := sc.Figure(Display{Axis: ax})
		if err != nil {
			t.Fatal(err)
		}
		pos := TickPositions(f.Plot, sc.Ticks, ax)
		want := 0.9
		if ax.Velocity() {
			want = 0.1 * physics.SpeedOfLightKmS
		}
		if len(pos) != 1 || len(pos[0]) != 1 || math.Abs(pos[0][0]-want) > 1e-9*want {
			t.Errorf("%+v: ticks at %v, want [%g] (12000 Å is outside the spectrum)", ax, pos, want)
		}
		img, fr := f.RenderPlot(900, 500, ax)
		px, _ := fr.Main.ToPixel(want, 0)
		py := fr.Main.Bottom - (2+tickLength/2)*96.0/72
		c := TickStyles[0]
		found := false
		for dx := -1; dx <= 1; dx++ {
			r, g, b, _ := img.At(int(px)+dx, int(py)).RGBA()
			if max(absDiff(r>>8, uint32(c.R)), absDiff(g>>8, uint32(c.G)), absDiff(b>>8, uint32(c.B))) < 40 {
				found = true
			}
		}
		if !found {
			t.Errorf("%+v: no tick colour at pixel (%.1f, %.1f)", ax, px, py)
		}
	}
}
