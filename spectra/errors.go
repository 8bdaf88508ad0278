package spectra

import (
	"errors"
	"fmt"
)

// Sentinel causes wrapped by *ParseError. Test for them with errors.Is.
var (
	// ErrSyntax: a value could not be parsed (not a number, bad card).
	ErrSyntax = errors.New("syntax error")
	// ErrColumns: a row has the wrong number of columns, or a named column
	// is missing.
	ErrColumns = errors.New("wrong columns")
	// ErrNoData: the input holds no samples.
	ErrNoData = errors.New("no data")
	// ErrOrder: wavelengths are neither strictly ascending nor strictly
	// descending, or not finite and positive.
	ErrOrder = errors.New("wavelengths not strictly monotonic")
	// ErrUnsupported: the input is valid but uses a feature this reader does
	// not handle (for instance a 2-D image or a non-linear WCS).
	ErrUnsupported = errors.New("unsupported")
	// ErrMalformed: the input breaks its format's rules (for FITS: a
	// missing mandatory keyword, a size that does not fit the file).
	ErrMalformed = errors.New("malformed")
	// ErrTooLarge: a line or a declared size exceeds the reader's bound.
	ErrTooLarge = errors.New("too large")
	// ErrAmbiguous: the file can be read in more than one way and the
	// reader will not guess (an epoch that looks like an MJD, a table of
	// overlapping segments, a multi-band image without labels); the
	// message says which option decides.
	ErrAmbiguous = errors.New("ambiguous")
)

// ParseError reports bad input: where it is and what was wrong. Line and
// Column are 1-based and 0 when they do not apply; for binary files Offset
// is the byte offset and HDU the 0-based header-data unit (-1 when not
// applicable). Err is one of the sentinel causes above or
// io.ErrUnexpectedEOF (a file that ends early), possibly wrapped with more
// detail.
type ParseError struct {
	File   string
	Line   int
	Column int
	HDU    int
	Offset int64
	Err    error
}

func (e *ParseError) Error() string {
	f := e.File
	if f == "" {
		f = "<input>"
	}
	switch {
	case e.Line > 0 && e.Column > 0:
		return fmt.Sprintf("%s:%d:%d: %v", f, e.Line, e.Column, e.Err)
	case e.Line > 0:
		return fmt.Sprintf("%s:%d: %v", f, e.Line, e.Err)
	case e.HDU >= 0 && e.Offset > 0:
		return fmt.Sprintf("%s: HDU %d (byte %d): %v", f, e.HDU, e.Offset, e.Err)
	case e.HDU >= 0:
		return fmt.Sprintf("%s: HDU %d: %v", f, e.HDU, e.Err)
	}
	return fmt.Sprintf("%s: %v", f, e.Err)
}

// Unwrap returns the cause.
func (e *ParseError) Unwrap() error { return e.Err }

// causef wraps a sentinel with a detail message, keeping errors.Is working.
func causef(sentinel error, format string, args ...any) error {
	return fmt.Errorf("%w: %s", sentinel, fmt.Sprintf(format, args...))
}
