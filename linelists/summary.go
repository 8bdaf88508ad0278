package linelists

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"text/tabwriter"
)

// SpeciesSummary describes the lines and levels of one species in a store.
type SpeciesSummary struct {
	Species       Species
	Lines         int
	Levels        int
	Source        LevelSource
	MinWavelength float64 // Å, vacuum; 0 when there are no lines
	MaxWavelength float64
	MaxLogGF      float64 // strongest line; NaN when there are no lines
}

// Summary describes a store for a reader of the terminal or the GUI.
type Summary struct {
	Lines         int
	Levels        int
	MinWavelength float64 // Å, vacuum
	MaxWavelength float64
	Species       []SpeciesSummary // in the store's species order (Z, charge)
}

// Summary counts lines and levels per species and the wavelength coverage.
func (s *Store) Summary() Summary {
	sum := Summary{Lines: s.Len(), Levels: len(s.Levels.Energy)}
	if s.Len() > 0 {
		sum.MinWavelength, sum.MaxWavelength = s.Wavelength[0], s.Wavelength[s.Len()-1]
	}
	sum.Species = make([]SpeciesSummary, len(s.SpeciesTable))
	for i, sp := range s.SpeciesTable {
		sum.Species[i] = SpeciesSummary{Species: sp, MaxLogGF: math.NaN(), Source: s.LevelSourceOf(sp)}
	}
	for i, w := range s.Wavelength {
		ss := &sum.Species[s.Species[i]]
		if ss.Lines == 0 {
			ss.MinWavelength = w
		}
		ss.MaxWavelength = w
		ss.Lines++
		if g := float64(s.LogGF[i]); !(g <= ss.MaxLogGF) {
			ss.MaxLogGF = g
		}
	}
	for _, sp := range s.Levels.Species {
		sum.Species[sp].Levels++
	}
	return sum
}

// WriteSummary writes a readable summary of a store and of the report of
// how it was loaded: files, lines per species, wavelength coverage, levels
// per species and where they came from, duplicates and skipped lines.
func WriteSummary(w io.Writer, s *Store, rep Report) error {
	var b bytes.Buffer
	for _, f := range rep.Files {
		name := f.Name
		if name == "" {
			name = "<input>"
		}
		fmt.Fprintf(&b, "file %s: %d rows, %d lines added", name, f.Rows, f.Added)
		if f.Cached {
			b.WriteString(" (from the binary cache)")
		}
		fmt.Fprintf(&b, ", wavelengths in %v\n", f.Medium)
		for _, kv := range f.Meta {
			if kv.Key != "medium" {
				fmt.Fprintf(&b, "  %s: %s\n", kv.Key, kv.Value)
			}
		}
		if len(f.Ignored) > 0 {
			fmt.Fprintf(&b, "  columns not used: %v\n", f.Ignored)
		}
		if f.Skipped.Total() > 0 {
			fmt.Fprintf(&b, "  skipped on purpose: %d outside the wavelength range, %d other species, %d below the log gf cut\n",
				f.Skipped.Wavelength, f.Skipped.Species, f.Skipped.Strength)
		}
	}
	if rep.Skipped.Total() > 0 {
		fmt.Fprintf(&b, "left out by the filter: %d outside the wavelength range, %d other species, %d below the log gf cut\n",
			rep.Skipped.Wavelength, rep.Skipped.Species, rep.Skipped.Strength)
	}
	sum := s.Summary()
	fmt.Fprintf(&b, "%d lines, %d species, %d levels", sum.Lines, len(sum.Species), sum.Levels)
	if sum.Lines > 0 {
		fmt.Fprintf(&b, ", %.3f–%.3f Å (vacuum) = %.4f–%.4f µm", sum.MinWavelength, sum.MaxWavelength, sum.MinWavelength/1e4, sum.MaxWavelength/1e4)
	}
	b.WriteString("\n")
	fmt.Fprintf(&b, "duplicates found: %d", rep.Duplicates)
	if rep.Duplicates > 0 {
		b.WriteString(" (same species and lower level, wavelength within 0.001 Å, log gf within 0.001; kept once)")
	}
	b.WriteString("\n")
	if rep.GroundAdded > 0 {
		fmt.Fprintf(&b, "ground levels added from the element table: %d species\n", rep.GroundAdded)
	}
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "species\tlines\tfrom Å\tto Å\tmax log gf\tlevels\t")
	for _, ss := range sum.Species {
		if ss.Lines == 0 {
			fmt.Fprintf(tw, "%v\t0\t-\t-\t-\t%d\t\n", ss.Species, ss.Levels)
			continue
		}
		fmt.Fprintf(tw, "%v\t%d\t%.3f\t%.3f\t%.3f\t%d\t\n", ss.Species, ss.Lines, ss.MinWavelength, ss.MaxWavelength, ss.MaxLogGF, ss.Levels)
	}
	tw.Flush()
	lower := 0
	for _, ss := range sum.Species {
		if ss.Source != FileLevels {
			lower++
		}
	}
	if lower > 0 {
		fmt.Fprintf(&b, "partition functions: %d of %d species have no levels file; their U(T) sums only the levels the line list names (or the ground weight), a lower bound\n", lower, len(sum.Species))
	}
	for _, wmsg := range rep.Warnings {
		fmt.Fprintf(&b, "warning: %s\n", wmsg)
	}
	_, err := w.Write(b.Bytes())
	return err
}
