package figure

import (
	"bytes"
	"image/png"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
)

// cornerSamples draws n samples of a correlated 3-D Gaussian (invented).
func cornerSamples(n int) [][]float64 {
	rng := rand.New(rand.NewPCG(1, 2))
	out := make([][]float64, n)
	for k := range out {
		a, b, c := rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()
		out[k] = []float64{-2 + 0.3*a, 0.2 + 0.01*(0.8*a+0.6*b), 5000 + 200*c}
	}
	return out
}

// TestCornerPanels: three parameters give six panels (the diagonal and the
// lower triangle), none above the diagonal, with the labels on the outer
// axes only.
func TestCornerPanels(t *testing.T) {
	names := []string{"log₁₀ X(Sr)", "v_ph / c", "T_ph / K"}
	f, err := Corner(names, cornerSamples(2000), CornerOptions{Truth: []float64{-2, 0.2, math.NaN()}})
	if err != nil {
		t.Fatal(err)
	}
	if f.Panels() != 6 {
		t.Errorf("%d panels, want 6", f.Panels())
	}
	for i := range 3 {
		for j := range 3 {
			if (f.Plots[i][j] == nil) != (j > i) {
				t.Errorf("panel (%d, %d) present = %v", i, j, f.Plots[i][j] != nil)
			}
		}
	}
	if f.Plots[2][0].X.Label.Text != names[0] || f.Plots[2][1].Y.Label.Text != "" || f.Plots[1][0].Y.Label.Text != names[1] {
		t.Error("axis labels not on the outer panels")
	}
	// The histogram's axis spans the samples: the median −2 lies inside.
	if p := f.Plots[0][0]; !(p.X.Min < -2 && p.X.Max > -2) {
		t.Errorf("histogram axis %v–%v", p.X.Min, p.X.Max)
	}
}

// TestCornerImage renders the figure and checks that it is drawn where
// expected: the top-right third (above the diagonal) stays white, the
// top-left panel (a histogram) and the bottom-left panel (a scatter) hold
// the samples' blue; and that PNG and SVG files are written.
func TestCornerImage(t *testing.T) {
	names := []string{"log₁₀ X(Nd)", "v_ph / c", "T_ph / K"}
	f, err := Corner(names, cornerSamples(2000), CornerOptions{Title: "invented"})
	if err != nil {
		t.Fatal(err)
	}
	img := f.Image(6*vg.Inch, 6*vg.Inch, 60).Image()
	b := img.Bounds()
	w, h := b.Dx(), b.Dy()
	blueIn := func(x0, y0, x1, y1 int) int {
		n := 0
		for y := y0; y < y1; y++ {
			for x := x0; x < x1; x++ {
				r, g, bl, _ := img.At(x, y).RGBA()
				if bl > r+0x2000 && bl > g {
					n++
				}
			}
		}
		return n
	}
	nonWhite := 0
	for y := 0; y < h/3-4; y++ {
		for x := 2*w/3 + 4; x < w; x++ {
			if r, g, bl, _ := img.At(x, y).RGBA(); r < 0xf000 || g < 0xf000 || bl < 0xf000 {
				nonWhite++
			}
		}
	}
	if nonWhite > 0 {
		t.Errorf("%d drawn pixels above the diagonal", nonWhite)
	}
	if n := blueIn(0, 0, w/3, h/3); n < 50 {
		t.Errorf("top-left histogram: %d blue pixels", n)
	}
	if n := blueIn(0, 2*h/3, w/3, h); n < 50 {
		t.Errorf("bottom-left scatter: %d blue pixels", n)
	}
	dir := t.TempDir()
	for _, name := range []string{"c.png", "c.svg", "c.pdf"} {
		p := filepath.Join(dir, name)
		if err := f.Save(4*vg.Inch, 4*vg.Inch, p); err != nil {
			t.Fatal(err)
		}
		raw, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		switch filepath.Ext(name) {
		case ".png":
			im, err := png.Decode(bytes.NewReader(raw))
			if err != nil || im.Bounds().Dx() != 600 {
				t.Errorf("PNG: %v, %v (want 600 px wide: 4 in at 150 dpi)", err, im.Bounds())
			}
		case ".svg":
			if !strings.Contains(string(raw), "<svg") {
				t.Error("SVG file without <svg")
			}
		case ".pdf":
			if !bytes.HasPrefix(raw, []byte("%PDF")) {
				t.Error("PDF file without its header")
			}
			// The parameter names, subscripts included, read back
			// from the PDF by poppler's pdftotext.
			txt, err := exec.Command(poppler(t, "pdftotext"), "-enc", "UTF-8", p, "-").Output()
			if err != nil {
				t.Fatalf("pdftotext: %v", err)
			}
			for _, n := range names {
				if !strings.Contains(string(txt), n) {
					t.Errorf("corner PDF text lacks %q:\n%s", n, txt)
				}
			}
		}
	}
	if err := f.Save(4*vg.Inch, 4*vg.Inch, filepath.Join(dir, "c.bmp")); err == nil {
		t.Error("unknown format accepted")
	}
}

// TestCornerErrors: bad samples are refused with an error.
func TestCornerErrors(t *testing.T) {
	for name, c := range map[string]struct {
		names []string
		s     [][]float64
		opt   CornerOptions
	}{
		"no parameters": {nil, [][]float64{{1}, {2}}, CornerOptions{}},
		"one sample":    {[]string{"a"}, [][]float64{{1}}, CornerOptions{}},
		"NaN":           {[]string{"a"}, [][]float64{{1}, {math.NaN()}}, CornerOptions{}},
		"short row":     {[]string{"a", "b"}, [][]float64{{1, 2}, {2}}, CornerOptions{}},
		"truth":         {[]string{"a"}, [][]float64{{1}, {2}}, CornerOptions{Truth: []float64{1, 2}}},
		"bins":          {[]string{"a"}, [][]float64{{1}, {2}}, CornerOptions{Bins: -1}},
	} {
		if _, err := Corner(c.names, c.s, c.opt); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	// A constant parameter still draws (its axis is widened).
	if _, err := Corner([]string{"a", "b"}, [][]float64{{1, 3}, {1, 4}, {1, 5}}, CornerOptions{}); err != nil {
		t.Errorf("constant parameter: %v", err)
	}
}
