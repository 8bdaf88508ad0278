package grid

import (
	"bytes"
	"errors"
	"testing"
)

// FuzzDecodeSpec: the decoder never panics, and a spec it accepts has a
// bounded size and a canonical form that decodes to the same grid.
func FuzzDecodeSpec(f *testing.F) {
	f.Add([]byte(exampleSpec))
	f.Add([]byte(`{"format":"broadline-grid/1","axes":[{"quantity":"epoch","values":[0,1]}]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := DecodeSpec(bytes.NewReader(data), "fuzz.json")
		if err != nil {
			if !errors.Is(err, ErrSpec) {
				t.Fatalf("error does not wrap ErrSpec: %v", err)
			}
			return
		}
		if s.Points() < 1 || s.Points() > MaxPoints {
			t.Fatalf("accepted %d points", s.Points())
		}
		again, err := DecodeSpec(bytes.NewReader(s.Canonical()), "canonical.json")
		if err != nil {
			t.Fatalf("canonical form refused: %v", err)
		}
		if again.SHA256() != s.SHA256() || again.Points() != s.Points() {
			t.Fatal("canonical form is another grid")
		}
		last := s.Point(s.Points() - 1)
		for i, v := range last.Values {
			vals := s.AxisValues(i)
			if v != vals[len(vals)-1] {
				t.Fatalf("last point axis %d = %v, want %v", i, v, vals[len(vals)-1])
			}
		}
	})
}

// FuzzReadPart: the part reader never panics, every error wraps ErrPart (or
// is a read error), and a part it accepts has the rows its header promises.
func FuzzReadPart(f *testing.F) {
	s := mustSpec(f, exampleSpec)
	opt := testOptions(2)
	opt.Wavelengths = []float64{4000, 5000}
	chi, spc, _ := writeBytes(f, s, Shard{1, 3}, &fake{epochs: 2, waves: opt.Wavelengths}, opt)
	f.Add(chi)
	f.Add(spc)
	f.Add(chi[:len(chi)/2])
	f.Fuzz(func(t *testing.T, data []byte) {
		info, err := ReadPart(bytes.NewReader(data), "fuzz.csv")
		if err != nil {
			if !errors.Is(err, ErrPart) {
				t.Fatalf("error does not wrap ErrPart: %v", err)
			}
			return
		}
		per := 1
		if info.Kind == KindSpectra {
			per = len(info.Epochs)
		}
		if want := info.Shard.Size(info.Spec.Points()) * per; info.Rows != want {
			t.Fatalf("accepted %d rows, the header promises %d", info.Rows, want)
		}
		if info.Failed > info.Rows {
			t.Fatalf("%d failed of %d rows", info.Failed, info.Rows)
		}
	})
}
