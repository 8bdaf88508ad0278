// Package figure draws publication figures with gonum/plot, independent of
// the rest of the program: they take plain slices and return plots or draw
// onto a vg canvas.
package figure

import (
	"fmt"
	"image/color"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Colours of the corner plot, from the colour-blind-safe palette of Okabe &
// Ito (2008, "Color universal design"): blue for the samples, vermillion
// for the median and 68 % lines, bluish green for the true values.
var (
	cornerBlue       = color.RGBA{R: 0x00, G: 0x72, B: 0xB2, A: 0xff}
	cornerVermillion = color.RGBA{R: 0xD5, G: 0x5E, B: 0x00, A: 0xff}
	cornerGreen      = color.RGBA{R: 0x00, G: 0x9E, B: 0x73, A: 0xff}
)

// Limits of a corner plot.
const (
	// MaxCornerParameters bounds the number of parameters (panels grow as
	// its square).
	MaxCornerParameters = 12
	// DefaultCornerBins is the number of histogram bins.
	DefaultCornerBins = 30
	// DefaultCornerPoints is the most points drawn in a 2-D panel; more
	// samples are thinned evenly.
	DefaultCornerPoints = 3000
)

// CornerOptions adjust a corner plot.
type CornerOptions struct {
	// Bins is the number of bins of the 1-D histograms (default 30).
	Bins int
	// MaxPoints is the most samples drawn in each 2-D panel (default 3000),
	// taken at even strides through the samples.
	MaxPoints int
	// Truth, when not nil, marks known values (one per parameter; NaN for
	// none), e.g. those of an injection.
	Truth []float64
	// Title is written above the top-left panel.
	Title string
}

// CornerFigure is a corner plot: an n×n grid whose diagonal holds each
// parameter's 1-D histogram and whose lower triangle holds the 2-D scatter of
// each pair, with the median (solid) and the 16th/84th percentiles (dashed).
type CornerFigure struct {
	// Plots[i][j] is the panel of row i and column j: the histogram of
	// parameter i on the diagonal, parameter j against i below it, nil
	// above it.
	Plots [][]*plot.Plot
	names []string
}

// Corner builds the corner plot of samples (samples[k][i] is parameter i of
// sample k), with names[i] the axis label of parameter i. Non-finite
// values are an error, as are fewer than 2 samples, more than
// MaxCornerParameters parameters, or rows of another length than names.
func Corner(names []string, samples [][]float64, opt CornerOptions) (*CornerFigure, error) {
	n := len(names)
	switch {
	case n == 0:
		return nil, fmt.Errorf("figure: corner: no parameters")
	case n > MaxCornerParameters:
		return nil, fmt.Errorf("figure: corner: %d parameters (at most %d)", n, MaxCornerParameters)
	case len(samples) < 2:
		return nil, fmt.Errorf("figure: corner: %d samples (need at least 2)", len(samples))
	case opt.Truth != nil && len(opt.Truth) != n:
		return nil, fmt.Errorf("figure: corner: %d true values for %d parameters", len(opt.Truth), n)
	case opt.Bins < 0 || opt.Bins > 1000 || opt.MaxPoints < 0:
		return nil, fmt.Errorf("figure: corner: %d bins, %d points (want 0–1000 bins, points ≥ 0)", opt.Bins, opt.MaxPoints)
	}
	if opt.Bins == 0 {
		opt.Bins = DefaultCornerBins
	}
	if opt.MaxPoints == 0 {
		opt.MaxPoints = DefaultCornerPoints
	}
	cols := make([][]float64, n)
	for i := range cols {
		cols[i] = make([]float64, len(samples))
	}
	for k, s := range samples {
		if len(s) != n {
			return nil, fmt.Errorf("figure: corner: sample %d has %d values for %d parameters", k, len(s), n)
		}
		for i, v := range s {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, fmt.Errorf("figure: corner: sample %d, %s = %v", k, names[i], v)
			}
			cols[i][k] = v
		}
	}
	type stats struct{ lo, hi, q16, q50, q84 float64 }
	st := make([]stats, n)
	for i, c := range cols {
		s := append([]float64(nil), c...)
		sort.Float64s(s)
		st[i] = stats{lo: s[0], hi: s[len(s)-1], q16: cornerQuantile(s, 0.16), q50: cornerQuantile(s, 0.5), q84: cornerQuantile(s, 0.84)}
		if st[i].hi == st[i].lo {
			st[i].lo, st[i].hi = st[i].lo-0.5, st[i].hi+0.5
		}
	}
	stride := max(1, (len(samples)+opt.MaxPoints-1)/opt.MaxPoints)
	f := &CornerFigure{Plots: make([][]*plot.Plot, n), names: names}
	for i := range n {
		f.Plots[i] = make([]*plot.Plot, n)
		for j := 0; j <= i; j++ {
			p := plot.New()
			p.X.Min, p.X.Max = st[j].lo, st[j].hi
			if i == n-1 {
				p.X.Label.Text = names[j]
			} else {
				p.X.Tick.Label.Color = color.Transparent
			}
			if j == 0 && i > 0 {
				p.Y.Label.Text = names[i]
			} else if i > 0 {
				p.Y.Tick.Label.Color = color.Transparent
			}
			if i == j {
				h, err := plotter.NewHist(plotter.Values(cols[i]), opt.Bins)
				if err != nil {
					return nil, fmt.Errorf("figure: corner: %s: %w", names[i], err)
				}
				h.Normalize(1)
				h.FillColor = color.NRGBA{R: 0x00, G: 0x72, B: 0xB2, A: 0x60}
				h.LineStyle.Color = cornerBlue
				p.Add(h)
				top := 0.0
				for _, b := range h.Bins {
					top = math.Max(top, b.Weight)
				}
				p.Y.Min, p.Y.Max = 0, 1.1*top
				p.Y.Tick.Label.Color = color.Transparent
				if err := cornerVLines(p, st[i].q16, st[i].q50, st[i].q84, 0, 1.1*top); err != nil {
					return nil, err
				}
				if opt.Truth != nil && !math.IsNaN(opt.Truth[i]) {
					if err := cornerTruth(p, opt.Truth[i], math.NaN(), 0, 1.1*top); err != nil {
						return nil, err
					}
				}
				if i == 0 && opt.Title != "" {
					p.Title.Text = opt.Title
				}
			} else {
				p.Y.Min, p.Y.Max = st[i].lo, st[i].hi
				pts := make(plotter.XYs, 0, len(samples)/stride+1)
				for k := 0; k < len(samples); k += stride {
					pts = append(pts, plotter.XY{X: cols[j][k], Y: cols[i][k]})
				}
				sc, err := plotter.NewScatter(pts)
				if err != nil {
					return nil, fmt.Errorf("figure: corner: %s–%s: %w", names[j], names[i], err)
				}
				sc.GlyphStyle.Color = color.NRGBA{R: 0x00, G: 0x72, B: 0xB2, A: 0x50}
				sc.GlyphStyle.Radius = vg.Points(1)
				sc.GlyphStyle.Shape = draw.CircleGlyph{}
				p.Add(sc)
				if err := cornerVLines(p, st[j].q16, st[j].q50, st[j].q84, st[i].lo, st[i].hi); err != nil {
					return nil, err
				}
				if err := cornerHLines(p, st[i].q16, st[i].q50, st[i].q84, st[j].lo, st[j].hi); err != nil {
					return nil, err
				}
				if opt.Truth != nil && !math.IsNaN(opt.Truth[j]) && !math.IsNaN(opt.Truth[i]) {
					if err := cornerTruth(p, opt.Truth[j], opt.Truth[i], st[i].lo, st[i].hi); err != nil {
						return nil, err
					}
				}
			}
			f.Plots[i][j] = p
		}
	}
	return f, nil
}

// Panels returns the number of panels drawn: n(n+1)/2.
func (f *CornerFigure) Panels() int {
	c := 0
	for _, row := range f.Plots {
		for _, p := range row {
			if p != nil {
				c++
			}
		}
	}
	return c
}

// Draw draws the figure onto c, the panels aligned in a grid.
func (f *CornerFigure) Draw(c draw.Canvas) {
	n := len(f.Plots)
	t := draw.Tiles{Rows: n, Cols: n, PadX: vg.Millimeter, PadY: vg.Millimeter,
		PadTop: vg.Millimeter * 2, PadBottom: vg.Millimeter * 2, PadLeft: vg.Millimeter * 2, PadRight: vg.Millimeter * 2}
	canvases := plot.Align(f.Plots, t, c)
	for i, row := range f.Plots {
		for j, p := range row {
			if p != nil {
				p.Draw(canvases[i][j])
			}
		}
	}
}

// Image renders the figure into an image canvas of the given size at dpi
// dots per inch (PNG, JPEG or TIFF via its WriteTo methods).
func (f *CornerFigure) Image(w, h vg.Length, dpi int) *vgimg.Canvas {
	c := vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(dpi))
	dc := draw.New(c)
	// An opaque white background, so that the PNG is not transparent.
	dc.SetColor(color.White)
	dc.Fill(dc.Rectangle.Path())
	f.Draw(dc)
	return c
}

// Save writes the figure to path, whose extension chooses the format: .png
// (150 dpi), .svg (fonts embedded) or .pdf.
func (f *CornerFigure) Save(w, h vg.Length, path string) error {
	var c vg.CanvasWriterTo
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".png":
		c = vgimg.PngCanvas{Canvas: f.Image(w, h, 150)}
	case ".svg":
		s := vgsvg.NewWith(vgsvg.UseWH(w, h), vgsvg.EmbedFonts(true))
		f.Draw(draw.New(s))
		c = s
	case ".pdf":
		p := newPDF(w, h) // Unicode text and straight alpha: see pdf.go
		f.Draw(draw.New(p))
		c = p
	default:
		return fmt.Errorf("figure: corner: unknown format %q (want .png, .svg or .pdf)", ext)
	}
	return cornerWrite(c, path)
}

// cornerQuantile returns the q-quantile of sorted s (linear interpolation
// between order statistics, Hyndman & Fan 1996, definition 7).
func cornerQuantile(s []float64, q float64) float64 {
	h := q * float64(len(s)-1)
	i := int(math.Floor(h))
	if i >= len(s)-1 {
		return s[len(s)-1]
	}
	return s[i] + (h-float64(i))*(s[i+1]-s[i])
}

// cornerVLines draws vertical lines at the median (solid) and the 16th and
// 84th percentiles (dashed) from y0 to y1.
func cornerVLines(p *plot.Plot, q16, q50, q84, y0, y1 float64) error {
	for k, x := range []float64{q16, q50, q84} {
		l, err := plotter.NewLine(plotter.XYs{{X: x, Y: y0}, {X: x, Y: y1}})
		if err != nil {
			return fmt.Errorf("figure: corner: %w", err)
		}
		cornerStyle(l, k != 1)
		p.Add(l)
	}
	return nil
}

// cornerHLines is cornerVLines across: horizontal lines from x0 to x1.
func cornerHLines(p *plot.Plot, q16, q50, q84, x0, x1 float64) error {
	for k, y := range []float64{q16, q50, q84} {
		l, err := plotter.NewLine(plotter.XYs{{X: x0, Y: y}, {X: x1, Y: y}})
		if err != nil {
			return fmt.Errorf("figure: corner: %w", err)
		}
		cornerStyle(l, k != 1)
		p.Add(l)
	}
	return nil
}

func cornerStyle(l *plotter.Line, dashed bool) {
	l.Color = cornerVermillion
	l.Width = vg.Points(1)
	if dashed {
		l.Dashes = []vg.Length{vg.Points(3), vg.Points(2)}
	}
}

// cornerTruth marks a true value: a vertical line at x from y0 to y1 and,
// when y is not NaN, a square at (x, y).
func cornerTruth(p *plot.Plot, x, y, y0, y1 float64) error {
	l, err := plotter.NewLine(plotter.XYs{{X: x, Y: y0}, {X: x, Y: y1}})
	if err != nil {
		return fmt.Errorf("figure: corner: %w", err)
	}
	l.Color, l.Width = cornerGreen, vg.Points(1.5)
	p.Add(l)
	if !math.IsNaN(y) {
		s, err := plotter.NewScatter(plotter.XYs{{X: x, Y: y}})
		if err != nil {
			return fmt.Errorf("figure: corner: %w", err)
		}
		s.GlyphStyle = draw.GlyphStyle{Color: cornerGreen, Radius: vg.Points(3), Shape: draw.BoxGlyph{}}
		p.Add(s)
	}
	return nil
}

// cornerWrite writes c to path, reporting the first error of writing or
// closing.
func cornerWrite(c vg.CanvasWriterTo, path string) (err error) {
	out, err := os.Create(path)
	if err != nil {
		return fmt.Errorf("figure: corner: %w", err)
	}
	defer func() {
		if cerr := out.Close(); cerr != nil && err == nil {
			err = fmt.Errorf("figure: corner: %w", cerr)
		}
	}()
	if _, err := c.WriteTo(out); err != nil {
		return fmt.Errorf("figure: corner: writing %s: %w", path, err)
	}
	return nil
}
