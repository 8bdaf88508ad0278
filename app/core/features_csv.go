package core

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"slices"
	"strconv"

	"broadline/opacity/synth"
	"broadline/spectra"
)

// FeaturesCSV writes the features of an observed spectrum and their
// attributions (attr[i] for feats[i], nil where a feature lies outside the
// model's range) as CSV, one row per feature: the minimum (µm, vacuum),
// depth, full width at half depth (µm), significance, the model's absorbed
// equivalent width in the window (Å), one column share_<El> per element
// that takes part in any attribution (its share of the absorbed equivalent
// width, 0–1; elements in order of atomic number), a note where there is
// no share to give, and the strongest lines. It is what "broadline
// identify" prints and what the workbench's features table exports.
func FeaturesCSV(feats []spectra.Feature, attr []*synth.Attribution) ([]byte, error) {
	if len(attr) != len(feats) {
		return nil, fmt.Errorf("features table: %d features but %d attributions", len(feats), len(attr))
	}
	type el struct {
		z   int
		sym string
	}
	var els []el
	seen := map[int]bool{}
	for _, a := range attr {
		if a == nil {
			continue
		}
		for _, e := range a.Elements {
			if !seen[e.Z] {
				seen[e.Z] = true
				els = append(els, el{e.Z, e.Symbol})
			}
		}
	}
	slices.SortFunc(els, func(a, b el) int { return a.z - b.z })
	head := []string{"minimum_um", "depth", "width_um", "significance", "absorbed_A"}
	for _, e := range els {
		head = append(head, "share_"+e.sym)
	}
	head = append(head, "note", "lines")
	var buf bytes.Buffer
	w := csv.NewWriter(&buf)
	if err := w.Write(head); err != nil {
		return nil, fmt.Errorf("features table: %w", err)
	}
	for i, f := range feats {
		a := attr[i]
		row := []string{
			strconv.FormatFloat(f.Wavelength/1e4, 'f', 5, 64), strconv.FormatFloat(f.Depth, 'f', 4, 64),
			strconv.FormatFloat(f.Width/1e4, 'f', 5, 64), strconv.FormatFloat(f.Significance, 'f', 1, 64),
		}
		note := ""
		switch {
		case a == nil:
			row = append(row, "")
			note = "outside the model"
		case !(a.Absorbed > 0):
			row = append(row, strconv.FormatFloat(a.Absorbed, 'f', 1, 64))
			note = "no model absorption"
		default:
			row = append(row, strconv.FormatFloat(a.Absorbed, 'f', 1, 64))
		}
		share := map[int]float64{}
		if a != nil && a.Absorbed > 0 {
			for _, e := range a.Elements {
				share[e.Z] = e.Share
			}
		}
		for _, e := range els {
			s, ok := share[e.z]
			switch {
			case note != "":
				row = append(row, "")
			case ok:
				row = append(row, strconv.FormatFloat(s, 'f', 4, 64))
			default:
				row = append(row, "0")
			}
		}
		lines := ""
		if a != nil && len(a.Lines) > 0 {
			lines = LinesText(a)
		}
		row = append(row, note, lines)
		if err := w.Write(row); err != nil {
			return nil, fmt.Errorf("features table: %w", err)
		}
	}
	w.Flush()
	if err := w.Error(); err != nil {
		return nil, fmt.Errorf("features table: %w", err)
	}
	return buf.Bytes(), nil
}
