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

	"broadline/physics"
)

// recoverFITSPanics is true except in the fuzz test's diagnostic mode
// (BROADLINE_FITS_PANICS=1), which lets a panic through to show its stack.
var recoverFITSPanics = true

// defaultMaxFITS bounds how many bytes ReadFITS reads (1 GiB).
const defaultMaxFITS = 1 << 30

// ReadFITS reads a spectrum from a FITS file: a 1-D primary or image
// extension with a linear or log-linear wavelength WCS, or a binary table
// with wavelength, flux and (optionally) uncertainty columns.
//
// The header-data unit is opt.HDU when opt.HDUSet, else the first one that
// holds a spectrum. Images: the wavelength of pixel p (1-based) comes from
// CRVAL1, CDELT1 or CD1_1 (times PC1_1 if present), CRPIX1 (default 1):
// w = CDELT1·(p − CRPIX1); CTYPE1 "WAVE"/"AWAV" (or "LINEAR", or absent)
// gives λ = CRVAL1 + w, "WAVE-LOG"/"AWAV-LOG" gives λ = CRVAL1·exp(w/CRVAL1)
// (Greisen et al. 2006), and DC-FLAG = 1 gives λ = 10^(CRVAL1 + w). The
// medium is air for AWAV and vacuum otherwise unless opt.Medium says; the
// unit is CUNIT1, defaulting to Å (common practice; the standard's default
// is metres, which such files rarely mean). BSCALE/BZERO and BLANK are
// applied; an uncertainty comes from another image HDU of the same length
// named ERR, ERROR, SIGMA, UNC, UNCERT, NOISE (σ), VAR/VARIANCE (σ²) or
// IVAR (1/σ²).
//
// Tables: the columns are chosen by name as in ReadText (or by opt.*Column,
// a name or a 1-based number); TUNITn gives units, TSCALn/TZEROn and TNULLn
// are applied. A table of one row whose columns hold whole arrays is read
// as one spectrum. Types L, B, I, J, K, E and D are read.
//
// Header values OBJECT, DATE-OBS (or DATE), EXPTIME (or EXPOSURE), AIRMASS
// and BUNIT fill the metadata; every card of the primary header and of the
// chosen HDU is kept in Meta.Extra.
//
// The input is read whole (at most opt.MaxBytes, default 1 GiB) and checked
// by a guard of ours before the fitsio library decodes it; see
// docs/spectra.md.
func ReadFITS(r io.Reader, opt ReadOptions) (*Spectrum, error) {
	max := opt.MaxBytes
	if max <= 0 {
		max = defaultMaxFITS
	}
	data, err := readAllBounded(r, max)
	if err != nil {
		return nil, &ParseError{File: opt.Name, HDU: -1, Err: err}
	}
	if int64(len(data)) > max {
		return nil, &ParseError{File: opt.Name, HDU: -1, Err: causef(ErrTooLarge, "larger than %d bytes", max)}
	}
	return decodeFITS(data, opt)
}

// decodeFITS is ReadFITS on bytes already in memory.
func decodeFITS(data []byte, opt ReadOptions) (s *Spectrum, err error) {
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
	fr := &fitsReader{opt: opt, name: name, data: buf, f: f, hdus: hdus}
	s, err = fr.read()
	if err != nil {
		return nil, err
	}
	if trailing > 0 {
		s.addHistory("ignored %d bytes after the last HDU", trailing)
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
}

func (fr *fitsReader) errf(hdu int, sentinel error, format string, args ...any) error {
	return &ParseError{File: fr.name, HDU: hdu, Err: causef(sentinel, format, args...)}
}

// spectrumHDU reports whether HDU i looks like a 1-D spectrum.
func (fr *fitsReader) kind(i int) string {
	h := fr.hdus[i]
	switch h.xtension {
	case "", "IMAGE":
		if n, _ := imageLength(h); n > 1 {
			return "image"
		}
	case "BINTABLE":
		if h.axes[1] > 0 && len(h.cols) >= 2 {
			return "table"
		}
	}
	return ""
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

func (fr *fitsReader) read() (*Spectrum, error) {
	idx := -1
	if fr.opt.HDUSet {
		if fr.opt.HDU < 0 || fr.opt.HDU >= len(fr.hdus) {
			return nil, fr.errf(-1, ErrColumns, "HDU %d chosen but the file has %d (0..%d)", fr.opt.HDU, len(fr.hdus), len(fr.hdus)-1)
		}
		idx = fr.opt.HDU
		if fr.kind(idx) == "" {
			return nil, fr.errf(idx, ErrUnsupported, "HDU %d holds no 1-D spectrum (%s, axes %v)", idx, orPrimary(fr.hdus[idx].xtension), fr.hdus[idx].axes)
		}
	} else {
		for i := range fr.hdus {
			if k := fr.kind(i); k == "image" && !isUncertaintyName(extname(fr.f.HDU(i))) || k == "table" {
				idx = i
				break
			}
		}
		if idx < 0 {
			return nil, fr.errf(-1, ErrNoData, "no HDU holds a 1-D spectrum (image with one axis longer than 1, or binary table)")
		}
	}
	meta := fr.metadata(idx)
	var s *Spectrum
	var err error
	if fr.kind(idx) == "image" {
		s, err = fr.image(idx, meta)
	} else {
		s, err = fr.table(idx, meta)
	}
	if err != nil {
		return nil, err
	}
	return s, nil
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

// imageValues decodes the pixels of image HDU i with BSCALE/BZERO/BLANK.
func (fr *fitsReader) imageValues(i int) ([]float64, []bool, error) {
	h := fr.hdus[i]
	img, ok := fr.f.HDU(i).(fitsio.Image)
	if !ok {
		return nil, nil, fr.errf(i, ErrUnsupported, "HDU %d is not an image", i)
	}
	hdr := img.Header()
	n, _ := imageLength(h)
	raw := img.Raw()
	size := int64(h.bitpix)
	if size < 0 {
		size = -size
	}
	if int64(len(raw)) != n*size/8 {
		return nil, nil, fr.errf(i, ErrMalformed, "image holds %d bytes, want %d", len(raw), n*size/8)
	}
	scale, ok, err := cardFloat(hdr, "BSCALE")
	if err != nil {
		return nil, nil, fr.errf(i, ErrMalformed, "%v", err)
	}
	if !ok {
		scale = 1
	}
	zero, _, err := cardFloat(hdr, "BZERO")
	if err != nil {
		return nil, nil, fr.errf(i, ErrMalformed, "%v", err)
	}
	var blank *int64
	if h.bitpix > 0 {
		if c := hdr.Get("BLANK"); c != nil {
			if b, ok := c.Value.(int); ok {
				v := int64(b)
				blank = &v
			}
		}
	}
	vals := make([]float64, n)
	bad := make([]bool, n)
	decodeValues(vals, raw, bitpixCode(h.bitpix), scale, zero, blank, bad)
	return vals, bad, nil
}

func (fr *fitsReader) image(idx int, meta Metadata) (*Spectrum, error) {
	flux, bad, err := fr.imageValues(idx)
	if err != nil {
		return nil, err
	}
	hdr := fr.f.HDU(idx).Header()
	n := len(flux)
	// The spectral axis is the one longer than 1.
	ax := 1
	for k, a := range fr.hdus[idx].axes {
		if a > 1 {
			ax = k + 1
		}
	}
	sfx := strconv.Itoa(ax)
	num := func(k string) (float64, bool, error) {
		v, ok, err := cardFloat(hdr, k+sfx)
		if err != nil {
			return 0, false, fr.errf(idx, ErrMalformed, "%v", err)
		}
		return v, ok, nil
	}
	crval, hasVal, err := num("CRVAL")
	if err != nil {
		return nil, err
	}
	if !hasVal {
		return nil, fr.errf(idx, ErrUnsupported, "no CRVAL%s: the image has no wavelength axis", sfx)
	}
	crpix, ok, err := num("CRPIX")
	if err != nil {
		return nil, err
	}
	if !ok {
		crpix = 1
	}
	delta, ok, err := cardFloat(hdr, "CD"+sfx+"_"+sfx)
	if err != nil {
		return nil, fr.errf(idx, ErrMalformed, "%v", err)
	}
	if !ok {
		delta, ok, err = num("CDELT")
		if err != nil {
			return nil, err
		}
		if !ok {
			return nil, fr.errf(idx, ErrUnsupported, "no CDELT%s or CD%s_%s: the image has no wavelength step", sfx, sfx, sfx)
		}
		if pc, ok, err := cardFloat(hdr, "PC"+sfx+"_"+sfx); err != nil {
			return nil, fr.errf(idx, ErrMalformed, "%v", err)
		} else if ok {
			delta *= pc
		}
	}
	if delta == 0 {
		return nil, fr.errf(idx, ErrMalformed, "wavelength step is 0")
	}
	ctype := strings.ToUpper(cardText(hdr, "CTYPE"+sfx))
	med := physics.Vacuum
	scheme := "linear"
	switch ctype {
	case "", "LINEAR", "WAVE", "WAVELENGTH", "LAMBDA":
	case "AWAV":
		med = physics.Air
	case "WAVE-LOG":
		scheme = "log"
	case "AWAV-LOG":
		med, scheme = physics.Air, "log"
	default:
		return nil, fr.errf(idx, ErrUnsupported, "CTYPE%s = %q (want WAVE, AWAV, WAVE-LOG, AWAV-LOG or LINEAR)", sfx, ctype)
	}
	if dc, ok, _ := cardFloat(hdr, "DC-FLAG"); ok && dc == 1 {
		if scheme == "log" {
			return nil, fr.errf(idx, ErrMalformed, "both DC-FLAG = 1 and a -LOG CTYPE")
		}
		scheme = "log10"
	}
	wave := make([]float64, n)
	for p := range wave {
		w := delta * (float64(p+1) - crpix)
		switch scheme {
		case "linear":
			wave[p] = crval + w
		case "log":
			wave[p] = crval * math.Exp(w/crval)
		default:
			wave[p] = math.Pow(10, crval+w)
		}
	}
	unitText := cardText(hdr, "CUNIT"+sfx)
	// Uncertainty from a sibling HDU.
	var unc []float64
	if !strings.EqualFold(fr.opt.UncColumn, "none") {
		for i := range fr.hdus {
			if i == idx || fr.kind(i) != "image" {
				continue
			}
			en := extname(fr.f.HDU(i))
			if fr.opt.UncColumn != "" {
				if !strings.EqualFold(en, fr.opt.UncColumn) && strconv.Itoa(i) != fr.opt.UncColumn {
					continue
				}
			} else if !isUncertaintyName(en) {
				continue
			}
			if m, _ := imageLength(fr.hdus[i]); m != int64(n) {
				continue
			}
			u, ubad, err := fr.imageValues(i)
			if err != nil {
				return nil, err
			}
			for k := range u {
				switch en {
				case "VAR", "VARIANCE":
					u[k] = math.Sqrt(u[k])
				case "IVAR", "INVVAR":
					u[k] = 1 / math.Sqrt(u[k])
				}
				if ubad[k] {
					bad[k] = true
				}
			}
			unc = u
			break
		}
	}
	return fr.finish(idx, meta, wave, flux, unc, bad, unitText, cardText(hdr, "BUNIT"), med, "image")
}

// finish converts units and medium and builds the spectrum.
func (fr *fitsReader) finish(idx int, meta Metadata, wave, flux, unc []float64, bad []bool, waveUnit, fluxUnit string, med physics.Medium, what string) (*Spectrum, error) {
	wu := waveUnit
	if fr.opt.WaveUnit != "" {
		wu = fr.opt.WaveUnit
	}
	unit := UnitAngstrom
	if wu != "" {
		u, err := ParseWaveUnit(wu)
		if err != nil {
			return nil, fr.errf(idx, ErrUnsupported, "%v", err)
		}
		unit = u
	}
	fu := fluxUnit
	if fr.opt.FluxUnit != "" {
		fu = fr.opt.FluxUnit
	}
	fluxU, err := ParseFluxUnit(fu)
	if err != nil {
		if fr.opt.FluxUnit != "" {
			return nil, fr.errf(idx, ErrUnsupported, "%v", err)
		}
		meta.Extra["flux_unit_text"] = fu
	}
	m, set, err := fr.opt.medium()
	if err != nil {
		return nil, fr.errf(idx, ErrUnsupported, "%v", err)
	}
	if set {
		med = m
	}
	f := unit.Factor()
	for i := range wave {
		wave[i] *= f
	}
	if med == physics.Air {
		physics.AirToVacuumAll(wave)
	}
	meta.FluxUnit = fluxU
	meta.OriginalMedium = med
	desc := len(wave) > 1 && wave[0] > wave[len(wave)-1]
	s, err := New(wave, flux, unc, meta)
	if err != nil {
		return nil, fr.errf(idx, ErrOrder, "%v", err)
	}
	nbad := 0
	for i, b := range bad {
		if b {
			j := i
			if desc {
				j = len(bad) - 1 - i
			}
			s.SetMask(j, MaskFile)
			nbad++
		}
	}
	s.addHistory("read %d samples from %s (FITS %s, HDU %d; wavelengths in %s, %s; %d flagged by the file)",
		s.Len(), nameOr(fr.name), what, idx, unit, med, nbad)
	return s, nil
}

// tableColumn describes a column chosen for reading.
type tableColumn struct {
	index       int
	name, unit  string
	scale, zero float64
	null        *int64
	col         fitsCol
}

func (fr *fitsReader) table(idx int, meta Metadata) (*Spectrum, error) {
	h := fr.hdus[idx]
	t, ok := fr.f.HDU(idx).(*fitsio.Table)
	if !ok {
		return nil, fr.errf(idx, ErrUnsupported, "HDU %d is not a binary table", idx)
	}
	cols := t.Cols()
	if len(cols) != len(h.cols) {
		return nil, fr.errf(idx, ErrMalformed, "decoder found %d columns, guard %d", len(cols), len(h.cols))
	}
	names := make([]string, len(cols))
	for i, c := range cols {
		names[i] = c.Name
		if strings.TrimSpace(c.Format) != strings.TrimSpace(h.cols[i].form) {
			return nil, fr.errf(idx, ErrMalformed, "column %d format read inconsistently", i+1)
		}
	}
	roles, units := classify(names)
	iw, ifl, iu, im := -1, -1, -1, -1
	uncRole := roleUnc
	for i, r := range roles {
		switch {
		case r == roleWave && iw < 0:
			iw = i
		case r == roleFlux && ifl < 0:
			ifl = i
		case (r == roleUnc || r == roleIvar) && iu < 0:
			iu, uncRole = i, r
		case r == roleMask && im < 0:
			im = i
		}
	}
	pick := func(choice, what string, dst *int) error {
		if choice == "" {
			return nil
		}
		if what == "uncertainty" && strings.EqualFold(choice, "none") {
			*dst = -1
			return nil
		}
		i, err := choose(names, len(names), choice, what)
		if err != nil {
			return &ParseError{File: fr.name, HDU: idx, Err: err}
		}
		*dst = i
		return nil
	}
	if err := pick(fr.opt.WaveColumn, "wavelength", &iw); err != nil {
		return nil, err
	}
	if err := pick(fr.opt.FluxColumn, "flux", &ifl); err != nil {
		return nil, err
	}
	if err := pick(fr.opt.UncColumn, "uncertainty", &iu); err != nil {
		return nil, err
	}
	if fr.opt.UncColumn != "" {
		uncRole = roleUnc
	}
	if iw < 0 || ifl < 0 || iw == ifl {
		return nil, fr.errf(idx, ErrColumns, "cannot tell the wavelength and flux columns apart among %s; choose them", strings.Join(names, ", "))
	}
	mk := func(i int) (tableColumn, error) {
		c := cols[i]
		tc := tableColumn{index: i, name: c.Name, unit: strings.TrimSpace(c.Unit), scale: 1, col: h.cols[i]}
		if tc.unit == "" {
			tc.unit = units[i]
		}
		hdr := t.Header()
		k := strconv.Itoa(i + 1)
		if v, ok, err := cardFloat(hdr, "TSCAL"+k); err != nil {
			return tc, fr.errf(idx, ErrMalformed, "%v", err)
		} else if ok {
			tc.scale = v
		}
		if v, _, err := cardFloat(hdr, "TZERO"+k); err != nil {
			return tc, fr.errf(idx, ErrMalformed, "%v", err)
		} else {
			tc.zero = v
		}
		if c := hdr.Get("TNULL" + k); c != nil {
			if v, ok := c.Value.(int); ok {
				x := int64(v)
				tc.null = &x
			}
		}
		switch tc.col.code {
		case 'B', 'I', 'J', 'K', 'E', 'D':
		case 'L':
			if i != im {
				return tc, fr.errf(idx, ErrUnsupported, "column %s is logical", c.Name)
			}
		default:
			return tc, fr.errf(idx, ErrUnsupported, "column %s has type %q (want B, I, J, K, E or D)", c.Name, tc.col.code)
		}
		return tc, nil
	}
	wc, err := mk(iw)
	if err != nil {
		return nil, err
	}
	fc, err := mk(ifl)
	if err != nil {
		return nil, err
	}
	if wc.col.repeat != fc.col.repeat {
		return nil, fr.errf(idx, ErrColumns, "wavelength column holds %d values per row, flux %d", wc.col.repeat, fc.col.repeat)
	}
	nrows := h.axes[1]
	per := wc.col.repeat
	n, ok := mulBound(nrows, per, int64(len(fr.data)))
	if !ok || n == 0 {
		return nil, fr.errf(idx, ErrNoData, "the table holds no samples")
	}
	read := func(tc tableColumn, bad []bool) []float64 {
		out := make([]float64, n)
		size := int64(1)
		if tc.col.repeat > 0 {
			size = tc.col.width / tc.col.repeat
		}
		rowLen := h.axes[0]
		if per == 1 {
			// One value per row: a single strided pass.
			decodeStrided(out, fr.data[h.dataStart+tc.col.offset:], int(rowLen), tc.col.code, tc.scale, tc.zero, tc.null, bad)
			return out
		}
		var tmp []bool
		if bad != nil {
			tmp = make([]bool, per)
		}
		for r := int64(0); r < nrows; r++ {
			off := h.dataStart + r*rowLen + tc.col.offset
			dst := out[r*per : (r+1)*per]
			decodeValues(dst, fr.data[off:off+per*size], tc.col.code, tc.scale, tc.zero, tc.null, tmp)
			if bad != nil {
				for k, b := range tmp {
					if b {
						bad[r*per+int64(k)] = true
						tmp[k] = false
					}
				}
			}
		}
		return out
	}
	bad := make([]bool, n)
	wave := read(wc, bad)
	flux := read(fc, bad)
	for i, w := range wave {
		if bad[i] && math.IsNaN(w) {
			return nil, fr.errf(idx, ErrOrder, "wavelength of sample %d is a null value", i)
		}
	}
	var unc []float64
	if iu >= 0 {
		uc, err := mk(iu)
		if err != nil {
			return nil, err
		}
		if uc.col.repeat != per {
			return nil, fr.errf(idx, ErrColumns, "uncertainty column holds %d values per row, flux %d", uc.col.repeat, per)
		}
		unc = read(uc, bad)
		if uncRole == roleIvar {
			for i, v := range unc {
				unc[i] = 1 / math.Sqrt(v)
			}
		}
	}
	if im >= 0 {
		mc, err := mk(im)
		if err == nil && mc.col.repeat == per {
			mv := read(mc, nil)
			for i, v := range mv {
				if v != 0 {
					bad[i] = true
				}
			}
		}
	}
	med := physics.Vacuum
	wn := strings.ToLower(wc.name)
	if strings.HasPrefix(wn, "awav") || strings.Contains(wn, "air") {
		med = physics.Air
	}
	return fr.finish(idx, meta, wave, flux, unc, bad, wc.unit, fc.unit, med, "binary table")
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
