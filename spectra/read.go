package spectra

import (
	"bufio"
	"fmt"
	"io"
	"os"
)

// Read reads a spectrum in any supported format: FITS when the input
// starts with "SIMPLE  =", otherwise a text table (see ReadText, ReadFITS).
func Read(r io.Reader, opt ReadOptions) (*Spectrum, error) {
	br := bufio.NewReaderSize(r, maxTextLine)
	head, _ := br.Peek(9)
	if string(head) == "SIMPLE  =" {
		return ReadFITS(br, opt)
	}
	return ReadText(br, opt)
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
		return nil, fmt.Errorf("spectra: %w", err)
	}
	if string(head[:n]) == "SIMPLE  =" {
		return ReadFITS(f, opt)
	}
	return ReadText(f, opt)
}
