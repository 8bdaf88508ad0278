package spectra

import (
	"bufio"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"github.com/astrogo/fitsio"

	"broadline/physics"
)

// maxBands bounds the rows of a 2-D image read as bands of one spectrum;
// a larger 2-D image is a two-dimensional spectrum to be extracted first.
const maxBands = 16

// ReadFITS reads a spectrum from a FITS file (gzip- or bzip2-compressed
// files are decompressed first, at most opt.MaxBytes):
//
//   - a 1-D primary or image extension with a linear or log-linear
//     wavelength WCS, or with its wavelengths in an image extension named
//     WAVE, WAVELENGTH or LAMBDA;
//   - a 2-D image whose rows are bands (flux, raw flux, sky, σ, and
//     possibly the wavelength), labelled by BANDIDn cards or chosen with
//     opt.Band (flux row), opt.WaveColumn and opt.UncColumn (rows);
//   - a binary table with wavelength, flux and (optionally) uncertainty and
//     mask columns: one sample per row, or rows holding whole arrays (one
//     row, or several orders/segments: opt.Row, opt.MergeRows).
//
// The header-data unit is opt.HDU when opt.HDUSet, else the first one that
// holds a spectrum (extensions named for uncertainties, quality, sky or
// wavelengths are not candidates); when another HDU also holds one, the
// report says so. Images: the wavelength of pixel p (1-based) comes from
// CRVAL1, CDELT1 or CD1_1 (times PC1_1 if present), CRPIX1 (default 1):
// w = CDELT1·(p − CRPIX1); CTYPE1 "WAVE"/"AWAV" (or "LINEAR", or absent)
// gives λ = CRVAL1 + w, "WAVE-LOG"/"AWAV-LOG" gives λ = CRVAL1·exp(w/CRVAL1)
// (Greisen et al. 2006), and DC-FLAG = 1 gives λ = 10^(CRVAL1 + w). The
// medium is air for AWAV and vacuum otherwise unless opt.Medium says; the
// unit is CUNIT1, defaulting to Å (common practice; the standard's default
// is metres, which such files rarely mean). BSCALE/BZERO and BLANK are
// applied; an uncertainty comes from another image HDU of the same shape
// named ERR, ERROR, SIGMA, UNC, UNCERT, NOISE (σ), VAR/VARIANCE (σ²) or
// IVAR (1/σ²), and quality flags from one named DQ, QUAL, QUALITY, MASK,
// FLAGS, BPM or BADPIX (non-zero = bad unless opt.MaskGood).
//
// Tables: the columns are chosen by name as in ReadText (or by opt.*Column,
// a name or a 1-based number); TUNITn gives units, TSCALn/TZEROn and TNULLn
// are applied. Types L, B, I, J, K, E and D are read.
//
// Header values OBJECT, DATE-OBS (or DATE), EXPTIME (or EXPOSURE), AIRMASS,
// MJD-OBS and BUNIT fill the metadata; every card of the primary header and
// of the chosen HDU is kept in Meta.Extra. Meta.Read reports what was used
// and assumed.
//
// The input is read whole (at most opt.MaxBytes, default 1 GiB) and checked
// by a guard of ours before the fitsio library decodes it; see
// docs/spectra.md.
func ReadFITS(r io.Reader, opt ReadOptions) (*Spectrum, error) {
	if rs, ok := r.(io.ReadSeeker); ok {
		// Peek without buffering, so that a file keeps its size for the
		// bounded read.
		var head [4]byte
		pos, err := rs.Seek(0, io.SeekCurrent)
		if err == nil {
			n, _ := io.ReadFull(rs, head[:])
			if _, err := rs.Seek(pos, io.SeekStart); err == nil && compression(head[:n]) == "" {
				return readFITS(rs, "", opt)
			}
		}
	}
	br := bufio.NewReaderSize(r, maxTextLine)
	u, comp, err := unwrap(br, &opt)
	if err != nil {
		return nil, err
	}
	return readFITS(u, comp, opt)
}

func readFITS(r io.Reader, comp string, opt ReadOptions) (*Spectrum, error) {
	max := opt.maxBytes()
	data, err := readAllBounded(r, max)
	if err != nil {
		return nil, &ParseError{File: opt.Name, HDU: -1, Err: err}
	}
	if int64(len(data)) > max {
		return nil, &ParseError{File: opt.Name, HDU: -1, Err: causef(ErrTooLarge, "larger than %d bytes", max)}
	}
	return decodeFITS(data, comp, opt)
}

// hduRole classifies an extension by its EXTNAME: "" (a candidate
// spectrum), "unc", "quality", "wave" or "sky".
func hduRole(name string) string {
	switch {
	case isUncertaintyName(name):
		return "unc"
	}
	switch name {
	case "DQ", "QUAL", "QUALITY", "MASK", "FLAGS", "FLAG", "BPM", "BADPIX", "GOOD", "GOODPIX":
		return "quality"
	case "WAVE", "WAVELENGTH", "WAVELENGTHS", "LAMBDA", "AWAV", "WAVELEN":
		return "wave"
	case "SKY", "BKG", "BACKGROUND":
		return "sky"
	}
	return ""
}

// kind says what HDU i holds: "image" (1-D), "bands" (a 2-D image of a few
// rows), "table", or "".
func (fr *fitsReader) kind(i int) string {
	h := fr.hdus[i]
	switch h.xtension {
	case "", "IMAGE":
		if n, _ := imageLength(h); n > 1 {
			return "image"
		}
		if nb := bandCount(h); nb > 0 {
			return "bands"
		}
	case "BINTABLE":
		if h.axes[1] > 0 && len(h.cols) >= 2 {
			return "table"
		}
	}
	return ""
}

// bandCount returns the number of rows of an image whose first axis is the
// spectral one and whose other axes hold 2..maxBands rows; else 0.
func bandCount(h *fitsHDU) int64 {
	if len(h.axes) < 2 || h.axes[0] < 2 {
		return 0
	}
	nb := int64(1)
	for _, a := range h.axes[1:] {
		if a == 0 {
			return 0
		}
		nb *= a
		if nb > maxBands {
			return 0
		}
	}
	if nb < 2 {
		return 0
	}
	return nb
}

// describe says in a few words what HDU i is, for messages.
func (fr *fitsReader) describe(i int) string {
	h := fr.hdus[i]
	name := extname(fr.f.HDU(i))
	d := fmt.Sprintf("HDU %d", i)
	if name != "" {
		d += " (" + name + ")"
	}
	switch fr.kind(i) {
	case "image":
		n, _ := imageLength(h)
		return d + fmt.Sprintf(" holds a 1-D image of %d pixels", n)
	case "bands":
		return d + fmt.Sprintf(" holds a %d×%d image of bands", h.axes[0], bandCount(h))
	case "table":
		return d + fmt.Sprintf(" holds a table of %d rows", h.axes[1])
	}
	if len(h.axes) == 0 || h.dataLen == 0 {
		return d + " holds no data"
	}
	return d + fmt.Sprintf(" holds %s with axes %v", orPrimary(h.xtension), h.axes)
}

func (fr *fitsReader) read() (*Spectrum, error) {
	var cands []int
	for i := range fr.hdus {
		k := fr.kind(i)
		if k == "table" || k != "" && hduRole(extname(fr.f.HDU(i))) == "" {
			cands = append(cands, i)
		}
	}
	hint := func(except int) string {
		for _, c := range cands {
			if c != except {
				return fmt.Sprintf("; %s: use --hdu %d", fr.describe(c), c)
			}
		}
		return ""
	}
	idx := -1
	if fr.opt.HDUSet {
		if fr.opt.HDU < 0 || fr.opt.HDU >= len(fr.hdus) {
			return nil, fr.errf(-1, ErrColumns, "HDU %d chosen but the file has %d (0..%d)%s", fr.opt.HDU, len(fr.hdus), len(fr.hdus)-1, hint(-1))
		}
		idx = fr.opt.HDU
		if fr.kind(idx) == "" {
			return nil, fr.errf(idx, ErrUnsupported, "%s, not a 1-D spectrum%s", fr.describe(idx), hint(idx))
		}
	} else {
		if len(cands) == 0 {
			var what []string
			for i := range fr.hdus {
				what = append(what, fr.describe(i))
			}
			return nil, fr.errf(-1, ErrNoData, "no HDU holds a 1-D spectrum (an image with one axis longer than 1, a few bands, or a binary table): %s", clip(strings.Join(what, "; "), 400))
		}
		idx = cands[0]
		for _, c := range cands[1:] {
			fr.rep.warnf("read HDU %d; %s too (choose with --hdu %d)", idx, fr.describe(c), c)
		}
	}
	fr.rep.HDU = idx
	fr.rep.HDUName = extname(fr.f.HDU(idx))
	meta := fr.metadata(idx)
	var s *Spectrum
	var err error
	switch fr.kind(idx) {
	case "image", "bands":
		s, err = fr.image(idx, meta)
	default:
		s, err = fr.table(idx, meta)
	}
	if err != nil {
		if !fr.opt.HDUSet {
			if h := hint(idx); h != "" {
				return nil, fmt.Errorf("%w%s", err, h)
			}
		}
		return nil, err
	}
	return s, nil
}

// fitsData is what an HDU reader collected, before units and the mask
// convention are applied.
type fitsData struct {
	wave, flux, unc    []float64
	uncKind            int
	null               []bool    // null values (BLANK, TNULL): flagged
	flags              []float64 // the file's flag per sample, or nil
	flagSrc            string
	maskGood           bool
	waveUnit, fluxUnit string
	waveLog            bool
	med                physics.Medium
	medFrom            string
}

// imageAll decodes every pixel of image HDU i with BSCALE/BZERO/BLANK.
func (fr *fitsReader) imageAll(i int) ([]float64, []bool, error) {
	h := fr.hdus[i]
	img, ok := fr.f.HDU(i).(fitsio.Image)
	if !ok {
		return nil, nil, fr.errf(i, ErrUnsupported, "HDU %d is not an image", i)
	}
	hdr := img.Header()
	n := int64(1)
	for _, a := range h.axes {
		n *= a // the guard bounded the product by the file's size
	}
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

// wcs computes the wavelengths of the n pixels of image HDU idx from its
// header, along axis ax (1-based).
func (fr *fitsReader) wcs(idx, ax, n int) (wave []float64, med physics.Medium, desc string, err error) {
	hdr := fr.f.HDU(idx).Header()
	sfx := strconv.Itoa(ax)
	num := func(k string) (float64, bool, error) {
		v, ok, err := cardFloat(hdr, k)
		if err != nil {
			return 0, false, fr.errf(idx, ErrMalformed, "%v", err)
		}
		return v, ok, nil
	}
	crval, hasVal, err := num("CRVAL" + sfx)
	if err != nil {
		return nil, 0, "", err
	}
	if !hasVal {
		return nil, 0, "", fr.errf(idx, ErrUnsupported, "no CRVAL%s: the image has no wavelength axis (and no WAVE extension or wavelength band)", sfx)
	}
	crpix, ok, err := num("CRPIX" + sfx)
	if err != nil {
		return nil, 0, "", err
	}
	if !ok {
		crpix = 1
	}
	delta, ok, err := num("CD" + sfx + "_" + sfx)
	if err != nil {
		return nil, 0, "", err
	}
	if !ok {
		delta, ok, err = num("CDELT" + sfx)
		if err != nil {
			return nil, 0, "", err
		}
		if !ok {
			return nil, 0, "", fr.errf(idx, ErrUnsupported, "no CDELT%s or CD%s_%s: the image has no wavelength step", sfx, sfx, sfx)
		}
		if pc, ok, err := num("PC" + sfx + "_" + sfx); err != nil {
			return nil, 0, "", err
		} else if ok {
			delta *= pc
		}
	}
	if delta == 0 {
		return nil, 0, "", fr.errf(idx, ErrMalformed, "wavelength step is 0")
	}
	ctype := strings.ToUpper(cardText(hdr, "CTYPE"+sfx))
	med = physics.Vacuum
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
		return nil, 0, "", fr.errf(idx, ErrUnsupported, "CTYPE%s = %q (want WAVE, AWAV, WAVE-LOG, AWAV-LOG or LINEAR)", sfx, clip(ctype, 20))
	}
	if dc, ok, _ := cardFloat(hdr, "DC-FLAG"); ok && dc == 1 {
		if scheme == "log" {
			return nil, 0, "", fr.errf(idx, ErrMalformed, "both DC-FLAG = 1 and a -LOG CTYPE")
		}
		scheme = "log10"
	}
	wave = make([]float64, n)
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
	desc = fmt.Sprintf("WCS (CTYPE%s = %q, %s)", sfx, ctype, scheme)
	return wave, med, desc, nil
}

// bandRole classifies a BANDIDn label.
func bandRole(label string) int {
	l := strings.ToLower(strings.TrimSpace(label))
	pre := func(ps ...string) bool {
		for _, p := range ps {
			if strings.HasPrefix(l, p) {
				return true
			}
		}
		return false
	}
	switch {
	case pre("wave", "lambda", "wavelength", "awav"):
		return roleWave
	case pre("ivar", "inverse var", "invvar"):
		return roleIvar
	case pre("var"):
		return roleVar
	case pre("sigma", "err", "uncert", "noise", "stddev", "std"):
		return roleUnc
	case pre("mask", "qual", "dq", "flag"):
		return roleMask
	case pre("spectrum", "flux", "optimal", "spec", "calibrated", "object", "science"):
		return roleFlux
	}
	return roleNone // raw, sky, background, or unknown
}

func (fr *fitsReader) image(idx int, meta Metadata) (*Spectrum, error) {
	h := fr.hdus[idx]
	hdr := fr.f.HDU(idx).Header()
	all, null, err := fr.imageAll(idx)
	if err != nil {
		return nil, err
	}
	d := fitsData{uncKind: roleUnc, fluxUnit: cardText(hdr, "BUNIT"), med: physics.Vacuum, medFrom: "assumed"}
	rep := fr.rep
	ax := 1
	var n int
	bands := fr.kind(idx) == "bands"
	nb := 1
	var labels []string
	band := 0 // 0-based flux row
	waveBand, uncBand, maskBand := -1, -1, -1
	if !bands {
		rep.Format = "FITS image"
		for k, a := range h.axes {
			if a > 1 {
				ax = k + 1
			}
		}
		n = len(all)
		rep.Flux = fmt.Sprintf("HDU %d", idx)
	} else {
		rep.Format = "FITS multi-band image"
		n = int(h.axes[0])
		nb = int(bandCount(h))
		labels = make([]string, nb)
		hasLabels := false
		for k := range labels {
			labels[k] = cardText(hdr, "BANDID"+strconv.Itoa(k+1))
			hasLabels = hasLabels || labels[k] != ""
		}
		pickBand := func(choice, what string) (int, error) {
			if n, err := strconv.Atoi(choice); err == nil {
				if n < 1 || n > nb {
					return 0, fr.errf(idx, ErrColumns, "%s band %d out of range 1..%d", what, n, nb)
				}
				return n - 1, nil
			}
			for k, l := range labels {
				if l != "" && strings.HasPrefix(strings.ToLower(l), strings.ToLower(choice)) {
					return k, nil
				}
			}
			return 0, fr.errf(idx, ErrColumns, "no %s band labelled %q (bands: %s)", what, clip(choice, 40), clip(quoteList(labels), 300))
		}
		switch {
		case fr.opt.Band > 0:
			if fr.opt.Band > nb {
				return nil, fr.errf(idx, ErrColumns, "band %d chosen but the image has %d rows (1..%d)", fr.opt.Band, nb, nb)
			}
			band = fr.opt.Band - 1
		case fr.opt.FluxColumn != "":
			if band, err = pickBand(fr.opt.FluxColumn, "flux"); err != nil {
				return nil, err
			}
		case !hasLabels:
			return nil, fr.errf(idx, ErrAmbiguous, "HDU %d is a 2-D image of %d rows (bands) without BANDIDn labels: choose the flux row with --band N (1..%d), and rows holding wavelength or uncertainty with --wave-col and --unc-col", idx, nb, nb)
		default:
			band = -1
			for k, l := range labels {
				if bandRole(l) == roleFlux {
					band = k
					break
				}
			}
			if band < 0 {
				return nil, fr.errf(idx, ErrAmbiguous, "no band is labelled as the spectrum (BANDIDn: %s): choose the flux row with --band N", clip(quoteList(labels), 300))
			}
		}
		for k, l := range labels {
			if k == band {
				continue
			}
			switch bandRole(l) {
			case roleWave:
				if waveBand < 0 {
					waveBand = k
				}
			case roleUnc, roleVar, roleIvar:
				if uncBand < 0 {
					uncBand, d.uncKind = k, bandRole(l)
				}
			case roleMask:
				if maskBand < 0 {
					maskBand = k
				}
			}
		}
		if c := fr.opt.WaveColumn; c != "" {
			if waveBand, err = pickBand(c, "wavelength"); err != nil {
				return nil, err
			}
		}
		if c := fr.opt.UncColumn; c != "" {
			if strings.EqualFold(c, "none") {
				uncBand = -1
			} else {
				if uncBand, err = pickBand(c, "uncertainty"); err != nil {
					return nil, err
				}
				d.uncKind = bandRole(labels[uncBand])
				if d.uncKind != roleVar && d.uncKind != roleIvar {
					d.uncKind = roleUnc
				}
			}
		}
		rep.Band = band + 1
		rep.Flux = fmt.Sprintf("band %d", band+1) + bandLabel(labels[band])
	}
	row := func(vals []float64, b int) []float64 { return vals[b*n : (b+1)*n] }
	d.flux = append([]float64(nil), row(all, band)...)
	d.null = append([]bool(nil), row2(null, band, n)...)
	// Wavelengths: a band, a WAVE extension, or the WCS.
	siblings := fr.siblings(idx)
	switch {
	case waveBand >= 0:
		d.wave = append([]float64(nil), row(all, waveBand)...)
		rep.Wave = fmt.Sprintf("band %d", waveBand+1) + bandLabel(labels[waveBand])
		d.waveUnit = cardText(hdr, "CUNIT1")
	case siblings["wave"] >= 0:
		wi := siblings["wave"]
		w, wnull, err := fr.imageAll(wi)
		if err != nil {
			return nil, err
		}
		for k, b := range wnull[:n] {
			if b {
				return nil, fr.errf(wi, ErrOrder, "wavelength of pixel %d is a null value", k+1)
			}
		}
		d.wave = w[:n]
		rep.Wave = fmt.Sprintf("HDU %d (%s)", wi, extname(fr.f.HDU(wi)))
		wh := fr.f.HDU(wi).Header()
		d.waveUnit = cardText(wh, "BUNIT")
		if d.waveUnit == "" {
			d.waveUnit = cardText(wh, "CUNIT1")
		}
		if extname(fr.f.HDU(wi)) == "AWAV" {
			d.med, d.medFrom = physics.Air, "file"
		}
	default:
		w, med, desc, err := fr.wcs(idx, ax, n)
		if err != nil && bands {
			// The 4-band form may carry its wavelengths in an unlabelled row.
			for k := 0; k < nb && err != nil; k++ {
				if k != band && strictlyMonotonic(row(all, k)) && labels[k] == "" {
					w, med, desc, err = append([]float64(nil), row(all, k)...), physics.Vacuum, fmt.Sprintf("band %d (assumed: the only monotonic row)", k+1), nil
					rep.warnf("no wavelength WCS: took band %d, the first row whose values increase or decrease strictly, as the wavelengths (choose with --wave-col)", k+1)
				}
			}
		}
		if err != nil {
			return nil, err
		}
		d.wave, rep.Wave = w, desc
		d.waveUnit = cardText(hdr, "CUNIT"+strconv.Itoa(ax))
		d.med = med
		if strings.HasPrefix(strings.ToUpper(cardText(hdr, "CTYPE"+strconv.Itoa(ax))), "AWAV") {
			d.medFrom = "file"
		} else if cardText(hdr, "CTYPE"+strconv.Itoa(ax)) != "" {
			d.medFrom = "file"
		}
	}
	// Uncertainty: a band or a sibling HDU.
	if uncBand >= 0 {
		d.unc = append([]float64(nil), row(all, uncBand)...)
		for k, b := range row2(null, uncBand, n) {
			d.null[k] = d.null[k] || b
		}
		rep.Uncertainty = fmt.Sprintf("band %d", uncBand+1) + bandLabel(labels[uncBand])
	} else if !strings.EqualFold(fr.opt.UncColumn, "none") {
		if ui := fr.uncSibling(idx, siblings); ui >= 0 {
			u, unull, err := fr.imageAll(ui)
			if err != nil {
				return nil, err
			}
			b := 0
			if len(u) > n {
				b = band
			}
			d.unc = append([]float64(nil), row(u, b)...)
			for k, x := range row2(unull, b, n) {
				d.null[k] = d.null[k] || x
			}
			en := extname(fr.f.HDU(ui))
			switch en {
			case "VAR", "VARIANCE":
				d.uncKind = roleVar
			case "IVAR", "INVVAR":
				d.uncKind = roleIvar
			}
			rep.Uncertainty = fmt.Sprintf("HDU %d (%s)", ui, en)
			if bu := cardText(fr.f.HDU(ui).Header(), "BUNIT"); bu != "" && d.fluxUnit != "" && d.uncKind == roleUnc && !sameFluxUnit(bu, d.fluxUnit) {
				rep.warnf("the uncertainty HDU %d is in %q but the flux in %q: taken as in the flux's unit", ui, bu, d.fluxUnit)
			}
		}
	}
	// Quality: a band or a sibling HDU.
	if !fr.opt.IgnoreMask && !strings.EqualFold(fr.opt.MaskColumn, "none") {
		if maskBand >= 0 {
			d.flags = append([]float64(nil), row(all, maskBand)...)
			d.flagSrc = fmt.Sprintf("band %d", maskBand+1)
		} else if qi := siblings["quality"]; qi >= 0 {
			q, _, err := fr.imageAll(qi)
			if err != nil {
				return nil, err
			}
			b := 0
			if len(q) > n {
				b = band
			}
			d.flags = append([]float64(nil), row(q, b)...)
			d.flagSrc = extname(fr.f.HDU(qi))
			rep.Mask = fmt.Sprintf("HDU %d (%s)", qi, d.flagSrc)
			d.maskGood = fr.opt.MaskGood || isGoodMaskName(strings.ToLower(d.flagSrc))
		}
	} else if siblings["quality"] >= 0 || maskBand >= 0 {
		rep.Mask, rep.MaskConvention = "quality data present", "ignored"
	}
	if maskBand >= 0 && d.flags != nil {
		rep.Mask = d.flagSrc + bandLabel(labels[maskBand])
		d.maskGood = fr.opt.MaskGood
	}
	d.uncKind = orSigma(d.uncKind)
	if rep.Uncertainty != "" {
		rep.UncertaintyKind = uncKindName(d.uncKind)
	}
	return fr.finish(idx, meta, &d)
}

func row2(v []bool, b, n int) []bool { return v[b*n : (b+1)*n] }

func bandLabel(l string) string {
	if l == "" {
		return ""
	}
	return fmt.Sprintf(" (%s)", clip(l, 40))
}

func orSigma(k int) int {
	if k == roleVar || k == roleIvar {
		return k
	}
	return roleUnc
}

func sameFluxUnit(a, b string) bool {
	ua, sa, e1 := ParseFluxUnitScale(a)
	ub, sb, e2 := ParseFluxUnitScale(b)
	return e1 == nil && e2 == nil && ua == ub && math.Abs(sa/sb-1) < 1e-9
}

func strictlyMonotonic(v []float64) bool {
	if len(v) < 2 {
		return false
	}
	up := v[1] > v[0]
	for i := 1; i < len(v); i++ {
		if !(v[i] > 0) || (up && !(v[i] > v[i-1])) || (!up && !(v[i] < v[i-1])) {
			return false
		}
	}
	return v[0] > 0
}

// siblings finds the image HDUs of the same shape as idx (or 1-D of its
// spectral length) by role: "unc", "quality", "wave" (-1: none).
func (fr *fitsReader) siblings(idx int) map[string]int {
	out := map[string]int{"unc": -1, "quality": -1, "wave": -1, "sky": -1}
	h := fr.hdus[idx]
	n := h.axes[0]
	if m, ok := imageLength(h); ok {
		n = m
	}
	for i := range fr.hdus {
		k := fr.kind(i)
		if i == idx || (k != "image" && k != "bands") {
			continue
		}
		role := hduRole(extname(fr.f.HDU(i)))
		if role == "" || out[role] >= 0 {
			continue
		}
		m, ok := imageLength(fr.hdus[i])
		same := len(fr.hdus[i].axes) == len(h.axes)
		for a := range h.axes {
			same = same && a < len(fr.hdus[i].axes) && fr.hdus[i].axes[a] == h.axes[a]
		}
		if (ok && m == n) || same {
			out[role] = i
		}
	}
	return out
}

// uncSibling returns the uncertainty HDU: the one the user named (by
// EXTNAME or number) or the one found by name.
func (fr *fitsReader) uncSibling(idx int, sib map[string]int) int {
	c := fr.opt.UncColumn
	if c == "" {
		return sib["unc"]
	}
	for i := range fr.hdus {
		if i == idx {
			continue
		}
		if k := fr.kind(i); k != "image" && k != "bands" {
			continue
		}
		if strings.EqualFold(extname(fr.f.HDU(i)), c) || strconv.Itoa(i) == c {
			return i
		}
	}
	return -1
}

// finish applies units, medium, the mask convention and the epoch, and
// builds the spectrum.
func (fr *fitsReader) finish(idx int, meta Metadata, d *fitsData) (*Spectrum, error) {
	rep := fr.rep
	rep.WaveLog = d.waveLog
	factor, lg, err := resolveWave(d.waveUnit, &fr.opt, rep)
	if err != nil {
		return nil, &ParseError{File: fr.name, HDU: idx, Err: err}
	}
	fluxU, scale, err := resolveFlux(d.fluxUnit, &fr.opt, rep)
	if err != nil {
		return nil, &ParseError{File: fr.name, HDU: idx, Err: err}
	}
	if fluxU == FluxUnknown && len(rep.UnknownUnits) > 0 && rep.FluxUnitText != "" {
		meta.Extra["flux_unit_text"] = rep.FluxUnitText
	}
	m, set, err := fr.opt.medium()
	if err != nil {
		return nil, fr.errf(idx, ErrUnsupported, "%v", err)
	}
	med := d.med
	rep.MediumFrom = d.medFrom
	if set {
		med, rep.MediumFrom = m, "option"
	}
	rep.Medium = med.String()
	toAngstrom(d.wave, factor, lg)
	if med == physics.Air {
		physics.AirToVacuumAll(d.wave)
	}
	uncToSigma(d.unc, d.uncKind)
	scaleFlux(d.flux, d.unc, scale)
	meta.FluxUnit = fluxU
	meta.OriginalMedium = med
	if err := resolveEpoch(&meta, fr.mjd, &fr.opt, rep); err != nil {
		return nil, &ParseError{File: fr.name, HDU: idx, Err: err}
	}
	nw := len(d.wave)
	desc := nw > 1 && d.wave[0] > d.wave[nw-1]
	s, err := New(d.wave, d.flux, d.unc, meta)
	if err != nil {
		return nil, fr.errf(idx, ErrOrder, "%v", err)
	}
	at := func(i int) int {
		if desc {
			return nw - 1 - i
		}
		return i
	}
	nbad := 0
	for i, b := range d.null {
		if b {
			s.SetMask(at(i), MaskFile)
			rep.flag("null value", 0)
			nbad++
		}
	}
	if d.flags != nil {
		if rep.MaskConvention == "" {
			rep.MaskConvention = maskConventionName(d.maskGood)
		}
		nflag := 0
		for i, v := range d.flags {
			if maskBad(v, d.maskGood) {
				if s.Mask == nil || s.Mask[at(i)]&MaskFile == 0 {
					nbad++
				}
				s.SetMask(at(i), MaskFile)
				rep.flag(d.flagSrc, v)
				nflag++
			}
		}
		checkMaskShare(nflag, len(d.flags), d.maskGood, rep)
	}
	checkPlausible(s, rep)
	s.Meta.Read = rep
	what := strings.TrimPrefix(rep.Format, "FITS ")
	s.addHistory("read %d samples from %s (FITS %s, HDU %d; wavelengths in %s, %s; %d flagged by the file)",
		s.Len(), nameOr(fr.name), what, idx, rep.WaveUnit, med, nbad)
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
	rep := fr.rep
	rep.Format = "FITS binary table"
	t, ok := fr.f.HDU(idx).(*fitsio.Table)
	if !ok {
		return nil, fr.errf(idx, ErrUnsupported, "HDU %d is not a binary table", idx)
	}
	cols := t.Cols()
	if len(cols) != len(h.cols) {
		return nil, fr.errf(idx, ErrMalformed, "decoder found %d columns, guard %d", len(cols), len(h.cols))
	}
	names := make([]string, len(cols))
	units := make([]string, len(cols))
	for i, c := range cols {
		names[i] = c.Name
		units[i] = strings.TrimSpace(c.Unit)
		if strings.TrimSpace(c.Format) != strings.TrimSpace(h.cols[i].form) {
			return nil, fr.errf(idx, ErrMalformed, "column %d format read inconsistently", i+1)
		}
	}
	ch, err := chooseColumns(names, units, &fr.opt, rep)
	if err != nil {
		return nil, &ParseError{File: fr.name, HDU: idx, Err: err}
	}
	if ch.wave < 0 || ch.flux < 0 || ch.wave == ch.flux {
		return nil, fr.errf(idx, ErrColumns, "cannot tell the wavelength and flux columns apart among %s; choose them", clip(strings.Join(names, ", "), 300))
	}
	mk := func(i int) (tableColumn, error) {
		c := cols[i]
		tc := tableColumn{index: i, name: c.Name, unit: units[i], scale: 1, col: h.cols[i]}
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
			if i != ch.mask {
				return tc, fr.errf(idx, ErrUnsupported, "column %s is logical", clip(c.Name, 40))
			}
		case 'P', 'Q':
			return tc, fr.errf(idx, ErrUnsupported, "column %s holds variable-length arrays (TFORM %s), which are not read", clip(c.Name, 40), clip(tc.col.form, 20))
		default:
			return tc, fr.errf(idx, ErrUnsupported, "column %s has type %q (want B, I, J, K, E or D)", clip(c.Name, 40), tc.col.code)
		}
		return tc, nil
	}
	wc, err := mk(ch.wave)
	if err != nil {
		return nil, err
	}
	fc, err := mk(ch.flux)
	if err != nil {
		return nil, err
	}
	if wc.col.repeat != fc.col.repeat {
		return nil, fr.errf(idx, ErrColumns, "wavelength column holds %d values per row, flux %d", wc.col.repeat, fc.col.repeat)
	}
	nrows := h.axes[1]
	per := wc.col.repeat
	// Which rows: all, or the one chosen.
	r0, r1 := int64(0), nrows
	if fr.opt.Row > 0 {
		if int64(fr.opt.Row) > nrows {
			return nil, fr.errf(idx, ErrColumns, "row %d chosen but the table has %d rows (1..%d)", fr.opt.Row, nrows, nrows)
		}
		if per == 1 {
			return nil, fr.errf(idx, ErrColumns, "--row chooses one row of a table whose rows hold whole spectra; this table has one sample per row")
		}
		r0, r1 = int64(fr.opt.Row-1), int64(fr.opt.Row)
	}
	n, ok := mulBound(r1-r0, per, int64(len(fr.data)))
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
		for r := r0; r < r1; r++ {
			off := h.dataStart + r*rowLen + tc.col.offset
			k := (r - r0) * per
			dst := out[k : k+per]
			decodeValues(dst, fr.data[off:off+per*size], tc.col.code, tc.scale, tc.zero, tc.null, tmp)
			if bad != nil {
				for j, b := range tmp {
					if b {
						bad[k+int64(j)] = true
						tmp[j] = false
					}
				}
			}
		}
		return out
	}
	d := fitsData{uncKind: ch.uncKind, waveUnit: wc.unit, fluxUnit: fc.unit, waveLog: ch.waveLog, maskGood: ch.maskGood, med: physics.Vacuum, medFrom: "assumed"}
	if d.waveLog && strings.Contains(strings.ToLower(d.waveUnit), "log") {
		d.waveLog = false // the unit says so; ParseWaveScale reads it
	}
	d.null = make([]bool, n)
	d.wave = read(wc, d.null)
	for i, w := range d.wave {
		if d.null[i] && math.IsNaN(w) {
			return nil, fr.errf(idx, ErrOrder, "wavelength of sample %d is a null value", i)
		}
	}
	d.flux = read(fc, d.null)
	rep.Wave, rep.Flux = "column "+strconv.Quote(wc.name), "column "+strconv.Quote(fc.name)
	if ch.unc >= 0 {
		uc, err := mk(ch.unc)
		if err != nil {
			return nil, err
		}
		if uc.col.repeat != per {
			return nil, fr.errf(idx, ErrColumns, "uncertainty column holds %d values per row, flux %d", uc.col.repeat, per)
		}
		d.unc = read(uc, d.null)
		rep.Uncertainty, rep.UncertaintyKind = "column "+strconv.Quote(uc.name), uncKindName(ch.uncKind)
		if uc.unit != "" && fc.unit != "" && ch.uncKind == roleUnc && !sameFluxUnit(uc.unit, fc.unit) {
			rep.warnf("uncertainty column %q is in %q but the flux in %q: taken as in the flux's unit", uc.name, uc.unit, fc.unit)
		}
	}
	if ch.mask >= 0 {
		mc, err := mk(ch.mask)
		if err == nil && mc.col.repeat == per {
			d.flags = read(mc, nil)
			d.flagSrc = mc.name
			rep.Mask, rep.MaskConvention = "column "+strconv.Quote(mc.name), maskConventionName(ch.maskGood)
		} else {
			rep.warnf("mask column %q not read (type or length differs from the flux)", mc.name)
		}
	}
	wn := strings.ToLower(wc.name)
	if strings.HasPrefix(wn, "awav") || strings.Contains(wn, "air") {
		d.med, d.medFrom = physics.Air, "file"
	}
	// Several rows of arrays: orders or segments.
	if per > 1 {
		for r := r0; r < r1; r++ {
			rep.Rows = append(rep.Rows, int(r+1))
		}
	}
	if per > 1 && r1-r0 > 1 {
		follow := true
		var prev float64
		dir := 0
		for i, w := range d.wave {
			if i > 0 {
				s := 1
				if w < prev {
					s = -1
				}
				if w == prev || (dir != 0 && s != dir) {
					follow = false
					break
				}
				dir = s
			}
			prev = w
		}
		switch {
		case follow:
			rep.warnf("merged %d rows of arrays that follow each other in wavelength (choose one with --row N)", r1-r0)
		case fr.opt.MergeRows:
			if err := mergeSorted(&d); err != nil {
				return nil, fr.errf(idx, ErrOrder, "%v", err)
			}
			rep.warnf("merged %d rows of arrays (orders/segments) sorted by wavelength, overlaps included", r1-r0)
		default:
			return nil, fr.errf(idx, ErrAmbiguous, "the table has %d rows of arrays (orders or segments) that overlap in wavelength: choose one with --row N (1..%d) or merge them with --merge-rows", r1-r0, r1-r0)
		}
	}
	return fr.finish(idx, meta, &d)
}

// mergeSorted sorts all samples by wavelength; equal wavelengths are an
// error (they cannot both be placed).
func mergeSorted(d *fitsData) error {
	n := len(d.wave)
	idx := make([]int, n)
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return d.wave[idx[a]] < d.wave[idx[b]] })
	for k := 1; k < n; k++ {
		if d.wave[idx[k]] == d.wave[idx[k-1]] {
			return fmt.Errorf("two segments share the wavelength %v: choose one row with --row", d.wave[idx[k]])
		}
	}
	perm := func(v []float64) []float64 {
		if v == nil {
			return nil
		}
		out := make([]float64, n)
		for k, i := range idx {
			out[k] = v[i]
		}
		return out
	}
	d.wave, d.flux, d.unc, d.flags = perm(d.wave), perm(d.flux), perm(d.unc), perm(d.flags)
	nb := make([]bool, n)
	for k, i := range idx {
		nb[k] = d.null[i]
	}
	d.null = nb
	return nil
}
