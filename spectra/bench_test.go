package spectra

import (
	"bytes"
	"encoding/binary"
	"math"
	"strconv"
	"testing"
)

const benchN = 1_000_000

func benchText() []byte {
	var b bytes.Buffer
	b.WriteString("# invented spectrum for the benchmark\nwavelength,flux,uncertainty\n")
	var line []byte
	for i := 0; i < benchN; i++ {
		line = line[:0]
		line = strconv.AppendFloat(line, 3000+0.02*float64(i), 'f', 3, 64)
		line = append(line, ',')
		line = strconv.AppendFloat(line, 1e-17*(1+0.1*math.Sin(float64(i)/50)), 'e', 6, 64)
		line = append(line, ",1.0e-19\n"...)
		b.Write(line)
	}
	return b.Bytes()
}

// benchFITSImage builds a 1-D float32 primary image of benchN pixels with
// a linear WCS (our own cards; the format is checked against astropy in
// TestReadFITSAgainstAstropy).
func benchFITSImage() []byte {
	h := fitsHeader("SIMPLE = T", "BITPIX = -32", "NAXIS = 1", "NAXIS1 = "+strconv.Itoa(benchN),
		"CTYPE1 = 'WAVE'", "CUNIT1 = 'Angstrom'", "CRVAL1 = 3000.0", "CDELT1 = 0.02", "CRPIX1 = 1.0")
	data := make([]byte, 4*benchN)
	for i := 0; i < benchN; i++ {
		binary.BigEndian.PutUint32(data[4*i:], math.Float32bits(float32(1+0.1*math.Sin(float64(i)/50))))
	}
	return pad(append(h, data...))
}

// benchFITSTable builds a binary table of benchN rows: WAVE (D), FLUX (E),
// ERR (E).
func benchFITSTable() []byte {
	prim := fitsHeader("SIMPLE = T", "BITPIX = 8", "NAXIS = 0")
	h := fitsHeader("XTENSION = 'BINTABLE'", "BITPIX = 8", "NAXIS = 2", "NAXIS1 = 16",
		"NAXIS2 = "+strconv.Itoa(benchN), "PCOUNT = 0", "GCOUNT = 1", "TFIELDS = 3",
		"TTYPE1 = 'WAVE'", "TFORM1 = 'D'", "TUNIT1 = 'Angstrom'", "TTYPE2 = 'FLUX'", "TFORM2 = 'E'",
		"TTYPE3 = 'ERR'", "TFORM3 = 'E'")
	data := make([]byte, 16*benchN)
	for i := 0; i < benchN; i++ {
		binary.BigEndian.PutUint64(data[16*i:], math.Float64bits(3000+0.02*float64(i)))
		binary.BigEndian.PutUint32(data[16*i+8:], math.Float32bits(1))
		binary.BigEndian.PutUint32(data[16*i+12:], math.Float32bits(0.01))
	}
	return append(prim, pad(append(h, data...))...)
}

// BenchmarkReadText1M reads a 1-million-sample CSV spectrum (goal ≤ 1 s).
func BenchmarkReadText1M(b *testing.B) {
	data := benchText()
	b.SetBytes(int64(len(data)))
	b.ResetTimer()
	for b.Loop() {
		s, err := ReadText(bytes.NewReader(data), ReadOptions{})
		if err != nil || s.Len() != benchN {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(benchN)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
}

// BenchmarkReadFITSImage1M reads a 1-million-pixel float32 image (goal ≤ 0.2 s).
func BenchmarkReadFITSImage1M(b *testing.B) {
	data := benchFITSImage()
	b.SetBytes(int64(len(data)))
	b.ResetTimer()
	for b.Loop() {
		s, err := ReadFITS(bytes.NewReader(data), ReadOptions{})
		if err != nil || s.Len() != benchN {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(benchN)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
}

// BenchmarkReadFITSTable1M reads a 1-million-row binary table (goal ≤ 0.2 s).
func BenchmarkReadFITSTable1M(b *testing.B) {
	data := benchFITSTable()
	b.SetBytes(int64(len(data)))
	b.ResetTimer()
	for b.Loop() {
		s, err := ReadFITS(bytes.NewReader(data), ReadOptions{})
		if err != nil || s.Len() != benchN || s.Uncertainty == nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(benchN)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
}

// BenchmarkSmooth smooths 100 000 log-spaced samples (R ≈ 45 000) to R = 1000.
func BenchmarkSmooth(b *testing.B) {
	w := LogGrid(3000, 25000, 100000)
	f := make([]float64, len(w))
	for i := range f {
		f[i] = 1 + 0.1*math.Sin(float64(i)/50)
	}
	dst := make([]float64, len(w))
	for b.Loop() {
		SmoothFlux(dst, w, f, 1000, nil)
	}
	b.ReportMetric(float64(len(w))*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
}

// BenchmarkFindFeatures1M finds features in a 1-million-sample spectrum
// smoothed to R = 200 (pre-binned first).
func BenchmarkFindFeatures1M(b *testing.B) {
	w := LinearGrid(4000, 24000, benchN)
	f := make([]float64, benchN)
	u := make([]float64, benchN)
	for i, x := range w {
		z := (x - 12000) / 300
		f[i] = 1 - 0.3*math.Exp(-0.5*z*z) + 0.01*math.Sin(float64(i))
		u[i] = 0.01
	}
	s, _ := New(w, f, u, Metadata{FluxUnit: FluxNormalized})
	for b.Loop() {
		fs, err := FindFeatures(s, FeatureOptions{ResolvingPower: 200})
		if err != nil || len(fs) == 0 {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(benchN)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
}
