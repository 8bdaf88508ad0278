package spectra

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/plot/plotter"
)

// Spectrum must satisfy gonum/plot's XYer without this package importing plot.
var _ plotter.XYer = (*Spectrum)(nil)

func TestPlotterAcceptsSpectrum(t *testing.T) {
	s, _ := New([]float64{1, 2, 3}, []float64{4, 5, 6}, nil, Metadata{})
	pts, err := plotter.CopyXYs(s)
	if err != nil || len(pts) != 3 || pts[2].X != 3 || pts[2].Y != 6 {
		t.Errorf("CopyXYs: %v %v", pts, err)
	}
}

// TestSmoothInputResolution: smoothing a spike to R0 = 2000 and then to
// R = 1000 with inputR = 2000 gives the width of smoothing it to 1000
// directly (Gaussian widths add in quadrature).
func TestSmoothInputResolution(t *testing.T) {
	w := LinearGrid(9000, 11000, 40001)
	f := make([]float64, len(w))
	f[20000] = 1
	s, _ := New(w, f, nil, Metadata{})
	a, err := s.Smooth(2000, 0)
	if err != nil {
		t.Fatal(err)
	}
	b, err := a.Smooth(1000, 2000)
	if err != nil {
		t.Fatal(err)
	}
	width := func(x *Spectrum) float64 {
		var m0, m2 float64
		for i, v := range x.Flux {
			d := x.Wavelength[i] - 10000
			m0 += v
			m2 += v * d * d
		}
		return math.Sqrt(m2 / m0)
	}
	if got, want := width(b), 10000/1000.0*fwhmToSigma; !scalar.EqualWithinRel(got, want, 0.01) {
		t.Errorf("σ after two steps %v Å, want %v", got, want)
	}
	if _, err := a.Smooth(3000, 2000); err == nil {
		t.Error("sharpening accepted")
	}
	if _, err := s.Smooth(-1, 0); err == nil {
		t.Error("negative R accepted")
	}
}
