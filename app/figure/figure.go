// Package figure draws the workbench's figures with gonum/plot: an
// observed spectrum with model overlays, the comparison of candidate
// compositions, the χ²/N curve of a sweep, their captions, and their
// export as PNG, SVG or PDF. The screen and the export draw the same
// plot.Plot. It imports no GUI toolkit.
package figure

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

	"broadline/app/core"
	"broadline/spectra"
)

// Palette is the colour-blind-safe palette of Okabe & Ito (2008, "Color
// Universal Design"), in the order the figures use it.
var Palette = struct {
	Observed, Model, Masked color.NRGBA
}{
	Observed: color.NRGBA{0, 0, 0, 255},     // black
	Model:    color.NRGBA{213, 94, 0, 255},  // vermillion
	Masked:   color.NRGBA{86, 180, 233, 70}, // sky blue, translucent
}

// Style is how a model curve is drawn: colour, width and dash pattern
// (nil: solid).
type Style struct {
	Color  color.NRGBA
	Width  vg.Length
	Dashes []vg.Length
}

// CandidateStyles are the comparison figure's model styles: Okabe & Ito
// colours, each with a dash pattern of its own so that they also differ in
// grey print. Black is the observed spectrum's; sky blue shades masks.
var CandidateStyles = [...]Style{
	{color.NRGBA{213, 94, 0, 255}, 1.4, nil},                                      // vermillion, solid
	{color.NRGBA{0, 114, 178, 255}, 1.4, []vg.Length{vg.Points(5), vg.Points(2)}}, // blue, dashed
	{color.NRGBA{0, 158, 115, 255}, 1.4, []vg.Length{vg.Points(1.5), vg.Points(1.5)}},
	{color.NRGBA{204, 121, 167, 255}, 1.4, []vg.Length{vg.Points(6), vg.Points(2), vg.Points(1.5), vg.Points(2)}},
	{color.NRGBA{230, 159, 0, 255}, 1.4, []vg.Length{vg.Points(3), vg.Points(3)}},
	{color.NRGBA{120, 120, 120, 255}, 1.4, []vg.Length{vg.Points(8), vg.Points(3)}},
}

// KnockOutStyle draws a knock-out beside the model.
var KnockOutStyle = Style{CandidateStyles[1].Color, 1.2, CandidateStyles[1].Dashes}

// MaskBands is a plotter that shades the wavelength ranges of masked
// samples over the whole height of the plot area.
type MaskBands struct {
	// Ranges are [from, to] pairs in the plot's x unit.
	Ranges [][2]float64
	Color  color.Color
}

// NewMaskBands returns the bands of obs's masked runs, x in unit u.
func NewMaskBands(obs *spectra.Spectrum, u core.WaveUnit) *MaskBands {
	mb := &MaskBands{Color: Palette.Masked}
	for i := 0; i < obs.Len(); {
		if !obs.Masked(i) {
			i++
			continue
		}
		j := i
		for j+1 < obs.Len() && obs.Masked(j+1) {
			j++
		}
		mb.Ranges = append(mb.Ranges, [2]float64{obs.Wavelength[i] * u.PerA, obs.Wavelength[j] * u.PerA})
		i = j + 1
	}
	return mb
}

// Plot implements plot.Plotter.
func (mb *MaskBands) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, _ := plt.Transforms(&c)
	c.SetColor(mb.Color)
	for _, r := range mb.Ranges {
		x0, x1 := trX(r[0]), trX(r[1])
		if x1 < c.Min.X || x0 > c.Max.X {
			continue
		}
		x0, x1 = max(x0, c.Min.X), min(x1, c.Max.X)
		if x1-x0 < 0.5 {
			x1 = x0 + 0.5 // a single masked sample stays visible
		}
		var p vg.Path
		p.Move(vg.Point{X: x0, Y: c.Min.Y})
		p.Line(vg.Point{X: x1, Y: c.Min.Y})
		p.Line(vg.Point{X: x1, Y: c.Max.Y})
		p.Line(vg.Point{X: x0, Y: c.Max.Y})
		p.Close()
		c.Fill(p)
	}
}

// Spectrum builds the plot of an observed spectrum and an optional model
// overlay, vacuum wavelength in unit u. Masked samples are drawn under a
// shaded band; gaps in the data (removed ranges) stay gaps. The y axis
// spans the unmasked observed flux and the whole overlay; extra curves are
// drawn with AddSpectrumCurve, which widens it.
func Spectrum(obs *spectra.Spectrum, ov *core.Overlay, title string, u core.WaveUnit) (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = title
	p.Title.Padding = vg.Points(4)
	p.X.Label.Text = "vacuum wavelength (" + u.Name + ")"
	p.Add(plotter.NewGrid())
	yr := newYRange()
	yr.addObserved(obs)
	if !(yr.hi > 0) {
		return nil, fmt.Errorf("figure: no unmasked positive flux to show")
	}
	p.Add(NewMaskBands(obs, u))
	if err := AddCurve(p, obs.Wavelength, obs.Flux, u, Style{Palette.Observed, 1, nil}, "observed"); err != nil {
		return nil, err
	}
	if ov != nil {
		name := "model"
		if ov.Preview {
			name = "model (absorption-only preview)"
		}
		if err := AddCurve(p, ov.Wavelength, ov.Flux, u, Style{Palette.Model, 1.6, nil}, name); err != nil {
			return nil, err
		}
		yr.add(ov.Flux, nil)
	}
	p.Legend.Top = true
	// Inset the legend so that its line samples are not cut at the
	// plot's right edge.
	p.Legend.XOffs = -vg.Points(10)
	p.Legend.YOffs = -vg.Points(2)
	yr.apply(p)
	return p, nil
}

// AddSpectrumCurve draws x (Å), y on a plot made by Spectrum (see
// AddCurve) and widens its y axis so that the new curve is not clipped.
func AddSpectrumCurve(p *plot.Plot, x, y []float64, u core.WaveUnit, st Style, name string) error {
	if err := AddCurve(p, x, y, u, st, name); err != nil {
		return err
	}
	yr := &yRange{lo: p.Y.Min, hi: p.Y.Max / 1.15}
	if p.Y.Min < 0 { // undo apply's margin below a negative minimum
		yr.lo = (p.Y.Min + 0.05*yr.hi) / 1.05
	}
	yr.add(y, nil)
	yr.apply(p)
	return nil
}

// AddCurve draws x (Å), y as lines in style st (x in unit u), one per run
// of the data (see Segments), with one legend entry called name.
func AddCurve(p *plot.Plot, x, y []float64, u core.WaveUnit, st Style, name string) error {
	for k, seg := range Segments(x, y, u) {
		l, err := plotter.NewLine(seg)
		if err != nil {
			return fmt.Errorf("figure: %w", err)
		}
		l.Color = st.Color
		l.Width = st.Width
		l.Dashes = st.Dashes
		p.Add(l)
		if k == 0 {
			p.Legend.Add(name, l)
		}
	}
	return nil
}

// Segments splits x (Å), y into runs of points (x in unit u) broken where
// the sampling step jumps by more than five times its median (a removed
// range) or y is not finite. Runs of fewer than two points are left out.
func Segments(x, y []float64, u core.WaveUnit) []plotter.XYs {
	return segmentsBy(x, y, func(w float64) float64 { return w * u.PerA })
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

// Render draws p into an RGBA image of w×h pixels at 96 dpi.
func Render(p *plot.Plot, w, h int) image.Image {
	const dpi = 96
	c := vgimg.NewWith(vgimg.UseWH(vg.Length(w)*vg.Inch/dpi, vg.Length(h)*vg.Inch/dpi), vgimg.UseDPI(dpi))
	p.Draw(draw.New(c))
	return c.Image()
}

// Sweep is the plot of a sweep: χ²/N against the parameter (v_ph in c or
// T_ph in K), log-scaled, with the refined minimum marked.
func Sweep(sw *core.Sweep) (*plot.Plot, error) {
	p := plot.New()
	if sw.Param == core.Temperature {
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
	l.Color, s.Color = Palette.Observed, Palette.Observed
	p.Add(l, s)
	mark, err := plotter.NewLine(plotter.XYs{{X: sw.Best, Y: lo / 1.5}, {X: sw.Best, Y: hi * 1.5}})
	if err != nil {
		return nil, fmt.Errorf("figure: %w", err)
	}
	mark.Color = Palette.Model
	mark.Width = 1.5
	p.Add(mark)
	p.Legend.Add("minimum near "+sw.Param.Describe(sw.Best), mark)
	p.Legend.Top = true
	p.Legend.XOffs = -vg.Points(10) // the line sample is not cut at the edge
	p.Y.Min, p.Y.Max = lo/1.5, hi*1.5
	return p, nil
}
