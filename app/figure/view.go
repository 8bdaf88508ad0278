package figure

import (
	"fmt"
	"image"
	"image/color"
	"math"
	"slices"
	"sort"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"broadline/app/core"
	"broadline/physics"
	"broadline/spectra"
)

// View is the part of the spectrum figure that is shown: a range of
// vacuum wavelength in Å (the whole spectrum when XMax ≤ XMin) and a flux
// range (fitted to what is drawn inside the wavelength range when Auto is
// set or YMax ≤ YMin). The zero View is the whole figure. The wavelength
// range is in Å whatever the x axis shows, so that a zoom survives a
// change of unit or a switch to the velocity axis.
type View struct {
	XMin, XMax float64 // vacuum Å
	YMin, YMax float64 // flux, in the observed spectrum's unit
	Auto       bool    // fit the flux range to what is shown
}

// HasX reports whether v sets a wavelength range.
func (v View) HasX() bool { return v.XMax > v.XMin }

// AutoY reports whether the flux range is fitted to what is shown.
func (v View) AutoY() bool { return v.Auto || !(v.YMax > v.YMin) }

// XAxis is what the spectrum figure's x axis shows: vacuum wavelength in
// Unit, or, when Rest > 0, the velocity in km/s that moves a line of vacuum
// rest wavelength Rest (Å) to each wavelength, v = c (λ_rest − λ)/λ_rest
// (first-order Doppler, as the synthesis' default; positive towards the
// blue). The velocity axis increases to the left, so that the spectrum
// keeps its orientation (blue on the left).
type XAxis struct {
	Unit core.WaveUnit
	Rest float64 // vacuum Å; ≤ 0: a wavelength axis
}

// Velocity reports whether the axis shows velocities.
func (a XAxis) Velocity() bool { return a.Rest > 0 }

// Of returns the axis value of vacuum wavelength lam (Å).
func (a XAxis) Of(lam float64) float64 {
	if a.Velocity() {
		return VelocityKmS(lam, a.Rest)
	}
	return lam * a.Unit.PerA
}

// Wavelength returns the vacuum wavelength (Å) of axis value x.
func (a XAxis) Wavelength(x float64) float64 {
	if a.Velocity() {
		return a.Rest * (1 - x/physics.SpeedOfLightKmS)
	}
	return x / a.Unit.PerA
}

// Ticker is the axis' tick marker: the default one, in 10³ km/s on a
// velocity axis (see Label).
func (a XAxis) Ticker() plot.Ticker {
	if a.Velocity() {
		return ScaledTicks{Exp: 3}
	}
	return plot.DefaultTicks{}
}

// Label is the axis label.
func (a XAxis) Label() string {
	if a.Velocity() {
		return "velocity relative to " + a.RestText() + " (10³ km/s, blueshift positive)"
	}
	return "vacuum wavelength (" + a.Unit.Name + ")"
}

// RestText is the rest wavelength in the axis unit, "1.0830 µm".
func (a XAxis) RestText() string {
	return strconv.FormatFloat(a.Rest*a.Unit.PerA, 'f', a.Unit.Decimals, 64) + " " + a.Unit.Name
}

// VelocityKmS is the velocity (km/s) that moves a line of vacuum rest
// wavelength rest to vacuum wavelength lam with the first-order Doppler
// relation λ = λ_rest(1 − v/c) the synthesis uses by default (Jeffery &
// Branch 1990): v = c (λ_rest − λ)/λ_rest, positive for a blueshift.
func VelocityKmS(lam, rest float64) float64 {
	return physics.SpeedOfLightKmS * (rest - lam) / rest
}

// LineTicks are the acting wavelengths (Å: rest wavelength shifted by the
// photosphere's velocity) of one species' strongest lines, marked as a
// row of ticks at the bottom of the spectrum figure.
type LineTicks struct {
	Label  string // e.g. "Sr II"
	Acting []float64
}

// TickStyles are the colours of the rows of line ticks: the Okabe & Ito
// colours that the observed spectrum, the model and the knock-out do not
// use, then the knock-out's blue.
var TickStyles = []color.NRGBA{CandidateStyles[2].Color, CandidateStyles[3].Color, CandidateStyles[4].Color,
	CandidateStyles[5].Color, CandidateStyles[1].Color}

// Display is how the spectrum figure is drawn: the part shown, the x
// axis, and the optional uncertainty band and residual panel.
type Display struct {
	View View
	Axis XAxis
	// Band shades the observed flux ± 1σ.
	Band bool
	// Residuals adds a panel of (observed − model)/σ under the spectrum.
	Residuals bool
}

// Scene is what the spectrum figure of a model shows, kept so that it can
// be drawn again for another Display without recomputing anything.
type Scene struct {
	Observed *spectra.Spectrum
	Model    *core.Overlay
	// Knock is the model without one element's lines (nil: none), named
	// KnockName in the legend.
	Knock     *core.Overlay
	KnockName string
	Title     string
	Caption   []string
	// Ticks are rows of line ticks (none: no rows).
	Ticks []LineTicks
}

// ModelScene is the scene of bench b's model m on its epoch's observed
// spectrum, with the knock-out of element z when knock is not nil: what
// Model draws.
func ModelScene(b *core.Bench, m core.Model, ov, knock *core.Overlay, z int) *Scene {
	d := b.Data
	s := &Scene{Observed: b.Observed[m.Epoch], Model: ov, Knock: knock,
		Title: fmt.Sprintf("%s, %g d after explosion", d.Object, d.Epochs[m.Epoch].Days)}
	s.Caption = []string{m.Caption(fmt.Sprintf("model (χ²/N = %.2f)", ov.Reduced()))}
	if knock != nil {
		sym := core.ElementSymbol(z)
		s.KnockName = "model without " + sym
		s.Caption = append(s.Caption, fmt.Sprintf("Dashed: the same model without the lines of %s (χ²/N = %.2f).", sym, knock.Reduced()))
	}
	s.Caption = append(s.Caption, d.CaptionTail()...)
	return s
}

// Figure draws the scene as display d asks: the plot (and the residual
// panel) with the scene's caption, and a line naming the ticks when there
// are any.
func (s *Scene) Figure(d Display) (*Captioned, error) {
	obs, ax, v := s.Observed, d.Axis, d.View
	p := plot.New()
	p.Title.Text = s.Title
	p.Title.Padding = vg.Points(4)
	p.X.Label.Text = ax.Label()
	if ax.Velocity() {
		p.X.Scale = plot.InvertedScale{Normalizer: plot.LinearScale{}}
	}
	p.X.Tick.Marker = ax.Ticker()
	p.Add(plotter.NewGrid())
	in := func(lam float64) bool { return !v.HasX() || (lam >= v.XMin && lam <= v.XMax) }
	yr := newYRange()
	yr.add(obs.Flux, func(i int) bool { return obs.Masked(i) || !in(obs.Wavelength[i]) })
	if !(yr.hi > 0) {
		if v.HasX() {
			return nil, fmt.Errorf("figure: no unmasked positive flux between %.6g and %.6g Å", v.XMin, v.XMax)
		}
		return nil, fmt.Errorf("figure: no unmasked positive flux to show")
	}
	p.Add(maskBandsBy(obs, ax.Of))
	if d.Band && obs.Uncertainty != nil {
		p.Add(&bandPlotter{runs: bandRuns(obs, ax.Of, v), color: color.NRGBA{0, 0, 0, 45}})
	}
	curve := func(x, y []float64, st Style, name string) error {
		i0, i1 := visible(x, v)
		for k, seg := range segmentsBy(x[i0:i1], y[i0:i1], ax.Of) {
			l, err := plotter.NewLine(seg)
			if err != nil {
				return fmt.Errorf("figure: %w", err)
			}
			l.Color, l.Width, l.Dashes = st.Color, st.Width, st.Dashes
			p.Add(l)
			if k == 0 {
				p.Legend.Add(name, l)
			}
		}
		return nil
	}
	if err := curve(obs.Wavelength, obs.Flux, Style{Palette.Observed, 1, nil}, "observed"); err != nil {
		return nil, err
	}
	if s.Model != nil {
		name := "model"
		if s.Model.Preview {
			name = "model (absorption-only preview)"
		}
		if err := curve(s.Model.Wavelength, s.Model.Flux, Style{Palette.Model, 1.6, nil}, name); err != nil {
			return nil, err
		}
		yr.add(s.Model.Flux, func(i int) bool { return !in(s.Model.Wavelength[i]) })
	}
	if s.Knock != nil {
		if err := curve(s.Knock.Wavelength, s.Knock.Flux, KnockOutStyle, s.KnockName); err != nil {
			return nil, err
		}
		yr.add(s.Knock.Flux, func(i int) bool { return !in(s.Knock.Wavelength[i]) })
	}
	if len(s.Ticks) > 0 {
		tp := &tickPlotter{sets: s.Ticks, of: ax.Of}
		p.Add(tp)
		for k, set := range s.Ticks {
			p.Legend.Add(set.Label+" lines at v_ph", tickThumb{TickStyles[k%len(TickStyles)]})
		}
	}
	p.Legend.Top = true
	p.Legend.XOffs = -vg.Points(10)
	p.Legend.YOffs = -vg.Points(2)
	if v.HasX() {
		a, b := ax.Of(v.XMin), ax.Of(v.XMax)
		p.X.Min, p.X.Max = math.Min(a, b), math.Max(a, b)
	}
	if v.AutoY() {
		yr.apply(p)
	} else {
		p.Y.Min, p.Y.Max = v.YMin, v.YMax
		fluxTicks(p, math.Max(math.Abs(v.YMin), math.Abs(v.YMax)))
	}
	f := &Captioned{Plot: p, Caption: s.Caption}
	if len(s.Ticks) > 0 {
		f.Caption = append(slices.Clone(s.Caption), "Ticks at the bottom: the strongest lines (largest Sobolev τ at the photosphere) of the species named, at their rest wavelengths shifted by the photosphere's velocity.")
	}
	if d.Residuals && s.Model != nil {
		r, err := residualPlot(obs, s.Model, ax, v, p)
		if err != nil {
			return nil, err
		}
		f.Residual = r
		p.X.Label.Text = ""
		p.X.Tick.Marker = unlabelled{ax.Ticker()}
	}
	return f, nil
}

// unlabelled are a ticker's ticks without their labels: the spectrum's x
// axis over a residual panel, which labels the same ticks.
type unlabelled struct{ plot.Ticker }

// Ticks implements plot.Ticker.
func (u unlabelled) Ticks(lo, hi float64) []plot.Tick {
	t := u.Ticker.Ticks(lo, hi)
	for i := range t {
		t[i].Label = ""
	}
	return t
}

// Residuals returns (observed − model)/σ at each sample of overlay ov (the
// observed samples inside the model's range): NaN where the sample is
// masked or has no uncertainty > 0, the samples fit.Compare leaves out of
// χ², so that the finite values' squares add up to ov.Chi2.
func Residuals(obs *spectra.Spectrum, ov *core.Overlay) []float64 {
	r := make([]float64, len(ov.Wavelength))
	j := 0
	for i, w := range ov.Wavelength {
		r[i] = math.NaN()
		for j < obs.Len() && obs.Wavelength[j] < w {
			j++
		}
		if j == obs.Len() || obs.Wavelength[j] != w || obs.Masked(j) || obs.Uncertainty == nil || !(obs.Uncertainty[j] > 0) {
			continue
		}
		r[i] = (obs.Flux[j] - ov.Flux[i]) / obs.Uncertainty[j]
	}
	return r
}

// residualPlot is the panel of (observed − model)/σ under spectrum plot
// main, over the same x range, symmetric about zero and at least ±3.
func residualPlot(obs *spectra.Spectrum, ov *core.Overlay, ax XAxis, v View, main *plot.Plot) (*plot.Plot, error) {
	r := Residuals(obs, ov)
	p := plot.New()
	p.X.Label.Text = ax.Label()
	p.X.Scale = main.X.Scale
	p.X.Tick.Marker = ax.Ticker()
	p.Y.Label.Text = "(obs − model)/σ"
	p.Add(plotter.NewGrid())
	zero, err := plotter.NewLine(plotter.XYs{{X: main.X.Min, Y: 0}, {X: main.X.Max, Y: 0}})
	if err != nil {
		return nil, fmt.Errorf("figure: %w", err)
	}
	zero.Color = Palette.Model
	zero.Dashes = []vg.Length{vg.Points(4), vg.Points(2)}
	p.Add(zero)
	i0, i1 := visible(ov.Wavelength, v)
	top := 3.0
	for _, x := range r[i0:i1] {
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			top = math.Max(top, 1.1*math.Abs(x))
		}
	}
	for _, seg := range segmentsBy(ov.Wavelength[i0:i1], r[i0:i1], ax.Of) {
		l, err := plotter.NewLine(seg)
		if err != nil {
			return nil, fmt.Errorf("figure: %w", err)
		}
		l.Color, l.Width = Palette.Observed, 0.8
		p.Add(l)
	}
	p.X.Min, p.X.Max = main.X.Min, main.X.Max
	p.Y.Min, p.Y.Max = -top, top
	return p, nil
}

// visible is the index range [i0, i1) of the increasing wavelengths x
// inside v's wavelength range, with one sample more on each side so that
// the curves run to the edges (all of x when v has no range).
func visible(x []float64, v View) (int, int) {
	if !v.HasX() {
		return 0, len(x)
	}
	i0 := sort.SearchFloat64s(x, v.XMin) - 1
	i1 := sort.SearchFloat64s(x, v.XMax) + 1
	return max(i0, 0), min(i1, len(x))
}

// segmentsBy is Segments with x mapped to the axis by of.
func segmentsBy(x, y []float64, of func(float64) float64) []plotter.XYs {
	if len(x) != len(y) {
		panic("figure: Segments: lengths differ")
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
			seg = append(seg, plotter.XY{X: of(x[i]), Y: y[i]})
		}
	}
	flush()
	return out
}

// maskBandsBy is NewMaskBands with wavelengths mapped to the axis by of.
func maskBandsBy(obs *spectra.Spectrum, of func(float64) float64) *MaskBands {
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
		a, b := of(obs.Wavelength[i]), of(obs.Wavelength[j])
		mb.Ranges = append(mb.Ranges, [2]float64{math.Min(a, b), math.Max(a, b)})
		i = j + 1
	}
	return mb
}

// bandRuns are the runs of observed samples with an uncertainty > 0, as
// (x, flux − σ, flux + σ) triples, broken where Segments breaks the curve.
func bandRuns(obs *spectra.Spectrum, of func(float64) float64, v View) [][][3]float64 {
	i0, i1 := visible(obs.Wavelength, v)
	step := medianStep(obs.Wavelength[i0:i1])
	var out [][][3]float64
	var run [][3]float64
	for i := i0; i < i1; i++ {
		f, s := obs.Flux[i], obs.Uncertainty[i]
		bad := !(s > 0) || math.IsNaN(f) || math.IsInf(f, 0) || math.IsInf(s, 0)
		if bad || (i > i0 && obs.Wavelength[i]-obs.Wavelength[i-1] > 5*step) {
			if len(run) >= 2 {
				out = append(out, run)
			}
			run = nil
		}
		if !bad {
			run = append(run, [3]float64{of(obs.Wavelength[i]), f - s, f + s})
		}
	}
	if len(run) >= 2 {
		out = append(out, run)
	}
	return out
}

// bandPlotter fills the observed flux ± 1σ.
type bandPlotter struct {
	runs  [][][3]float64
	color color.Color
}

// Plot implements plot.Plotter.
func (bp *bandPlotter) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, trY := plt.Transforms(&c)
	c.SetColor(bp.color)
	for _, run := range bp.runs {
		pts := make([]vg.Point, 0, 2*len(run))
		for _, q := range run {
			pts = append(pts, vg.Point{X: trX(q[0]), Y: trY(q[2])})
		}
		for k := len(run) - 1; k >= 0; k-- {
			pts = append(pts, vg.Point{X: trX(run[k][0]), Y: trY(run[k][1])})
		}
		poly := c.ClipPolygonXY(pts)
		if len(poly) < 3 {
			continue
		}
		var path vg.Path
		path.Move(poly[0])
		for _, q := range poly[1:] {
			path.Line(q)
		}
		path.Close()
		c.Fill(path)
	}
}

// tickLength and tickRow are the size of a line tick and the spacing of
// the rows of ticks, from the bottom of the plot area.
const (
	tickLength = 8 // points
	tickRow    = 10
)

// tickPlotter draws the rows of line ticks at the bottom of the plot area.
type tickPlotter struct {
	sets []LineTicks
	of   func(float64) float64
}

// Plot implements plot.Plotter.
func (tp *tickPlotter) Plot(c draw.Canvas, plt *plot.Plot) {
	trX, _ := plt.Transforms(&c)
	for k, set := range tp.sets {
		sty := draw.LineStyle{Color: TickStyles[k%len(TickStyles)], Width: vg.Points(1.4)}
		y0 := c.Min.Y + vg.Points(2+tickRow*float64(k))
		for _, a := range set.Acting {
			x := trX(tp.of(a))
			if x < c.Min.X || x > c.Max.X {
				continue
			}
			c.StrokeLine2(sty, x, y0, x, y0+vg.Points(tickLength))
		}
	}
}

// TickPositions returns, for each row of line ticks of f's x axis, the
// axis values of the ticks that fall inside the shown range: where the
// figure puts them.
func TickPositions(p *plot.Plot, sets []LineTicks, ax XAxis) [][]float64 {
	out := make([][]float64, len(sets))
	for k, set := range sets {
		for _, a := range set.Acting {
			if x := ax.Of(a); x >= p.X.Min && x <= p.X.Max {
				out[k] = append(out[k], x)
			}
		}
	}
	return out
}

// tickThumb is the legend sample of a row of ticks: a short vertical tick.
type tickThumb struct{ color color.Color }

// Thumbnail implements plot.Thumbnailer.
func (tt tickThumb) Thumbnail(c *draw.Canvas) {
	x := (c.Min.X + c.Max.X) / 2
	c.StrokeLine2(draw.LineStyle{Color: tt.color, Width: vg.Points(1.4)}, x, c.Min.Y, x, c.Max.Y)
}

// fluxTicks labels p's y axis for values up to top in units of a common
// power of ten named in the axis label.
func fluxTicks(p *plot.Plot, top float64) {
	exp := CommonExponent(top)
	p.Y.Label.Text = FluxLabel(exp)
	p.Y.Tick.Marker = ScaledTicks{Exp: exp}
}

// ResidualShare is the part of the plot's height the residual panel takes.
const ResidualShare = 0.28

// layout splits canvas c between f's plot and its residual panel (when it
// has one), cropped so that their data areas line up left and right.
func (f *Captioned) layout(c draw.Canvas) (top, bottom draw.Canvas) {
	if f.Residual == nil {
		return c, draw.Canvas{}
	}
	h := c.Max.Y - c.Min.Y
	top = draw.Crop(c, 0, 0, vg.Length(ResidualShare)*h, 0)
	bottom = draw.Crop(c, 0, 0, 0, -vg.Length(1-ResidualShare)*h)
	dt, db := f.Plot.DataCanvas(top), f.Residual.DataCanvas(bottom)
	left := max(dt.Min.X, db.Min.X)
	right := min(dt.Max.X, db.Max.X)
	top = draw.Crop(top, left-dt.Min.X, right-dt.Max.X, 0, 0)
	bottom = draw.Crop(bottom, left-db.Min.X, right-db.Max.X, 0, 0)
	return top, bottom
}

// drawPlots draws f's plot and residual panel on c.
func (f *Captioned) drawPlots(c draw.Canvas) {
	top, bottom := f.layout(c)
	f.Plot.Draw(top)
	if f.Residual != nil {
		f.Residual.Draw(bottom)
	}
}

// Panel is where a plot's data area lies in a rendered image, and the
// plot's transform between data and pixels there.
type Panel struct {
	// Shown is false for a panel the figure does not have.
	Shown bool
	// Left, Right, Top and Bottom bound the data area, in pixels from the
	// image's top left corner.
	Left, Right, Top, Bottom float64
	// Min and Max are the x axis' range (axis units), at pixel columns
	// PxMin and PxMax (PxMin > PxMax on a velocity axis); YMin and YMax
	// the y range, at pixel rows PyMin and PyMax.
	Min, Max, PxMin, PxMax   float64
	YMin, YMax, PyMin, PyMax float64
}

// Contains reports whether pixel (px, py) lies in the data area.
func (p Panel) Contains(px, py float64) bool {
	return p.Shown && px >= p.Left && px <= p.Right && py >= p.Top && py <= p.Bottom
}

// ToData returns the axis value x and the y value at pixel (px, py).
func (p Panel) ToData(px, py float64) (x, y float64) {
	x = p.Min + (px-p.PxMin)/(p.PxMax-p.PxMin)*(p.Max-p.Min)
	y = p.YMin + (py-p.PyMin)/(p.PyMax-p.PyMin)*(p.YMax-p.YMin)
	return x, y
}

// ToPixel returns the pixel of axis value x and y value y.
func (p Panel) ToPixel(x, y float64) (px, py float64) {
	px = p.PxMin + (x-p.Min)/(p.Max-p.Min)*(p.PxMax-p.PxMin)
	py = p.PyMin + (y-p.YMin)/(p.YMax-p.YMin)*(p.PyMax-p.PyMin)
	return px, py
}

// panelOf is where plot p, drawn on canvas c of an image h pixels high at
// dpi, has its data area, found with the plot's own transforms.
func panelOf(p *plot.Plot, c draw.Canvas, h, dpi float64) Panel {
	dc := p.DataCanvas(c)
	trX, trY := p.Transforms(&dc)
	k := dpi / float64(vg.Inch) // pixels per point
	px := func(l vg.Length) float64 { return float64(l) * k }
	py := func(l vg.Length) float64 { return h - float64(l)*k }
	return Panel{Shown: true,
		Left: px(dc.Min.X), Right: px(dc.Max.X), Top: py(dc.Max.Y), Bottom: py(dc.Min.Y),
		Min: p.X.Min, Max: p.X.Max, PxMin: px(trX(p.X.Min)), PxMax: px(trX(p.X.Max)),
		YMin: p.Y.Min, YMax: p.Y.Max, PyMin: py(trY(p.Y.Min)), PyMax: py(trY(p.Y.Max))}
}

// Frame is a rendered spectrum figure's geometry: its size, its x axis,
// and where its spectrum and residual panels lie, for turning the
// pointer's pixel into data.
type Frame struct {
	Width, Height int
	Axis          XAxis
	Main          Panel
	Residual      Panel
}

// View is the View of what the frame shows: its wavelength range (Å) and
// flux range.
func (f Frame) View() View {
	a, b := f.Axis.Wavelength(f.Main.Min), f.Axis.Wavelength(f.Main.Max)
	return View{XMin: math.Min(a, b), XMax: math.Max(a, b), YMin: f.Main.YMin, YMax: f.Main.YMax}
}

// RenderPlot draws the figure's plot and residual panel, without the
// caption, into a w×h image at 96 dpi for the screen, and returns the
// image and its Frame.
func (f *Captioned) RenderPlot(w, h int, ax XAxis) (image.Image, Frame) {
	const dpi = 96
	c := vgimg.NewWith(vgimg.UseWH(vg.Length(w)*vg.Inch/dpi, vg.Length(h)*vg.Inch/dpi), vgimg.UseDPI(dpi))
	dc := draw.New(c)
	f.drawPlots(dc)
	fr := Frame{Width: w, Height: h, Axis: ax}
	top, bottom := f.layout(dc)
	fr.Main = panelOf(f.Plot, top, float64(h), dpi)
	if f.Residual != nil {
		fr.Residual = panelOf(f.Residual, bottom, float64(h), dpi)
	}
	return c.Image(), fr
}

// Extent is the wavelength range (Å) of the scene's observed spectrum.
func (s *Scene) Extent() (lo, hi float64) {
	w := s.Observed.Wavelength
	if len(w) == 0 {
		return 0, 0
	}
	return w[0], w[len(w)-1]
}

// ZoomAbout scales v's ranges by k (< 1: zoom in) about the wavelength
// lam (Å) and, when the flux range is fixed, about the flux y; an
// automatic flux range stays automatic.
func (v View) ZoomAbout(lam, y, k float64) View {
	v.XMin, v.XMax = lam+(v.XMin-lam)*k, lam+(v.XMax-lam)*k
	if !v.AutoY() {
		v.YMin, v.YMax = y+(v.YMin-y)*k, y+(v.YMax-y)*k
	}
	return v
}

// Pan moves v by dLam Å and, when the flux range is fixed, by dy.
func (v View) Pan(dLam, dy float64) View {
	v.XMin, v.XMax = v.XMin+dLam, v.XMax+dLam
	if !v.AutoY() {
		v.YMin, v.YMax = v.YMin+dy, v.YMax+dy
	}
	return v
}

// MinViewWidth is the narrowest wavelength range (Å) a view shows.
const MinViewWidth = 1.0

// Within keeps v on the spectrum [lo, hi] Å: its wavelength range no
// narrower than MinViewWidth nor wider than three times the spectrum, and
// its middle on the spectrum. A view without
// a wavelength range is left as it is.
func (v View) Within(lo, hi float64) View {
	if !v.HasX() || !(hi > lo) {
		return v
	}
	w := math.Min(math.Max(v.XMax-v.XMin, MinViewWidth), 3*(hi-lo))
	mid := math.Min(math.Max((v.XMin+v.XMax)/2, lo), hi)
	v.XMin, v.XMax = mid-w/2, mid+w/2
	return v
}
