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
	Plot    *plot.Plot
	Caption []string
}

// Model is the figure of bench b's model m on its epoch's observed
// spectrum, with the knock-out of element z drawn too when knock is not
// nil, and its caption (the model, the knock-out, the dataset's label and
// the cautions).
func Model(b *core.Bench, m core.Model, ov, knock *core.Overlay, z int, u core.WaveUnit) (*Captioned, error) {
	d := b.Data
	title := fmt.Sprintf("%s, %g d after explosion", d.Object, d.Epochs[m.Epoch].Days)
	p, err := Spectrum(b.Observed[m.Epoch], ov, title, u)
	if err != nil {
		return nil, err
	}
	caption := []string{m.Caption(fmt.Sprintf("model (χ²/N = %.2f)", ov.Reduced()))}
	if knock != nil {
		sym := core.ElementSymbol(z)
		if err := AddCurve(p, knock.Wavelength, knock.Flux, u, KnockOutStyle, "model without "+sym); err != nil {
			return nil, err
		}
		caption = append(caption, fmt.Sprintf("Dashed: the same model without the lines of %s (χ²/N = %.2f).", sym, knock.Reduced()))
	}
	return &Captioned{Plot: p, Caption: append(caption, d.CaptionTail()...)}, nil
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
		if err := AddCurve(p, ov.Wavelength, ov.Flux, u, CandidateStyles[i%len(CandidateStyles)], name); err != nil {
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
// share of h). The file is written atomically: a failure leaves any
// earlier file at path as it was.
func (f *Captioned) Export(path string, w, h vg.Length) error {
	format, ok := ExportFormats[strings.ToLower(filepath.Ext(path))]
	if !ok {
		return fmt.Errorf("export figure: %s: unknown file type (use .png, .svg or .pdf)", path)
	}
	var c vg.CanvasWriterTo
	if format == "pdf" {
		c = newPDF(w, h) // not gonum's vgpdf: see pdf.go
	} else {
		var err error
		if c, err = draw.NewFormattedCanvas(w, h, format); err != nil {
			return fmt.Errorf("export figure: %w", err)
		}
	}
	f.draw(c)
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return fmt.Errorf("export figure: %w", err)
	}
	if err := core.WriteFileAtomic(path, buf.Bytes()); err != nil {
		return fmt.Errorf("export figure: %w", err)
	}
	return nil
}

// draw draws the plot on cv with the caption lines under it, each wrapped
// at spaces to the canvas's width.
func (f *Captioned) draw(cv vg.CanvasSizer) {
	dc := draw.New(cv)
	sty := f.Plot.Legend.TextStyle
	sty.Font.Size = vg.Points(8)
	sty.Color = color.Black
	margin := vg.Points(8)
	var lines []string
	for _, c := range f.Caption {
		lines = append(lines, WrapText(c, dc.Max.X-dc.Min.X-2*margin, sty.Width)...)
	}
	line := sty.FontExtents().Height * 1.25
	capH := line*vg.Length(len(lines)) + vg.Points(6)
	f.Plot.Draw(draw.Crop(dc, 0, 0, capH, 0))
	for i, txt := range lines {
		dc.FillText(sty, vg.Point{X: dc.Min.X + margin, Y: dc.Min.Y + capH - line*vg.Length(i+1)}, txt)
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
	f.draw(c)
	return c.Image()
}
