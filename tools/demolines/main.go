// Command demolines writes the invented line lists of broadline's built-in
// demo to app/demo/lines/ (or -out): for each element of demogen.Plan,
// demo_<el>.txt.gz with the lines and demo_<el>_levels.txt.gz with the full
// invented level set. Every file's header says that it is invented for
// demonstration and is not atomic data. The output depends only on -seed.
//
//	go run ./tools/demolines [-out app/demo/lines] [-seed 1]
package main

import (
	"bytes"
	"compress/gzip"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"broadline/internal/demogen"
	"broadline/linelists"
)

func main() {
	out := flag.String("out", "app/demo/lines", "output directory")
	seed := flag.Uint64("seed", 1, "random seed")
	flag.Parse()
	if err := run(*out, *seed); err != nil {
		fmt.Fprintln(os.Stderr, "demolines:", err)
		os.Exit(1)
	}
}

func run(dir string, seed uint64) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	total, bytesOut := 0, 0
	for _, el := range demogen.Plan() {
		s, err := demogen.Lines(el, seed)
		if err != nil {
			return err
		}
		comments := demogen.Comments(el, seed)
		var species []string
		for _, sp := range s.SpeciesTable {
			species = append(species, sp.String())
		}
		meta := []linelists.KeyValue{
			{Key: "content", Value: "invented demonstration data, not atomic data"},
			{Key: "generator", Value: fmt.Sprintf("broadline tools/demolines, seed %d", seed)},
			{Key: "species", Value: strings.Join(species, ", ")},
		}
		var lines bytes.Buffer
		if err := linelists.Write(&lines, s, linelists.WriteOptions{
			Comments: comments, Meta: meta,
			Note: func(i int) string { return demogen.RealNote(s, i) },
		}); err != nil {
			return err
		}
		var levels bytes.Buffer
		lc := append(append([]string{}, comments...), "Levels of the invented atoms (and the real levels of the marked lines).")
		if err := linelists.WriteLevels(&levels, s, nil, lc); err != nil {
			return err
		}
		for name, data := range map[string][]byte{el.File + ".txt.gz": lines.Bytes(), el.File + "_levels.txt.gz": levels.Bytes()} {
			n, err := writeGzip(filepath.Join(dir, name), data)
			if err != nil {
				return err
			}
			bytesOut += n
		}
		total += s.Len()
		perSpecies := make([]int, len(s.SpeciesTable))
		for _, k := range s.Species {
			perSpecies[k]++
		}
		var counts []string
		for k, sp := range s.SpeciesTable {
			counts = append(counts, fmt.Sprintf("%s %d", sp, perSpecies[k]))
		}
		fmt.Printf("%-18s %7d lines, %5d levels (%s)\n", el.File+".txt.gz", s.Len(), len(s.Levels.Energy), strings.Join(counts, ", "))
	}
	fmt.Printf("total %d lines, %.2f MB compressed\n", total, float64(bytesOut)/1e6)
	return nil
}

// writeGzip writes data compressed, with no time stamp or name in the gzip
// header, so the output is the same byte for byte on every run.
func writeGzip(path string, data []byte) (int, error) {
	var buf bytes.Buffer
	zw, err := gzip.NewWriterLevel(&buf, gzip.BestCompression)
	if err != nil {
		return 0, err
	}
	if _, err := zw.Write(data); err != nil {
		return 0, err
	}
	if err := zw.Close(); err != nil {
		return 0, err
	}
	return buf.Len(), os.WriteFile(path, buf.Bytes(), 0o644)
}
