package grid

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"
)

// Limits on what a part file records about its inputs.
const (
	MaxInputs     = 1000 // input files of one run
	MaxNameBytes  = 1000 // bytes of one file name, program version or role
	MaxEpochs     = 256  // per-epoch results of one point
	MaxWavelength = 1 << 16
)

// Inputs identifies what a grid was computed from; part files record it and
// Merge refuses parts whose inputs differ.
type Inputs struct {
	// Program names the program and its version, e.g. "broadline 0.6.0".
	Program string
	// Files are the input files (dataset, line lists, spectra …) in the
	// caller's order.
	Files []InputFile
}

// InputFile is one input file: what it is for, its name and its checksum.
type InputFile struct {
	// Role says what the file is for: lower-case letters, digits and '-',
	// e.g. "dataset", "linelist", "spectrum".
	Role string
	// Name is the file name as given (one line, no control characters).
	Name string
	// SHA256 is the file's SHA-256 in 64 lower-case hexadecimal digits.
	SHA256 string
}

// HashFile returns the InputFile of the file at path, with its SHA-256.
func HashFile(role, path string) (InputFile, error) {
	f, err := os.Open(path)
	if err != nil {
		return InputFile{}, fmt.Errorf("grid: checksum of %s: %w", path, err)
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return InputFile{}, fmt.Errorf("grid: checksum of %s: %w", path, err)
	}
	in := InputFile{Role: role, Name: path, SHA256: hex.EncodeToString(h.Sum(nil))}
	if err := in.valid(); err != nil {
		return InputFile{}, err
	}
	return in, nil
}

// ErrInputs is wrapped by errors about an Inputs value or Options.
var ErrInputs = errors.New("invalid grid inputs")

func (in InputFile) valid() error {
	if in.Role == "" || len(in.Role) > 64 || strings.Trim(in.Role, "abcdefghijklmnopqrstuvwxyz0123456789-") != "" {
		return fmt.Errorf("grid: input role %q: want lower-case letters, digits and '-': %w", in.Role, ErrInputs)
	}
	if in.Name == "" || len(in.Name) > MaxNameBytes || strings.ContainsFunc(in.Name, isControl) {
		return fmt.Errorf("grid: input %s name %q: want 1–%d bytes without control characters: %w", in.Role, in.Name, MaxNameBytes, ErrInputs)
	}
	if len(in.SHA256) != 64 || strings.Trim(in.SHA256, "0123456789abcdef") != "" {
		return fmt.Errorf("grid: input %s: checksum %q is not 64 lower-case hex digits: %w", in.Name, in.SHA256, ErrInputs)
	}
	return nil
}

func (in *Inputs) valid() error {
	if len(in.Program) > MaxNameBytes || strings.ContainsFunc(in.Program, isControl) {
		return fmt.Errorf("grid: program %q: want at most %d bytes without control characters: %w", in.Program, MaxNameBytes, ErrInputs)
	}
	if len(in.Files) > MaxInputs {
		return fmt.Errorf("grid: %d input files, more than %d: %w", len(in.Files), MaxInputs, ErrInputs)
	}
	for _, f := range in.Files {
		if err := f.valid(); err != nil {
			return err
		}
	}
	return nil
}
