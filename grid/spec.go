package grid

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"

	"broadline/linelists"
)

// FormatName is the value of a spec's "format" key: the name and version of
// the grid format this package reads.
const FormatName = "broadline-grid/1"

// Limits on a spec. A spec beyond any of them is refused when decoded.
const (
	MaxSpecBytes     = 1 << 20    // size of a spec file
	MaxAxes          = 8          // axes in one grid
	MaxValuesPerAxis = 100_000    // values of one axis (listed or from/to/steps)
	MaxPoints        = 10_000_000 // points of the whole grid (the product of the axis sizes)
	MaxEpochIndex    = 9999       // largest epoch index on an "epoch" axis
	MaxTemperature   = 1e6        // K, largest temperature on a "temperature" axis
	MaxDays          = 1e5        // largest time on a "days" axis
)

// The quantities an axis can hold (the "quantity" key).
const (
	Velocity    = "velocity"    // photosphere velocity as a fraction of c, 0 < v < 1
	Temperature = "temperature" // photosphere temperature in K, 0 < T ≤ MaxTemperature
	Fraction    = "fraction"    // mass fraction of the element named by "element", 0 ≤ X ≤ 1
	Days        = "days"        // time since explosion in days, 0 < t ≤ MaxDays
	Epoch       = "epoch"       // index of an epoch of the dataset, an integer 0–MaxEpochIndex
)

// Spacings of a from/to/steps axis (the "spacing" key).
const (
	Linear = "linear" // evenly spaced values (the default)
	Log    = "log"    // evenly spaced logarithms (from and to > 0)
)

// Spec is a decoded, checked grid: its axes, each with its values. Its
// points are every combination of one value per axis, enumerated row-major
// (the last axis varies fastest; see Spec.Point).
type Spec struct {
	// Format is FormatName.
	Format string `json:"format"`
	// Label is an optional free text (at most 200 bytes, one line).
	Label string `json:"label,omitempty"`
	// Axes in enumeration order: the first varies slowest.
	Axes []Axis `json:"axes"`

	values [][]float64 // expanded values of each axis
	names  []string    // column name of each axis
	points int         // product of the axis sizes
	canon  []byte      // canonical JSON (json.Marshal of the checked spec)
}

// Axis is one dimension of a grid: a quantity and its values, either listed
// (Values) or generated (From, To, Steps, Spacing).
type Axis struct {
	// Quantity is one of Velocity, Temperature, Fraction, Days, Epoch.
	Quantity string `json:"quantity"`
	// Element is the element symbol of a Fraction axis (case-insensitive on
	// input, stored as the standard symbol, e.g. "Nd"); empty otherwise.
	Element string `json:"element,omitempty"`
	// Values lists the axis values in enumeration order (no duplicates).
	Values []float64 `json:"values,omitempty"`
	// From, To and Steps generate Steps values from From to To inclusive
	// (From < To; Steps = 1 means From alone, and To must equal From).
	From  *float64 `json:"from,omitempty"`
	To    *float64 `json:"to,omitempty"`
	Steps int      `json:"steps,omitempty"`
	// Spacing is Linear (default when empty) or Log, for From/To/Steps only.
	Spacing string `json:"spacing,omitempty"`
}

// Name is the axis's column name in the part files and the key of its value
// in a Point: the quantity, or "fraction_" and the element symbol.
func (a *Axis) Name() string {
	if a.Quantity == Fraction {
		return Fraction + "_" + a.Element
	}
	return a.Quantity
}

// ErrSpec is wrapped by every error about a spec's content.
var ErrSpec = errors.New("invalid grid spec")

// DecodeSpec reads a grid spec (JSON, at most MaxSpecBytes) strictly:
// unknown keys, trailing data, a wrong format name and out-of-range values
// are errors that name the file (name is used in messages only).
func DecodeSpec(r io.Reader, name string) (*Spec, error) {
	data, err := io.ReadAll(io.LimitReader(r, MaxSpecBytes+1))
	if err != nil {
		return nil, fmt.Errorf("grid: reading spec %s: %w", name, err)
	}
	if len(data) > MaxSpecBytes {
		return nil, fmt.Errorf("grid: spec %s: larger than %d bytes: %w", name, MaxSpecBytes, ErrSpec)
	}
	s, err := parseSpec(data)
	if err != nil {
		return nil, fmt.Errorf("grid: spec %s: %w", name, err)
	}
	return s, nil
}

// parseSpec decodes and checks the JSON of a spec.
func parseSpec(data []byte) (*Spec, error) {
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	var s Spec
	if err := dec.Decode(&s); err != nil {
		var se *json.SyntaxError
		if errors.As(err, &se) {
			line, col := lineCol(data, se.Offset)
			return nil, fmt.Errorf("line %d, column %d: %w: %w", line, col, err, ErrSpec)
		}
		return nil, fmt.Errorf("%w: %w", err, ErrSpec)
	}
	if _, err := dec.Token(); err != io.EOF {
		return nil, fmt.Errorf("data after the JSON object: %w", ErrSpec)
	}
	if err := s.check(); err != nil {
		return nil, err
	}
	return &s, nil
}

// lineCol turns a byte offset into a 1-based line and column.
func lineCol(data []byte, off int64) (line, col int) {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	line = 1 + bytes.Count(data[:off], []byte("\n"))
	// The offset is just past the offending byte: report that byte's column.
	col = int(off) - bytes.LastIndexByte(data[:off], '\n') - 1
	return line, col
}

// NewSpec checks a spec built in code (as DecodeSpec checks a decoded one)
// and returns it ready for use. Format may be left empty.
func NewSpec(label string, axes ...Axis) (*Spec, error) {
	s := &Spec{Format: FormatName, Label: label, Axes: slices.Clone(axes)}
	for i := range s.Axes {
		s.Axes[i].Values = slices.Clone(s.Axes[i].Values)
	}
	if err := s.check(); err != nil {
		return nil, fmt.Errorf("grid: %w", err)
	}
	return s, nil
}

// check validates the spec, expands the axes and computes the canonical form.
func (s *Spec) check() error {
	if s.Format != FormatName {
		return fmt.Errorf("format %q, want %q: %w", s.Format, FormatName, ErrSpec)
	}
	if len(s.Label) > 200 || strings.ContainsFunc(s.Label, isControl) {
		return fmt.Errorf("label longer than 200 bytes or with control characters: %w", ErrSpec)
	}
	if len(s.Axes) == 0 || len(s.Axes) > MaxAxes {
		return fmt.Errorf("%d axes (want 1–%d): %w", len(s.Axes), MaxAxes, ErrSpec)
	}
	s.values = make([][]float64, len(s.Axes))
	s.names = make([]string, len(s.Axes))
	for i := range s.Axes {
		a := &s.Axes[i]
		vals, err := a.expand()
		if err != nil {
			return fmt.Errorf("axis %d (%s): %w", i+1, a.Quantity, err)
		}
		name := a.Name()
		if slices.Contains(s.names[:i], name) {
			return fmt.Errorf("axis %d: a second %s axis: %w", i+1, name, ErrSpec)
		}
		s.values[i], s.names[i] = vals, name
	}
	// Each axis is bounded, so the product fits a float64 well enough to say how big it is.
	total := 1.0
	for _, v := range s.values {
		total *= float64(len(v))
	}
	if total > MaxPoints {
		return fmt.Errorf("the axes give %.4g points (%s), more than the limit %d: %w", total, s.sizes(len(s.values)), MaxPoints, ErrSpec)
	}
	s.points = int(total)
	canon, err := json.Marshal(s)
	if err != nil { // cannot happen: every value is finite
		return fmt.Errorf("canonical form: %w", err)
	}
	s.canon = canon
	return nil
}

// sizes describes the sizes of the first n axes, e.g. "1000 × 1000 × 20".
func (s *Spec) sizes(n int) string {
	parts := make([]string, n)
	for i := range n {
		parts[i] = fmt.Sprint(len(s.values[i]))
	}
	return strings.Join(parts, " × ")
}

// expand checks the axis and returns its values.
func (a *Axis) expand() ([]float64, error) {
	switch a.Quantity {
	case Velocity, Temperature, Days, Epoch:
		if a.Element != "" {
			return nil, fmt.Errorf("\"element\" is only for a %s axis: %w", Fraction, ErrSpec)
		}
	case Fraction:
		el, err := linelists.ElementBySymbol(a.Element)
		if err != nil {
			return nil, fmt.Errorf("element %q: %w: %w", a.Element, err, ErrSpec)
		}
		a.Element = el.Symbol
	case "":
		return nil, fmt.Errorf("no \"quantity\" (want %s, %s, %s, %s or %s): %w", Velocity, Temperature, Fraction, Days, Epoch, ErrSpec)
	default:
		return nil, fmt.Errorf("unknown quantity %q (want %s, %s, %s, %s or %s): %w", a.Quantity, Velocity, Temperature, Fraction, Days, Epoch, ErrSpec)
	}
	var vals []float64
	listed := a.Values != nil
	generated := a.From != nil || a.To != nil || a.Steps != 0 || a.Spacing != ""
	switch {
	case listed && generated:
		return nil, fmt.Errorf("both \"values\" and from/to/steps: %w", ErrSpec)
	case listed:
		if len(a.Values) == 0 || len(a.Values) > MaxValuesPerAxis {
			return nil, fmt.Errorf("%d values (want 1–%d): %w", len(a.Values), MaxValuesPerAxis, ErrSpec)
		}
		vals = a.Values
	case generated:
		var err error
		if vals, err = a.generate(); err != nil {
			return nil, err
		}
	default:
		return nil, fmt.Errorf("no values: give \"values\" or \"from\", \"to\" and \"steps\": %w", ErrSpec)
	}
	for j, v := range vals {
		if err := a.checkValue(v); err != nil {
			return nil, fmt.Errorf("value %d (%s): %w", j+1, formatFloat(v), err)
		}
	}
	sorted := slices.Clone(vals)
	slices.Sort(sorted)
	for j := 1; j < len(sorted); j++ {
		if sorted[j] == sorted[j-1] {
			return nil, fmt.Errorf("value %s appears twice: %w", formatFloat(sorted[j]), ErrSpec)
		}
	}
	return vals, nil
}

// generate returns the values of a from/to/steps axis.
func (a *Axis) generate() ([]float64, error) {
	if a.From == nil || a.To == nil || a.Steps == 0 {
		return nil, fmt.Errorf("\"from\", \"to\" and \"steps\" go together: %w", ErrSpec)
	}
	lo, hi, n := *a.From, *a.To, a.Steps
	if n < 1 || n > MaxValuesPerAxis {
		return nil, fmt.Errorf("steps %d (want 1–%d): %w", n, MaxValuesPerAxis, ErrSpec)
	}
	if math.IsNaN(lo) || math.IsInf(lo, 0) || math.IsNaN(hi) || math.IsInf(hi, 0) {
		return nil, fmt.Errorf("from and to must be finite: %w", ErrSpec)
	}
	switch {
	case n == 1 && lo != hi:
		return nil, fmt.Errorf("steps 1 needs to = from (got %s and %s): %w", formatFloat(lo), formatFloat(hi), ErrSpec)
	case n > 1 && !(lo < hi):
		return nil, fmt.Errorf("from %s must be less than to %s: %w", formatFloat(lo), formatFloat(hi), ErrSpec)
	}
	if a.Quantity == Epoch && a.Spacing == Log {
		return nil, fmt.Errorf("an epoch axis cannot be log-spaced: %w", ErrSpec)
	}
	vals := make([]float64, n)
	switch a.Spacing {
	case "", Linear:
		for i := range n {
			vals[i] = lo + float64(i)*(hi-lo)/float64(max(n-1, 1))
		}
	case Log:
		if !(lo > 0) {
			return nil, fmt.Errorf("log spacing needs from > 0 (got %s): %w", formatFloat(lo), ErrSpec)
		}
		ratio := hi / lo
		for i := range n {
			vals[i] = lo * math.Pow(ratio, float64(i)/float64(max(n-1, 1)))
		}
	default:
		return nil, fmt.Errorf("spacing %q (want %s or %s): %w", a.Spacing, Linear, Log, ErrSpec)
	}
	// The ends are the given values exactly.
	vals[0], vals[n-1] = lo, hi
	return vals, nil
}

// checkValue checks one value against the quantity's range.
func (a *Axis) checkValue(v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("not finite: %w", ErrSpec)
	}
	ok := true
	var want string
	switch a.Quantity {
	case Velocity:
		ok, want = v > 0 && v < 1, "0 < v/c < 1"
	case Temperature:
		ok, want = v > 0 && v <= MaxTemperature, fmt.Sprintf("0 < T ≤ %g K", MaxTemperature)
	case Fraction:
		ok, want = v >= 0 && v <= 1, "0 ≤ mass fraction ≤ 1"
	case Days:
		ok, want = v > 0 && v <= MaxDays, fmt.Sprintf("0 < days ≤ %g", MaxDays)
	case Epoch:
		ok, want = v >= 0 && v <= MaxEpochIndex && v == math.Trunc(v), fmt.Sprintf("an integer 0–%d", MaxEpochIndex)
	}
	if !ok {
		return fmt.Errorf("out of range (want %s): %w", want, ErrSpec)
	}
	return nil
}

// Points is the number of points of the grid (the product of the axis sizes).
func (s *Spec) Points() int { return s.points }

// AxisValues returns the values of axis i in enumeration order (a copy).
func (s *Spec) AxisValues(i int) []float64 { return slices.Clone(s.values[i]) }

// Names returns the column names of the axes, in order (a copy).
func (s *Spec) Names() []string { return slices.Clone(s.names) }

// Canonical returns the canonical JSON of the spec: json.Marshal of the
// checked spec (keys in the documented order, element symbols normalised,
// no spaces). Two specs with the same canonical form are the same grid.
func (s *Spec) Canonical() []byte { return slices.Clone(s.canon) }

// SHA256 is the hexadecimal SHA-256 of the canonical JSON; part files record it.
func (s *Spec) SHA256() string {
	h := sha256.Sum256(s.canon)
	return hex.EncodeToString(h[:])
}

// Point returns point k of the enumeration (0 ≤ k < Points()): row-major,
// so with axes of sizes n₁ … n_m and value indices i₁ … i_m,
// k = ((i₁·n₂ + i₂)·n₃ + i₃)… and the last axis varies fastest.
// It panics when k is out of range (a programming mistake).
func (s *Spec) Point(k int) Point {
	if k < 0 || k >= s.points {
		panic(fmt.Sprintf("grid: point %d out of range 0–%d", k, s.points-1))
	}
	p := Point{Index: k, Values: make([]float64, len(s.values)), names: s.names}
	for i := len(s.values) - 1; i >= 0; i-- {
		n := len(s.values[i])
		p.Values[i] = s.values[i][k%n]
		k /= n
	}
	return p
}

// Point is one point of a grid: its index in the enumeration and one value
// per axis.
type Point struct {
	// Index is the point's position in the row-major enumeration.
	Index int
	// Values holds one value per axis, in the spec's axis order, in the
	// axis's unit (v/c, K, mass fraction, days, epoch index).
	Values []float64
	names  []string
}

// Get returns the value of the axis with the given column name (see
// Axis.Name: "velocity", "temperature", "fraction_Nd", "days", "epoch")
// and whether the grid has that axis.
func (p Point) Get(name string) (float64, bool) {
	for i, n := range p.names {
		if n == name {
			return p.Values[i], true
		}
	}
	return 0, false
}

// Map returns the point's values keyed by axis column name.
func (p Point) Map() map[string]float64 {
	m := make(map[string]float64, len(p.names))
	for i, n := range p.names {
		m[n] = p.Values[i]
	}
	return m
}

func isControl(r rune) bool { return r < 0x20 || r == 0x7f }
