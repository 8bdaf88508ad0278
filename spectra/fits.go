package spectra

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"math/big"
	"os"
	"strconv"
	"strings"

	"github.com/astrogo/fitsio"
)

// recoverFITSPanics is true except in the fuzz test's diagnostic mode
// (BROADLINE_FITS_PANICS=1), which lets a panic through to show its stack.
var recoverFITSPanics = true

// defaultMaxFITS bounds how many bytes ReadFITS reads (1 GiB).
const defaultMaxFITS = 1 << 30

// decodeFITS is ReadFITS on bytes already in memory.
func decodeFITS(data []byte, comp string, opt ReadOptions) (s *Spectrum, err error) {
	name := opt.Name
	hdus, trailing, err := scanFITS(data, name)
	if err != nil {
		return nil, err
	}
	last := hdus[len(hdus)-1]
	buf := data[:min(last.end, int64(len(data)))]
	if last.paddedTail {
		// The file stops inside the last HDU's padding: complete it.
		buf = append(append(make([]byte, 0, last.end), buf...), make([]byte, last.end-int64(len(buf)))...)
	}
	// The boundary: nothing from the library escapes as a panic.
	defer func() {
		if !recoverFITSPanics {
			return
		}
		if p := recover(); p != nil {
			s = nil
			err = &ParseError{File: name, HDU: -1, Err: causef(ErrMalformed, "FITS decoder failed: %v", p)}
		}
	}()
	f, err := fitsio.Open(bytes.NewReader(buf))
	if err != nil {
		return nil, &ParseError{File: name, HDU: -1, Err: causef(ErrMalformed, "%v", err)}
	}
	defer f.Close()
	if len(f.HDUs()) != len(hdus) {
		return nil, &ParseError{File: name, HDU: -1, Err: causef(ErrMalformed, "decoder found %d HDUs, guard %d", len(f.HDUs()), len(hdus))}
	}
	for i, h := range hdus {
		if f.HDU(i).Header().Bitpix() != h.bitpix || len(f.HDU(i).Header().Axes()) != len(h.axes) {
			return nil, &ParseError{File: name, HDU: i, Err: causef(ErrMalformed, "header read inconsistently")}
		}
		for k, a := range f.HDU(i).Header().Axes() {
			if int64(a) != h.axes[k] {
				return nil, &ParseError{File: name, HDU: i, Err: causef(ErrMalformed, "NAXIS%d read inconsistently", k+1)}
			}
		}
	}
	fr := &fitsReader{opt: opt, name: name, data: buf, f: f, hdus: hdus, rep: newReport("FITS")}
	fr.rep.Compression = comp
	s, err = fr.read()
	if err != nil {
		return nil, err
	}
	if trailing > 0 {
		s.addHistory("ignored %d bytes after the last HDU", trailing)
		fr.rep.warnf("%d bytes after the last HDU were ignored", trailing)
	}
	if last.paddedTail {
		s.addHistory("the file was not padded to a whole 2880-byte block")
	}
	return s, nil
}

type fitsReader struct {
	opt  ReadOptions
	name string
	data []byte
	f    *fitsio.File
	hdus []*fitsHDU
	rep  *ReadReport
	mjd  float64
}

func (fr *fitsReader) errf(hdu int, sentinel error, format string, args ...any) error {
	return &ParseError{File: fr.name, HDU: hdu, Err: causef(sentinel, format, args...)}
}

// imageLength returns the number of pixels of a 1-D image (an N×1×… image
// counts as 1-D).
func imageLength(h *fitsHDU) (int64, bool) {
	var n int64 = 1
	big := 0
	for _, a := range h.axes {
		if a > 1 {
			big++
			n = a
		}
		if a == 0 {
			return 0, false
		}
	}
	if len(h.axes) == 0 || big > 1 {
		return 0, false
	}
	return n, true
}

func orPrimary(x string) string {
	if x == "" {
		return "primary"
	}
	return x
}

func extname(h fitsio.HDU) string {
	if c := h.Header().Get("EXTNAME"); c != nil {
		if s, ok := c.Value.(string); ok {
			return strings.ToUpper(strings.TrimSpace(s))
		}
	}
	return ""
}

func isUncertaintyName(n string) bool {
	switch n {
	case "ERR", "ERROR", "ERRS", "ERRORS", "SIGMA", "UNC", "UNCERT", "UNCERTAINTY", "NOISE", "VAR", "VARIANCE", "IVAR", "INVVAR":
		return true
	}
	return false
}

// cardString formats a card value as text.
func cardString(v fitsio.Value) string {
	switch x := v.(type) {
	case nil:
		return ""
	case string:
		return x
	case bool:
		if x {
			return "T"
		}
		return "F"
	case int:
		return strconv.Itoa(x)
	case float64:
		return strconv.FormatFloat(x, 'g', -1, 64)
	case big.Int:
		return x.String()
	case *big.Int:
		return x.String()
	}
	return fmt.Sprint(v)
}

// cardFloat returns a numeric card value.
func cardFloat(h *fitsio.Header, key string) (float64, bool, error) {
	c := h.Get(key)
	if c == nil || c.Value == nil {
		return 0, false, nil
	}
	switch x := c.Value.(type) {
	case int:
		return float64(x), true, nil
	case float64:
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return 0, false, fmt.Errorf("keyword %s = %v is not finite", key, x)
		}
		return x, true, nil
	}
	return 0, false, fmt.Errorf("keyword %s = %v is not a number", key, c.Value)
}

func cardText(h *fitsio.Header, key string) string {
	if c := h.Get(key); c != nil {
		if s, ok := c.Value.(string); ok {
			return strings.TrimSpace(s)
		}
	}
	return ""
}

func (fr *fitsReader) metadata(idx int) Metadata {
	m := Metadata{Source: fr.name, Extra: map[string]string{}}
	for _, i := range []int{0, idx} {
		h := fr.f.HDU(i).Header()
		for _, k := range h.Keys() {
			if k == "" || k == "COMMENT" || k == "HISTORY" || k == "END" {
				continue
			}
			if c := h.Get(k); c != nil {
				m.Extra[k] = cardString(c.Value)
			}
		}
		if v := cardText(h, "OBJECT"); v != "" {
			m.Object = v
		}
		for _, k := range []string{"DATE-OBS", "DATE_OBS"} {
			if v := cardText(h, k); v != "" {
				m.Date = v
				break
			}
		}
		for _, k := range []string{"EXPTIME", "EXPOSURE"} {
			if v, ok, _ := cardFloat(h, k); ok {
				m.Exposure = v
				break
			}
		}
		if v, ok, _ := cardFloat(h, "AIRMASS"); ok {
			m.Airmass = v
		}
		for _, k := range []string{"MJD-OBS", "MJD_OBS", "MJD"} {
			if v, ok, _ := cardFloat(h, k); ok && v > 0 {
				fr.mjd = v
				break
			}
		}
	}
	return m
}

// decodeValues converts n big-endian values of the given FITS type code
// from b, applying scale and zero, into dst. blank (for integers) marks
// values equal to it as invalid in bad.
func decodeValues(dst []float64, b []byte, code byte, scale, zero float64, blank *int64, bad []bool) {
	n := len(dst)
	be := binary.BigEndian
	set := func(i int, raw int64) {
		if blank != nil && raw == *blank {
			dst[i] = math.NaN()
			bad[i] = true
			return
		}
		dst[i] = zero + scale*float64(raw)
	}
	switch code {
	case 'B':
		for i := 0; i < n; i++ {
			set(i, int64(b[i]))
		}
	case 'L':
		for i := 0; i < n; i++ {
			if b[i] == 'T' {
				dst[i] = 1
			} else {
				dst[i] = 0
			}
		}
	case 'I':
		for i := 0; i < n; i++ {
			set(i, int64(int16(be.Uint16(b[2*i:]))))
		}
	case 'J':
		for i := 0; i < n; i++ {
			set(i, int64(int32(be.Uint32(b[4*i:]))))
		}
	case 'K':
		for i := 0; i < n; i++ {
			set(i, int64(be.Uint64(b[8*i:])))
		}
	case 'E':
		if scale == 1 && zero == 0 {
			for i := 0; i < n; i++ {
				dst[i] = float64(math.Float32frombits(be.Uint32(b[4*i:])))
			}
			return
		}
		for i := 0; i < n; i++ {
			dst[i] = zero + scale*float64(math.Float32frombits(be.Uint32(b[4*i:])))
		}
	case 'D':
		for i := 0; i < n; i++ {
			dst[i] = zero + scale*math.Float64frombits(be.Uint64(b[8*i:]))
		}
	}
}

func bitpixCode(bp int) byte {
	switch bp {
	case 8:
		return 'B'
	case 16:
		return 'I'
	case 32:
		return 'J'
	case 64:
		return 'K'
	case -32:
		return 'E'
	}
	return 'D'
}

// decodeStrided decodes len(dst) values of type code, one every stride
// bytes from the start of b, as decodeValues does for contiguous values.
func decodeStrided(dst []float64, b []byte, stride int, code byte, scale, zero float64, blank *int64, bad []bool) {
	be := binary.BigEndian
	set := func(i int, raw int64) {
		if blank != nil && raw == *blank {
			dst[i] = math.NaN()
			if bad != nil {
				bad[i] = true
			}
			return
		}
		dst[i] = zero + scale*float64(raw)
	}
	for i := range dst {
		p := b[i*stride:]
		switch code {
		case 'B':
			set(i, int64(p[0]))
		case 'L':
			if p[0] == 'T' {
				dst[i] = 1
			} else {
				dst[i] = 0
			}
		case 'I':
			set(i, int64(int16(be.Uint16(p))))
		case 'J':
			set(i, int64(int32(be.Uint32(p))))
		case 'K':
			set(i, int64(be.Uint64(p)))
		case 'E':
			dst[i] = zero + scale*float64(math.Float32frombits(be.Uint32(p)))
		case 'D':
			dst[i] = zero + scale*math.Float64frombits(be.Uint64(p))
		}
	}
}

// readAllBounded reads r to the end, at most max+1 bytes. When r can tell
// its size (a file, a bytes.Reader) the buffer is allocated once.
func readAllBounded(r io.Reader, max int64) ([]byte, error) {
	var size int64 = -1
	switch v := r.(type) {
	case interface{ Stat() (os.FileInfo, error) }:
		if fi, err := v.Stat(); err == nil && fi.Mode().IsRegular() {
			size = fi.Size()
			if sk, ok := r.(io.Seeker); ok {
				if pos, err := sk.Seek(0, io.SeekCurrent); err == nil {
					size -= pos
				}
			}
		}
	case interface{ Len() int }:
		size = int64(v.Len())
	}
	if size < 0 || size > max {
		return io.ReadAll(io.LimitReader(r, max+1))
	}
	buf := make([]byte, size+1)
	n, err := io.ReadFull(r, buf)
	if err == io.ErrUnexpectedEOF || err == io.EOF {
		return buf[:n], nil
	}
	if err != nil {
		return nil, err
	}
	// The input grew past its stated size: read the rest normally.
	rest, err := io.ReadAll(io.LimitReader(r, max+1-int64(n)))
	return append(buf[:n], rest...), err
}
