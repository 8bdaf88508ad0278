package spectra

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// The FITS guard. github.com/astrogo/fitsio trusts the sizes in a header:
// it allocates NAXISn products and TFIELDS slices before reading, and it
// type-asserts card values without checking. Before handing a file to it,
// scanFITS walks every header with a small card scanner of our own, checks
// the structural keywords (BITPIX, NAXIS, NAXISn, PCOUNT, GCOUNT, TFIELDS,
// TFORMn, THEAP) for type, range and uniqueness, computes each HDU's data
// size with overflow checks and requires it to fit in the bytes actually
// present. Only the HDUs that pass are given to fitsio, and any panic inside
// fitsio is turned into an error (see ReadFITS).

const (
	fitsBlock = 2880
	fitsCard  = 80
	maxNAXIS  = 999 // FITS standard limit
	maxFields = 999 // FITS standard limit on TFIELDS
)

// fitsHDU is what the guard learned about one header-data unit.
type fitsHDU struct {
	index      int
	start      int64 // byte offset of the header
	dataStart  int64 // byte offset of the data
	dataLen    int64 // bytes of data (without padding)
	end        int64 // offset just past the padded data
	xtension   string
	bitpix     int
	axes       []int64
	pcount     int64
	cols       []fitsCol // binary tables only
	cards      map[string]string
	order      []string // keys in order of appearance (first occurrence)
	paddedTail bool     // the file ended inside this HDU's padding
}

// fitsCol is a binary-table column as laid out in a row.
type fitsCol struct {
	form   string // TFORMn as written
	code   byte   // L X B I J K A E D C M P Q
	repeat int64
	offset int64 // within the row
	width  int64 // bytes
}

// guardErr builds a *ParseError for the guard.
func guardErr(name string, hdu int, off int64, sentinel error, format string, args ...any) error {
	return &ParseError{File: name, HDU: hdu, Offset: off, Err: causef(sentinel, format, args...)}
}

// cardValue returns the value field of a card (columns 11–80) as a string:
// quoted strings are unquoted (” → '), other values are trimmed up to a
// comment slash.
func cardValue(card []byte) (string, bool) {
	if len(card) < 10 || card[8] != '=' || card[9] != ' ' {
		return "", false
	}
	v := card[10:]
	i := 0
	for i < len(v) && v[i] == ' ' {
		i++
	}
	if i < len(v) && v[i] == '\'' {
		var b strings.Builder
		for j := i + 1; j < len(v); j++ {
			if v[j] == '\'' {
				if j+1 < len(v) && v[j+1] == '\'' {
					b.WriteByte('\'')
					j++
					continue
				}
				return strings.TrimRight(b.String(), " "), true
			}
			b.WriteByte(v[j])
		}
		return "", false // unterminated string
	}
	s := string(v[i:])
	if k := strings.IndexByte(s, '/'); k >= 0 {
		s = s[:k]
	}
	return strings.TrimSpace(s), true
}

// strictInt parses a FITS integer value: optional sign and digits only.
func strictInt(s string) (int64, bool) {
	if s == "" {
		return 0, false
	}
	t := s
	if t[0] == '+' || t[0] == '-' {
		t = t[1:]
	}
	if t == "" {
		return 0, false
	}
	for i := 0; i < len(t); i++ {
		if t[i] < '0' || t[i] > '9' {
			return 0, false
		}
	}
	n, err := strconv.ParseInt(s, 10, 64)
	return n, err == nil
}

// mulBound returns a·b, or ok=false if it exceeds limit (a, b, limit ≥ 0).
func mulBound(a, b, limit int64) (int64, bool) {
	if a == 0 || b == 0 {
		return 0, true
	}
	if a > limit/b {
		return 0, false
	}
	return a * b, true
}

// scanFITS checks data and returns its HDUs. Bytes after the last complete
// HDU that do not start another extension are reported in trailing.
func scanFITS(data []byte, name string) (hdus []*fitsHDU, trailing int64, err error) {
	size := int64(len(data))
	if size < fitsBlock {
		if size == 0 {
			return nil, 0, &ParseError{File: name, HDU: 0, Err: causef(ErrNoData, "empty file")}
		}
		if size >= 9 && string(data[:9]) == "SIMPLE  =" {
			return nil, 0, &ParseError{File: name, HDU: 0, Err: fmt.Errorf("header shorter than one 2880-byte block: %w", io.ErrUnexpectedEOF)}
		}
		return nil, 0, guardErr(name, 0, 0, ErrMalformed, "not a FITS file (shorter than one 2880-byte block)")
	}
	if string(data[:9]) != "SIMPLE  =" {
		return nil, 0, guardErr(name, 0, 0, ErrMalformed, "not a FITS file (does not start with SIMPLE)")
	}
	pos := int64(0)
	for idx := 0; pos < size; idx++ {
		if idx > 0 {
			head := string(data[pos:min(pos+9, size)])
			if !strings.HasPrefix("XTENSION=", head) && !strings.HasPrefix(head, "XTENSION=") {
				return hdus, size - pos, nil
			}
		}
		h, err := scanHDU(data, pos, idx, name)
		if err != nil {
			return nil, 0, err
		}
		hdus = append(hdus, h)
		pos = h.end
	}
	return hdus, 0, nil
}

func scanHDU(data []byte, start int64, idx int, name string) (*fitsHDU, error) {
	size := int64(len(data))
	h := &fitsHDU{index: idx, start: start, cards: map[string]string{}}
	seen := map[string]bool{}
	structural := func(k string) bool {
		switch k {
		case "SIMPLE", "XTENSION", "BITPIX", "NAXIS", "PCOUNT", "GCOUNT", "TFIELDS", "THEAP", "GROUPS":
			return true
		}
		return strings.HasPrefix(k, "NAXIS") || strings.HasPrefix(k, "TFORM")
	}
	pos := start
	ended := false
	for !ended {
		if pos+fitsBlock > size {
			return nil, &ParseError{File: name, HDU: idx, Offset: pos, Err: fmt.Errorf("header has no END card before the end of the file: %w", io.ErrUnexpectedEOF)}
		}
		for c := int64(0); c < fitsBlock/fitsCard; c++ {
			card := data[pos+c*fitsCard : pos+(c+1)*fitsCard]
			key := strings.TrimRight(string(card[:8]), " ")
			if key == "END" {
				ended = true
				break
			}
			v, ok := cardValue(card)
			if !ok {
				if structural(key) {
					return nil, guardErr(name, idx, pos+c*fitsCard, ErrMalformed, "keyword %s has no valid value", key)
				}
				continue
			}
			if structural(key) {
				if seen[key] {
					return nil, guardErr(name, idx, pos+c*fitsCard, ErrMalformed, "keyword %s appears twice", key)
				}
				seen[key] = true
			}
			if _, dup := h.cards[key]; !dup {
				h.order = append(h.order, key)
			}
			h.cards[key] = v
		}
		pos += fitsBlock
	}
	h.dataStart = pos
	bad := func(format string, args ...any) error {
		return guardErr(name, idx, start, ErrMalformed, format, args...)
	}
	getInt := func(k string, def int64, required bool) (int64, error) {
		v, ok := h.cards[k]
		if !ok {
			if required {
				return 0, bad("missing mandatory keyword %s", k)
			}
			return def, nil
		}
		n, ok := strictInt(v)
		if !ok {
			return 0, bad("keyword %s = %q is not an integer", k, v)
		}
		return n, nil
	}
	if idx == 0 {
		if h.cards["SIMPLE"] != "T" {
			return nil, bad("SIMPLE is not T")
		}
		if h.cards["GROUPS"] == "T" {
			return nil, guardErr(name, idx, start, ErrUnsupported, "random-groups files are not spectra")
		}
	} else {
		x, ok := h.cards["XTENSION"]
		if !ok {
			return nil, bad("missing XTENSION")
		}
		h.xtension = x
		switch x {
		case "IMAGE", "BINTABLE", "TABLE":
		default:
			return nil, guardErr(name, idx, start, ErrUnsupported, "extension type %q", x)
		}
	}
	bp, err := getInt("BITPIX", 0, true)
	if err != nil {
		return nil, err
	}
	switch bp {
	case 8, 16, 32, 64, -32, -64:
	default:
		return nil, bad("BITPIX = %d is not one of 8, 16, 32, 64, -32, -64", bp)
	}
	h.bitpix = int(bp)
	nax, err := getInt("NAXIS", 0, true)
	if err != nil {
		return nil, err
	}
	if nax < 0 || nax > maxNAXIS {
		return nil, bad("NAXIS = %d out of range 0..%d", nax, maxNAXIS)
	}
	limit := size // nothing can be larger than the file
	elems := int64(1)
	if nax == 0 {
		elems = 0
	}
	for i := int64(1); i <= nax; i++ {
		n, err := getInt("NAXIS"+strconv.FormatInt(i, 10), 0, true)
		if err != nil {
			return nil, err
		}
		if n < 0 {
			return nil, bad("NAXIS%d = %d is negative", i, n)
		}
		h.axes = append(h.axes, n)
		var ok bool
		if elems, ok = mulBound(elems, n, limit); !ok {
			return nil, guardErr(name, idx, start, io.ErrUnexpectedEOF, "the header declares more data than the file holds (%d bytes)", size)
		}
	}
	pc, err := getInt("PCOUNT", 0, idx > 0)
	if err != nil {
		return nil, err
	}
	gc, err := getInt("GCOUNT", 1, idx > 0)
	if err != nil {
		return nil, err
	}
	if pc < 0 || pc > limit {
		return nil, bad("PCOUNT = %d out of range", pc)
	}
	if gc != 1 {
		return nil, guardErr(name, idx, start, ErrUnsupported, "GCOUNT = %d (only 1 is supported)", gc)
	}
	if h.xtension != "BINTABLE" && pc != 0 {
		return nil, bad("PCOUNT = %d in an image or ASCII table (must be 0)", pc)
	}
	h.pcount = pc
	if h.xtension == "BINTABLE" || h.xtension == "TABLE" {
		if nax != 2 || bp != 8 {
			return nil, bad("a table needs NAXIS = 2 and BITPIX = 8")
		}
		if err := scanColumns(h, getInt, bad); err != nil {
			return nil, err
		}
	}
	byteSize := int64(bp)
	if byteSize < 0 {
		byteSize = -byteSize
	}
	n, ok := mulBound(elems, byteSize/8, limit)
	if ok {
		n += pc
	}
	if !ok || n > size-h.dataStart {
		return nil, &ParseError{File: name, HDU: idx, Offset: h.dataStart,
			Err: fmt.Errorf("the header declares %d bytes of data but only %d remain: %w", n, size-h.dataStart, io.ErrUnexpectedEOF)}
	}
	h.dataLen = n
	padded := (n + fitsBlock - 1) / fitsBlock * fitsBlock
	h.end = h.dataStart + padded
	if h.end > size {
		h.paddedTail = true
	}
	return h, nil
}

// scanColumns reads TFIELDS and TFORMn and checks that the columns fill
// NAXIS1 bytes exactly; THEAP must lie within the heap area.
func scanColumns(h *fitsHDU, getInt func(string, int64, bool) (int64, error), bad func(string, ...any) error) error {
	nf, err := getInt("TFIELDS", 0, true)
	if err != nil {
		return err
	}
	if nf < 0 || nf > maxFields {
		return bad("TFIELDS = %d out of range 0..%d", nf, maxFields)
	}
	rowLen := h.axes[0]
	var off int64
	for i := int64(1); i <= nf; i++ {
		k := "TFORM" + strconv.FormatInt(i, 10)
		f, ok := h.cards[k]
		if !ok {
			return bad("missing %s", k)
		}
		if _, ok := h.cards["TTYPE"+strconv.FormatInt(i, 10)]; !ok {
			// fitsio needs a name for every column; give one so that a
			// missing TTYPE is reported clearly rather than as a crash.
			return bad("missing TTYPE%d", i)
		}
		c, err := parseTFORM(f, rowLen)
		if err != nil {
			return bad("%s = %q: %v", k, f, err)
		}
		if h.xtension == "TABLE" {
			continue // ASCII tables: positions come from TBCOLn; never read.
		}
		c.offset = off
		off += c.width
		if off > rowLen {
			return bad("columns are wider than NAXIS1 = %d", rowLen)
		}
		h.cols = append(h.cols, c)
	}
	if h.xtension == "BINTABLE" && off != rowLen {
		return bad("columns add up to %d bytes but NAXIS1 = %d", off, rowLen)
	}
	if th, err := getInt("THEAP", 0, false); err != nil {
		return err
	} else if _, has := h.cards["THEAP"]; has {
		main := rowLen * h.axes[1]
		if th < main || th > main+h.pcount {
			return bad("THEAP = %d outside the heap area", th)
		}
	}
	return nil
}

// parseTFORM parses a binary-table TFORM "rT" or "rPT(max)".
func parseTFORM(f string, rowLen int64) (fitsCol, error) {
	c := fitsCol{form: f}
	s := strings.TrimSpace(f)
	i := 0
	for i < len(s) && s[i] >= '0' && s[i] <= '9' {
		i++
	}
	c.repeat = 1
	if i > 0 {
		r, err := strconv.ParseInt(s[:i], 10, 64)
		if err != nil || r > rowLen*8 {
			return c, fmt.Errorf("repeat count out of range")
		}
		c.repeat = r
	}
	if i >= len(s) {
		return c, fmt.Errorf("no type code")
	}
	c.code = s[i]
	var size int64
	switch c.code {
	case 'L', 'B', 'A':
		size = 1
	case 'I':
		size = 2
	case 'J', 'E':
		size = 4
	case 'K', 'D', 'C':
		size = 8
	case 'M':
		size = 16
	case 'X':
		c.width = (c.repeat + 7) / 8
		return c, nil
	case 'P':
		c.width = 8 * min(c.repeat, 1)
		return c, nil
	case 'Q':
		c.width = 16 * min(c.repeat, 1)
		return c, nil
	default:
		return c, fmt.Errorf("unknown type code %q", c.code)
	}
	w, ok := mulBound(c.repeat, size, math.MaxInt32)
	if !ok {
		return c, fmt.Errorf("column too wide")
	}
	c.width = w
	return c, nil
}
