package linelists

import (
	"errors"
	"fmt"
)

// Sentinel causes wrapped by the errors of this package; test with errors.Is.
var (
	// ErrSpecies: a species string is not an element symbol and ion stage.
	ErrSpecies = errors.New("bad species")
	// ErrSyntax: a field is not the number or word the column expects.
	ErrSyntax = errors.New("syntax error")
	// ErrRange: a number is out of its allowed range (a non-positive
	// wavelength, gf ≤ 0, a negative energy, …).
	ErrRange = errors.New("value out of range")
	// ErrHeader: the header row or a "# key: value" line is unusable.
	ErrHeader = errors.New("bad header")
	// ErrFieldCount: a row has a different number of fields than the header.
	ErrFieldCount = errors.New("wrong number of fields")
	// ErrTooLong: a line exceeds the reader's line-length bound.
	ErrTooLong = errors.New("line too long")
	// ErrCache: a binary cache is corrupt, stale or of another version.
	ErrCache = errors.New("unusable cache")
)

// ParseError reports bad data in a file: where it is and what was expected.
// Line and Column count from 1; zero means unknown or not applicable.
type ParseError struct {
	File   string // file name as given, or "" for an unnamed reader
	Line   int    // line number, from 1
	Column int    // column (field) number, from 1
	Err    error  // the cause; wraps one of the sentinels above
}

func (e *ParseError) Error() string {
	file := e.File
	if file == "" {
		file = "<input>"
	}
	switch {
	case e.Line > 0 && e.Column > 0:
		return fmt.Sprintf("%s:%d: column %d: %v", file, e.Line, e.Column, e.Err)
	case e.Line > 0:
		return fmt.Sprintf("%s:%d: %v", file, e.Line, e.Err)
	default:
		return fmt.Sprintf("%s: %v", file, e.Err)
	}
}

// Unwrap returns the cause.
func (e *ParseError) Unwrap() error { return e.Err }
