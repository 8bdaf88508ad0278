package core

import (
	"encoding/csv"
	"strconv"
	"strings"
	"testing"

	"broadline/opacity/synth"
	"broadline/spectra"
)

// TestFeaturesCSV: one column per element (share_<El>, in order of Z)
// holding that element's share as a number, 0 where an element takes no
// part in a feature, empty with a note where there is no attribution; a
// mismatch of lengths is refused.
func TestFeaturesCSV(t *testing.T) {
	feats := []spectra.Feature{
		{Wavelength: 7842, Depth: 0.21, Width: 400, Significance: 30},
		{Wavelength: 12000, Depth: 0.1, Width: 600, Significance: 8},
		{Wavelength: 30000, Depth: 0.1, Width: 600, Significance: 6},
	}
	attr := []*synth.Attribution{
		{Absorbed: 55.5, Elements: []synth.ElementShare{{Z: 38, Symbol: "Sr", Share: 0.75}, {Z: 20, Symbol: "Ca", Share: 0.25}},
			Lines: []synth.LineContribution{}},
		{Absorbed: 12, Elements: []synth.ElementShare{{Z: 60, Symbol: "Nd", Share: 1}}},
		nil,
	}
	data, err := FeaturesCSV(feats, attr)
	if err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(strings.NewReader(string(data))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	want := "minimum_um,depth,width_um,significance,absorbed_A,share_Ca,share_Sr,share_Nd,note,lines"
	if strings.Join(rows[0], ",") != want {
		t.Fatalf("header %q, want %q", rows[0], want)
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	num := func(r int, name string) float64 {
		v, err := strconv.ParseFloat(rows[r][col[name]], 64)
		if err != nil {
			t.Fatalf("row %d %s: %v", r, name, err)
		}
		return v
	}
	if len(rows) != 4 {
		t.Fatalf("%d rows", len(rows))
	}
	if num(1, "share_Sr") != 0.75 || num(1, "share_Ca") != 0.25 || num(1, "share_Nd") != 0 || num(1, "minimum_um") != 0.7842 {
		t.Errorf("row 1: %q", rows[1])
	}
	if num(2, "share_Nd") != 1 || num(2, "share_Sr") != 0 || num(2, "absorbed_A") != 12 {
		t.Errorf("row 2: %q", rows[2])
	}
	if rows[3][col["share_Sr"]] != "" || rows[3][col["note"]] != "outside the model" || rows[3][col["absorbed_A"]] != "" {
		t.Errorf("row 3: %q", rows[3])
	}
	if _, err := FeaturesCSV(feats, attr[:2]); err == nil {
		t.Error("2 attributions for 3 features accepted")
	}
}
