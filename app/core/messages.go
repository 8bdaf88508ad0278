package core

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"reflect"
	"regexp"
	"strconv"
	"strings"
)

// DecodeJSON decodes the one JSON value in data into v strictly (unknown
// keys and data after the value are errors) and words every error for the
// person who wrote the file: where (line and column, from 1) and what was
// expected, never Go's type names ("json: cannot unmarshal string into Go
// struct field …").
func DecodeJSON(data []byte, v any) error {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(v); err != nil {
		return jsonError(data, dec.InputOffset(), err)
	}
	if _, err := dec.Token(); err != io.EOF {
		line, col := lineCol(data, dec.InputOffset())
		return fmt.Errorf("line %d, column %d: more after the end of the JSON object", line, col)
	}
	return nil
}

var unknownField = regexp.MustCompile(`^json: unknown field "(.*)"$`)

// jsonError is err from encoding/json in plain words; off is the decoder's
// offset when it stopped (the best position an error without one has).
func jsonError(data []byte, off int64, err error) error {
	var se *json.SyntaxError
	var te *json.UnmarshalTypeError
	switch {
	case errors.Is(err, io.EOF) && len(bytes.TrimSpace(data)) == 0:
		return fmt.Errorf("the file is empty: want a JSON object")
	case errors.Is(err, io.ErrUnexpectedEOF) || (errors.Is(err, io.EOF)):
		line, col := lineCol(data, int64(len(data)))
		return fmt.Errorf("line %d, column %d: the file ends inside the JSON (a missing } or ] or \")", line, col)
	case errors.As(err, &se):
		line, col := lineCol(data, se.Offset)
		return fmt.Errorf("line %d, column %d: %s", line, col, strings.TrimPrefix(se.Error(), "json: "))
	case errors.As(err, &te):
		line, col := lineCol(data, te.Offset)
		key := te.Field
		if key == "" {
			return fmt.Errorf("line %d, column %d: want %s, not %s", line, col, kindWords(te.Type), valueWords(te.Value))
		}
		return fmt.Errorf("line %d, column %d: %q: want %s, not %s", line, col, key, kindWords(te.Type), valueWords(te.Value))
	}
	line, col := lineCol(data, off)
	if m := unknownField.FindStringSubmatch(err.Error()); m != nil {
		// encoding/json reports an unknown key only after the whole
		// value: find the key itself (its first use as a key).
		key := regexp.MustCompile(regexp.QuoteMeta(strconv.Quote(m[1])) + `\s*:`)
		if loc := key.FindIndex(data); loc != nil {
			line, col = lineCol(data, int64(loc[0]+1))
		}
		return fmt.Errorf("line %d, column %d: unknown key %q (a misspelt key is never ignored; keys are listed in the README)", line, col, m[1])
	}
	// An error of a value's own decoder (a composition, a velocity…):
	// its message is already in words.
	return fmt.Errorf("line %d, column %d: %s", line, col, UserMessage(err))
}

// lineCol turns a byte offset into a line and column, both from 1; the
// offset is just past the byte at fault.
func lineCol(data []byte, off int64) (line, col int) {
	off = min(max(off, 0), int64(len(data)))
	line = 1 + bytes.Count(data[:off], []byte("\n"))
	col = int(off) - bytes.LastIndexByte(data[:off], '\n') - 1
	return line, max(col, 1)
}

func kindWords(t reflect.Type) string {
	if t == nil {
		return "another value"
	}
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	switch t.Kind() {
	case reflect.Float32, reflect.Float64:
		return "a number"
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64,
		reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64:
		return "a whole number"
	case reflect.String:
		return "a string (in double quotes)"
	case reflect.Bool:
		return "true or false"
	case reflect.Slice, reflect.Array:
		return "a list [ … ]"
	case reflect.Map, reflect.Struct:
		return "an object { … }"
	}
	return "another value"
}

func valueWords(v string) string {
	switch v {
	case "string":
		return "a string"
	case "number":
		return "a number"
	case "bool":
		return "true/false"
	case "array":
		return "a list"
	case "object":
		return "an object"
	}
	if strings.HasPrefix(v, "number ") {
		return v // "number -1" for an unsigned field, "number 1.5" for an integer one
	}
	return v
}

// packagePrefix matches a Go package's name at the start of a message or
// of one of its ": "-separated parts ("linelists: ", "synth: ").
var packagePrefix = regexp.MustCompile(`(^|: )(linelists|synth|spectra|opacity|fit|grid|physics|kernels|json|core|figure): `)

// tempName matches the temporary file of WriteFileAtomic.
var tempName = regexp.MustCompile(`\S*/\.[^/\s]+\.\d+\.tmp`)

// UserMessage is err's message for a person: without the names of the Go
// packages it passed through ("linelists: ", "synth: ") and without
// temporary file names. The workbench and the commands show errors
// through it.
func UserMessage(err error) string {
	if err == nil {
		return ""
	}
	s := err.Error()
	for {
		t := packagePrefix.ReplaceAllString(s, "$1")
		if t == s {
			break
		}
		s = t
	}
	return tempName.ReplaceAllString(s, "a temporary file")
}

// Bound of a session file.
const maxSessionBytes = 1 << 20

// readBounded reads all of r, refusing more than limit bytes (a file of
// kind what).
func readBounded(r io.Reader, limit int64, what string) ([]byte, error) {
	data, err := io.ReadAll(io.LimitReader(r, limit+1))
	if err != nil {
		return nil, fmt.Errorf("read %s file: %w", what, err)
	}
	if int64(len(data)) > limit {
		return nil, fmt.Errorf("%s file larger than %d bytes: not a %s file", what, limit, what)
	}
	return data, nil
}
