package figure

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	_ "gonum.org/v1/plot/vg/vgsvg" // SVG export

	"broadline/app/core"
)

// Captioned is a figure with the caption lines that go under it, as the
// export writes it.
type Captioned struct {
	Plot *plot.Plot
	// Residual, when not nil, is a panel drawn under Plot over the same x
	// range (see Display.Residuals).
	Residual *plot.Plot
	Caption  []string
}

// Model is the figure of bench b's model m on its epoch's observed
// spectrum, with the knock-out of element z drawn too when knock is not
// nil, and its caption (the model, the knock-out, the dataset's label and
// the cautions).
func Model(b *core.Bench, m core.Model, ov, knock *core.Overlay, z int, u core.WaveUnit) (*Captioned, error) {
	return ModelScene(b, m, ov, knock, z).Figure(Display{Axis: XAxis{Unit: u}})
}

// Comparison is the figure of one epoch's observed spectrum with the
// candidates' models, and its caption: one line per candidate with its
// parameters and composition, the dataset's label, and the cautions.
func Comparison(b *core.Bench, cmp *core.Comparison, u core.WaveUnit) (*Captioned, error) {
	d := b.Data
	title := fmt.Sprintf("%s, %g d after explosion: candidate compositions", d.Object, d.Epochs[cmp.Epoch].Days)
	p, err := Spectrum(b.Observed[cmp.Epoch], nil, title, u)
	if err != nil {
		return nil, err
	}
	var caption []string
	for i, c := range cmp.Candidates {
		ov := cmp.Models[i]
		name := fmt.Sprintf("%s  (χ²/N = %.2f)", c.Label, ov.Reduced())
		if ov.Preview {
			name += ", preview"
		}
		if err := AddSpectrumCurve(p, ov.Wavelength, ov.Flux, u, CandidateStyles[i%len(CandidateStyles)], name); err != nil {
			return nil, err
		}
		caption = append(caption, c.Model.Caption(c.Label))
	}
	return &Captioned{Plot: p, Caption: append(caption, d.CaptionTail()...)}, nil
}

// ExportFormats are the file types Export writes, by extension.
var ExportFormats = map[string]string{".png": "png", ".svg": "svg", ".pdf": "pdf"}

// Export writes the figure with its caption under it to path, as PNG, SVG
// or PDF by the path's extension, w × h in size (the caption takes its
// share of h), a PNG at 96 dpi. The file is written atomically: a failure
// leaves any earlier file at path as it was.
func (f *Captioned) Export(path string, w, h vg.Length) error {
	return f.export(path, w, h, 96, 1)
}

// Size is an export size: the figure's width, the height of its plot (the
// caption is added under it, so a long caption never squeezes the plot),
// the resolution of a PNG and the scale of the text against the plot's
// own sizes (titles 12 pt, ticks 10 pt; captions 8 pt).
type Size struct {
	Name       string
	Width      vg.Length
	PlotHeight vg.Length
	DPI        int
	TextScale  float64
}

// Sizes are the export sizes the workbench offers, the first the default.
// The column widths are the usual ones of astronomy journals (one column
// about 3.5 in, the full page width about 7.2 in; common practice), at the
// 300 dpi that journals ask of line art in raster form (common practice).
var Sizes = []Size{
	{Name: "two journal columns (7.2 in, 300 dpi)", Width: 7.2 * vg.Inch, PlotHeight: 4 * vg.Inch, DPI: 300, TextScale: 0.85},
	{Name: "one journal column (3.5 in, 300 dpi)", Width: 3.5 * vg.Inch, PlotHeight: 2.6 * vg.Inch, DPI: 300, TextScale: 0.7},
	{Name: "screen (10 in, 96 dpi)", Width: 10 * vg.Inch, PlotHeight: 5.5 * vg.Inch, DPI: 96, TextScale: 1},
}

// SizeNames are the names of Sizes, in order, for a selector.
func SizeNames() []string {
	out := make([]string, len(Sizes))
	for i, s := range Sizes {
		out[i] = s.Name
	}
	return out
}

// SizeNamed is the size of Sizes called name, and whether there is one.
func SizeNamed(name string) (Size, bool) {
	for _, s := range Sizes {
		if s.Name == name {
			return s, true
		}
	}
	return Size{}, false
}

// ExportSize writes the figure to path as Export does, at size s: s.Width
// wide, s.PlotHeight for the plot plus what the caption needs, the text
// scaled by s.TextScale, a PNG at s.DPI.
func (f *Captioned) ExportSize(path string, s Size) error {
	if s.Width <= 0 || s.PlotHeight <= 0 || s.DPI <= 0 || !(s.TextScale > 0) {
		return fmt.Errorf("export figure: size %q is not a size", s.Name)
	}
	_, capH := f.captionLines(s.Width, s.TextScale)
	return f.export(path, s.Width, s.PlotHeight+capH, s.DPI, s.TextScale)
}

func (f *Captioned) export(path string, w, h vg.Length, dpi int, scale float64) error {
	format, ok := ExportFormats[strings.ToLower(filepath.Ext(path))]
	if !ok {
		return fmt.Errorf("export figure: %s: unknown file type (use .png, .svg or .pdf)", filepath.Base(path))
	}
	var c vg.CanvasWriterTo
	switch format {
	case "pdf":
		c = newPDF(w, h) // not gonum's vgpdf: see pdf.go
	case "png":
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(dpi))}
	default:
		var err error
		if c, err = draw.NewFormattedCanvas(w, h, format); err != nil {
			return fmt.Errorf("export figure: %w", err)
		}
	}
	restore := scaleText(f.Plot, scale)
	if f.Residual != nil {
		defer scaleText(f.Residual, scale)()
	}
	f.draw(c, scale)
	restore()
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return fmt.Errorf("export figure: %w", err)
	}
	if err := core.WriteFileAtomic(path, buf.Bytes()); err != nil {
		return fmt.Errorf("export figure: %w", err)
	}
	return nil
}

// scaleText multiplies the sizes of p's texts (title, axis labels, tick
// labels, legend) and legend samples by k, and returns the function that
// puts them back.
func scaleText(p *plot.Plot, k float64) (restore func()) {
	if k == 1 {
		return func() {}
	}
	sizes := []*vg.Length{&p.Title.TextStyle.Font.Size, &p.X.Label.TextStyle.Font.Size, &p.Y.Label.TextStyle.Font.Size,
		&p.X.Tick.Label.Font.Size, &p.Y.Tick.Label.Font.Size, &p.Legend.TextStyle.Font.Size, &p.Legend.ThumbnailWidth,
		&p.X.Tick.Length, &p.Y.Tick.Length}
	old := make([]vg.Length, len(sizes))
	for i, s := range sizes {
		old[i] = *s
		*s = vg.Length(float64(*s) * k)
	}
	return func() {
		for i, s := range sizes {
			*s = old[i]
		}
	}
}

// captionStyle is the caption's text style at text scale k.
func (f *Captioned) captionStyle(k float64) draw.TextStyle {
	sty := f.Plot.Legend.TextStyle
	sty.Font.Size = vg.Length(float64(vg.Points(8)) * max(k, 0.875)) // 7 pt at the smallest
	sty.Color = color.Black
	return sty
}

const captionMargin = 8 // points, left and right of the caption

// captionLines are the caption's lines wrapped to width w at text scale k
// and the height they take.
func (f *Captioned) captionLines(w vg.Length, k float64) ([]string, vg.Length) {
	sty := f.captionStyle(k)
	var lines []string
	for _, c := range f.Caption {
		lines = append(lines, WrapText(c, w-2*vg.Points(captionMargin), sty.Width)...)
	}
	line := sty.FontExtents().Height * 1.25
	return lines, line*vg.Length(len(lines)) + vg.Points(6)
}

// draw draws the plot on cv with the caption lines under it, each wrapped
// at spaces to the canvas's width, the caption's text at scale k.
func (f *Captioned) draw(cv vg.CanvasSizer, k float64) {
	dc := draw.New(cv)
	sty := f.captionStyle(k)
	lines, capH := f.captionLines(dc.Max.X-dc.Min.X, k)
	line := sty.FontExtents().Height * 1.25
	f.drawPlots(draw.Crop(dc, 0, 0, capH, 0))
	for i, txt := range lines {
		dc.FillText(sty, vg.Point{X: dc.Min.X + vg.Points(captionMargin), Y: dc.Min.Y + capH - line*vg.Length(i+1)}, txt)
	}
}

// WrapText splits s at spaces into lines no wider than w as measured by
// width (a word wider than w gets a line of its own).
func WrapText(s string, w vg.Length, width func(string) vg.Length) []string {
	var out []string
	cur := ""
	for _, word := range strings.Fields(s) {
		next := word
		if cur != "" {
			next = cur + " " + word
		}
		if cur != "" && width(next) > w {
			out = append(out, cur)
			next = word
		}
		cur = next
	}
	if cur != "" {
		out = append(out, cur)
	}
	return out
}

// Render draws the figure with its caption into an image of w×h pixels at
// 96 dpi, for the screen.
func (f *Captioned) Render(w, h int) image.Image {
	const dpi = 96
	c := vgimg.NewWith(vgimg.UseWH(vg.Length(w)*vg.Inch/dpi, vg.Length(h)*vg.Inch/dpi), vgimg.UseDPI(dpi))
	f.draw(c, 1)
	return c.Image()
}
