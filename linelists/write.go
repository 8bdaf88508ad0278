package linelists

import (
	"bufio"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// WriteOptions controls Write.
type WriteOptions struct {
	// Comments are free-text lines written first, each after "# ".
	Comments []string
	// Meta are "# key: value" lines written after the comments. The
	// medium line ("# medium: vacuum") is always written and need not be
	// given.
	Meta []KeyValue
	// Note, when not nil, may return a comment for line i, written on its
	// own "# " line just before it (e.g. to mark a real line in a demo).
	Note func(i int) string
}

// Write writes s in our text format: vacuum wavelengths in Å, species in
// canonical notation with an underscore (Nd_II) so that the file stays
// whitespace-separated, log gf, and the lower level's energy in eV and
// weight (g = 0, unknown, is written as "-"). Read gives back the same
// store, to the printed precision (wavelength 1e-4 Å, log gf 1e-3, energy
// 1e-6 eV).
func Write(w io.Writer, s *Store, opts WriteOptions) error {
	bw := bufio.NewWriterSize(w, 1<<16)
	for _, c := range opts.Comments {
		for _, l := range strings.Split(c, "\n") {
			fmt.Fprintf(bw, "# %s\n", l)
		}
	}
	fmt.Fprintf(bw, "# medium: vacuum\n")
	for _, kv := range opts.Meta {
		if strings.EqualFold(kv.Key, "medium") {
			continue
		}
		fmt.Fprintf(bw, "# %s: %s\n", kv.Key, strings.ReplaceAll(kv.Value, "\n", " "))
	}
	bw.WriteString("wavelength_A species log_gf lower_energy_eV lower_g\n")
	names := make([]string, len(s.SpeciesTable))
	for i, sp := range s.SpeciesTable {
		names[i] = strings.ReplaceAll(sp.String(), " ", "_")
	}
	buf := make([]byte, 0, 96)
	for i := 0; i < s.Len(); i++ {
		if opts.Note != nil {
			if n := opts.Note(i); n != "" {
				fmt.Fprintf(bw, "# %s\n", strings.ReplaceAll(n, "\n", " "))
			}
		}
		lv := s.Lower[i]
		buf = strconv.AppendFloat(buf[:0], s.Wavelength[i], 'f', 4, 64)
		buf = append(buf, ' ')
		buf = append(buf, names[s.Species[i]]...)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, float64(s.LogGF[i]), 'f', 3, 32)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, s.Levels.Energy[lv], 'f', 6, 64)
		buf = append(buf, ' ')
		if g := s.Levels.G[lv]; g > 0 {
			buf = strconv.AppendFloat(buf, float64(g), 'f', -1, 32)
		} else {
			buf = append(buf, '-')
		}
		buf = append(buf, '\n')
		bw.Write(buf)
	}
	return bw.Flush()
}
