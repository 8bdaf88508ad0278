package figure

// The PDF canvas. gonum/plot's own vgpdf embeds each font as a simple
// TrueType font in the WinAnsi (cp1252) encoding without a Unicode map, so
// χ, ⁻, − and every other character outside cp1252 is lost and even µ, ², Å
// come out of a text extractor as two-byte garbage; it also hands fpdf the
// premultiplied colour of a translucent fill, which greys the telluric
// bands. This canvas follows vgpdf (BSD licence, The Gonum Authors) but
// embeds each font with fpdf's UTF-8 route: a subset Type 0 (CID) font with
// a ToUnicode map, so the text is drawn and extracted as written; and it
// passes fpdf the straight (non-premultiplied) colour with its alpha.

import (
	"bufio"
	"bytes"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"time"

	pdf "codeberg.org/go-pdf/fpdf"
	stdfnt "golang.org/x/image/font"

	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
)

// pdfDPI is the nominal resolution of drawing in PDF (points).
const pdfDPI = 72

// pdfCanvas implements vg.CanvasWriterTo by drawing into a one-page PDF.
type pdfCanvas struct {
	doc       *pdf.Fpdf
	w, h      vg.Length
	numImages int
	stack     []pdfContext
	fonts     map[font.Font]bool
	err       error
}

type pdfContext struct {
	width vg.Length
}

// newPDF returns a PDF canvas of w × h. The document carries a fixed
// creation date so that the same figure gives the same bytes.
func newPDF(w, h vg.Length) *pdfCanvas {
	cfg := pdf.InitType{UnitStr: "pt", Size: pdf.SizeType{Wd: w.Points(), Ht: h.Points()}}
	c := &pdfCanvas{doc: pdf.NewCustom(&cfg), w: w, h: h, stack: make([]pdfContext, 1), fonts: map[font.Font]bool{}}
	c.doc.SetCreationDate(time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC))
	c.doc.SetCreator("broadline", true)
	c.doc.SetMargins(0, 0, 0)
	c.doc.SetAutoPageBreak(false, 0)
	c.doc.AddPage()
	c.Push()
	c.Translate(vg.Point{X: 0, Y: c.h})
	c.Scale(1, -1)
	vg.Initialize(c)
	return c
}

func (c *pdfCanvas) ctx() *pdfContext { return &c.stack[len(c.stack)-1] }

// Size implements vg.CanvasSizer.
func (c *pdfCanvas) Size() (w, h vg.Length) { return c.w, c.h }

// SetLineWidth implements vg.Canvas.
func (c *pdfCanvas) SetLineWidth(w vg.Length) {
	c.ctx().width = w
	c.doc.SetLineWidth(w.Points())
}

// SetLineDash implements vg.Canvas.
func (c *pdfCanvas) SetLineDash(dashes []vg.Length, offs vg.Length) {
	ds := make([]float64, len(dashes))
	for i, d := range dashes {
		ds[i] = d.Points()
	}
	c.doc.SetDashPattern(ds, offs.Points())
}

// SetColor implements vg.Canvas: the straight colour and its alpha.
func (c *pdfCanvas) SetColor(clr color.Color) {
	r, g, b, a := straightRGBA(clr)
	c.doc.SetFillColor(r, g, b)
	c.doc.SetDrawColor(r, g, b)
	c.doc.SetTextColor(r, g, b)
	c.doc.SetAlpha(a, "Normal")
}

// straightRGBA is clr as 8-bit non-premultiplied red, green, blue and an
// alpha in [0, 1] (color.Color.RGBA is premultiplied; PDF colours are not).
func straightRGBA(clr color.Color) (r, g, b int, a float64) {
	if clr == nil {
		clr = color.Black
	}
	n := color.NRGBAModel.Convert(clr).(color.NRGBA)
	return int(n.R), int(n.G), int(n.B), float64(n.A) / 255
}

// Rotate implements vg.Canvas.
func (c *pdfCanvas) Rotate(r float64) { c.doc.TransformRotate(-r*180/math.Pi, 0, 0) }

// Translate implements vg.Canvas.
func (c *pdfCanvas) Translate(pt vg.Point) { c.doc.TransformTranslate(pt.X.Points(), pt.Y.Points()) }

// Scale implements vg.Canvas.
func (c *pdfCanvas) Scale(x, y float64) { c.doc.TransformScale(x*100, y*100, 0, 0) }

// Push implements vg.Canvas.
func (c *pdfCanvas) Push() {
	c.stack = append(c.stack, *c.ctx())
	c.doc.TransformBegin()
}

// Pop implements vg.Canvas.
func (c *pdfCanvas) Pop() {
	c.doc.TransformEnd()
	c.stack = c.stack[:len(c.stack)-1]
}

// Stroke implements vg.Canvas.
func (c *pdfCanvas) Stroke(p vg.Path) {
	if c.ctx().width > 0 {
		c.path(p, "D")
	}
}

// Fill implements vg.Canvas.
func (c *pdfCanvas) Fill(p vg.Path) { c.path(p, "F") }

func fontStyle(f font.Font) string {
	s := ""
	if f.Weight >= stdfnt.WeightBold {
		s += "B"
	}
	if f.Style == stdfnt.StyleItalic {
		s += "I"
	}
	return s
}

// FillString implements vg.Canvas: str drawn with fnt, its baseline's
// left end at pt.
func (c *pdfCanvas) FillString(fnt font.Face, pt vg.Point, str string) {
	if fnt.Font.Size == 0 || c.err != nil {
		return
	}
	key := fnt.Font
	key.Size = 0
	name := fnt.Name()
	if !c.fonts[key] {
		var raw bytes.Buffer
		if _, err := fnt.Face.WriteSourceTo(nil, &raw); err != nil {
			c.err = fmt.Errorf("font %s: %w", name, err)
			return
		}
		c.doc.AddUTF8FontFromBytes(name, "", raw.Bytes())
		c.fonts[key] = true
	}
	c.doc.SetFont(name, "", fnt.Font.Size.Points())
	c.Push()
	defer c.Pop()
	c.Translate(pt)
	c.Scale(1, -1) // fpdf's text origin is the top left corner
	c.doc.SetXY(0, 0)
	// Text draws at the baseline: fpdf's Text takes the baseline point.
	c.doc.Text(0, 0, str)
}

// DrawImage implements vg.Canvas.
func (c *pdfCanvas) DrawImage(rect vg.Rectangle, img image.Image) {
	opts := pdf.ImageOptions{ImageType: "png", ReadDpi: true}
	c.numImages++
	name := fmt.Sprintf("image_%03d.png", c.numImages)
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		c.err = fmt.Errorf("image: %w", err)
		return
	}
	c.doc.RegisterImageOptionsReader(name, opts, &buf)
	sz := rect.Size()
	c.doc.ImageOptions(name, rect.Min.X.Points(), rect.Min.Y.Points(), sz.X.Points(), sz.Y.Points(), false, opts, 0, "")
}

func (c *pdfCanvas) path(path vg.Path, style string) {
	var x0, y0 float64
	for _, comp := range path {
		switch comp.Type {
		case vg.MoveComp:
			x0, y0 = comp.Pos.X.Points(), comp.Pos.Y.Points()
			c.doc.MoveTo(x0, y0)
		case vg.LineComp:
			c.doc.LineTo(comp.Pos.X.Points(), comp.Pos.Y.Points())
		case vg.ArcComp:
			c.arc(comp, style)
		case vg.CurveComp:
			px, py := comp.Pos.X.Points(), comp.Pos.Y.Points()
			switch len(comp.Control) {
			case 1:
				c.doc.CurveTo(comp.Control[0].X.Points(), comp.Control[0].Y.Points(), px, py)
			case 2:
				c.doc.CurveBezierCubicTo(comp.Control[0].X.Points(), comp.Control[0].Y.Points(),
					comp.Control[1].X.Points(), comp.Control[1].Y.Points(), px, py)
			default:
				panic("figure: PDF path: a curve with more than two control points")
			}
		case vg.CloseComp:
			c.doc.LineTo(x0, y0)
			c.doc.ClosePath()
		default:
			panic(fmt.Sprintf("figure: PDF path: unknown component type %d", comp.Type))
		}
	}
	c.doc.DrawPath(style)
}

func (c *pdfCanvas) arc(comp vg.PathComp, style string) {
	x0 := comp.Pos.X + comp.Radius*vg.Length(math.Cos(comp.Start))
	y0 := comp.Pos.Y + comp.Radius*vg.Length(math.Sin(comp.Start))
	c.doc.LineTo(x0.Points(), y0.Points())
	r := comp.Radius.Points()
	const deg = 180 / math.Pi
	beg := comp.Start * deg
	c.doc.Arc(comp.Pos.X.Points(), comp.Pos.Y.Points(), r, r, comp.Angle*deg, beg, beg+comp.Angle*deg, style)
	x1 := comp.Pos.X + comp.Radius*vg.Length(math.Cos(comp.Start+comp.Angle))
	y1 := comp.Pos.Y + comp.Radius*vg.Length(math.Sin(comp.Start+comp.Angle))
	c.doc.MoveTo(x1.Points(), y1.Points())
}

// WriteTo writes the PDF to w; the canvas may not be drawn on after.
func (c *pdfCanvas) WriteTo(w io.Writer) (int64, error) {
	if c.err != nil {
		return 0, fmt.Errorf("PDF: %w", c.err)
	}
	c.Pop()
	c.doc.Close()
	if err := c.doc.Error(); err != nil {
		return 0, fmt.Errorf("PDF: %w", err)
	}
	cw := &countWriter{w: w}
	b := bufio.NewWriter(cw)
	if err := c.doc.Output(b); err != nil {
		return cw.n, fmt.Errorf("PDF: %w", err)
	}
	err := b.Flush()
	return cw.n, err
}

type countWriter struct {
	w io.Writer
	n int64
}

func (cw *countWriter) Write(p []byte) (int, error) {
	n, err := cw.w.Write(p)
	cw.n += int64(n)
	return n, err
}
