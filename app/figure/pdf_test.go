package figure

import (
	"bytes"
	"fmt"
	"image/color"
	"image/png"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"

	"broadline/app/core"
)

// poppler returns the path of a poppler-utils program (pdftotext,
// pdftoppm); make test installs the package (scripts/deps.sh).
func poppler(t *testing.T, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		t.Fatalf("%s not found: install poppler-utils (make test does, through scripts/deps.sh)", name)
	}
	return p
}

// exportDemoPDF exports the demo's first epoch with a stand-in model, x in
// µm, and a caption holding the non-ASCII characters the figures use.
func exportDemoPDF(t *testing.T, dir string) string {
	t.Helper()
	b := demoBench(t)
	obs := b.Observed[0]
	ov := &core.Overlay{Wavelength: obs.Wavelength, Flux: obs.Flux}
	p, err := Spectrum(obs, ov, "demo epoch 1", core.UnitOf("um"))
	if err != nil {
		t.Fatal(err)
	}
	fig := &Captioned{Plot: p, Caption: []string{
		"model (χ²/N = 1.23), v_ph = 0.25 c, T_ph = 5000 K, κ in cm² g⁻¹, 8000 Å − 9000 Å.",
	}}
	path := filepath.Join(dir, "fig.pdf")
	if err := fig.Export(path, 7.2*vg.Inch, 4.5*vg.Inch); err != nil {
		t.Fatal(err)
	}
	return path
}

// TestPDFText: the text extracted from an exported PDF by poppler's
// pdftotext (an independent reader) is the text drawn, non-ASCII included:
// the x label's µm, the y label's Å and cm², the caption's χ²/N, ⁻¹ and −.
// gonum's vgpdf (WinAnsi, no Unicode map) turned these into "Ï‡Â²" and
// "Âµm".
func TestPDFText(t *testing.T) {
	path := exportDemoPDF(t, t.TempDir())
	out, err := exec.Command(poppler(t, "pdftotext"), "-enc", "UTF-8", path, "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	text := string(out)
	for _, want := range []string{"χ²/N = 1.23", "µm", "Å", "cm²", "g⁻¹", "8000 Å − 9000 Å", "demo epoch 1", "observed"} {
		if !strings.Contains(text, want) {
			t.Errorf("pdftotext output lacks %q:\n%s", want, text)
		}
	}
	for _, bad := range []string{"Ï", "Â"} {
		if strings.Contains(text, bad) {
			t.Errorf("pdftotext output holds mojibake %q", bad)
		}
	}
}

// TestPDFMaskColour: the translucent telluric bands keep their sky blue in
// PDF. The page is rasterised by poppler's pdftoppm and must hold pixels of
// the band colour over white: 86,180,233 at alpha 70/255 composited on
// 255 gives 209,234,249 (straight-alpha "over"; Porter & Duff 1984). The
// premultiplied colour that vgpdf passed would give a grey near 191,198,203.
func TestPDFMaskColour(t *testing.T) {
	dir := t.TempDir()
	path := exportDemoPDF(t, dir)
	if err := exec.Command(poppler(t, "pdftoppm"), "-png", "-r", "72", "-singlefile", path, filepath.Join(dir, "page")).Run(); err != nil {
		t.Fatalf("pdftoppm: %v", err)
	}
	data, err := os.ReadFile(filepath.Join(dir, "page.png"))
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	a := float64(Palette.Masked.A) / 255
	over := func(c uint8) float64 { return float64(c)*a + 255*(1-a) }
	want := [3]float64{over(Palette.Masked.R), over(Palette.Masked.G), over(Palette.Masked.B)}
	near, grey := 0, 0
	r := img.Bounds()
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			c := color.NRGBAModel.Convert(img.At(x, y)).(color.NRGBA)
			px := [3]float64{float64(c.R), float64(c.G), float64(c.B)}
			if max(abs(px[0]-want[0]), abs(px[1]-want[1]), abs(px[2]-want[2])) <= 6 {
				near++
			}
			if max(abs(px[0]-191), abs(px[1]-198), abs(px[2]-203)) <= 6 {
				grey++
			}
		}
	}
	if near < 500 {
		t.Errorf("%d pixels of the band colour %.0f (grey ones: %d)", near, want, grey)
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// TestStraightRGBA: a translucent colour reaches the PDF as its straight
// components (the NRGBA it was written as), not premultiplied.
func TestStraightRGBA(t *testing.T) {
	r, g, b, a := straightRGBA(Palette.Masked)
	if r != 86 || g != 180 || b != 233 || a < 0.27 || a > 0.28 {
		t.Errorf("straightRGBA(%v) = %d,%d,%d,%.3f", Palette.Masked, r, g, b, a)
	}
}

// TestExportSizes: a PNG at a journal size has the column's width in
// pixels at its resolution (3.5 in × 300 dpi = 1050 px; 7.2 in × 300 dpi =
// 2160 px) and the plot's height plus the caption's; a longer caption
// makes the file taller, not the plot shorter. SVG and PDF take the same
// size in points (72 per inch).
func TestExportSizes(t *testing.T) {
	b := demoBench(t)
	obs := b.Observed[0]
	p, err := Spectrum(obs, nil, "sizes", core.UnitOf(""))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	short := &Captioned{Plot: p, Caption: []string{"one line"}}
	long := &Captioned{Plot: p, Caption: []string{strings.Repeat("a longer caption of many words ", 20)}}
	for _, name := range []string{"one journal column (3.5 in, 300 dpi)", "two journal columns (7.2 in, 300 dpi)"} {
		s, ok := SizeNamed(name)
		if !ok {
			t.Fatalf("no size %q in %q", name, SizeNames())
		}
		var heights []int
		for i, fig := range []*Captioned{short, long} {
			path := filepath.Join(dir, fmt.Sprintf("f%d.png", i))
			if err := fig.ExportSize(path, s); err != nil {
				t.Fatal(err)
			}
			data, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			cfg, err := png.DecodeConfig(bytes.NewReader(data))
			if err != nil {
				t.Fatal(err)
			}
			if want := int(math.Round(float64(s.Width/vg.Inch) * float64(s.DPI))); cfg.Width != want {
				t.Errorf("%s: %d px wide, want %d", name, cfg.Width, want)
			}
			if min := int(float64(s.PlotHeight/vg.Inch) * float64(s.DPI)); cfg.Height <= min {
				t.Errorf("%s: %d px high, not more than the plot's %d", name, cfg.Height, min)
			}
			heights = append(heights, cfg.Height)
		}
		if heights[1] <= heights[0] {
			t.Errorf("%s: a longer caption gave heights %v", name, heights)
		}
		pdfPath := filepath.Join(dir, "f.pdf")
		if err := short.ExportSize(pdfPath, s); err != nil {
			t.Fatal(err)
		}
		out, err := exec.Command(poppler(t, "pdfinfo"), pdfPath).Output()
		if err != nil {
			t.Fatalf("pdfinfo: %v", err)
		}
		want := fmt.Sprintf("Page size: %g x ", math.Round(s.Width.Points()*100)/100)
		if !strings.Contains(strings.Join(strings.Fields(string(out)), " "), want) {
			t.Errorf("%s: pdfinfo says\n%s\nwant %q", name, out, want)
		}
	}
	if err := short.ExportSize(filepath.Join(dir, "x.png"), Size{Name: "none"}); err == nil {
		t.Error("a zero size was accepted")
	}
}
