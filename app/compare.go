package main

import (
	"bytes"
	"context"
	"fmt"
	"image"
	"image/color"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	_ "gonum.org/v1/plot/vg/vgpdf" // PDF export
	_ "gonum.org/v1/plot/vg/vgsvg" // SVG export

	"broadline/linelists"
	"broadline/opacity"
	"broadline/opacity/synth"
)

// Candidate is a model the analyst keeps to compare with others: a label
// and the model's parameters at one epoch.
type Candidate struct {
	Label               string  `json:"label"`
	Epoch               int     `json:"epoch"`
	PhotosphereVelocity float64 `json:"photosphere_velocity_c"`
	Temperature         float64 `json:"temperature_k"`
	MassFractions       string  `json:"mass_fractions"`
	Preview             bool    `json:"preview"`
}

// maxCandidates is the number of candidates a session keeps: as many as
// the comparison figure has distinct colours.
const maxCandidates = len(candidateColors)

// candidateColors are the Okabe & Ito (2008) colours of the comparison
// figure's models, with a dash pattern each so that they also differ in
// grey print. Black is the observed spectrum's; sky blue shades masks.
var candidateColors = [...]struct {
	c    color.NRGBA
	dash []vg.Length
}{
	{color.NRGBA{213, 94, 0, 255}, nil},                                      // vermillion, solid
	{color.NRGBA{0, 114, 178, 255}, []vg.Length{vg.Points(5), vg.Points(2)}}, // blue, dashed
	{color.NRGBA{0, 158, 115, 255}, []vg.Length{vg.Points(1.5), vg.Points(1.5)}},
	{color.NRGBA{204, 121, 167, 255}, []vg.Length{vg.Points(6), vg.Points(2), vg.Points(1.5), vg.Points(2)}},
	{color.NRGBA{230, 159, 0, 255}, []vg.Length{vg.Points(3), vg.Points(3)}},
	{color.NRGBA{120, 120, 120, 255}, []vg.Length{vg.Points(8), vg.Points(3)}},
}

// candidateOf returns the session's current model as a candidate.
func candidateOf(s *Session, label string) Candidate {
	return Candidate{Label: label, Epoch: s.Epoch, PhotosphereVelocity: s.PhotosphereVelocity,
		Temperature: s.Temperature, MassFractions: s.MassFractions, Preview: s.Preview}
}

// session returns a copy of s showing candidate c.
func (c Candidate) session(s *Session) *Session {
	t := *s
	t.Candidates = nil
	t.Epoch, t.PhotosphereVelocity, t.Temperature, t.MassFractions, t.Preview =
		c.Epoch, c.PhotosphereVelocity, c.Temperature, c.MassFractions, c.Preview
	return &t
}

// nextLabel returns the first of "A", "B", … that no candidate has.
func nextLabel(cs []Candidate) string {
	for r := 'A'; r <= 'Z'; r++ {
		l := string(r)
		free := true
		for _, c := range cs {
			free = free && c.Label != l
		}
		if free {
			return l
		}
	}
	return fmt.Sprintf("model %d", len(cs)+1)
}

// comparison is the computed models of the candidates of one epoch.
type comparison struct {
	Epoch      int
	Candidates []Candidate
	Models     []*overlay
}

// compareCandidates synthesises every candidate of the session at epoch
// (in the order kept), calling progress after each. It stops when ctx is
// done.
func (b *bench) compareCandidates(ctx context.Context, s *Session, epoch int, progress func(done, total int)) (*comparison, error) {
	cmp := &comparison{Epoch: epoch}
	for _, c := range s.Candidates {
		if c.Epoch == epoch {
			cmp.Candidates = append(cmp.Candidates, c)
		}
	}
	if len(cmp.Candidates) == 0 {
		return nil, fmt.Errorf("no candidates kept for this epoch: keep the current model as a candidate first")
	}
	for i, c := range cmp.Candidates {
		ov, err := b.compute(ctx, c.session(s))
		if err != nil {
			return nil, fmt.Errorf("candidate %s: %w", c.Label, err)
		}
		cmp.Models = append(cmp.Models, ov)
		if progress != nil {
			progress(i+1, len(cmp.Candidates))
		}
	}
	return cmp, nil
}

// comparisonFigure is the figure of one epoch's observed spectrum with the
// candidates' models, and the caption lines that go under it: one per
// candidate with its parameters and composition, the dataset's label, and
// the model's cautions.
func (b *bench) comparisonFigure(cmp *comparison, u waveUnit) (*plot.Plot, []string, error) {
	sc := b.data.Scenario
	obs := b.data.Observed[cmp.Epoch]
	title := fmt.Sprintf("%s, %g d after explosion: candidate compositions", sc.Object, sc.Epochs[cmp.Epoch].Days)
	p, err := spectrumFigure(obs, nil, title, u)
	if err != nil {
		return nil, nil, err
	}
	var caption []string
	for i, c := range cmp.Candidates {
		ov := cmp.Models[i]
		st := candidateColors[i%len(candidateColors)]
		name := fmt.Sprintf("%s  (χ²/N = %.2f)", c.Label, ov.Chi2/float64(max(ov.N, 1)))
		if ov.Preview {
			name += ", preview"
		}
		if err := addStyledSegments(p, ov.Wavelength, ov.Flux, u, st.c, 1.4, st.dash, name); err != nil {
			return nil, nil, err
		}
		caption = append(caption, modelCaption(c.Label, c.session(&Session{})))
	}
	return p, append(caption, captionTail(sc)...), nil
}

// captionTail is the end of every exported figure's caption: the dataset's
// label (for the demo: that it is invented) and the model's cautions.
func captionTail(sc *synth.Scenario) []string {
	return []string{firstSentence(sc.Label),
		"Model: LTE, Sobolev approximation, sharp photosphere, incomplete atomic data. A matched feature is a hypothesis to be checked with full radiative transfer."}
}

// modelCaption is the caption line of one model in a figure.
func modelCaption(label string, s *Session) string {
	return fmt.Sprintf("%s: v_ph = %.3f c, T = %.0f K, mass fractions %s", label, s.PhotosphereVelocity, s.Temperature, compositionText(s.MassFractions))
}

// compositionText is a composition as the figure's caption gives it: the
// normalised mass fractions, largest first, to three significant digits.
func compositionText(fractions string) string {
	c, err := opacity.ParseComposition(fractions)
	if err != nil {
		return fractions
	}
	type el struct {
		sym string
		x   float64
	}
	var els []el
	for i, z := range c.Z {
		e, err := linelists.ElementByZ(z)
		if err != nil {
			return fractions
		}
		els = append(els, el{e.Symbol, c.MassFraction[i]})
	}
	for i := 1; i < len(els); i++ { // insertion sort: a handful of elements
		for j := i; j > 0 && els[j].x > els[j-1].x; j-- {
			els[j], els[j-1] = els[j-1], els[j]
		}
	}
	parts := make([]string, len(els))
	for i, e := range els {
		parts[i] = fmt.Sprintf("%s %.3g", e.sym, e.x)
	}
	return strings.Join(parts, ", ")
}

// exportFormats are the file types the figure export writes, by extension.
var exportFormats = map[string]string{".png": "png", ".svg": "svg", ".pdf": "pdf"}

// exportFigure writes p with the caption lines under it to path, as PNG, SVG
// or PDF by the path's extension, w × h in size (the caption takes its
// share of h). The file is written atomically: a failure leaves any
// earlier file at path as it was.
func exportFigure(p *plot.Plot, caption []string, path string, w, h vg.Length) error {
	format, ok := exportFormats[strings.ToLower(filepath.Ext(path))]
	if !ok {
		return fmt.Errorf("export figure: %s: unknown file type (use .png, .svg or .pdf)", path)
	}
	c, err := draw.NewFormattedCanvas(w, h, format)
	if err != nil {
		return fmt.Errorf("export figure: %w", err)
	}
	drawCaptioned(c, p, caption)
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return fmt.Errorf("export figure: %w", err)
	}
	if err := writeFileAtomic(path, buf.Bytes()); err != nil {
		return fmt.Errorf("export figure: %w", err)
	}
	return nil
}

// drawCaptioned draws p on cv with the caption lines under it, each wrapped
// at spaces to the canvas's width.
func drawCaptioned(cv vg.CanvasSizer, p *plot.Plot, caption []string) {
	dc := draw.New(cv)
	sty := p.Legend.TextStyle
	sty.Font.Size = vg.Points(8)
	sty.Color = color.Black
	margin := vg.Points(8)
	var lines []string
	for _, c := range caption {
		lines = append(lines, wrapText(c, dc.Max.X-dc.Min.X-2*margin, sty.Width)...)
	}
	line := sty.FontExtents().Height * 1.25
	capH := line*vg.Length(len(lines)) + vg.Points(6)
	p.Draw(draw.Crop(dc, 0, 0, capH, 0))
	for i, txt := range lines {
		dc.FillText(sty, vg.Point{X: dc.Min.X + margin, Y: dc.Min.Y + capH - line*vg.Length(i+1)}, txt)
	}
}

// wrapText splits s at spaces into lines no wider than w as measured by
// width (a word wider than w gets a line of its own).
func wrapText(s string, w vg.Length, width func(string) vg.Length) []string {
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

// renderCaptioned draws p with its caption into an image of w×h pixels at
// 96 dpi, for the screen.
func renderCaptioned(p *plot.Plot, caption []string, w, h int) image.Image {
	const dpi = 96
	c := vgimg.NewWith(vgimg.UseWH(vg.Length(w)*vg.Inch/dpi, vg.Length(h)*vg.Inch/dpi), vgimg.UseDPI(dpi))
	drawCaptioned(c, p, caption)
	return c.Image()
}
