package grid

import (
	"bufio"
	"bytes"
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"errors"
	"fmt"
	"hash"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"
)

// PartVersion is the first line of every part file: the part format's name
// and version.
const PartVersion = "# broadline grid part 1"

// The kinds of part file.
const (
	KindChi2    = "chi2"    // one row per point: χ²/N per epoch and combined
	KindSpectra = "spectra" // one row per point and epoch: the model flux
)

// MaxLineBytes bounds one line of a part file.
const MaxLineBytes = 4 << 20

// MaxErrorBytes bounds the recorded error message of a failed point; a
// longer message is cut there and ends with "…".
const MaxErrorBytes = 2000

// ErrPart is wrapped by every error about a part file's content.
var ErrPart = errors.New("invalid grid part")

// ErrIncomplete is wrapped (with ErrPart) when a part file ends before its
// end line: a run that was stopped or a file cut short.
var ErrIncomplete = errors.New("incomplete grid part")

// header is everything a part file records before its rows.
type header struct {
	kind        string
	program     string
	spec        *Spec
	inputs      []InputFile
	epochs      []string
	wavelengths []float64 // KindSpectra only
	shard       Shard
}

// columns returns the names of the header row.
func (h *header) columns() []string {
	cols := []string{"point"}
	if h.kind == KindSpectra {
		cols = append(cols, "epoch")
		for _, w := range h.wavelengths {
			cols = append(cols, formatFloat(w))
		}
		return cols
	}
	cols = append(cols, h.spec.names...)
	cols = append(cols, "chi2n")
	for _, e := range h.epochs {
		cols = append(cols, "chi2n_"+e, "n_"+e)
	}
	return append(cols, "error")
}

// rowsPerPoint is the number of rows each point has.
func (h *header) rowsPerPoint() int {
	if h.kind == KindSpectra {
		return len(h.epochs)
	}
	return 1
}

// bytes writes the header lines and the header row, each ending in '\n'.
func (h *header) bytes() []byte {
	var b bytes.Buffer
	b.WriteString(PartVersion + "\n")
	fmt.Fprintf(&b, "# kind: %s\n", h.kind)
	fmt.Fprintf(&b, "# program: %s\n", h.program)
	fmt.Fprintf(&b, "# spec-sha256: %s\n", h.spec.SHA256())
	fmt.Fprintf(&b, "# spec: %s\n", h.spec.canon)
	for _, in := range h.inputs {
		fmt.Fprintf(&b, "# input: %s %s %s\n", in.Role, in.SHA256, in.Name)
	}
	fmt.Fprintf(&b, "# epochs: %s\n", strings.Join(h.epochs, " "))
	if h.kind == KindSpectra {
		fmt.Fprintf(&b, "# wavelengths: %d (vacuum Å, in the header row)\n", len(h.wavelengths))
	}
	fmt.Fprintf(&b, "# shard: %s\n", h.shard)
	fmt.Fprintf(&b, "# points: %d of %d\n", h.shard.Size(h.spec.points), h.spec.points)
	b.WriteString(strings.Join(h.columns(), ","))
	b.WriteByte('\n')
	return b.Bytes()
}

// endLine is the last line of a complete part: the row count and the
// SHA-256 of every byte before it.
func endLine(rows int, sum []byte) string {
	return fmt.Sprintf("# end: %d rows, sha256 %s\n", rows, hex.EncodeToString(sum))
}

// validLabel reports whether an epoch label is usable in column names:
// 1–32 bytes of letters, digits, '.', '_' and '-'.
func validLabel(s string) bool {
	if s == "" || len(s) > 32 {
		return false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !('a' <= c && c <= 'z' || 'A' <= c && c <= 'Z' || '0' <= c && c <= '9' || c == '.' || c == '_' || c == '-') {
			return false
		}
	}
	return true
}

func checkEpochs(epochs []string) error {
	if len(epochs) == 0 || len(epochs) > MaxEpochs {
		return fmt.Errorf("grid: %d epoch labels (want 1–%d): %w", len(epochs), MaxEpochs, ErrInputs)
	}
	for i, e := range epochs {
		if !validLabel(e) {
			return fmt.Errorf("grid: epoch label %q: want 1–32 letters, digits, '.', '_' or '-': %w", e, ErrInputs)
		}
		if slices.Contains(epochs[:i], e) {
			return fmt.Errorf("grid: epoch label %q given twice: %w", e, ErrInputs)
		}
	}
	return nil
}

func checkWavelengths(ws []float64) error {
	if len(ws) == 0 || len(ws) > MaxWavelength {
		return fmt.Errorf("grid: %d wavelengths (want 1–%d): %w", len(ws), MaxWavelength, ErrInputs)
	}
	for i, w := range ws {
		if !(w > 0) || math.IsInf(w, 0) || i > 0 && !(w > ws[i-1]) {
			return fmt.Errorf("grid: wavelength %d (%s): want positive, finite, increasing: %w", i+1, formatFloat(w), ErrInputs)
		}
	}
	return nil
}

// formatFloat writes x so that strconv.ParseFloat gives back the same bits.
func formatFloat(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// EpochFit is the match of a model to one epoch: χ²/N over N samples.
type EpochFit struct {
	Chi2N float64
	N     int
}

// combined is Σ χ²ᵢ / Σ Nᵢ over the epochs (χ²ᵢ = Chi2Nᵢ·Nᵢ), summed in
// epoch order; NaN when no epoch has samples.
func combined(fits []EpochFit) float64 {
	var chi2, n float64
	for _, f := range fits {
		chi2 += f.Chi2N * float64(f.N)
		n += float64(f.N)
	}
	if n == 0 {
		return math.NaN()
	}
	return chi2 / n
}

// appendChi2Row appends the row of point p: its values, χ²/N, and either
// the fits or (when msg is not empty) empty fields and the error message.
func appendChi2Row(dst []byte, s *Spec, p Point, fits []EpochFit, nEpochs int, msg string) []byte {
	dst = strconv.AppendInt(dst, int64(p.Index), 10)
	for _, v := range p.Values {
		dst = append(dst, ',')
		dst = strconv.AppendFloat(dst, v, 'g', -1, 64)
	}
	if msg != "" {
		for range 1 + 2*nEpochs {
			dst = append(dst, ',')
		}
		dst = append(dst, ',')
		dst = append(dst, csvField(msg)...)
		return append(dst, '\n')
	}
	dst = append(dst, ',')
	dst = strconv.AppendFloat(dst, combined(fits), 'g', -1, 64)
	for _, f := range fits {
		dst = append(dst, ',')
		dst = strconv.AppendFloat(dst, f.Chi2N, 'g', -1, 64)
		dst = append(dst, ',')
		dst = strconv.AppendInt(dst, int64(f.N), 10)
	}
	return append(dst, ",\n"...)
}

// appendSpectrumRow appends the row of point k at one epoch: the flux, or
// empty fields when flux is nil (a failed point).
func appendSpectrumRow(dst []byte, k int, epoch string, flux []float64, nWave int) []byte {
	dst = strconv.AppendInt(dst, int64(k), 10)
	dst = append(dst, ',')
	dst = append(dst, epoch...)
	if flux == nil {
		for range nWave {
			dst = append(dst, ',')
		}
		return append(dst, '\n')
	}
	for _, f := range flux {
		dst = append(dst, ',')
		dst = strconv.AppendFloat(dst, f, 'g', -1, 64)
	}
	return append(dst, '\n')
}

// cleanMessage makes an error message one line of at most MaxErrorBytes.
func cleanMessage(msg string) string {
	msg = strings.Map(func(r rune) rune {
		if isControl(r) {
			return ' '
		}
		return r
	}, strings.ToValidUTF8(msg, "?"))
	msg = strings.TrimSpace(msg)
	if msg == "" {
		msg = "error"
	}
	if len(msg) > MaxErrorBytes {
		cut := MaxErrorBytes - len("…")
		for cut > 0 && !isRuneStart(msg[cut]) {
			cut--
		}
		msg = msg[:cut] + "…"
	}
	return msg
}

func isRuneStart(b byte) bool { return b&0xC0 != 0x80 }

// csvField quotes a field as encoding/csv would.
func csvField(s string) string {
	if !strings.ContainsAny(s, "\",\r\n") && s != "" && s[0] != ' ' && s[0] != '\t' && s != `\.` {
		return s
	}
	return `"` + strings.ReplaceAll(s, `"`, `""`) + `"`
}

// partReader reads and checks a part file line by line: the header first,
// then each row against the spec and the shard, then the end line.
type partReader struct {
	name   string
	br     *bufio.Reader
	sum    hash.Hash
	line   int // number of the line last read
	h      header
	hdr    []byte // the header bytes as read
	next   int    // index of the next point expected
	sub    int    // row of that point expected next (spectra: the epoch)
	rows   int    // rows read
	failed int    // points recorded as failed
	done   bool   // the end line was read
	raw    []byte // the line last read
}

func (r *partReader) errf(format string, args ...any) error {
	return fmt.Errorf("grid: %s:%d: %s: %w", r.name, r.line, fmt.Sprintf(format, args...), ErrPart)
}

// readLine reads one line including its '\n'; a last line without '\n' or
// the end of the file before the end line is ErrIncomplete.
func (r *partReader) readLine() ([]byte, error) {
	r.raw = r.raw[:0]
	for {
		chunk, err := r.br.ReadSlice('\n')
		r.raw = append(r.raw, chunk...)
		if len(r.raw) > MaxLineBytes {
			r.line++
			return nil, r.errf("line longer than %d bytes", MaxLineBytes)
		}
		switch {
		case err == nil:
			r.line++
			return r.raw, nil
		case errors.Is(err, bufio.ErrBufferFull):
			continue
		case err == io.EOF:
			r.line++
			return nil, fmt.Errorf("grid: %s:%d: the file ends before its end line (a run stopped or a file cut short): %w: %w", r.name, r.line, ErrIncomplete, ErrPart)
		default:
			return nil, fmt.Errorf("grid: reading %s: %w", r.name, err)
		}
	}
}

// headerLine reads a "# key: value" line and returns the value.
func (r *partReader) headerLine(key string) (string, error) {
	b, err := r.readLine()
	if err != nil {
		return "", err
	}
	r.hdr = append(r.hdr, b...)
	prefix := "# " + key + ": "
	s := string(b[:len(b)-1])
	if !strings.HasPrefix(s, prefix) {
		return "", r.errf("want a %q line, got %.60q", prefix, s)
	}
	return s[len(prefix):], nil
}

// newPartReader reads and checks the header of a part.
func newPartReader(rd io.Reader, name string) (*partReader, error) {
	r := &partReader{name: name, br: bufio.NewReaderSize(rd, 64<<10), sum: sha256.New()}
	b, err := r.readLine()
	if err != nil {
		return nil, err
	}
	if string(b) != PartVersion+"\n" {
		return nil, r.errf("not a grid part (want the first line %q)", PartVersion)
	}
	r.hdr = append(r.hdr, b...)
	h := &r.h
	if h.kind, err = r.headerLine("kind"); err != nil {
		return nil, err
	}
	if h.kind != KindChi2 && h.kind != KindSpectra {
		return nil, r.errf("kind %q (want %s or %s)", h.kind, KindChi2, KindSpectra)
	}
	if h.program, err = r.headerLine("program"); err != nil {
		return nil, err
	}
	sum, err := r.headerLine("spec-sha256")
	if err != nil {
		return nil, err
	}
	js, err := r.headerLine("spec")
	if err != nil {
		return nil, err
	}
	if h.spec, err = parseSpec([]byte(js)); err != nil {
		return nil, r.errf("spec: %v", err)
	}
	if h.spec.SHA256() != sum {
		return nil, r.errf("spec-sha256 %.64s is not the checksum of the spec line (%s)", sum, h.spec.SHA256())
	}
	// input lines, then the epochs line
	var ep string
	for {
		b, err := r.readLine()
		if err != nil {
			return nil, err
		}
		r.hdr = append(r.hdr, b...)
		s := string(b[:len(b)-1])
		if v, ok := strings.CutPrefix(s, "# input: "); ok {
			if len(h.inputs) == MaxInputs {
				return nil, r.errf("more than %d input lines", MaxInputs)
			}
			role, rest, _ := strings.Cut(v, " ")
			sha, fname, _ := strings.Cut(rest, " ")
			in := InputFile{Role: role, SHA256: sha, Name: fname}
			if err := in.valid(); err != nil {
				return nil, r.errf("%v", err)
			}
			h.inputs = append(h.inputs, in)
			continue
		}
		v, ok := strings.CutPrefix(s, "# epochs: ")
		if !ok {
			return nil, r.errf("want an \"# input: \" or \"# epochs: \" line, got %.60q", s)
		}
		ep = v
		break
	}
	h.epochs = strings.Split(ep, " ")
	if err := checkEpochs(h.epochs); err != nil {
		return nil, r.errf("%v", err)
	}
	var nw int
	if h.kind == KindSpectra {
		v, err := r.headerLine("wavelengths")
		if err != nil {
			return nil, err
		}
		num, _, _ := strings.Cut(v, " ")
		if nw, err = strconv.Atoi(num); err != nil || nw < 1 || nw > MaxWavelength {
			return nil, r.errf("wavelengths %.20q: want a count 1–%d", num, MaxWavelength)
		}
	}
	v, err := r.headerLine("shard")
	if err != nil {
		return nil, err
	}
	if h.shard, err = ParseShard(v); err != nil {
		return nil, r.errf("%v", err)
	}
	if _, err := r.headerLine("points"); err != nil {
		return nil, err
	}
	// the header row
	b, err = r.readLine()
	if err != nil {
		return nil, err
	}
	r.hdr = append(r.hdr, b...)
	if h.kind == KindSpectra {
		cols := strings.Split(string(b[:len(b)-1]), ",")
		if len(cols) != 2+nw {
			return nil, r.errf("header row has %d columns, want %d (point, epoch and %d wavelengths)", len(cols), 2+nw, nw)
		}
		h.wavelengths = make([]float64, nw)
		for i, c := range cols[2:] {
			if h.wavelengths[i], err = strconv.ParseFloat(c, 64); err != nil {
				return nil, r.errf("header row column %d: wavelength %.30q", i+3, c)
			}
		}
		if err := checkWavelengths(h.wavelengths); err != nil {
			return nil, r.errf("%v", err)
		}
	}
	// The header must be exactly what a run would write for these values.
	if want := h.bytes(); !bytes.Equal(r.hdr, want) {
		return nil, r.errf("the header differs from the one this version writes for its own values (edited, or another format)")
	}
	r.sum.Write(r.hdr)
	r.next = h.shard.Index
	return r, nil
}

// nextRow reads the next row; it returns nil when the end line has been
// read and checked.
func (r *partReader) nextRow() ([]byte, error) {
	if r.done {
		return nil, nil
	}
	b, err := r.readLine()
	if err != nil {
		return nil, err
	}
	if bytes.HasPrefix(b, []byte("# end: ")) {
		return nil, r.finish(b)
	}
	total := r.h.spec.points
	if r.next >= total {
		return nil, r.errf("a row after the shard's last point (want the end line)")
	}
	var want []byte
	var failed bool
	if r.h.kind == KindChi2 {
		want, failed, err = r.checkChi2(b)
	} else {
		want, failed, err = r.checkSpectrum(b)
	}
	if err != nil {
		return nil, err
	}
	if !bytes.Equal(b, want) {
		return nil, r.errf("row not in the form a run writes (want %.80q)", want)
	}
	r.sum.Write(b)
	r.rows++
	if failed && r.sub == 0 {
		r.failed++
	}
	r.sub++
	if r.sub == r.h.rowsPerPoint() {
		r.sub = 0
		r.next += r.h.shard.Count
	}
	return b, nil
}

// finish checks the end line and that nothing follows it.
func (r *partReader) finish(b []byte) error {
	if r.sub != 0 || r.next < r.h.spec.points {
		return r.errf("end line after %d rows; point %d is missing", r.rows, r.next)
	}
	if want := endLine(r.rows, r.sum.Sum(nil)); string(b) != want {
		return r.errf("end line %.100q does not match the rows (want %.100q)", b, want)
	}
	if _, err := r.br.ReadByte(); err != io.EOF {
		r.line++
		return r.errf("data after the end line")
	}
	r.done = true
	return nil
}

// fields splits a row into its fields.
func (r *partReader) fields(b []byte) ([]string, error) {
	s := string(b[:len(b)-1])
	if !strings.Contains(s, `"`) {
		return strings.Split(s, ","), nil
	}
	cr := csv.NewReader(strings.NewReader(s))
	cr.FieldsPerRecord = -1
	rec, err := cr.Read()
	if err != nil {
		return nil, r.errf("row: %v", err)
	}
	if _, err := cr.Read(); err != io.EOF {
		return nil, r.errf("row spans more than one record")
	}
	return rec, nil
}

// pointField checks the row's point index.
func (r *partReader) pointField(f string) error {
	k, err := strconv.Atoi(f)
	if err != nil {
		return r.errf("point %.30q: not an integer", f)
	}
	if k != r.next {
		switch {
		case k < r.next:
			return r.errf("point %d again or out of order (want %d)", k, r.next)
		case !r.h.shard.Contains(k) || k >= r.h.spec.points:
			return r.errf("point %d does not belong to shard %s", k, r.h.shard)
		default:
			return r.errf("point %d where point %d is expected (a row missing or out of order)", k, r.next)
		}
	}
	return nil
}

// checkChi2 parses a χ² row and returns the row a run writes for its values.
func (r *partReader) checkChi2(b []byte) (want []byte, failed bool, err error) {
	f, err := r.fields(b)
	if err != nil {
		return nil, false, err
	}
	ne := len(r.h.epochs)
	na := len(r.h.spec.names)
	if len(f) != 1+na+1+2*ne+1 {
		return nil, false, r.errf("%d fields, want %d", len(f), 1+na+1+2*ne+1)
	}
	if err := r.pointField(f[0]); err != nil {
		return nil, false, err
	}
	p := r.h.spec.Point(r.next)
	msg := f[len(f)-1]
	if msg != "" {
		return appendChi2Row(nil, r.h.spec, p, nil, ne, msg), true, nil
	}
	fits := make([]EpochFit, ne)
	for i := range fits {
		x, err1 := strconv.ParseFloat(f[na+2+2*i], 64)
		n, err2 := strconv.Atoi(f[na+3+2*i])
		if err1 != nil || err2 != nil || n < 0 {
			return nil, false, r.errf("epoch %s: χ²/N %.30q and N %.30q: want a number and a count", r.h.epochs[i], f[na+2+2*i], f[na+3+2*i])
		}
		fits[i] = EpochFit{Chi2N: x, N: n}
	}
	return appendChi2Row(nil, r.h.spec, p, fits, ne, ""), false, nil
}

// checkSpectrum parses a spectrum row and returns the row a run writes.
func (r *partReader) checkSpectrum(b []byte) (want []byte, failed bool, err error) {
	f, err := r.fields(b)
	if err != nil {
		return nil, false, err
	}
	nw := len(r.h.wavelengths)
	if len(f) != 2+nw {
		return nil, false, r.errf("%d fields, want %d", len(f), 2+nw)
	}
	if err := r.pointField(f[0]); err != nil {
		return nil, false, err
	}
	if e := r.h.epochs[r.sub]; f[1] != e {
		return nil, false, r.errf("epoch %.40q, want %s", f[1], e)
	}
	if f[2] == "" {
		return appendSpectrumRow(nil, r.next, f[1], nil, nw), true, nil
	}
	flux := make([]float64, nw)
	for i, s := range f[2:] {
		if flux[i], err = strconv.ParseFloat(s, 64); err != nil {
			return nil, false, r.errf("flux %d: %.30q is not a number", i+1, s)
		}
	}
	return appendSpectrumRow(nil, r.next, f[1], flux, nw), false, nil
}

// PartInfo describes a complete, valid part file.
type PartInfo struct {
	Kind    string // KindChi2 or KindSpectra
	Program string // the program that wrote it
	SpecSHA string // SHA-256 of the spec's canonical JSON
	Spec    *Spec  // the spec, as recorded in the file
	Inputs  []InputFile
	Epochs  []string
	Shard   Shard
	Rows    int // data rows
	Failed  int // points recorded as failed
}

// ReadPart reads a whole part file and checks it: header, every row against
// the recorded spec and shard, the row count and checksum of the end line.
// name is used in messages. A file cut short gives an error wrapping
// ErrIncomplete; any other defect one wrapping ErrPart.
func ReadPart(rd io.Reader, name string) (*PartInfo, error) {
	r, err := newPartReader(rd, name)
	if err != nil {
		return nil, err
	}
	for {
		b, err := r.nextRow()
		if err != nil {
			return nil, err
		}
		if b == nil {
			break
		}
	}
	return r.info(), nil
}

func (r *partReader) info() *PartInfo {
	return &PartInfo{Kind: r.h.kind, Program: r.h.program, SpecSHA: r.h.spec.SHA256(), Spec: r.h.spec,
		Inputs: slices.Clone(r.h.inputs), Epochs: slices.Clone(r.h.epochs), Shard: r.h.shard, Rows: r.rows, Failed: r.failed}
}
