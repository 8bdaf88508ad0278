package spectra

import (
	"bufio"
	"bytes"
	"compress/bzip2"
	"compress/gzip"
	"errors"
	"fmt"
	"io"
	"os"
)

// Read reads a spectrum in any supported format. A gzip- or
// bzip2-compressed input is decompressed first (recognised by its first
// bytes, whatever the file is called; at most opt.MaxBytes are
// decompressed); then an input that starts with "SIMPLE  =" is FITS,
// anything else a text table (see ReadText, ReadFITS). The spectrum's
// Meta.Read reports what was read and assumed.
func Read(r io.Reader, opt ReadOptions) (*Spectrum, error) {
	br := bufio.NewReaderSize(r, maxTextLine)
	u, comp, err := unwrap(br, &opt)
	if err != nil {
		return nil, err
	}
	return readSniffed(u, comp, opt)
}

func readSniffed(r *bufio.Reader, comp string, opt ReadOptions) (*Spectrum, error) {
	head, _ := r.Peek(9)
	if string(head) == "SIMPLE  =" {
		return readFITS(r, comp, opt)
	}
	return readText(r, comp, opt)
}

// ReadFile opens path and reads it with Read; opt.Name defaults to path.
func ReadFile(path string, opt ReadOptions) (*Spectrum, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("spectra: %w", err)
	}
	defer f.Close()
	if opt.Name == "" {
		opt.Name = path
	}
	// Sniff without buffering, so that ReadFITS sees the file (and its size).
	head := make([]byte, 9)
	n, _ := io.ReadFull(f, head)
	if _, err := f.Seek(0, io.SeekStart); err != nil {
		// A pipe: read what was sniffed, then the rest.
		return Read(io.MultiReader(bytes.NewReader(head[:n]), f), opt)
	}
	switch {
	case string(head[:n]) == "SIMPLE  =":
		return readFITS(f, "", opt)
	case compression(head[:n]) != "":
		return Read(f, opt)
	}
	return readText(f, "", opt)
}

// compression names the compression whose magic bytes start head.
func compression(head []byte) string {
	switch {
	case len(head) >= 2 && head[0] == 0x1f && head[1] == 0x8b:
		return "gzip"
	case len(head) >= 4 && string(head[:3]) == "BZh" && head[3] >= '1' && head[3] <= '9':
		return "bzip2"
	}
	return ""
}

// unwrap returns the decompressed input when br starts with gzip or bzip2
// magic bytes, bounded to opt.MaxBytes.
func unwrap(br *bufio.Reader, opt *ReadOptions) (*bufio.Reader, string, error) {
	head, _ := br.Peek(4)
	comp := compression(head)
	var zr io.Reader
	switch comp {
	case "":
		return br, "", nil
	case "gzip":
		g, err := gzip.NewReader(br)
		if err != nil {
			return nil, comp, &ParseError{File: opt.Name, HDU: -1, Err: fmt.Errorf("%w: gzip header: %v", ErrMalformed, err)}
		}
		zr = g
	case "bzip2":
		zr = bzip2.NewReader(br)
	}
	b := &boundedReader{r: zr, left: opt.maxBytes(), max: opt.maxBytes(), kind: comp}
	return bufio.NewReaderSize(b, maxTextLine), comp, nil
}

// boundedReader stops a decompressor after max bytes with ErrTooLarge and
// marks its errors as malformed input.
type boundedReader struct {
	r         io.Reader
	left, max int64
	kind      string
}

func (b *boundedReader) Read(p []byte) (int, error) {
	if b.left <= 0 {
		// One more byte would exceed the bound: is there one?
		var one [1]byte
		n, err := b.r.Read(one[:])
		if n > 0 {
			return 0, causef(ErrTooLarge, "%s data decompress to more than %d bytes (ReadOptions.MaxBytes)", b.kind, b.max)
		}
		return 0, b.wrap(err)
	}
	if int64(len(p)) > b.left {
		p = p[:b.left]
	}
	n, err := b.r.Read(p)
	b.left -= int64(n)
	return n, b.wrap(err)
}

func (b *boundedReader) wrap(err error) error {
	switch {
	case err == nil || err == io.EOF:
		return err
	case errors.Is(err, io.ErrUnexpectedEOF):
		return fmt.Errorf("%s data end early: %w", b.kind, err)
	}
	return fmt.Errorf("%w: %s data: %v", ErrMalformed, b.kind, err)
}

// binaryHint describes why head is no text, or returns "" for text.
func binaryHint(head []byte) string {
	magic := []struct{ m, what string }{
		{"\x89PNG", "a PNG image"}, {"%PDF", "a PDF document"}, {"PK\x03\x04", "a zip archive (not supported: unpack it)"},
		{"\xfd7zXZ", "xz-compressed (not supported: decompress it)"}, {"\x89HDF", "an HDF5 file"},
		{"\x28\xb5\x2f\xfd", "zstd-compressed (not supported: decompress it)"},
	}
	for _, m := range magic {
		if bytes.HasPrefix(head, []byte(m.m)) {
			return m.what
		}
	}
	ctrl := 0
	for i, c := range head {
		if c == 0 {
			return fmt.Sprintf("binary data (a zero byte at offset %d)", i)
		}
		if c < 0x20 && c != '\t' && c != '\n' && c != '\r' && c != '\f' && c != '\v' || c == 0x7f {
			ctrl++
		}
	}
	if ctrl > 0 && ctrl*50 > len(head) {
		return fmt.Sprintf("binary data (%d control bytes in the first %d)", ctrl, len(head))
	}
	return ""
}
