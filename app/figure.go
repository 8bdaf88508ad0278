package main

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"broadline/spectra"
)

// palette is the colour-blind-safe palette of Okabe & Ito (2008, "Color
// Universal Design"), in the order the figures use it.
var palette = struct {
	Observed, Model, Masked color.NRGBA
}{
	Observed: color.NRGBA{0, 0, 0, 255},     // black
	Model:    color.NRGBA{213, 94, 0, 255},  // vermillion
	Masked:   color.NRGBA{86, 180, 233, 70}, // sky blue, translucent
}

// waveUnit is a unit for showing wavelengths: its name, the factor from Å,
// and the decimals that keep 1 Å visible at 1 µm.
type waveUnit struct {
	Name     string
	PerA     float64 // value in this unit of 1 Å
	Decimals int
}

// The wavelength units the workbench offers; µm is the default (the field's
// usual unit for 0.4–2.5 µm spectra). Their keys are what sessions save.
var waveUnits = map[string]waveUnit{
	"um": {"µm", 1e-4, 4},
	"nm": {"nm", 0.1, 1},
	"A":  {"Å", 1, 0},
}

// unitOf returns the unit saved as key ("" or unknown: µm).
func unitOf(key string) waveUnit {
	if u, ok := waveUnits[key]; ok {
		return u
	}
	return waveUnits["um"]
}

// spectrumFigure builds the comparison plot of an observed spectrum and an
// optional model overlay, vacuum wavelength in unit u. Masked samples are
// drawn under a shaded band; gaps in the data (removed ranges) stay gaps.
func spectrumFigure(obs *spectra.Spectrum, ov *overlay, title string, u waveUnit) (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = title
	p.Title.Padding = vg.Points(4)
	p.X.Label.Text = "vacuum wavelength (" + u.Name + ")"
	p.Y.Label.Text = "flux (erg/s/cm²/Å)"
	p.Add(plotter.NewGrid())

	// Shade masked runs.
	ymax := 0.0
	for i, f := range obs.Flux {
		if !obs.Masked(i) && f > ymax && !math.IsInf(f, 0) {
			ymax = f
		}
	}
	if ymax <= 0 {
		return nil, fmt.Errorf("figure: no unmasked positive flux to show")
	}
	for i := 0; i < obs.Len(); {
		if !obs.Masked(i) {
			i++
			continue
		}
		j := i
		for j+1 < obs.Len() && obs.Masked(j+1) {
			j++
		}
		band, err := plotter.NewPolygon(plotter.XYs{
			{X: obs.Wavelength[i] * u.PerA, Y: 0}, {X: obs.Wavelength[j] * u.PerA, Y: 0},
			{X: obs.Wavelength[j] * u.PerA, Y: 1.15 * ymax}, {X: obs.Wavelength[i] * u.PerA, Y: 1.15 * ymax},
		})
		if err != nil {
			return nil, fmt.Errorf("figure: %w", err)
		}
		band.Color = palette.Masked
		band.LineStyle.Width = 0
		p.Add(band)
		i = j + 1
	}

	if err := addSegments(p, obs.Wavelength, obs.Flux, u, palette.Observed, 1, "observed"); err != nil {
		return nil, err
	}
	if ov != nil {
		name := "model"
		if ov.Preview {
			name = "model (absorption-only preview)"
		}
		if err := addSegments(p, ov.Wavelength, ov.Flux, u, palette.Model, 1.6, name); err != nil {
			return nil, err
		}
	}
	p.Legend.Top = true
	p.Y.Min = 0
	p.Y.Max = 1.15 * ymax
	return p, nil
}

// addSegments draws x (Å), y as solid lines (x in unit u), one per segment.
func addSegments(p *plot.Plot, x, y []float64, u waveUnit, c color.Color, width vg.Length, name string) error {
	return addStyledSegments(p, x, y, u, c, width, nil, name)
}

// addStyledSegments is addSegments with a dash pattern (nil: solid).
func addStyledSegments(p *plot.Plot, x, y []float64, u waveUnit, c color.Color, width vg.Length, dashes []vg.Length, name string) error {
	for k, seg := range segments(x, y, u) {
		l, err := plotter.NewLine(seg)
		if err != nil {
			return fmt.Errorf("figure: %w", err)
		}
		l.Color = c
		l.Width = width
		l.Dashes = dashes
		p.Add(l)
		if k == 0 {
			p.Legend.Add(name, l)
		}
	}
	return nil
}

// segments splits x (Å), y into runs of points (x in unit u) broken where the
// sampling step jumps by more than five times its median (a removed range)
// or y is not finite. Runs of fewer than two points are left out.
func segments(x, y []float64, u waveUnit) []plotter.XYs {
	if len(x) != len(y) {
		panic("broadline: segments: lengths differ")
	}
	step := medianStep(x)
	var out []plotter.XYs
	var seg plotter.XYs
	flush := func() {
		if len(seg) >= 2 {
			out = append(out, seg)
		}
		seg = nil
	}
	for i := range x {
		bad := math.IsNaN(y[i]) || math.IsInf(y[i], 0)
		if bad || (i > 0 && x[i]-x[i-1] > 5*step) {
			flush()
		}
		if !bad {
			seg = append(seg, plotter.XY{X: x[i] * u.PerA, Y: y[i]})
		}
	}
	flush()
	return out
}

func medianStep(x []float64) float64 {
	if len(x) < 2 {
		return math.Inf(1)
	}
	d := make([]float64, len(x)-1)
	for i := range d {
		d[i] = x[i+1] - x[i]
	}
	slices.Sort(d)
	return d[len(d)/2]
}

// renderFigure draws p into an RGBA image of w×h pixels at 96 dpi.
func renderFigure(p *plot.Plot, w, h int) image.Image {
	const dpi = 96
	c := vgimg.NewWith(vgimg.UseWH(vg.Length(w)*vg.Inch/dpi, vg.Length(h)*vg.Inch/dpi), vgimg.UseDPI(dpi))
	p.Draw(draw.New(c))
	return c.Image()
}

// sweepFigure is the plot of a sweep: χ²/N against the parameter (v_ph in
// c or T_ph in K), log-scaled, with the refined minimum marked.
func sweepFigure(sw *paramSweep) (*plot.Plot, error) {
	p := plot.New()
	if sw.Param == sweepTemperatureParam {
		p.Title.Text = "χ²/N against the photosphere temperature"
		p.X.Label.Text = "T_ph (K)"
	} else {
		p.Title.Text = "χ²/N against the photosphere velocity"
		p.X.Label.Text = "v_ph (c)"
	}
	p.Y.Label.Text = "χ²/N"
	p.Y.Scale = plot.LogScale{}
	p.Y.Tick.Marker = plot.LogTicks{Prec: -1}
	p.Add(plotter.NewGrid())
	pts := make(plotter.XYs, len(sw.Values))
	lo, hi := math.Inf(1), 0.0
	for i, v := range sw.Values {
		pts[i] = plotter.XY{X: v, Y: sw.Chi2N[i]}
		lo, hi = math.Min(lo, sw.Chi2N[i]), math.Max(hi, sw.Chi2N[i])
	}
	if !(lo > 0) {
		return nil, fmt.Errorf("figure: χ²/N not positive")
	}
	l, s, err := plotter.NewLinePoints(pts)
	if err != nil {
		return nil, fmt.Errorf("figure: %w", err)
	}
	l.Color, s.Color = palette.Observed, palette.Observed
	p.Add(l, s)
	mark, err := plotter.NewLine(plotter.XYs{{X: sw.Best, Y: lo / 1.5}, {X: sw.Best, Y: hi * 1.5}})
	if err != nil {
		return nil, fmt.Errorf("figure: %w", err)
	}
	mark.Color = palette.Model
	mark.Width = 1.5
	p.Add(mark)
	p.Legend.Add("minimum near "+sw.Param.describe(sw.Best), mark)
	p.Legend.Top = true
	p.Y.Min, p.Y.Max = lo/1.5, hi*1.5
	return p, nil
}
